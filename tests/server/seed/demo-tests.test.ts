/**
 * Demo seed: the demo job holds test records in every state the readiness screen shows (passed and
 * witnessed, failed then re-tested, awaiting a witness, a witnessed record corrected by a newer one,
 * and missing), with figures computed by the record's own calculation, once.
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { Job, TestRecord } from '../../../server/models';
import { seedDemo } from '../../../server/seed/demo';
import { loadReadiness } from '../../../server/services/board';
import { connectTestDb } from '../../support/db';

jest.setTimeout(120_000);

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

describe('demo seed: test records', () => {
  it('seeds records in every state, once, and readiness shows them', async () => {
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const records = await TestRecord.findAll({ where: { jobId: job.id }, order: [['recordedAt', 'ASC']] });
    const superseded = new Set(records.map((r) => r.supersedesId).filter(Boolean));
    expect(new Set(records.map((r) => r.kind))).toEqual(new Set(['pressure', 'evacuation', 'charge', 'drain', 'startup']));
    // Passed and witnessed; passed and awaiting a witness; corrected by a newer record.
    expect(records.some((r) => r.result === 'passed' && r.witnessedAt !== null)).toBe(true);
    expect(records.some((r) => r.result === 'passed' && r.witnessedAt === null && r.kind === 'pressure')).toBe(true);
    expect(records.some((r) => superseded.has(r.id) && r.witnessedAt !== null)).toBe(true);
    // Failed, then re-tested and passed (same kind and system or unit, later).
    const retested = records.filter(
      (r) => r.result === 'failed' && records.some((n) => n.kind === r.kind && n.systemId === r.systemId && n.unitId === r.unitId && n.result === 'passed' && n.recordedAt > r.recordedAt),
    );
    expect(new Set(retested.map((r) => r.kind))).toEqual(new Set(['pressure', 'evacuation', 'drain']));
    // Figures are the calculation's: the failed pressure test lost more than the gauge's 1 psi after correction.
    const failedPressure = retested.find((r) => r.kind === 'pressure')!;
    expect((failedPressure.figures as { correctedChange: { value: number } }).correctedChange.value).toBeLessThan(-1);
    // Missing: systems with no pressure test at all.
    const [{ n }] = await db.sequelize.query<{ n: string }>(
      `SELECT count(*) AS n FROM systems s WHERE s.job_id = $1 AND NOT EXISTS (SELECT 1 FROM test_records r WHERE r.system_id = s.id AND r.kind = 'pressure')`,
      { bind: [job.id], type: QueryTypes.SELECT },
    ) as [{ n: string }];
    expect(Number(n)).toBeGreaterThan(0);

    const readiness = (await loadReadiness(db.sequelize, { jobId: job.id, timeZone: job.timeZone, companyId: null }))!;
    const states = new Set(readiness.levels.flatMap((l) => l.testBlockers.map((b) => `${b.kind}:${b.state}`)));
    for (const s of ['pressure:missing', 'pressure:awaiting_witness', 'drain:missing']) expect(states.has(s)).toBe(true);
    expect(readiness.systems.some((s) => s.startupBlockers.length === 0)).toBe(true);

    // Once: a second run adds nothing.
    await seedDemo(db);
    expect(await TestRecord.count({ where: { jobId: job.id } })).toBe(records.length);
  });
});
