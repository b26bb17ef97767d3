/**
 * Readiness that waits for test records (docs/api-test-records.md "Readiness"):
 * - a level's ceilings close only when, besides today's rule (shared/rules/ceilings.ts), every system
 *   with a unit on the level has a passed AND witnessed pressure test covering that level (a test of
 *   the whole system, or of a part naming the level), and every concealed unit on the level (ducted
 *   kinds, coil kit) not excluded from the ceiling rule has a passed drain test;
 * - a system is ready for start-up when its units are ready (today's rule), a passed pressure test
 *   covers every level it has units on, its evacuation passed and its charge is recorded;
 * - a system is accepted when it is ready for start-up, its start-up record passed, and every unit on
 *   it has a passed drain test (a pumped unit's test needs power, so it waits for acceptance, not start-up).
 * The record that counts is the latest one not superseded (a re-test or a correction replaces it).
 * A subcontractor sees only what their company answers for (services/testScope.ts): blockers of
 * other companies' systems are left out, as findings of other companies are.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { LevelReadiness, SystemReadiness } from '../../../shared/schemas/board';
import { CONCEALED_UNIT_KINDS, type LevelTestReadiness, type SystemTestReadiness, type TestBlocker, type TestRecordKind } from '../../../shared/schemas/testRecords';
import type { FindingScope } from '../findingQueries';
import { responsibleSql } from '../testScope';

interface UnitRow {
  id: string;
  tag: string;
  kind: string;
  level_id: string;
  system_id: string | null;
  system_name: string | null;
  visible: boolean;
  excluded: boolean;
}
interface RecordRow {
  id: string;
  kind: TestRecordKind;
  system_id: string | null;
  unit_id: string | null;
  level_ids: string[] | null;
  result: 'passed' | 'failed' | 'recorded';
  witnessed: boolean;
}

const CONCEALED = new Set<string>(CONCEALED_UNIT_KINDS);

export interface TestFacts {
  units: UnitRow[];
  /** Current records, latest first. */
  records: RecordRow[];
}

export async function loadTestFacts(sequelize: Sequelize, scope: FindingScope): Promise<TestFacts> {
  const bind: unknown[] = [scope.jobId];
  const visible = scope.companyId ? responsibleSql('s', `$${bind.push(scope.companyId)}`) : 'true';
  const [units, records] = await Promise.all([
    sequelize.query<UnitRow>(
      `SELECT u.id, u.tag, u.kind, u.level_id, u.system_id, s.name AS system_name, ${visible} AS visible,
              (u.ceiling_excluded_reason IS NOT NULL) AS excluded
         FROM units u LEFT JOIN systems s ON s.id = u.system_id
        WHERE u.job_id = $1 ORDER BY u.tag, u.id`,
      { bind, type: QueryTypes.SELECT },
    ),
    sequelize.query<RecordRow>(
      `SELECT r.id, r.kind, r.system_id, r.unit_id, r.level_ids, r.result, (r.witnessed_at IS NOT NULL) AS witnessed
         FROM test_records r
        WHERE r.job_id = $1 AND NOT EXISTS (SELECT 1 FROM test_records nx WHERE nx.supersedes_id = r.id)
        ORDER BY r.recorded_at DESC, r.created_at DESC, r.id DESC`,
      { bind: [scope.jobId], type: QueryTypes.SELECT },
    ),
  ]);
  return { units, records };
}

function blocker(kind: TestRecordKind, state: TestBlocker['state'], at: { systemId?: string | null; systemName?: string | null; unit?: UnitRow; levelId?: string | null }, recordId: string | null): TestBlocker {
  return {
    kind,
    state,
    systemId: at.systemId ?? at.unit?.system_id ?? null,
    systemName: at.systemName ?? at.unit?.system_name ?? null,
    unitId: at.unit?.id ?? null,
    unitTag: at.unit?.tag ?? null,
    levelId: at.levelId ?? null,
    recordId,
  };
}

