/**
 * The counts that keep a large job fast (migration 20261202010100, server/services/statCache.ts):
 *
 * 1. finding_tallies always equal a plain count(*) of the findings, after every kind of change
 *    (insert, status moves both ways, reassignment, level move, severity, void, delete).
 * 2. The cached figures (board, scorecards, recurring, trend, readiness whole and for a level and a
 *    system, the building view's systems) equal the same figures computed afresh with the cache
 *    bypassed, after each change, for the GC and for two subcontractors; and the cache is really
 *    used (a fix leaves the recurring list's cached object in place, a due date readiness's).
 *
 * The figures' own definitions are checked against independently computed numbers in
 * tests/server/routes/board.test.ts; this file checks that caching never serves an old figure.
 * The job is a small copy of the benchmark's generated job (scripts/lib/benchSeed.ts).
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { loadBoard, loadFloorSystems, loadReadiness, loadRecurring, loadScorecards, loadTrend } from '../../../server/services/board';
import { Job, System } from '../../../server/models';
import { systemDetail } from '../../../server/services/refrigerantChecks';
import type { FindingScope } from '../../../server/services/findingQueries';
import { listFindings } from '../../../server/services/findingQueries';
import { recordFindingEvent } from '../../../server/services/findings';
import { withoutStatCache } from '../../../server/services/statCache';
import { seedBenchJob, type BenchJob } from '../../../scripts/lib/benchSeed';
import { connectTestDb } from '../../support/db';
import { waitFor } from '../../support/wait';

jest.setTimeout(300_000);

let db: Database;
let bench: BenchJob;
let gcScope: FindingScope;
let subScope: FindingScope;
let otherSubScope: FindingScope;
let actorId: string;
let gcId: string;

const q = <T extends object>(sql: string, bind: unknown[] = []) => db.sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT });

beforeAll(async () => {
  db = await connectTestDb();
  bench = await seedBenchJob(db, { findings: 1500, levels: 4, unitsPerLevel: 15, spacesPerLevel: 3, systemsPerLevel: 1, companies: 4 });
  const [company, second] = await q<{ company_id: string }>(
    `SELECT company_id FROM findings WHERE job_id = $1 GROUP BY company_id ORDER BY count(*) DESC, company_id LIMIT 2`,
    [bench.jobId],
  );
  gcScope = { jobId: bench.jobId, timeZone: bench.timeZone, companyId: null };
  subScope = { ...gcScope, companyId: company!.company_id };
  otherSubScope = { ...gcScope, companyId: second!.company_id };
  actorId = bench.users.find((u) => u.role === 'inspector')!.id;
  gcId = bench.users.find((u) => u.role === 'gc_manager')!.id;
});
afterAll(async () => {
  await db.close();
});

async function expectTalliesExact() {
  const tallies = await q<{ k: string; n: string }>(
    `SELECT concat_ws('|', level_id, company_id, status, severity) AS k, n FROM finding_tallies WHERE job_id = $1 AND n <> 0 ORDER BY 1`,
    [bench.jobId],
  );
  const counted = await q<{ k: string; n: string }>(
    `SELECT concat_ws('|', level_id, company_id, status, severity) AS k, count(*) AS n FROM findings WHERE job_id = $1 GROUP BY 1 ORDER BY 1`,
    [bench.jobId],
  );
  expect(tallies.map((r) => [r.k, Number(r.n)])).toEqual(counted.map((r) => [r.k, Number(r.n)]));
}

/** Every cached figure, for the GC and a subcontractor, next to the same figure computed afresh. */
async function expectCacheExact() {
  const figures = async () => {
    const out: Record<string, unknown> = {};
    for (const [who, scope] of [['gc', gcScope], ['sub', subScope]] as const) {
      out[`${who} board`] = await loadBoard(db.sequelize, scope);
      out[`${who} scorecards`] = await loadScorecards(db.sequelize, scope);
      out[`${who} recurring`] = await loadRecurring(db.sequelize, scope);
      out[`${who} trend`] = await loadTrend(db.sequelize, scope, { days: 30 });
      out[`${who} list`] = (await listFindings(db.sequelize, scope, {}, '-number', { limit: 5, after: null, cursorAfter: () => 'next' })).counts;
    }
    // Readiness is cached whole per company scope and cut per level / system: next to the answer
    // computed afresh with the filter applied in SQL.
    const [level] = await q<{ id: string }>(`SELECT id FROM levels WHERE job_id = $1 ORDER BY position DESC LIMIT 1`, [bench.jobId]);
    const [system] = await q<{ id: string; level_id: string }>(
      `SELECT s.id, min(u.level_id::text) AS level_id FROM systems s JOIN units u ON u.system_id = s.id WHERE s.job_id = $1 GROUP BY s.id ORDER BY s.name LIMIT 1`,
      [bench.jobId],
    );
    for (const [who, scope] of [['gc', gcScope], ['sub', subScope], ['other sub', otherSubScope]] as const) {
      out[`${who} readiness`] = await loadReadiness(db.sequelize, scope);
      out[`${who} readiness, level`] = await loadReadiness(db.sequelize, scope, { levelId: level!.id });
      out[`${who} readiness, system`] = await loadReadiness(db.sequelize, scope, { systemId: system!.id });
      out[`${who} readiness, level and system`] = await loadReadiness(db.sequelize, scope, { levelId: system!.level_id, systemId: system!.id });
      out[`${who} floor systems`] = await loadFloorSystems(db.sequelize, scope);
    }
    return out;
  };
  const cached = await figures();
  const fresh = await withoutStatCache(figures);
  expect(cached).toEqual(fresh);
}

