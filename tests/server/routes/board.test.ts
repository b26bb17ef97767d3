/**
 * The GC's view: GET /board, /readiness, /scorecards, /recurring, /trend.
 *
 * 1. The seeded demo job: every cell of the board, every scorecard value, readiness, the
 *    recurring list and the trend are compared with numbers computed HERE, in plain JS, from rows
 *    read with simple SELECTs (never by calling server/services/board.ts), for the GC manager,
 *    the inspector and a subcontractor (own company only). The board's overdue cells are also
 *    checked against the findings list's own overdue filter.
 * 2. A small hand-built job whose expected numbers are written by hand (median of 2, 5, 9 days
 *    = 5; first pass 2 of 3; a reassignment and a reopened finding; the trend day by day).
 * 3. 401 / 403 / 404 / 400, and another job's ids.
 */
import { createHash } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { CatalogueItem, Finding, Job, UnitCheck } from '../../../server/models';
import { DEMO_ACCOUNTS, DEMO_JOBS, DEMO_PASSWORD, seedDemo } from '../../../server/seed/demo';
import { nextFindingNumber, recordFindingEvent } from '../../../server/services/findings';
import {
  READINESS_LEVEL_BLOCKERS_MAX,
  type BoardCounts,
  type BoardResponse,
  type ReadinessBlocker,
  type ReadinessResponse,
  type RecurringResponse,
  type ScorecardsResponse,
  type TrendResponse,
} from '../../../shared/schemas/board';
import type { ReadinessWithTests } from '../../../shared/schemas/testRecords';
import type { FindingStatus, Severity } from '../../../shared/words';
import { caller, jobPath, type Caller } from '../../support/api';
import { buildTestApp, csrfFor, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import {
  addMember,
  buildJobWithCrew,
  buildLevel,
  buildSystem,
  buildUnit,
  buildUser,
  copyCatalogue,
  linkCompany,
} from '../../support/factories';

jest.setTimeout(300_000);

let db: Database;
let trimout: TrimoutApp;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

const DAY = 24 * 60 * 60 * 1000;

/** YYYY-MM-DD of an instant in a time zone (Intl, independent of the server's helpers). */
function dateIn(timeZone: string, at: Date): string {
  const parts = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).formatToParts(at);
  const get = (t: string) => parts.find((p) => p.type === t)!.value;
  return `${get('year')}-${get('month')}-${get('day')}`;
}
function plusDays(date: string, n: number): string {
  const d = new Date(`${date}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + n);
  return d.toISOString().slice(0, 10);
}
function median(values: number[]): number | null {
  if (values.length === 0) return null;
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}
const byKey = <T>(key: keyof T) => (a: T, b: T) => String(a[key]).localeCompare(String(b[key]));

// ---------------------------------------------------------------------------------------------
// Rows, read with plain SELECTs
// ---------------------------------------------------------------------------------------------

interface Rows {
  timeZone: string;
  thresholds: { minUnits?: number; minShare?: number };
  findings: {
    id: string;
    number: number;
    level_id: string;
    unit_id: string | null;
    catalogue_item_id: string;
    severity: Severity;
    status: FindingStatus;
    company_id: string;
    due_on: string;
    logged_at: Date;
    /** A "Something else" finding's own title (null: the defect type's). */
    title: string | null;
  }[];
  levels: { id: string; name: string; position: number }[];
  units: {
    id: string;
    tag: string;
    kind: string;
    level_id: string;
    system_id: string | null;
    version: number;
    ceiling_excluded_reason: string | null;
    ceiling_excluded_at: Date | null;
    excluded_by: { id: string; name: string } | null;
    installed_by_crew_id: string | null;
  }[];
  crews: { id: string; company_id: string; name: string }[];
  systems: { id: string; name: string; company_id: string | null }[];
  /** Test records (pressure tests and drain tests decide whether a level's ceilings can close). */
  tests: { id: string; kind: string; system_id: string | null; unit_id: string | null; level_ids: string[] | null; result: string; witnessed: boolean; superseded: boolean; recorded_at: Date; created_at: Date }[];
  checks: { id: string; unit_id: string; checked_at: Date; complete: boolean }[];
  items: { id: string; code: string; title: string; unit_kinds: string[]; needs_ceiling_access: boolean }[];
  events: { id: string; finding_id: string; kind: string; at: Date; from: Record<string, unknown> | null; to: Record<string, unknown> | null }[];
  companies: { id: string; name: string; trades: string[] }[];
}

async function readRows(jobId: string): Promise<Rows> {
  const q = <T extends object>(sql: string) => db.sequelize.query<T>(sql, { bind: [jobId], type: QueryTypes.SELECT });
  const [job] = await q<{ time_zone: string; recurring_thresholds: Rows['thresholds'] }>(`SELECT time_zone, recurring_thresholds FROM jobs WHERE id = $1`);
  return {
    timeZone: job!.time_zone,
    thresholds: job!.recurring_thresholds,
    findings: await q(
      `SELECT id, number, level_id, unit_id, catalogue_item_id, title, severity, status, company_id, to_char(due_on, 'YYYY-MM-DD') AS due_on, logged_at
         FROM findings WHERE job_id = $1`,
    ),
    levels: await q(`SELECT id, name, position FROM levels WHERE job_id = $1`),
    units: await q(
      `SELECT u.id, u.tag, u.kind, u.level_id, u.system_id, u.version, u.ceiling_excluded_reason, u.ceiling_excluded_at, u.installed_by_crew_id,
              CASE WHEN x.id IS NULL THEN NULL ELSE json_build_object('id', x.id, 'name', x.name) END AS excluded_by
         FROM units u LEFT JOIN users x ON x.id = u.ceiling_excluded_by WHERE u.job_id = $1`,
    ),
    systems: await q(`SELECT id, name, company_id FROM systems WHERE job_id = $1`),
    tests: await q(
      `SELECT r.id, r.kind, r.system_id, r.unit_id, r.level_ids, r.result, r.witnessed_at IS NOT NULL AS witnessed, r.recorded_at, r.created_at,
              EXISTS (SELECT 1 FROM test_records nx WHERE nx.supersedes_id = r.id) AS superseded
         FROM test_records r WHERE r.job_id = $1`,
    ),
    crews: await q(`SELECT id, company_id, name FROM crews WHERE job_id = $1`),
    checks: await q(`SELECT id, unit_id, checked_at, complete FROM unit_checks WHERE job_id = $1`),
    items: await q(`SELECT id, code, title, unit_kinds, needs_ceiling_access FROM catalogue_items WHERE job_id = $1`),
    events: await q(`SELECT id, finding_id, kind, at, "from", "to" FROM finding_events WHERE job_id = $1`),
    companies: await q(`SELECT c.id, c.name, jc.trades FROM job_companies jc JOIN companies c ON c.id = jc.company_id WHERE jc.job_id = $1`),
  };
}

/**
 * Whether a level's test records let its ceilings close: every system with a unit on the level has,
 * as its latest record not superseded, a passed and witnessed pressure test covering the level, and
 * every ducted unit or coil kit not excluded from the ceiling rule a passed drain test. A
 * subcontractor is judged only on the systems their company answers for (the system's company, or
 * the mechanical companies when it names none). The lists behind it: test-readiness.test.ts.
 */
function levelTestBlockers(rows: Rows, levelId: string, companyId: string | null): number {
  const mechanical = (c: string) => rows.companies.some((x) => x.id === c && x.trades.includes('mechanical'));
  const answers = (systemId: string | null) => {
    if (!companyId) return true;
    const owner = rows.systems.find((x) => x.id === systemId)?.company_id ?? null;
    return owner ? owner === companyId : mechanical(companyId);
  };
  const newest = (list: Rows['tests']) =>
    [...list].filter((t) => !t.superseded).sort((a, b) => b.recorded_at.getTime() - a.recorded_at.getTime() || b.created_at.getTime() - a.created_at.getTime() || (a.id < b.id ? 1 : -1))[0];
  const units = rows.units.filter((u) => u.level_id === levelId && answers(u.system_id));
  let count = 0;
  for (const systemId of new Set(units.map((u) => u.system_id).filter((x): x is string => x !== null))) {
    const p = newest(rows.tests.filter((t) => t.kind === 'pressure' && t.system_id === systemId && (t.level_ids === null || t.level_ids.includes(levelId))));
    if (!p || p.result !== 'passed' || !p.witnessed) count++;
  }
  for (const u of units.filter((x) => /^(ducted_|ahu_coil_kit)/.test(x.kind) && x.ceiling_excluded_reason === null)) {
    const d = newest(rows.tests.filter((t) => t.kind === 'drain' && t.unit_id === u.id));
    if (!d || d.result !== 'passed') count++;
  }
  return count;
}
const levelTestsReady = (rows: Rows, levelId: string, companyId: string | null) => levelTestBlockers(rows, levelId, companyId) === 0;

/** Units whose latest check (by checked_at, then id) is complete. */
function checkedUnitIds(rows: Rows): Set<string> {
  const latest = new Map<string, Rows['checks'][number]>();
  for (const c of rows.checks) {
    const prev = latest.get(c.unit_id);
    const later = !prev || c.checked_at.getTime() > prev.checked_at.getTime() || (c.checked_at.getTime() === prev.checked_at.getTime() && c.id > prev.id);
    if (later) latest.set(c.unit_id, c);
  }
  return new Set([...latest.values()].filter((c) => c.complete).map((c) => c.unit_id));
}

const unresolved = (s: FindingStatus) => s === 'open' || s === 'fix_submitted';

/**
 * The longest wait for the inspector among `findings` (those waiting for re-inspection): calendar
 * days on the job's clock from the day of each one's latest fix_submitted event to today; null when none waits.
 */
function longestWait(rows: Rows, findings: Rows['findings']): number | null {
  const today = dateIn(rows.timeZone, new Date());
  let longest: number | null = null;
  for (const f of findings.filter((x) => x.status === 'fix_submitted')) {
    const latest = Math.max(...rows.events.filter((e) => e.finding_id === f.id && e.kind === 'fix_submitted').map((e) => e.at.getTime()));
    const since = dateIn(rows.timeZone, new Date(latest));
    const days = Math.round((Date.parse(`${today}T00:00:00Z`) - Date.parse(`${since}T00:00:00Z`)) / DAY);
    longest = Math.max(longest ?? 0, days);
  }
  return longest;
}
function visible(rows: Rows, companyId: string | null) {
  return rows.findings.filter((f) => f.status !== 'voided' && (!companyId || f.company_id === companyId));
}

// ---------------------------------------------------------------------------------------------
// Expected answers, in plain JS
// ---------------------------------------------------------------------------------------------

/**
 * Kinds that sit in or above the ceiling: cassettes are set into the ceiling grid, ducted units
 * hang above it (common practice). The level's ceilings can close only when each such unit has a
 * complete unit check and no unresolved finding needs access above the ceiling; a level without
 * such units (and without such findings) has nothing to close.
 */
const IN_OR_ABOVE_CEILING = /^(cassette|ducted)_/;
function ceilingVerdict(ceilingUnits: number, unchecked: number, blockers: number) {
  const ceilingState = ceilingUnits === 0 && blockers === 0 ? 'no_ceiling_units' : unchecked === 0 && blockers === 0 ? 'ready' : 'blocked';
  return { ceilingState, ceilingReady: ceilingState === 'ready' } as const;
}

function expectedBoard(rows: Rows, companyId: string | null): BoardResponse {
  const today = dateIn(rows.timeZone, new Date());
  const checked = checkedUnitIds(rows);
  const ceilingItems = new Set(rows.items.filter((i) => i.needs_ceiling_access).map((i) => i.id));
  const fs = visible(rows, companyId);
  const counts = (list: typeof fs, units: Rows['units']) => ({
    open: list.filter((f) => f.status === 'open').length,
    openCritical: list.filter((f) => f.status === 'open' && f.severity === 'critical').length,
    openMajor: list.filter((f) => f.status === 'open' && f.severity === 'major').length,
    fixSubmitted: list.filter((f) => f.status === 'fix_submitted').length,
    closed: list.filter((f) => f.status === 'closed').length,
    // Every finding read that is not voided (visible() dropped those), counted as a whole.
    total: list.length,
    unresolved: list.filter((f) => unresolved(f.status)).length,
    // Overdue: open (new or returned) and past due; a fix waiting for re-inspection is not.
    overdue: list.filter((f) => f.status === 'open' && f.due_on < today).length,
    unitsTotal: units.length,
    unitsChecked: units.filter((u) => checked.has(u.id)).length,
  });
  const levels = [...rows.levels]
    .sort((a, b) => a.position - b.position)
    .map((l) => {
      const mine = fs.filter((f) => f.level_id === l.id);
      const blockers = mine.filter((f) => unresolved(f.status) && ceilingItems.has(f.catalogue_item_id)).length;
      const ceilingUnits = rows.units.filter((u) => u.level_id === l.id && IN_OR_ABOVE_CEILING.test(u.kind));
      // A unit a GC manager excluded from the rule (with a reason) does not count as unchecked.
      const unchecked = ceilingUnits.filter((u) => !checked.has(u.id) && u.ceiling_excluded_reason === null).length;
      const excluded = ceilingUnits.filter((u) => !checked.has(u.id) && u.ceiling_excluded_reason !== null).length;
      return {
        levelId: l.id,
        name: l.name,
        position: l.position,
        ...counts(mine, rows.units.filter((u) => u.level_id === l.id)),
        ceilingBlockers: blockers,
        ceilingUnits: ceilingUnits.length,
        ceilingUnitsUnchecked: unchecked,
        ceilingUnitsExcluded: excluded,
        longestWaitDays: longestWait(rows, mine),
        // Test records the level waits for block its ceilings as findings do.
        ceilingTestBlockers: levelTestBlockers(rows, l.id, companyId),
        ...ceilingVerdict(ceilingUnits.length, unchecked, blockers + levelTestBlockers(rows, l.id, companyId)),
      };
    });
  return { levels, totals: counts(fs, rows.units), longestWaitDays: longestWait(rows, fs), today, companyScope: companyId };
}

function expectedReadiness(rows: Rows, companyId: string | null): ReadinessResponse {
  const checked = checkedUnitIds(rows);
  const items = new Map(rows.items.map((i) => [i.id, i]));
  const units = new Map(rows.units.map((u) => [u.id, u]));
  const fs = rows.findings.filter((f) => unresolved(f.status) && (!companyId || f.company_id === companyId)).sort((a, b) => a.number - b.number);
  const blocker = (f: Rows['findings'][number]): ReadinessBlocker => ({
    findingId: f.id,
    number: f.number,
    code: items.get(f.catalogue_item_id)!.code,
    title: f.title ?? items.get(f.catalogue_item_id)!.title,
    severity: f.severity,
    status: f.status as 'open' | 'fix_submitted',
    unitId: f.unit_id,
    unitTag: f.unit_id ? units.get(f.unit_id)!.tag : null,
  });
  const unitDto = (u: Rows['units'][number]) => {
    const blockers = fs.filter((f) => f.unit_id === u.id && (f.severity === 'critical' || f.severity === 'major')).map(blocker);
    return {
      unitId: u.id,
      tag: u.tag,
      kind: u.kind,
      levelId: u.level_id,
      systemId: u.system_id,
      checked: checked.has(u.id),
      ready: checked.has(u.id) && blockers.length === 0,
      blockers,
    };
  };
  const all = rows.units.map(unitDto).sort(byKey('unitId'));
  const systems = rows.systems
    .map((s) => {
      const mine = all.filter((u) => u.systemId === s.id);
      return {
        systemId: s.id,
        name: s.name,
        unitsTotal: mine.length,
        unitsReady: mine.filter((u) => u.ready).length,
        unitsUnchecked: mine.filter((u) => !u.checked).length,
        ready: mine.length > 0 && mine.every((u) => u.ready),
        units: mine,
      };
    })
    .sort(byKey('systemId'));
  const levels = [...rows.levels]
    .sort((a, b) => a.position - b.position)
    .map((l) => {
      const blockers = fs.filter((f) => f.level_id === l.id && items.get(f.catalogue_item_id)!.needs_ceiling_access).map(blocker);
      const mine = all.filter((u) => u.levelId === l.id);
      const ceilingUnits = mine.filter((u) => IN_OR_ABOVE_CEILING.test(u.kind));
      const byTag = (a: { tag: string; unitId: string }, b: { tag: string; unitId: string }) => (a.tag < b.tag ? -1 : a.tag > b.tag ? 1 : a.unitId < b.unitId ? -1 : 1);
      const row = (u: { unitId: string }) => units.get(u.unitId)!;
      const unchecked = ceilingUnits.filter((u) => !u.checked && row(u).ceiling_excluded_reason === null).sort(byTag);
      const excluded = ceilingUnits.filter((u) => !u.checked && row(u).ceiling_excluded_reason !== null).sort(byTag);
      return {
        levelId: l.id,
        name: l.name,
        position: l.position,
        // A level whose test records hold it back cannot close its ceilings either.
        ...ceilingVerdict(ceilingUnits.length, unchecked.length, blockers.length + (levelTestsReady(rows, l.id, companyId) ? 0 : 1)),
        testsReady: levelTestsReady(rows, l.id, companyId),
        ceilingUnits: ceilingUnits.length,
        ceilingUnitsUnchecked: unchecked.length,
        uncheckedCeilingUnits: unchecked.slice(0, READINESS_LEVEL_BLOCKERS_MAX).map((u) => ({ unitId: u.unitId, tag: u.tag, version: row(u).version })),
        ceilingUnitsExcluded: excluded.length,
        excludedCeilingUnits: excluded.slice(0, READINESS_LEVEL_BLOCKERS_MAX).map((u) => ({
          unitId: u.unitId,
          tag: u.tag,
          version: row(u).version,
          reason: row(u).ceiling_excluded_reason!,
          by: row(u).excluded_by!,
          at: row(u).ceiling_excluded_at!.toISOString(),
        })),
        blockers,
        unitsTotal: mine.length,
        unitsReady: mine.filter((u) => u.ready).length,
      };
    });
  return { systems, levels, unitsWithoutSystem: all.filter((u) => u.systemId === null), companyScope: companyId } as ReadinessResponse;
}

/**
 * Sorted by ids so the comparison does not depend on text collation. The lists of test records
 * behind each level and system are checked by hand in test-readiness.test.ts; here a level keeps
 * only whether its tests are ready.
 */
function normaliseReadiness(r: ReadinessWithTests): ReadinessResponse {
  return {
    ...r,
    levels: r.levels.map(({ testBlockers: _t, ...l }) => l),
    systems: [...r.systems]
      .sort(byKey('systemId'))
      .map(({ startupReady: _s, startupBlockers: _sb, accepted: _a, acceptanceBlockers: _ab, ...s }) => ({ ...s, units: [...s.units].sort(byKey('unitId')) })),
    unitsWithoutSystem: [...r.unitsWithoutSystem].sort(byKey('unitId')),
  };
}

/** The demo has no reassignments and no reopened findings: each accepted fix is measured from logging. */
function expectedDemoScorecards(rows: Rows): ScorecardsResponse {
  expect(rows.events.filter((e) => e.kind === 'reassigned' || e.kind === 'reopened')).toHaveLength(0);
  const today = dateIn(rows.timeZone, new Date());
  const companies = rows.companies.map((c) => {
    const mine = rows.findings.filter((f) => f.company_id === c.id && f.status !== 'voided');
    const days: number[] = [];
    let firstPass = 0;
    let returns = 0;
    for (const f of mine) {
      const evs = rows.events.filter((e) => e.finding_id === f.id).sort((a, b) => a.at.getTime() - b.at.getTime() || a.id.localeCompare(b.id));
      returns += evs.filter((e) => e.kind === 'returned').length;
      for (const [i, e] of evs.entries()) {
        if (e.kind !== 'accepted') continue;
        days.push((e.at.getTime() - f.logged_at.getTime()) / DAY);
        if (!evs.slice(0, i).some((x) => x.kind === 'returned')) firstPass += 1;
      }
    }
    const m = median(days);
    return {
      companyId: c.id,
      name: c.name,
      trade: c.trades[0] ?? null,
      trades: c.trades,
      open: mine.filter((f) => f.status === 'open').length,
      overdue: mine.filter((f) => f.status === 'open' && f.due_on < today).length,
      fixesWaiting: mine.filter((f) => f.status === 'fix_submitted').length,
      longestWaitDays: longestWait(rows, mine),
      accepted: days.length,
      acceptedFirstPass: firstPass,
      firstPassRate: days.length === 0 ? null : firstPass / days.length,
      medianDaysToAccept: m === null ? null : Math.round(m * 10) / 10,
      returns,
    };
  });
  return { companies: companies.sort(byKey('companyId')) };
}

function expectedRecurring(rows: Rows, companyId: string | null): RecurringResponse {
  const thresholds = { minUnits: rows.thresholds.minUnits ?? 3, minShare: rows.thresholds.minShare ?? 0.1 };
  const checked = checkedUnitIds(rows);
  const units = new Map(rows.units.map((u) => [u.id, u]));
  const levels = new Map(rows.levels.map((l) => [l.id, l]));
  const names = new Map(rows.companies.map((c) => [c.id, c.name]));
  const fs = visible(rows, companyId).filter((f) => f.unit_id !== null);
  const items = [];
  // A catalogue type recurs as itself; "Something else" findings (their own title) recur by their
  // normalised title (case and repeated white space aside), each title a defect of its own.
  const groups: { key: string; item: Rows['items'][number]; mine: typeof fs }[] = [];
  for (const item of rows.items) {
    const own = fs.filter((f) => f.catalogue_item_id === item.id);
    const plain = own.filter((f) => f.title === null);
    if (plain.length) groups.push({ key: item.id, item, mine: plain });
    const byTitle = new Map<string, typeof fs>();
    for (const f of own.filter((x) => x.title !== null)) {
      const k = `other:${f.title!.trim().replace(/\s+/g, ' ').toLowerCase()}`;
      byTitle.set(k, [...(byTitle.get(k) ?? []), f]);
    }
    for (const [key, mine] of byTitle) groups.push({ key, item, mine });
  }
  for (const { key, item, mine } of groups) {
    const firstAt = new Map<string, Date>();
    for (const f of mine) {
      const prev = firstAt.get(f.unit_id!);
      if (!prev || f.logged_at < prev) firstAt.set(f.unit_id!, f.logged_at);
    }
    const unitCount = firstAt.size;
    if (unitCount < thresholds.minUnits) continue;
    // Looked-at units of its kinds: complete latest check, plus every unit the type was found on.
    const checkedUnits = rows.units.filter((u) => (checked.has(u.id) && item.unit_kinds.includes(u.kind)) || firstAt.has(u.id)).length;
    const share = unitCount / checkedUnits;
    if (share < thresholds.minShare) continue;
    const order = [...firstAt.entries()].sort((a, b) => a[1].getTime() - b[1].getTime() || a[0].localeCompare(b[0]));
    const perLevel = new Map<string, number>();
    for (const unitId of firstAt.keys()) perLevel.set(units.get(unitId)!.level_id, (perLevel.get(units.get(unitId)!.level_id) ?? 0) + 1);
    const perCompany = new Map<string, Set<string>>();
    for (const f of mine) perCompany.set(f.company_id, (perCompany.get(f.company_id) ?? new Set()).add(f.unit_id!));
    // A unit's crew counts for a finding only when it is a crew of the finding's company.
    const perCrew = new Map<string, { companyId: string; crewId: string | null; units: Set<string> }>();
    for (const f of mine) {
      const crew = rows.crews.find((c) => c.id === units.get(f.unit_id!)!.installed_by_crew_id && c.company_id === f.company_id) ?? null;
      const k = `${f.company_id}|${crew?.id ?? ''}`;
      const entry = perCrew.get(k) ?? { companyId: f.company_id, crewId: crew?.id ?? null, units: new Set<string>() };
      perCrew.set(k, entry.units.add(f.unit_id!) && entry);
    }
    const shown = key === item.id ? item.title : [...mine].sort((a, b) => a.logged_at.getTime() - b.logged_at.getTime() || a.unit_id!.localeCompare(b.unit_id!))[0]!.title!;
    items.push({
      key,
      catalogueItemId: item.id,
      code: item.code,
      title: shown,
      unitCount,
      checkedUnits,
      share,
      recurringSince: order[thresholds.minUnits - 1]![1].toISOString(),
      byLevel: [...perLevel.entries()]
        .map(([levelId, count]) => ({ levelId, name: levels.get(levelId)!.name, count }))
        .sort((a, b) => levels.get(a.levelId)!.position - levels.get(b.levelId)!.position),
      byCompany: [...perCompany.entries()].map(([id, set]) => ({ companyId: id, name: names.get(id)!, count: set.size })).sort(byKey('companyId')),
      byCrew: sortCrews(
        [...perCrew.values()].map((c) => ({
          companyId: c.companyId,
          companyName: names.get(c.companyId)!,
          crewId: c.crewId,
          name: c.crewId ? rows.crews.find((x) => x.id === c.crewId)!.name : null,
          count: c.units.size,
        })),
      ),
    });
  }
  return { thresholds, items: items.sort(byKey('key')), companyScope: companyId };
}

function normaliseRecurring(r: RecurringResponse): RecurringResponse {
  return {
    ...r,
    items: [...r.items]
      .sort(byKey('key'))
      .map((i) => ({ ...i, share: Math.round(i.share * 1e9) / 1e9, byCompany: [...i.byCompany].sort(byKey('companyId')), byCrew: sortCrews(i.byCrew) })),
  };
}

function sortCrews<T extends { companyId: string; crewId: string | null }>(list: T[]): T[] {
  return [...list].sort((a, b) => `${a.companyId}|${a.crewId ?? ''}`.localeCompare(`${b.companyId}|${b.crewId ?? ''}`));
}

/** Status at the end of each day (job time zone): the last status event on or before that date. */
function expectedTrend(rows: Rows, companyId: string | null, days: number, levelId: string | null): TrendResponse {
  const today = dateIn(rows.timeZone, new Date());
  const fs = rows.findings.filter((f) => (!companyId || f.company_id === companyId) && (!levelId || f.level_id === levelId));
  const history = fs.map((f) =>
    rows.events
      .filter((e) => e.finding_id === f.id && typeof e.to?.status === 'string')
      .sort((a, b) => a.at.getTime() - b.at.getTime() || a.id.localeCompare(b.id))
      .map((e) => ({ date: dateIn(rows.timeZone, e.at), status: e.to!.status as string })),
  );
  const points = [];
  for (let i = days - 1; i >= 0; i--) {
    const date = plusDays(today, -i);
    const statuses = history.map((h) => h.filter((e) => e.date <= date).at(-1)?.status);
    points.push({ date, open: statuses.filter((s) => s === 'open').length, fixSubmitted: statuses.filter((s) => s === 'fix_submitted').length });
  }
  return { levelId, points, companyScope: companyId };
}

// ---------------------------------------------------------------------------------------------
// 1. The demo job
// ---------------------------------------------------------------------------------------------

describe('the demo job', () => {
  let jobId: string;
  let gc: Caller;
  let insp: Caller;
  let mech: Caller;
  let mechCompany: string;

  beforeAll(async () => {
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: DEMO_JOBS[0]!.name } }))!;
    jobId = job.id;
    const account = (role: string) => DEMO_ACCOUNTS.find((a) => a.email.startsWith(role))!.email;
    gc = caller(await signIn(trimout.app, account('gc.manager'), DEMO_PASSWORD));
    insp = caller(await signIn(trimout.app, account('inspector'), DEMO_PASSWORD));
    mech = caller(await signIn(trimout.app, account('mechanical'), DEMO_PASSWORD));
    const [row] = await db.sequelize.query<{ company_id: string }>(`SELECT company_id FROM users WHERE email = $1`, {
      bind: [account('mechanical')],
      type: QueryTypes.SELECT,
    });
    mechCompany = row!.company_id;
  });

  it('the data is rich enough to test: findings in every status on several levels, unit checks, ceiling blockers', async () => {
    const rows = await readRows(jobId);
    expect(new Set(rows.findings.map((f) => f.status))).toEqual(new Set(['open', 'fix_submitted', 'closed', 'voided']));
    expect(checkedUnitIds(rows).size).toBeGreaterThan(5);
    const board = expectedBoard(rows, null);
    expect(board.totals.overdue).toBeGreaterThan(0);
    expect(board.levels.filter((l) => !l.ceilingReady).length).toBeGreaterThan(0);
    // A level whose ceiling units are not all checked, with no finding blocking, is not ready: the
    // case that used to show "can close".
    expect(board.levels.some((l) => l.ceilingBlockers === 0 && l.ceilingUnitsUnchecked > 0 && l.ceilingState === 'blocked')).toBe(true);
    expect(expectedRecurring(rows, null).items.length).toBeGreaterThan(0);
  });

  it('board: every cell matches counts from the seeded rows (GC manager, inspector, subcontractor)', async () => {
    const rows = await readRows(jobId);
    for (const [who, companyId] of [
      [gc, null],
      [insp, null],
      [mech, mechCompany],
    ] as const) {
      const res = await who.get(jobPath(jobId, '/board'));
      expect(res.status).toBe(200);
      expect(res.body).toEqual(expectedBoard(rows, companyId));
    }
    // The subcontractor's counts are strictly smaller: other companies' findings are not in them.
    const all = (await gc.get(jobPath(jobId, '/board'))).body as BoardResponse;
    const mine = (await mech.get(jobPath(jobId, '/board'))).body as BoardResponse;
    expect(mine.totals.open).toBeLessThan(all.totals.open);
  });

  it('board: open + fix submitted + closed = total on every row and the totals; overdue is a share of open', async () => {
    const rows = await readRows(jobId);
    for (const [who, companyId] of [
      [gc, null],
      [mech, mechCompany],
    ] as const) {
      const board = (await who.get(jobPath(jobId, '/board'))).body as BoardResponse;
      const fs = visible(rows, companyId);
      const rowsAndTotals: [place: string, row: BoardCounts, levelId: string | null][] = [
        ...board.levels.map((l) => [l.name, l, l.levelId] as [string, BoardCounts, string]),
        ['all levels', board.totals, null],
      ];
      for (const [place, row, levelId] of rowsAndTotals) {
        const mine = levelId ? fs.filter((f) => f.level_id === levelId) : fs;
        expect({ place, sum: row.open + row.fixSubmitted + row.closed, unresolved: row.open + row.fixSubmitted }).toEqual({
          place,
          sum: row.total,
          unresolved: row.unresolved,
        });
        // The total is every finding on the row that is not voided, counted from the rows read here.
        expect({ place, total: row.total }).toEqual({ place, total: mine.length });
        expect(row.overdue).toBeLessThanOrEqual(row.open);
      }
      // Voided findings exist and sit outside the partition.
      expect(rows.findings.some((f) => f.status === 'voided' && (!companyId || f.company_id === companyId))).toBe(true);
    }
  });

  it("board: overdue agrees with the findings list's overdue filter, level by level", async () => {
    for (const who of [gc, mech]) {
      const board = (await who.get(jobPath(jobId, '/board'))).body as BoardResponse;
      for (const level of board.levels) {
        const list = await who.get(jobPath(jobId, `/findings?levelId=${level.levelId}&overdue=true&limit=1`));
        expect(list.status).toBe(200);
        expect({ level: level.name, overdue: list.body.total }).toEqual({ level: level.name, overdue: level.overdue });
      }
    }
  });

  it('readiness: units, systems and levels match the seeded rows', async () => {
    const rows = await readRows(jobId);
    for (const [who, companyId] of [
      [gc, null],
      [insp, null],
      [mech, mechCompany],
    ] as const) {
      const res = await who.get(jobPath(jobId, '/readiness'));
      expect(res.status).toBe(200);
      expect(normaliseReadiness(res.body)).toEqual(expectedReadiness(rows, companyId));
    }
    // Filtered to one level: that level, its systems (judged on all their units), its units without a system.
    const full = expectedReadiness(rows, null);
    const level = full.levels.find((l) => l.unitsTotal > 0)!;
    const res = await gc.get(jobPath(jobId, `/readiness?levelId=${level.levelId}`));
    expect(res.status).toBe(200);
    const body = normaliseReadiness(res.body);
    expect(body.levels).toEqual([level]);
    expect(body.systems).toEqual(full.systems.filter((s) => rows.units.some((u) => u.system_id === s.systemId && u.level_id === level.levelId)));
    expect(body.unitsWithoutSystem).toEqual(full.unitsWithoutSystem.filter((u) => u.levelId === level.levelId));
    const system = full.systems.find((s) => s.unitsTotal > 0)!;
    const bySystem = normaliseReadiness((await gc.get(jobPath(jobId, `/readiness?systemId=${system.systemId}`))).body);
    expect(bySystem.systems).toEqual([system]);
    expect(bySystem.unitsWithoutSystem).toEqual([]);
    expect(bySystem.levels.map((l) => l.levelId).sort()).toEqual([...new Set(system.units.map((u) => u.levelId))].sort());
  });

  it('readiness and recurring: cached answers are sent as JSON with an entity tag of their bytes, and 304 when it still matches', async () => {
    // The JSON of a cached figure is written once (statCache.ts writeJson); what is sent must be
    // what res.json would send: the same type, bytes and weak entity tag (RFC 9110 8.8.3).
    const { agent } = await signIn(trimout.app, DEMO_ACCOUNTS.find((a) => a.email.startsWith('gc.manager'))!.email, DEMO_PASSWORD);
    for (const rest of ['/readiness', '/recurring']) {
      const first = await agent.get(jobPath(jobId, rest));
      const second = await agent.get(jobPath(jobId, rest));
      for (const res of [first, second]) {
        expect(res.status).toBe(200);
        expect(res.headers['content-type']).toBe('application/json; charset=utf-8');
        // The text as sent (decompressed), byte for byte what JSON.stringify writes.
        expect(res.text).toBe(JSON.stringify(res.body));
        const bytes = Buffer.from(res.text, 'utf8');
        // Express's default: W/"<length in hex>-<first 27 characters of the base64 SHA-1>".
        const sha1 = createHash('sha1').update(bytes).digest('base64').slice(0, 27);
        expect(res.headers.etag).toBe(`W/"${bytes.length.toString(16)}-${sha1}"`);
      }
      expect(second.headers.etag).toBe(first.headers.etag);
      const again = await agent.get(jobPath(jobId, rest)).set('If-None-Match', first.headers.etag as string);
      expect(again.status).toBe(304);
    }
  });

  it('scorecards: every value matches the seeded rows and events (GC manager, inspector); subcontractor 403', async () => {
    const rows = await readRows(jobId);
    const expected = expectedDemoScorecards(rows);
    expect(expected.companies.some((c) => c.accepted > 0 && c.returns > 0)).toBe(true);
    for (const who of [gc, insp]) {
      const res = await who.get(jobPath(jobId, '/scorecards'));
      expect(res.status).toBe(200);
      expect({ companies: [...res.body.companies].sort(byKey('companyId')) }).toEqual(expected);
    }
    expect((await mech.get(jobPath(jobId, '/scorecards'))).status).toBe(403);
  });

  it('recurring: the flagged defect types, their counts by level and company, and since when', async () => {
    const rows = await readRows(jobId);
    for (const [who, companyId] of [
      [gc, null],
      [insp, null],
      [mech, mechCompany],
    ] as const) {
      const res = await who.get(jobPath(jobId, '/recurring'));
      expect(res.status).toBe(200);
      expect(normaliseRecurring(res.body)).toEqual(normaliseRecurring(expectedRecurring(rows, companyId)));
      if (companyId) expect((res.body as RecurringResponse).items.every((i) => i.byCompany.every((c) => c.companyId === companyId))).toBe(true);
    }
  });

  it('trend: open and fix submitted at the end of each day, rebuilt from the events', async () => {
    const rows = await readRows(jobId);
    const res = await gc.get(jobPath(jobId, '/trend'));
    expect(res.status).toBe(200);
    expect(res.body).toEqual(expectedTrend(rows, null, 30, null));
    // The last point is today's board.
    const board = (await gc.get(jobPath(jobId, '/board'))).body as BoardResponse;
    expect(res.body.points.at(-1)).toMatchObject({ date: board.today, open: board.totals.open, fixSubmitted: board.totals.fixSubmitted });
    const level = rows.levels.sort((a, b) => a.position - b.position)[1]!;
    const perLevel = await mech.get(jobPath(jobId, `/trend?levelId=${level.id}&days=45`));
    expect(perLevel.status).toBe(200);
    expect(perLevel.body).toEqual(expectedTrend(rows, mechCompany, 45, level.id));
  });
});

// ---------------------------------------------------------------------------------------------
// 2. A hand-built job: expected numbers written by hand
// ---------------------------------------------------------------------------------------------

describe('a small hand-built job', () => {
  type Crew = Awaited<ReturnType<typeof buildJobWithCrew>>;
  let crew: Crew;
  let gc: Caller;
  let insp: Caller;
  let subA: Caller;
  let subB: Caller;
  let A: string;
  let B: string;
  let L1: { id: string; name: string };
  let L2: { id: string; name: string };
  const u: Record<string, { id: string; tag: string }> = {};
  const f: Record<string, Finding> = {};
  let S: { id: string; name: string };
  /** Base day B = today (UTC) - 15; every event is at B + n days, at the hour given. */
  let base: string;
  const at = (day: number, hour = 12) => new Date(`${plusDays(base, day)}T${String(hour).padStart(2, '0')}:00:00Z`);

  beforeAll(async () => {
    crew = await buildJobWithCrew();
    const { job } = crew;
    A = crew.subA.companyId;
    B = crew.subB.companyId;
    await linkCompany(job.id, crew.gcCompany.id, ['general']);
    await linkCompany(job.id, A, ['mechanical']);
    await linkCompany(job.id, B, ['electrical', 'controls']);
    await copyCatalogue(job.id);
    L1 = await buildLevel(job.id, { name: 'First' });
    L2 = await buildLevel(job.id, { name: 'Second' });
    S = await buildSystem(job.id, { name: 'Circuit 1' });
    u.U1 = await buildUnit(job.id, L1.id, { tag: 'U1', kind: 'cassette_4way' });
    u.U2 = await buildUnit(job.id, L1.id, { tag: 'U2', kind: 'cassette_4way' });
    u.U5 = await buildUnit(job.id, L1.id, { tag: 'U5', kind: 'cassette_4way' });
    u.U6 = await buildUnit(job.id, L1.id, { tag: 'U6', kind: 'cassette_4way' });
    u.U3 = await buildUnit(job.id, L2.id, { tag: 'U3', kind: 'cassette_4way', systemId: S.id });
    u.U4 = await buildUnit(job.id, L2.id, { tag: 'U4', kind: 'wall_mounted', systemId: S.id });
    base = plusDays(new Date().toISOString().slice(0, 10), -15);

    // Checks: U2's latest check is incomplete (an earlier one was complete): U2 is not checked.
    const check = (unitId: string, day: number, complete: boolean) =>
      UnitCheck.create({ jobId: job.id, unitId, walkId: null, checkedBy: crew.inspector.id, checkedAt: at(day), complete });
    for (const key of ['U1', 'U3', 'U4', 'U5', 'U6']) await check(u[key]!.id, 0, true);
    await check(u.U2!.id, 0, true);
    await check(u.U2!.id, 1, false);

    const items = await CatalogueItem.findAll({ where: { jobId: job.id } });
    const pg01 = items.find((i) => i.code === 'PG-01')!; // cassettes only, no ceiling access
    const ct03 = items.find((i) => i.code === 'CT-03')!; // needs access above the ceiling
    expect(pg01.unitKinds.includes('cassette_4way') && !pg01.unitKinds.includes('wall_mounted') && !pg01.needsCeilingAccess).toBe(true);
    expect(ct03.needsCeilingAccess).toBe(true);

    type Step = [kind: 'fix_submitted' | 'accepted' | 'returned' | 'voided' | 'reopened' | 'reassigned', day: number];
    const make = async (
      key: string,
      spec: { company: string; unit: string; level: string; item: string; severity: Severity; loggedAt: Date; dueOn: string; steps: Step[]; final: FindingStatus; finalCompany?: string },
    ) => {
      f[key] = await db.sequelize.transaction(async (transaction) => {
        const finding = await Finding.create(
          {
            jobId: job.id,
            number: await nextFindingNumber(db.sequelize, job.id, transaction),
            unitId: spec.unit,
            spaceId: null,
            levelId: spec.level,
            catalogueItemId: spec.item,
            walkId: null,
            unitCheckId: null,
            severity: spec.severity,
            status: spec.final,
            companyId: spec.finalCompany ?? spec.company,
            dueOn: spec.dueOn,
            note: key,
            measuredText: null,
            measuredValue: null,
            ruleResult: null,
            loggedBy: crew.inspector.id,
            loggedAt: spec.loggedAt,
            pinX: null,
            pinY: null,
            voidedReason: spec.final === 'voided' ? 'Logged twice.' : null,
          },
          { transaction },
        );
        const ev = (kind: Step[0] | 'logged', when: Date, from: Record<string, unknown> | null, to: Record<string, unknown>) =>
          recordFindingEvent({ findingId: finding.id, jobId: job.id, actorId: crew.inspector.id, kind, from, to, at: when }, transaction);
        await ev('logged', spec.loggedAt, null, { status: 'open', companyId: spec.company });
        let status = 'open';
        for (const [kind, day] of spec.steps) {
          if (kind === 'reassigned') {
            await ev(kind, at(day), { companyId: spec.company }, { companyId: spec.finalCompany });
            continue;
          }
          const to = { fix_submitted: 'fix_submitted', accepted: 'closed', returned: 'open', voided: 'voided', reopened: 'open' }[kind];
          await ev(kind, at(day), { status }, { status: to });
          status = to;
        }
        expect(status).toBe(spec.final);
        return finding;
      });
    };
    const far = '2099-12-31';
    // Level 1, defect type PG-01 on cassettes.
    await make('F1', { company: A, unit: u.U1!.id, level: L1.id, item: pg01.id, severity: 'major', loggedAt: at(0, 12), dueOn: far, steps: [['fix_submitted', 1], ['accepted', 2]], final: 'closed' });
    await make('F2', {
      company: A, unit: u.U2!.id, level: L1.id, item: pg01.id, severity: 'major', loggedAt: at(0, 12), dueOn: far,
      steps: [['fix_submitted', 1], ['returned', 2], ['fix_submitted', 4], ['accepted', 5]], final: 'closed',
    });
    await make('F3', {
      company: B, finalCompany: A, unit: u.U1!.id, level: L1.id, item: pg01.id, severity: 'major', loggedAt: at(0, 14), dueOn: far,
      steps: [['fix_submitted', 1], ['returned', 2], ['reassigned', 3], ['fix_submitted', 10], ['accepted', 12]], final: 'closed',
    });
    await make('F4', { company: A, unit: u.U2!.id, level: L1.id, item: pg01.id, severity: 'major', loggedAt: at(0, 15), dueOn: far, steps: [['fix_submitted', 1], ['returned', 2], ['voided', 3]], final: 'voided' });
    // Level 2.
    await make('F5', {
      company: B, unit: u.U3!.id, level: L2.id, item: pg01.id, severity: 'major', loggedAt: at(0, 16), dueOn: far,
      steps: [['fix_submitted', 1], ['accepted', 2], ['reopened', 4], ['fix_submitted', 5], ['accepted', 7]], final: 'closed',
    });
    await make('F6', { company: A, unit: u.U3!.id, level: L2.id, item: pg01.id, severity: 'critical', loggedAt: at(6), dueOn: '2020-01-01', steps: [], final: 'open' });
    // F7 is past its due date but its fix waits for re-inspection: it is not overdue against B.
    await make('F7', { company: B, unit: u.U4!.id, level: L2.id, item: ct03.id, severity: 'minor', loggedAt: at(8), dueOn: '2020-01-01', steps: [['fix_submitted', 9]], final: 'fix_submitted' });

    gc = caller(await signIn(trimout.app, crew.gcManager.email));
    insp = caller(await signIn(trimout.app, crew.inspector.email));
    subA = caller(await signIn(trimout.app, crew.subA.email));
    subB = caller(await signIn(trimout.app, crew.subB.email));
  });

  const zero = { open: 0, openCritical: 0, openMajor: 0, fixSubmitted: 0, closed: 0, total: 0, unresolved: 0, overdue: 0 };

  it('board: by hand', async () => {
    const res = await gc.get(jobPath(crew.job.id, '/board'));
    expect(res.status).toBe(200);
    expect(res.body.levels).toEqual([
      // F1, F2, F3 closed; F4 voided (never counted). U1, U5, U6 checked; U2's latest check is incomplete.
      // Its four cassettes sit in the ceiling and U2's latest check is incomplete: the ceilings cannot
      // close yet, although no finding blocks them.
      { levelId: L1.id, name: 'First', position: 1, ...zero, closed: 3, total: 3, unitsTotal: 4, unitsChecked: 3, ceilingBlockers: 0, ceilingTestBlockers: 0, ceilingUnits: 4, ceilingUnitsUnchecked: 1, ceilingUnitsExcluded: 0, longestWaitDays: null, ceilingState: 'blocked', ceilingReady: false },
      // F5 closed, F6 open critical and overdue, F7 fix submitted (past due, waiting for the inspector:
      // not overdue) and needs ceiling access.
      { levelId: L2.id, name: 'Second', position: 2, ...zero, open: 1, openCritical: 1, fixSubmitted: 1, closed: 1, total: 3, unresolved: 2, overdue: 1, unitsTotal: 2, unitsChecked: 2, ceilingBlockers: 1, ceilingTestBlockers: 1, ceilingUnits: 1, ceilingUnitsUnchecked: 0, ceilingUnitsExcluded: 0, longestWaitDays: 6, ceilingState: 'blocked', ceilingReady: false },
    ]);
    expect(res.body.totals).toEqual({ ...zero, open: 1, openCritical: 1, fixSubmitted: 1, closed: 4, total: 6, unresolved: 2, overdue: 1, unitsTotal: 6, unitsChecked: 5 });
    expect(res.body.companyScope).toBeNull();
    // Company B sees only F5 and F7 (F3 now belongs to A).
    const b = await subB.get(jobPath(crew.job.id, '/board'));
    expect(b.body.totals).toEqual({ ...zero, fixSubmitted: 1, closed: 1, total: 2, unresolved: 1, unitsTotal: 6, unitsChecked: 5 });
    expect(b.body.levels[1]).toMatchObject({ ceilingBlockers: 1, ceilingReady: false });
    expect(b.body.companyScope).toBe(B);
    // Company A has no ceiling blocker on level 2, but as the job's mechanical company it answers for
    // Circuit 1, whose pressure test is missing: that alone holds the ceiling for them.
    const a = await subA.get(jobPath(crew.job.id, '/board'));
    expect(a.body.totals).toEqual({ ...zero, open: 1, openCritical: 1, closed: 3, total: 4, unresolved: 1, overdue: 1, unitsTotal: 6, unitsChecked: 5 });
    expect(a.body.levels[1]).toMatchObject({ ceilingBlockers: 0, ceilingTestBlockers: 1, ceilingState: 'blocked', ceilingReady: false });
    expect(a.body.levels[0]).toMatchObject({ ceilingUnitsUnchecked: 1, ceilingState: 'blocked' });
  });

  it('scorecards: median of 2, 5 and 9 days is 5; first pass 2 of 3; returns go to the company responsible at the time', async () => {
    const res = await insp.get(jobPath(crew.job.id, '/scorecards'));
    expect(res.status).toBe(200);
    const byId = new Map((res.body as ScorecardsResponse).companies.map((c) => [c.companyId, c]));
    expect(byId.size).toBe(3);
    // A: F1 2 days; F2 5 days after one return; F3 reassigned to A on day 3, accepted day 12: 9 days,
    // no return since A took it. F4 (voided) does not count. F6 open and overdue.
    expect(byId.get(A)).toEqual({
      companyId: A, name: expect.any(String), trade: 'mechanical', trades: ['mechanical'],
      open: 1, overdue: 1, fixesWaiting: 0, longestWaitDays: null, accepted: 3, acceptedFirstPass: 2, firstPassRate: 2 / 3, medianDaysToAccept: 5, returns: 1,
    });
    // B: F5 logged day 0 at 16:00, accepted day 2 at 12:00 (1 5/6 days), reopened day 4 and accepted
    // again day 7 (3 days): median (1.833 + 3) / 2 = 2.417 → 2.4 (one decimal). F3's return on day 2
    // was B's (before the reassignment). F7 waits for re-inspection.
    expect(byId.get(B)).toEqual({
      companyId: B, name: expect.any(String), trade: 'electrical', trades: ['electrical', 'controls'],
      // F7's fix was submitted on day 9 of 15: it has waited 6 days for the inspector.
      open: 0, overdue: 0, fixesWaiting: 1, longestWaitDays: 6, accepted: 2, acceptedFirstPass: 2, firstPassRate: 1, medianDaysToAccept: 2.4, returns: 1,
    });
    expect(byId.get(crew.gcCompany.id)).toMatchObject({ open: 0, accepted: 0, firstPassRate: null, medianDaysToAccept: null, returns: 0 });
    expect((await subA.get(jobPath(crew.job.id, '/scorecards'))).status).toBe(403);
  });

  it('readiness: by hand', async () => {
    const res = await gc.get(jobPath(crew.job.id, '/readiness'));
    expect(res.status).toBe(200);
    const body = res.body as ReadinessResponse;
    const blockerF6 = { findingId: f.F6!.id, number: f.F6!.number, code: 'PG-01', title: expect.any(String), severity: 'critical', status: 'open', unitId: u.U3!.id, unitTag: 'U3' };
    const missing = (kind: string, levelId: string | null = null) => ({ kind, state: 'missing', systemId: S.id, systemName: 'Circuit 1', unitId: null, unitTag: null, levelId, recordId: null });
    const missingDrain = (x: { id: string; tag: string }) => ({ kind: 'drain', state: 'missing', systemId: S.id, systemName: 'Circuit 1', unitId: x.id, unitTag: x.tag, levelId: null, recordId: null });
    const blockerF7 = { findingId: f.F7!.id, number: f.F7!.number, code: 'CT-03', title: expect.any(String), severity: 'minor', status: 'fix_submitted', unitId: u.U4!.id, unitTag: 'U4' };
    // Circuit 1: U3 is blocked by the open critical F6; U4 is ready (F7 is minor).
    expect(body.systems).toEqual([
      {
        systemId: S.id, name: 'Circuit 1', ready: false, unitsTotal: 2, unitsReady: 1, unitsUnchecked: 0,
        // No test records on this job: every one is missing.
        startupReady: false, startupBlockers: [missing('pressure', L2.id), missing('evacuation'), missing('charge')],
        accepted: false,
        acceptanceBlockers: [missing('pressure', L2.id), missing('evacuation'), missing('charge'), missing('startup'), missingDrain(u.U3!), missingDrain(u.U4!)],
        units: [
          { unitId: u.U3!.id, tag: 'U3', kind: 'cassette_4way', levelId: L2.id, systemId: S.id, checked: true, ready: false, blockers: [blockerF6] },
          { unitId: u.U4!.id, tag: 'U4', kind: 'wall_mounted', levelId: L2.id, systemId: S.id, checked: true, ready: true, blockers: [] },
        ],
      },
    ]);
    expect(body.unitsWithoutSystem.map((x) => [x.tag, x.checked, x.ready])).toEqual([
      ['U1', true, true],
      ['U2', false, false],
      ['U5', true, true],
      ['U6', true, true],
    ]);
    expect(body.levels).toEqual([
      {
        levelId: L1.id, name: 'First', position: 1, ceilingState: 'blocked', ceilingReady: false, ceilingUnits: 4, ceilingUnitsUnchecked: 1,
        uncheckedCeilingUnits: [{ unitId: u.U2!.id, tag: 'U2', version: 1 }], ceilingUnitsExcluded: 0, excludedCeilingUnits: [], blockers: [], unitsTotal: 4, unitsReady: 3,
        testsReady: true, testBlockers: [],
      },
      {
        levelId: L2.id, name: 'Second', position: 2, ceilingState: 'blocked', ceilingReady: false, ceilingUnits: 1, ceilingUnitsUnchecked: 0,
        uncheckedCeilingUnits: [], ceilingUnitsExcluded: 0, excludedCeilingUnits: [], blockers: [blockerF7], unitsTotal: 2, unitsReady: 1,
        testsReady: false, testBlockers: [missing('pressure', L2.id)],
      },
    ]);
    // Company B: F6 is not theirs, so nothing of B's holds U3 back; F7 is B's ceiling blocker.
    const b = (await subB.get(jobPath(crew.job.id, '/readiness'))).body as ReadinessResponse;
    expect(b.systems[0]).toMatchObject({ ready: true, unitsReady: 2 });
    expect(b.levels[1]).toMatchObject({ ceilingReady: false, blockers: [blockerF7] });
    expect(b.companyScope).toBe(B);
    // Level 2 only; system only.
    const l2 = (await gc.get(jobPath(crew.job.id, `/readiness?levelId=${L2.id}`))).body as ReadinessResponse;
    expect(l2.levels.map((l) => l.levelId)).toEqual([L2.id]);
    expect(l2.systems.map((s) => s.systemId)).toEqual([S.id]);
    expect(l2.unitsWithoutSystem).toEqual([]);
    const l1 = (await gc.get(jobPath(crew.job.id, `/readiness?levelId=${L1.id}`))).body as ReadinessResponse;
    expect(l1.systems).toEqual([]);
    expect(l1.unitsWithoutSystem.map((x) => x.tag)).toEqual(['U1', 'U2', 'U5', 'U6']);
  });

  it('recurring: PG-01 on 3 of 5 looked-at cassettes; since the finding that reached the third unit; minShare from the job', async () => {
    const path = jobPath(crew.job.id);
    const job = await gc.get(path);
    expect(job.body.recurringThresholds).toEqual({ minUnits: 3, minShare: 0.1 });
    const patched = await gc.patch(path, { recurringThresholds: { minUnits: 3, minShare: 0.5 } }, { 'If-Match': job.headers.etag as string });
    expect(patched.status).toBe(200);
    expect(patched.body.recurringThresholds).toEqual({ minUnits: 3, minShare: 0.5 });

    const res = await gc.get(jobPath(crew.job.id, '/recurring'));
    expect(res.status).toBe(200);
    // Units with PG-01 (F4 voided): U1 (F1 at 12:00, F3), U2 (F2 at 12:00), U3 (F5 at 16:00, F6).
    // Checked cassettes: U1, U3, U5, U6 (U2's latest check is incomplete, but PG-01 was found on
    // it, so it was looked at) → 3 / 5 = 0.6.
    expect(res.body).toEqual({
      thresholds: { minUnits: 3, minShare: 0.5 },
      companyScope: null,
      items: [
        {
          key: f.F1!.catalogueItemId, catalogueItemId: f.F1!.catalogueItemId, code: 'PG-01', title: expect.any(String),
          unitCount: 3, checkedUnits: 5, share: 0.6, recurringSince: at(0, 16).toISOString(),
          byLevel: [
            { levelId: L1.id, name: 'First', count: 2 },
            { levelId: L2.id, name: 'Second', count: 1 },
          ],
          byCompany: expect.arrayContaining([
            { companyId: A, name: expect.any(String), count: 3 }, // F1, F3 (now A's) on U1; F2 on U2; F6 on U3
            { companyId: B, name: expect.any(String), count: 1 }, // F5 on U3
          ]),
          // No unit here records its crew: each company's units are "crew not recorded".
          byCrew: expect.arrayContaining([
            { companyId: A, companyName: expect.any(String), crewId: null, name: null, count: 3 },
            { companyId: B, companyName: expect.any(String), crewId: null, name: null, count: 1 },
          ]),
        },
      ],
    });
    // Company A alone: U1 (F1), U2 (F2), U3 first by F6 on day 6 → since day 6.
    const a = await subA.get(jobPath(crew.job.id, '/recurring'));
    expect(a.body.items).toHaveLength(1);
    expect(a.body.items[0]).toMatchObject({ unitCount: 3, recurringSince: at(6).toISOString(), byCompany: [{ companyId: A, name: expect.any(String), count: 3 }] });
    // Company B alone: one unit, nothing recurring.
    expect((await subB.get(jobPath(crew.job.id, '/recurring'))).body.items).toEqual([]);

    // 0.6 is under 80 %: no longer recurring. Old clients may still send windowDays.
    const again = await gc.patch(path, { recurringThresholds: { minUnits: 3, minShare: 0.8, windowDays: 14 } }, { 'If-Match': patched.headers.etag as string });
    expect(again.status).toBe(200);
    expect((await gc.get(jobPath(crew.job.id, '/recurring'))).body.items).toEqual([]);
    const bad = await gc.patch(path, { recurringThresholds: { minUnits: 3, minShare: 1.5 } }, { 'If-Match': again.headers.etag as string });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(['recurringThresholds.minShare']);
  });

  it('trend: day by day across status changes (job in UTC)', async () => {
    const res = await gc.get(jobPath(crew.job.id, '/trend?days=21'));
    expect(res.status).toBe(200);
    const body = res.body as TrendResponse;
    expect(body.points).toHaveLength(21);
    expect(body.points[0]!.date).toBe(plusDays(base, -5));
    expect(body.points.at(-1)!.date).toBe(plusDays(base, 15));
    const byDay = (points: TrendResponse['points']) => Object.fromEntries(points.map((p) => [p.date, [p.open, p.fixSubmitted]]));
    const want = (list: [number, number, number][]) => {
      const out: Record<string, [number, number]> = {};
      for (let d = -5; d <= 15; d++) {
        const last = list.filter(([day]) => day <= d).at(-1);
        out[plusDays(base, d)] = last ? [last[1], last[2]] : [0, 0];
      }
      return out;
    };
    // [day, open, fix submitted at the end of that day]
    expect(byDay(body.points)).toEqual(
      want([
        [0, 5, 0], // F1..F5 logged
        [1, 0, 5], // all five fixes submitted
        [2, 3, 0], // F1, F5 accepted; F2, F3, F4 returned
        [3, 2, 0], // F4 voided (F3 reassigned: no status change)
        [4, 2, 1], // F2 fix submitted; F5 reopened
        [5, 1, 1], // F2 accepted; F5 fix submitted
        [6, 2, 1], // F6 logged
        [7, 2, 0], // F5 accepted
        [8, 3, 0], // F7 logged
        [9, 2, 1], // F7 fix submitted
        [10, 1, 2], // F3 fix submitted
        [12, 1, 1], // F3 accepted
      ]),
    );
    // Level 2 only (F5, F6, F7).
    const l2 = (await gc.get(jobPath(crew.job.id, `/trend?days=21&levelId=${L2.id}`))).body as TrendResponse;
    expect(l2.levelId).toBe(L2.id);
    expect(byDay(l2.points)).toEqual(want([[0, 1, 0], [1, 0, 1], [2, 0, 0], [4, 1, 0], [5, 0, 1], [6, 1, 1], [7, 1, 0], [8, 2, 0], [9, 1, 1]]));
    // Company A (its current findings: F1, F2, F3, F4, F6).
    const a = (await subA.get(jobPath(crew.job.id, '/trend?days=21'))).body as TrendResponse;
    expect(byDay(a.points)).toEqual(want([[0, 4, 0], [1, 0, 4], [2, 3, 0], [3, 2, 0], [4, 1, 1], [5, 1, 0], [6, 2, 0], [10, 1, 1], [12, 1, 0]]));
    // Default: 30 days ending today.
    const def = (await insp.get(jobPath(crew.job.id, '/trend'))).body as TrendResponse;
    expect(def.points).toHaveLength(30);
    expect(def.points.at(-1)).toEqual({ date: plusDays(base, 15), open: 1, fixSubmitted: 1 });
  });

  it('refuses: 401 signed out, 404 outsider / unknown job / another job’s level or system, 400 bad query', async () => {
    const jobId = crew.job.id;
    const anon = request.agent(trimout.app);
    await csrfFor(anon);
    for (const p of ['/board', '/readiness', '/scorecards', '/recurring', '/trend']) {
      expect((await anon.get(jobPath(jobId, p))).status).toBe(401);
    }
    const outsider = await buildUser();
    const out = caller(await signIn(trimout.app, outsider.email));
    for (const p of ['/board', '/readiness', '/scorecards', '/recurring', '/trend']) {
      expect((await out.get(jobPath(jobId, p))).status).toBe(404);
      expect((await gc.get(jobPath('00000000-0000-4000-8000-00000000abcd', p))).status).toBe(404);
    }
    // Another job of the same crew: its level and system ids are not on this job.
    const other = await buildJobWithCrew();
    await addMember(other.job.id, crew.gcManager.id, 'gc_manager');
    const otherLevel = await buildLevel(other.job.id);
    const otherSystem = await buildSystem(other.job.id);
    await buildUnit(other.job.id, otherLevel.id, { systemId: otherSystem.id });
    expect((await gc.get(jobPath(jobId, `/readiness?levelId=${otherLevel.id}`))).status).toBe(404);
    expect((await gc.get(jobPath(jobId, `/readiness?systemId=${otherSystem.id}`))).status).toBe(404);
    expect((await gc.get(jobPath(jobId, `/trend?levelId=${otherLevel.id}`))).status).toBe(404);
    // ... and the other job's board answers with nothing of this one.
    const otherBoard = (await gc.get(jobPath(other.job.id, '/board'))).body as BoardResponse;
    expect(otherBoard.levels.map((l) => l.levelId)).toEqual([otherLevel.id]);
    expect(otherBoard.totals).toMatchObject({ open: 0, closed: 0, unitsTotal: 1 });
    // A subcontractor of this job is not on the other one.
    expect((await subA.get(jobPath(other.job.id, '/board'))).status).toBe(404);

    const bad = [
      '/trend?days=3',
      '/trend?days=366',
      '/trend?days=abc',
      '/trend?levelId=nope',
      '/trend?sort=x',
      '/readiness?levelId=1',
      '/readiness?extra=1',
    ];
    for (const p of bad) {
      const res = await gc.get(jobPath(jobId, p));
      expect({ p, status: res.status }).toEqual({ p, status: 400 });
      expect(res.body.error.fields).toBeDefined();
    }
    expect((await gc.get('/api/jobs/not-a-uuid/board')).status).toBe(400);
  });

  // Last: it adds a level the tests above do not expect.
  it('a level with no unit in or above the ceiling says so instead of "can close"; one unchecked cassette blocks it', async () => {
    const L3 = await buildLevel(crew.job.id, { name: 'Roof plant', position: 3 });
    await buildUnit(crew.job.id, L3.id, { tag: 'W1', kind: 'wall_mounted' });
    const board = (await gc.get(jobPath(crew.job.id, '/board'))).body as BoardResponse;
    expect(board.levels.find((l) => l.levelId === L3.id)).toMatchObject({ ceilingUnits: 0, ceilingState: 'no_ceiling_units', ceilingReady: false });
    const cassette = await buildUnit(crew.job.id, L3.id, { tag: 'C1', kind: 'cassette_2way' });
    const readiness = (await gc.get(jobPath(crew.job.id, `/readiness?levelId=${L3.id}`))).body as ReadinessResponse;
    expect(readiness.levels).toEqual([
      expect.objectContaining({ levelId: L3.id, ceilingState: 'blocked', ceilingReady: false, ceilingUnits: 1, ceilingUnitsUnchecked: 1, uncheckedCeilingUnits: [{ unitId: cassette.id, tag: 'C1', version: 1 }], blockers: [] }),
    ]);
  });
});