/** The latest current record of a kind for a system (optionally covering a level) or a unit. */
function latest(facts: TestFacts, kind: TestRecordKind, where: { systemId?: string; unitId?: string; levelId?: string }): RecordRow | undefined {
  return facts.records.find(
    (r) =>
      r.kind === kind &&
      (where.systemId === undefined || r.system_id === where.systemId) &&
      (where.unitId === undefined || r.unit_id === where.unitId) &&
      (where.levelId === undefined || r.level_ids === null || r.level_ids.includes(where.levelId)),
  );
}

/** The blocker for a rule "the latest record passed (and was witnessed)", or null when it holds. */
function judge(record: RecordRow | undefined, kind: TestRecordKind, at: Parameters<typeof blocker>[2], needsWitness: boolean, passes = (r: RecordRow) => r.result === 'passed'): TestBlocker | null {
  if (!record) return blocker(kind, 'missing', at, null);
  if (!passes(record)) return blocker(kind, 'failed', at, record.id);
  if (needsWitness && !record.witnessed) return blocker(kind, 'awaiting_witness', at, record.id);
  return null;
}

export function levelTests(facts: TestFacts, levelId: string): LevelTestReadiness {
  const units = facts.units.filter((u) => u.level_id === levelId && u.visible);
  const blockers: TestBlocker[] = [];
  const systems = new Map<string, string>();
  for (const u of units) if (u.system_id) systems.set(u.system_id, u.system_name ?? '');
  for (const [systemId, systemName] of [...systems].sort((a, b) => a[1].localeCompare(b[1]) || a[0].localeCompare(b[0]))) {
    const b = judge(latest(facts, 'pressure', { systemId, levelId }), 'pressure', { systemId, systemName, levelId }, true);
    if (b) blockers.push(b);
  }
  // A unit a GC manager excluded from the ceiling rule (with a reason) does not hold the ceiling back for its drain either.
  for (const u of units.filter((x) => CONCEALED.has(x.kind) && !x.excluded)) {
    const b = judge(latest(facts, 'drain', { unitId: u.id }), 'drain', { unit: u }, false);
    if (b) blockers.push(b);
  }
  return { testsReady: blockers.length === 0, testBlockers: blockers };
}

export function systemTests(facts: TestFacts, system: SystemReadiness): SystemTestReadiness {
  const units = facts.units.filter((u) => u.system_id === system.systemId);
  const visible = units.length === 0 || units.some((u) => u.visible);
  if (!visible) return { startupReady: system.ready, startupBlockers: [], accepted: false, acceptanceBlockers: [] };
  const at = { systemId: system.systemId, systemName: system.name };
  const startup: TestBlocker[] = [];
  const levels = [...new Set(units.map((u) => u.level_id))];
  for (const levelId of levels.length ? levels : [undefined]) {
    const b = judge(latest(facts, 'pressure', { systemId: system.systemId, levelId }), 'pressure', { ...at, levelId: levelId ?? null }, false);
    if (b) startup.push(b);
  }
  const evacuation = judge(latest(facts, 'evacuation', { systemId: system.systemId }), 'evacuation', at, false);
  if (evacuation) startup.push(evacuation);
  const charge = judge(latest(facts, 'charge', { systemId: system.systemId }), 'charge', at, false, () => true);
  if (charge) startup.push(charge);
  const startupReady = system.ready && startup.length === 0;
  const acceptance = [...startup];
  const started = judge(latest(facts, 'startup', { systemId: system.systemId }), 'startup', at, false);
  if (started) acceptance.push(started);
  for (const u of units) {
    const b = judge(latest(facts, 'drain', { unitId: u.id }), 'drain', { unit: u }, false);
    if (b) acceptance.push(b);
  }
  return { startupReady, startupBlockers: startup, accepted: startupReady && acceptance.length === 0, acceptanceBlockers: acceptance };
}

/** Adds the test figures to a readiness answer's levels and systems; a level with a test blocker cannot close its ceilings. */
export function withTests(facts: TestFacts, levels: LevelReadiness[], systems: SystemReadiness[]) {
  return {
    levels: levels.map((l) => {
      const t = levelTests(facts, l.levelId);
      const ceilingState = t.testsReady ? l.ceilingState : ('blocked' as const);
      return { ...l, ceilingState, ceilingReady: ceilingState === 'ready', ...t };
    }),
    systems: systems.map((s) => ({ ...s, ...systemTests(facts, s) })),
  };
}