async function oneFinding(where: string): Promise<{ id: string; status: string; company_id: string; level_id: string }> {
  const [row] = await q<{ id: string; status: string; company_id: string; level_id: string }>(
    `SELECT id, status, company_id, level_id FROM findings WHERE job_id = $1 AND ${where} ORDER BY number LIMIT 1`,
    [bench.jobId],
  );
  if (!row) throw new Error(`no finding where ${where}`);
  return row;
}

async function event(findingId: string, kind: string, from: Record<string, unknown> | null, to: Record<string, unknown> | null, at?: Date) {
  await db.sequelize.transaction((transaction) =>
    recordFindingEvent({ findingId, jobId: bench.jobId, actorId, kind: kind as never, from, to, reason: 'stat cache test', at }, transaction),
  );
}

describe('tallies and the stat cache', () => {
  it('start: tallies match the findings; cached figures match fresh ones', async () => {
    await expectTalliesExact();
    await expectCacheExact();
    await expectCacheExact(); // now from the cache
  });

  it('a fix (open -> fix_submitted) changes the live counts and leaves the recurring list cached', async () => {
    const recurringBefore = await loadRecurring(db.sequelize, gcScope);
    const f = await oneFinding(`status = 'open'`);
    await db.sequelize.query(`UPDATE findings SET status = 'fix_submitted' WHERE id = $1`, { bind: [f.id] });
    await event(f.id, 'fix_submitted', { status: 'open' }, { status: 'fix_submitted' });
    expect(await loadRecurring(db.sequelize, gcScope)).toBe(recurringBefore);
    await expectTalliesExact();
    await expectCacheExact();
  });

  it('re-inspections: accepted (closed) and returned (open again)', async () => {
    const a = await oneFinding(`status = 'fix_submitted'`);
    await db.sequelize.query(`UPDATE findings SET status = 'closed' WHERE id = $1`, { bind: [a.id] });
    await event(a.id, 'accepted', { status: 'fix_submitted' }, { status: 'closed' });
    const r = await oneFinding(`status = 'fix_submitted'`);
    await db.sequelize.query(`UPDATE findings SET status = 'open', return_count = return_count + 1 WHERE id = $1`, { bind: [r.id] });
    await event(r.id, 'returned', { status: 'fix_submitted' }, { status: 'open' });
    await expectTalliesExact();
    await expectCacheExact();
  });

  it('a reassignment to the subcontractor, a level move and a severity change', async () => {
    const f = await oneFinding(`status = 'open' AND company_id <> '${subScope.companyId}'`);
    await db.sequelize.query(`UPDATE findings SET company_id = $2 WHERE id = $1`, { bind: [f.id, subScope.companyId] });
    await event(f.id, 'reassigned', { companyId: f.company_id }, { companyId: subScope.companyId });
    const g = await oneFinding(`status = 'fix_submitted' AND unit_id IS NULL AND space_id IS NULL`).catch(() => null);
    if (g) {
      const [other] = await q<{ id: string }>(`SELECT id FROM levels WHERE job_id = $1 AND id <> $2 LIMIT 1`, [bench.jobId, g.level_id]);
      await db.sequelize.query(`UPDATE findings SET level_id = $2 WHERE id = $1`, { bind: [g.id, other!.id] });
    }
    const h = await oneFinding(`status = 'open' AND severity <> 'critical'`);
    await db.sequelize.query(`UPDATE findings SET severity = 'critical' WHERE id = $1`, { bind: [h.id] });
    await expectTalliesExact();
    await expectCacheExact();
  });

  it('a void, a new finding, a due date moved into the past, and a back-dated event', async () => {
    const v = await oneFinding(`status = 'open'`);
    await db.sequelize.query(`UPDATE findings SET status = 'voided', voided_reason = 'duplicate' WHERE id = $1`, { bind: [v.id] });
    await event(v.id, 'voided', { status: 'open' }, { status: 'voided' });
    // A copy of an open finding with the next number, as logging one would make.
    const src = await oneFinding(`status = 'open' AND unit_id IS NOT NULL`);
    const [made] = await q<{ id: string }>(
      `INSERT INTO findings (id, job_id, number, level_id, space_id, unit_id, catalogue_item_id, severity, status, company_id, due_on, note,
                             logged_by, logged_at, return_count, version, created_at, updated_at)
       SELECT gen_random_uuid(), job_id, (SELECT max(number) + 1 FROM findings WHERE job_id = $2), level_id, space_id, unit_id, catalogue_item_id,
              severity, 'open', company_id, due_on, 'copy', logged_by, now(), 0, 1, now(), now()
         FROM findings WHERE id = $1
       RETURNING id`,
      [src.id, bench.jobId],
    );
    await event(made!.id, 'logged', null, { status: 'open' });
    const d = await oneFinding(`status = 'open' AND due_on >= current_date`).catch(() => null);
    if (d) await db.sequelize.query(`UPDATE findings SET due_on = current_date - 3 WHERE id = $1`, { bind: [d.id] });
    const old = await oneFinding(`status = 'fix_submitted'`);
    await db.sequelize.query(`UPDATE findings SET status = 'closed' WHERE id = $1`, { bind: [old.id] });
    await event(old.id, 'accepted', { status: 'fix_submitted' }, { status: 'closed' }, new Date(Date.now() - 3 * 24 * 3600 * 1000));
    await expectTalliesExact();
    await expectCacheExact();
  });

  it('structure: a catalogue flag, a company name, the recurring thresholds, a level name and a unit check', async () => {
    await db.sequelize.query(`UPDATE catalogue_items SET needs_ceiling_access = NOT needs_ceiling_access WHERE id = (
      SELECT catalogue_item_id FROM findings WHERE job_id = $1 AND status = 'open' GROUP BY 1 ORDER BY count(*) DESC LIMIT 1)`, { bind: [bench.jobId] });
    await db.sequelize.query(`UPDATE companies SET name = name || ' (renamed)' WHERE id = $1`, { bind: [subScope.companyId] });
    await db.sequelize.query(`UPDATE jobs SET recurring_thresholds = '{"minUnits": 2, "minShare": 0.01}' WHERE id = $1`, { bind: [bench.jobId] });
    await db.sequelize.query(`UPDATE levels SET name = name || ' (renamed)' WHERE id = (SELECT id FROM levels WHERE job_id = $1 ORDER BY position LIMIT 1)`, {
      bind: [bench.jobId],
    });
    await db.sequelize.query(
      `INSERT INTO unit_checks (id, job_id, unit_id, walk_id, checked_by, checked_at, complete, created_at, updated_at)
       SELECT gen_random_uuid(), job_id, unit_id, walk_id, checked_by, now(), NOT complete, now(), now()
         FROM unit_checks WHERE job_id = $1 ORDER BY checked_at DESC LIMIT 1`,
      { bind: [bench.jobId] },
    );
    await expectTalliesExact();
    await expectCacheExact();
  });

  it('crews: a crew named, units given that crew, then the crew renamed (recurring by crew follows each)', async () => {
    const [crew] = await q<{ id: string }>(
      `INSERT INTO crews (id, job_id, company_id, name, version, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, 'Stat crew', 1, now(), now()) RETURNING id`,
      [bench.jobId, subScope.companyId],
    );
    await expectCacheExact();
    await db.sequelize.query(
      `UPDATE units SET installed_by_crew_id = $3 WHERE id IN (
         SELECT unit_id FROM findings WHERE job_id = $1 AND company_id = $2 AND unit_id IS NOT NULL AND status <> 'voided' ORDER BY number LIMIT 20)`,
      { bind: [bench.jobId, subScope.companyId, crew!.id] },
    );
    await expectCacheExact();
    // Only the crews table changes here: its own trigger must raise the cached figures' version.
    await db.sequelize.query(`UPDATE crews SET name = 'Stat crew (renamed)' WHERE id = $1`, { bind: [crew!.id] });
    await expectCacheExact();
    const recurring = await loadRecurring(db.sequelize, gcScope);
    expect(recurring.items.some((i) => i.byCrew.some((c) => c.name === 'Stat crew (renamed)'))).toBe(true);
  });

  it('readiness: a blocker renamed and moved to another unit; a due date leaves the cached answer in place', async () => {
    const before = await loadReadiness(db.sequelize, subScope);
    const d = await oneFinding(`company_id = '${subScope.companyId}' AND status = 'open'`);
    await db.sequelize.query(`UPDATE findings SET due_on = due_on + 1 WHERE id = $1`, { bind: [d.id] });
    expect(await loadReadiness(db.sequelize, subScope)).toBe(before);
    // The title and the unit show on a blocker but are neither "unresolved" nor (the title) "shape".
    const t = await oneFinding(`company_id = '${subScope.companyId}' AND status IN ('open', 'fix_submitted') AND severity IN ('critical', 'major') AND unit_id IS NOT NULL`);
    await db.sequelize.query(`UPDATE findings SET title = 'Blocker renamed for the cache test' WHERE id = $1`, { bind: [t.id] });
    await expectCacheExact();
    const m = await oneFinding(`status IN ('open', 'fix_submitted') AND severity IN ('critical', 'major') AND unit_id IS NOT NULL AND id <> '${t.id}'`);
    await db.sequelize.query(
      `UPDATE findings SET unit_id = (SELECT u.id FROM units u WHERE u.level_id = $2 AND u.id <> (SELECT unit_id FROM findings WHERE id = $1) ORDER BY u.tag DESC LIMIT 1) WHERE id = $1`,
      { bind: [m.id, m.level_id] },
    );
    await expectCacheExact();
  });

  it('readiness: test records added, witnessed and superseded; a system given to a company', async () => {
    const systems = await q<{ id: string; level_ids: string[] }>(
      `SELECT s.id, array_agg(DISTINCT u.level_id) AS level_ids FROM systems s JOIN units u ON u.system_id = s.id WHERE s.job_id = $1 GROUP BY s.id ORDER BY s.name`,
      [bench.jobId],
    );
    const [a, b] = systems;
    const record = async (kind: string, systemId: string | null, unitId: string | null, result: string, figures: object = {}, supersedesId: string | null = null) => {
      const [row] = await q<{ id: string }>(
        `INSERT INTO test_records (id, job_id, kind, system_id, unit_id, recorded_by, recorded_at, result, data, figures, supersedes_id, created_at, updated_at)
         VALUES (gen_random_uuid(), $1, $2, $3, $4, $5, now(), $6, '{}'::jsonb, $7::jsonb, $8, now(), now()) RETURNING id`,
        [bench.jobId, kind, systemId, unitId, actorId, result, JSON.stringify(figures), supersedesId],
      );
      return row!.id;
    };
    const pressure = await record('pressure', a!.id, null, 'passed');
    await expectCacheExact();
    await db.sequelize.query(`UPDATE test_records SET witnessed_by = $2, witnessed_at = now() WHERE id = $1`, { bind: [pressure, gcId] });
    await expectCacheExact();
    const failed = await record('evacuation', a!.id, null, 'failed');
    await expectCacheExact();
    await record('evacuation', a!.id, null, 'passed', {}, failed);
    await record('charge', a!.id, null, 'recorded', { weighedInKg: 4.5 });
    await record('pressure', b!.id, null, 'passed');
    const [concealed] = await q<{ id: string }>(
      `SELECT id FROM units WHERE job_id = $1 AND kind IN ('ducted_low', 'ducted_high', 'ahu_coil_kit') ORDER BY tag LIMIT 1`,
      [bench.jobId],
    );
    await record('drain', null, concealed!.id, 'passed');
    await expectCacheExact();
    // Which company answers for a system's records decides what a subcontractor sees.
    await db.sequelize.query(`UPDATE systems SET company_id = $2 WHERE id = $1`, { bind: [a!.id, subScope.companyId] });
    await expectCacheExact();
  });

  it('readiness: a unit added, a ceiling exclusion, the excluder renamed, the job settings changed', async () => {
    await db.sequelize.query(
      `INSERT INTO units (id, job_id, tag, kind, capacity, level_id, space_id, system_id, version, created_at, updated_at)
       SELECT gen_random_uuid(), job_id, tag || '-NEW', kind, capacity, level_id, space_id, system_id, 1, now(), now()
         FROM units WHERE job_id = $1 ORDER BY tag LIMIT 1`,
      { bind: [bench.jobId] },
    );
    await expectCacheExact();
    // An unchecked unit in the ceiling (no complete latest check), excluded by a GC manager.
    await db.sequelize.query(
      `UPDATE units SET ceiling_excluded_reason = 'Above a fixed ceiling', ceiling_excluded_by = $2, ceiling_excluded_at = now(), version = version + 1
        WHERE id = (SELECT u.id FROM units u
                     WHERE u.job_id = $1 AND u.kind IN ('cassette_4way', 'cassette_2way', 'cassette_compact', 'ducted_low', 'ducted_high')
                       AND NOT coalesce((SELECT uc.complete FROM unit_checks uc WHERE uc.unit_id = u.id ORDER BY uc.checked_at DESC, uc.id DESC LIMIT 1), false)
                     ORDER BY u.tag LIMIT 1)`,
      { bind: [bench.jobId, gcId] },
    );
    await expectCacheExact();
    const excluded = (await loadReadiness(db.sequelize, gcScope))!.levels.flatMap((l) => l.excludedCeilingUnits);
    expect(excluded.length).toBeGreaterThan(0);
    // Only the users table changes here: the person's name shows on the exclusion.
    await db.sequelize.query(`UPDATE users SET name = name || ' (renamed)' WHERE id = $1`, { bind: [gcId] });
    await expectCacheExact();
    const renamed = (await loadReadiness(db.sequelize, gcScope))!.levels.flatMap((l) => l.excludedCeilingUnits);
    expect(renamed.every((u) => u.by.name.endsWith(' (renamed)'))).toBe(true);
    await db.sequelize.query(`UPDATE jobs SET test_settings = '{}'::jsonb, version = version + 1 WHERE id = $1`, { bind: [bench.jobId] });
    await expectCacheExact();
  });

  it('readiness: each company scope gets its own answer (a subcontractor never gets the GC answer or another company\'s)', async () => {
    const gc = (await loadReadiness(db.sequelize, gcScope))!;
    const sub = (await loadReadiness(db.sequelize, subScope))!;
    const other = (await loadReadiness(db.sequelize, otherSubScope))!;
    expect([gc.companyScope, sub.companyScope, other.companyScope]).toEqual([null, subScope.companyId, otherSubScope.companyId]);
    const blockerCompanies = async (r: typeof gc) => {
      const ids = [...r.systems.flatMap((x) => x.units), ...r.unitsWithoutSystem].flatMap((u) => u.blockers.map((b) => b.findingId));
      ids.push(...r.levels.flatMap((l) => l.blockers.map((b) => b.findingId)));
      const rows = await q<{ company_id: string }>(`SELECT DISTINCT company_id FROM findings WHERE id = ANY ($1::uuid[])`, [ids]);
      return rows.map((x) => x.company_id).sort();
    };
    expect((await blockerCompanies(gc)).length).toBeGreaterThan(1);
    expect(await blockerCompanies(sub)).toEqual([subScope.companyId]);
    expect(await blockerCompanies(other)).toEqual([otherSubScope.companyId]);
    // Served again from the cache, each scope its own.
    expect(await loadReadiness(db.sequelize, subScope)).toBe(sub);
    expect(await loadReadiness(db.sequelize, gcScope)).toBe(gc);
    expect(sub).not.toEqual(gc);
    expect(sub).not.toEqual(other);
  });

  it("the building view's refrigerant verdicts are each system page's own (linked spaces, an R-32 system, a charge record)", async () => {
    const [pair] = await q<{ a: string; b: string }>(
      `SELECT min(u.space_id::text) AS a, max(s2.id::text) AS b FROM units u JOIN spaces s2 ON s2.level_id = u.level_id AND s2.id <> u.space_id
        WHERE u.job_id = $1 AND u.system_id IS NOT NULL GROUP BY u.level_id ORDER BY u.level_id LIMIT 1`,
      [bench.jobId],
    );
    await db.sequelize.query(
      `INSERT INTO space_links (id, job_id, space_a_id, space_b_id, created_at, updated_at) VALUES (gen_random_uuid(), $1, least($2::uuid, $3::uuid), greatest($2::uuid, $3::uuid), now(), now())`,
      { bind: [bench.jobId, pair!.a, pair!.b] },
    );
    await db.sequelize.query(
      `UPDATE systems SET refrigerant = 'R-32', factory_charge = 3, field_charge = 0.5
        WHERE id = (SELECT id FROM systems WHERE job_id = $1 ORDER BY name DESC LIMIT 1)`,
      { bind: [bench.jobId] },
    );
    // Rooms 2.7 m high; a heavy charge on the first systems (over), none on the others (within),
    // and a room without a floor area (not judged).
    await db.sequelize.query(`UPDATE spaces SET ceiling_height = 2700 WHERE job_id = $1`, { bind: [bench.jobId] });
    await db.sequelize.query(`UPDATE systems SET factory_charge = 200, field_charge = 5 WHERE job_id = $1 AND refrigerant <> 'R-32' AND name < 'VRF-02'`, {
      bind: [bench.jobId],
    });
    await db.sequelize.query(
      `UPDATE spaces SET floor_area = NULL WHERE id = (SELECT u.space_id FROM units u JOIN systems s ON s.id = u.system_id
        WHERE u.job_id = $1 AND s.name >= 'VRF-03' AND s.refrigerant <> 'R-32' ORDER BY s.name, u.tag LIMIT 1)`,
      { bind: [bench.jobId] },
    );
    const job = (await Job.findByPk(bench.jobId))!;
    const systems = await System.findAll({ where: { jobId: bench.jobId }, order: [['name', 'ASC'], ['id', 'ASC']] });
    const verdict = async (s: System) => {
      const d = await systemDetail(job, s);
      const over = d.concentration.pass === false || d.a2lFloorArea.some((x) => x.result.pass === false);
      const within = d.concentration.pass === true && d.a2lFloorArea.every((x) => x.result.pass !== false);
      return over ? 'over_limit' : within ? 'within_limit' : 'not_judged';
    };
    const expected = [];
    for (const s of systems) expected.push([s.id, await verdict(s)]);
    const floor = await loadFloorSystems(db.sequelize, gcScope);
    expect(floor.systems.map((s) => [s.systemId, s.refrigerant])).toEqual(expected);
    expect(new Set(expected.map((e) => e[1]))).toEqual(new Set(['over_limit', 'within_limit', 'not_judged']));
    await expectCacheExact();
  });

  it('a reassignment (event, then finding) and a re-inspection (finding, then event) at the same moment do not deadlock', async () => {
    // The two write paths touch the versions in opposite orders. Raised mid-transaction, each
    // would hold a version row the other waits for (PostgreSQL would abort one as a deadlock);
    // raised at commit in one order (migration 20261202010300), both commit.
    const a = await oneFinding(`status = 'open' AND company_id <> '${subScope.companyId}'`);
    const b = await oneFinding(`status = 'fix_submitted'`);
    const ta = await db.sequelize.transaction();
    const tb = await db.sequelize.transaction();
    try {
      await recordFindingEvent(
        { findingId: a.id, jobId: bench.jobId, actorId, kind: 'reassigned', from: { companyId: a.company_id }, to: { companyId: subScope.companyId }, reason: 'stat cache test' },
        ta,
      );
      await db.sequelize.query(`UPDATE findings SET status = 'closed' WHERE id = $1`, { bind: [b.id], transaction: tb });
      const [{ pid: pidA }] = await db.sequelize.query<{ pid: number }>(`SELECT pg_backend_pid() AS pid`, { type: QueryTypes.SELECT, transaction: ta });
      let moved = false;
      const moveA = db.sequelize
        .query(`UPDATE findings SET company_id = $2 WHERE id = $1`, { bind: [a.id, subScope.companyId], transaction: ta })
        .finally(() => (moved = true));
      // B's event goes in only once A's move has run, or is stuck waiting on a lock B holds (the
      // order that deadlocked when versions were raised mid-transaction).
      await waitFor(
        async () =>
          moved ||
          (
            await db.sequelize.query<{ waiting: boolean }>(`SELECT wait_event_type = 'Lock' AS waiting FROM pg_stat_activity WHERE pid = $1`, {
              bind: [pidA],
              type: QueryTypes.SELECT,
            })
          )[0]?.waiting,
        { what: "A's move to run or wait on B's lock" },
      );
      await recordFindingEvent(
        { findingId: b.id, jobId: bench.jobId, actorId, kind: 'accepted', from: { status: 'fix_submitted' }, to: { status: 'closed' }, reason: 'stat cache test' },
        tb,
      );
      await tb.commit();
      await moveA;
      await ta.commit();
    } catch (err) {
      await ta.rollback().catch(() => undefined);
      await tb.rollback().catch(() => undefined);
      throw err;
    }
    await expectTalliesExact();
    await expectCacheExact();
  });

  it('deleting findings (with their job) leaves no tally or version rows behind', async () => {
    const f = await oneFinding(`true`);
    await db.sequelize.query(`DELETE FROM findings WHERE id = $1`, { bind: [f.id] }).catch(() => undefined); // events may refuse it
    await expectTalliesExact();
    await db.sequelize.query(`DELETE FROM jobs WHERE id = $1`, { bind: [bench.jobId] });
    const [left] = await q<{ t: string; v: string }>(
      `SELECT (SELECT count(*) FROM finding_tallies WHERE job_id = $1) AS t, (SELECT count(*) FROM job_stat_versions WHERE job_id = $1) AS v`,
      [bench.jobId],
    );
    expect({ t: Number(left!.t), v: Number(left!.v) }).toEqual({ t: 0, v: 0 });
  });
});
