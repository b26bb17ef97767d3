/**
 * The demo seed's findings: 60 on the demo job in every status, over several levels and the
 * three subcontractor companies, returned ones with a return count of 1–2, some overdue, each
 * history consistent with the finding's status; walks and unit checks; idempotent.
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { Finding, Job } from '../../../server/models';
import { seedDemo } from '../../../server/seed/demo';
import { DEMO_FINDING_COUNT } from '../../../server/seed/demoFindings';
import { todayIn } from '../../../shared/rules/dates';
import { connectTestDb } from '../../support/db';

jest.setTimeout(120_000);

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

describe('demo seed: findings', () => {
  it('seeds findings in every status with their histories, once', async () => {
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const findings = await Finding.findAll({ where: { jobId: job.id }, order: [['number', 'ASC']] });
    const seeded = findings.slice(0, DEMO_FINDING_COUNT);
    expect(seeded).toHaveLength(DEMO_FINDING_COUNT);
    expect(new Set(seeded.map((f) => f.status))).toEqual(new Set(['open', 'fix_submitted', 'closed', 'voided']));
    expect(new Set(seeded.map((f) => f.companyId)).size).toBe(3);
    expect(new Set(seeded.map((f) => f.levelId)).size).toBeGreaterThanOrEqual(3);
    const returnedOpen = seeded.filter((f) => f.status === 'open' && f.returnCount > 0);
    expect(new Set(returnedOpen.map((f) => f.returnCount))).toEqual(new Set([1, 2]));
    const today = todayIn(job.timeZone);
    expect(seeded.filter((f) => f.status === 'open' && f.dueOn < today).length).toBeGreaterThanOrEqual(5);
    expect(seeded.filter((f) => f.status === 'voided').every((f) => Boolean(f.voidedReason))).toBe(true);

    // Each history ends in the finding's status; return counts match the "returned" events.
    const events = await db.sequelize.query<{ finding_id: string; kind: string; to: { status?: string } | null }>(
      `SELECT finding_id, kind, "to" FROM finding_events WHERE job_id = $1 ORDER BY at, id`,
      { bind: [job.id], type: QueryTypes.SELECT },
    );
    for (const f of seeded) {
      const mine = events.filter((e) => e.finding_id === f.id);
      expect(mine[0]!.kind).toBe('logged');
      const last = mine.filter((e) => e.to?.status).at(-1)!;
      expect({ id: f.id, status: last.to!.status }).toEqual({ id: f.id, status: f.status });
      expect(mine.filter((e) => e.kind === 'returned')).toHaveLength(f.returnCount);
      // Each change recorded as an event raised the version once. Placing a pin on the plan also
      // raises it but records no event (server/routes/correction.ts), and other suites sharing this
      // database (the plans browser test) pin demo findings: for a pinned finding, at least that.
      const changes = mine.filter((e) => e.kind !== 'logged' && e.kind !== 'comment').length;
      if (f.pinX === null) expect(f.version).toBe(changes + 1);
      else expect(f.version).toBeGreaterThanOrEqual(changes + 1);
    }
    const [fixes] = await db.sequelize.query<{ n: number }>(`SELECT count(*)::int AS n FROM fixes WHERE job_id = $1`, { bind: [job.id], type: QueryTypes.SELECT });
    expect(fixes!.n).toBe(events.filter((e) => e.kind === 'fix_submitted').length);
    const [walks] = await db.sequelize.query<{ w: number; c: number }>(
      `SELECT (SELECT count(*)::int FROM walks WHERE job_id = $1) AS w, (SELECT count(*)::int FROM unit_checks WHERE job_id = $1) AS c`,
      { bind: [job.id], type: QueryTypes.SELECT },
    );
    expect(walks!.w).toBeGreaterThanOrEqual(3);
    expect(walks!.c).toBeGreaterThanOrEqual(10);

    const again = await seedDemo(db);
    expect(again.created).toBe(false);
    expect(await Finding.count({ where: { jobId: job.id } })).toBe(findings.length);
  });
});
