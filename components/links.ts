/**
 * Every in-app address, built in one place: a screen writes `links.finding(jobId, findingId)`,
 * never a '/jobs/…' string of its own, so a route that moves changes here only. Each piece taken
 * from data is URI-encoded; query keys come out in a fixed order, so a link reads the same each
 * time. API addresses (the fetches and the CSV downloads) are not here: they are built in
 * components/api (jobPath, components/api/exports.ts).
 *
 * This module imports no screen, so any screen may import it without making an import loop.
 */
import type { Href } from 'expo-router';
import type { FindingStatus, Severity, UnitKindKey } from '../shared/words';
import type { UnitWalkState } from '../shared/schemas/findings';
import type { TestRecordKind, TestResult } from '../shared/schemas/testRecords';
import { DEFAULT_SCORECARD_SORT, type ScorecardSort } from './board/scorecardSort';

const e = encodeURIComponent;

/** `?a=1&b=2` from the given keys, in the given order; undefined, empty and false values are left out. */
function query<T extends object>(params: T, order: readonly (keyof T)[]): string {
  const parts = order
    .filter((k) => params[k] !== undefined && params[k] !== null && params[k] !== '' && params[k] !== false)
    .map((k) => `${e(String(k))}=${e(String(params[k]))}`);
  return parts.length ? `?${parts.join('&')}` : '';
}

/**
 * The address values of a view, for links and for router.setParams: keys in the given order;
 * empty values, and values equal to the view's default, left out (a plain link stays plain).
 */
function values<T extends object>(params: T, order: readonly (keyof T)[], defaults: Partial<T> = {}): Record<string, string> {
  const out: Record<string, string> = {};
  for (const k of order) {
    const v = params[k];
    if (v === undefined || v === null || v === '' || v === false || v === defaults[k]) continue;
    out[String(k)] = String(v);
  }
  return out;
}

/** What the findings list shows when its address says nothing else (newest first). */
export const DEFAULT_FINDING_SORT = '-number';

/** The findings list's address filters (read back by components/findings/filterParams.ts). */
export interface FindingLinkFilters {
  levelId?: string;
  spaceId?: string;
  unitId?: string;
  companyId?: string;
  catalogueItemId?: string;
  kind?: UnitKindKey | string;
  status?: FindingStatus | string;
  severity?: Severity | string;
  /** true (or the list's own 'true'): only overdue findings. */
  overdue?: boolean | 'true' | 'false';
  /** Words in the title, note, code or tag (a "Something else" defect is known by its title). */
  q?: string;
  /** One of the list's sorts (FINDING_SORTS); newest first is the default and is left out. */
  sort?: string;
}
const FINDING_FILTER_ORDER: readonly (keyof FindingLinkFilters)[] = [
  'levelId',
  'spaceId',
  'unitId',
  'companyId',
  'catalogueItemId',
  'kind',
  'status',
  'severity',
  'overdue',
  'q',
  'sort',
];

/** The findings list's filters and sort as address values (links.findings and the list itself write the same). */
export function findingParams(filters: FindingLinkFilters): Record<string, string> {
  const overdue = filters.overdue === true || filters.overdue === 'true' ? true : undefined;
  return values({ ...filters, overdue }, FINDING_FILTER_ORDER, { sort: DEFAULT_FINDING_SORT });
}

/** A level walk's unit filters in the address (read back by components/walk/walkParams.ts). */
export interface WalkLinkFilters {
  /** Part of a unit's tag. */
  q?: string;
  state?: UnitWalkState | string;
  spaceId?: string;
  systemId?: string;
  kind?: UnitKindKey | string;
}
const WALK_FILTER_ORDER: readonly (keyof WalkLinkFilters)[] = ['q', 'state', 'spaceId', 'systemId', 'kind'];

/** A level walk's filters as address values. */
export function walkParams(filters: WalkLinkFilters): Record<string, string> {
  return values(filters, WALK_FILTER_ORDER);
}

/** The scorecards' order as address values: `sort=name` (A→Z) or `sort=-open` (largest first); most overdue first is left out. */
export function scorecardParams(sort: ScorecardSort): Record<string, string> {
  const write = (s: ScorecardSort) => `${s.dir === 'desc' ? '-' : ''}${s.key}`;
  return values({ sort: write(sort) }, ['sort'], { sort: write(DEFAULT_SCORECARD_SORT) });
}

/** The test records list's address filters (read back by components/tests/testParams.ts). */
export interface TestLinkFilters {
  systemId?: string;
  unitId?: string;
  kind?: TestRecordKind | string;
  result?: TestResult | string;
  /** 'true': witnessed only; 'false': waiting for a witness. */
  witnessed?: 'true' | 'false' | string;
  /** 'true': leave corrected (superseded) records out. */
  current?: 'true' | string;
}
const TEST_FILTER_ORDER: readonly (keyof TestLinkFilters)[] = ['systemId', 'unitId', 'kind', 'result', 'witnessed', 'current'];

/** The test records list's filters as address values. */
export function testParams(filters: TestLinkFilters): Record<string, string> {
  return values(filters, TEST_FILTER_ORDER);
}

/** What the new test record screen may be opened with (read by app/(app)/jobs/[jobId]/tests/new.tsx). */
export interface NewTestParams {
  kind?: TestRecordKind | string;
  systemId?: string;
  unitId?: string;
  /** A drain test for a unit of this level (the form offers the level's units). */
  levelId?: string;
  /** The record this one corrects (a witnessed, locked record). */
  supersedesId?: string;
}
const NEW_TEST_ORDER: readonly (keyof NewTestParams)[] = ['kind', 'systemId', 'unitId', 'levelId', 'supersedesId'];

/** `?a=1&b=2` from address values already in order. */
function search(params: Record<string, string>): string {
  return query(params, Object.keys(params));
}

/** What the new-finding screen may be opened with (read by app/(app)/jobs/[jobId]/findings/new.tsx). */
export interface NewFindingParams {
  unitId?: string;
  spaceId?: string;
  levelId?: string;
  catalogueItemId?: string;
  measuredText?: string;
  walkId?: string;
}
const NEW_FINDING_ORDER: readonly (keyof NewFindingParams)[] = ['unitId', 'spaceId', 'levelId', 'catalogueItemId', 'measuredText', 'walkId'];

/** How the levels board shows the job: as the building, or as a table of counts. */
export type BoardView = 'building' | 'table';

/** The set-up sections, one route each under /jobs/:jobId/setup/. */
export type SetupSection = 'job' | 'levels' | 'spaces' | 'systems' | 'models' | 'units' | 'import' | 'companies' | 'crews' | 'members' | 'catalogue' | 'settings';

/** What a plan is opened to place: a finding's pin or a unit's. */
export type PlaceKind = 'finding' | 'unit';

const job = (jobId: string) => `/jobs/${e(jobId)}`;
const level = (jobId: string, levelId: string) => `${job(jobId)}/levels/${e(levelId)}`;
const href = (path: string) => path as Href;

export const links = {
  /** The job list (also where signed-in people land). */
  home: (): Href => href('/'),
  signIn: (): Href => href('/sign-in'),
  signUp: (): Href => href('/sign-up'),
  forgotPassword: (): Href => href('/forgot-password'),
  preferences: (): Href => href('/preferences'),
  /** What is kept on this phone waiting to send, and what needs attention. */
  sync: (): Href => href('/sync'),
  /** A subcontractor's findings to fix, across jobs. */
  inbox: (): Href => href('/inbox'),
  newJob: (): Href => href('/jobs/new'),

  /** The job's overview. */
  job: (jobId: string): Href => href(job(jobId)),
  setup: (jobId: string, section: SetupSection): Href => href(`${job(jobId)}/setup/${section}`),

  /** Pick a level to walk. */
  walk: (jobId: string): Href => href(`${job(jobId)}/walk`),
  /** One level's walk; `saved` names the unit whose check was just saved; `filters` narrow its units. */
  levelWalk: (jobId: string, levelId: string, saved?: string, filters: WalkLinkFilters = {}): Href =>
    href(`${level(jobId, levelId)}/walk${search({ ...walkParams(filters), ...(saved ? { saved } : {}) })}`),
  /** Scan a unit label's QR code (or type the tag) to open that unit's check. */
  scan: (jobId: string): Href => href(`${job(jobId)}/scan`),
  /** One unit's check; `saved` names the unit whose check was just saved (Save and next unit). */
  unitCheck: (jobId: string, unitId: string, saved?: string): Href => href(`${job(jobId)}/units/${e(unitId)}/check${query({ saved }, ['saved'])}`),
  /** A level's plan, optionally opened to place a finding's or a unit's pin. */
  plan: (jobId: string, levelId: string, place?: { kind: PlaceKind; id: string }): Href =>
    href(`${level(jobId, levelId)}/plan${place ? query({ place: place.kind, id: place.id }, ['place', 'id']) : ''}`),

  /** The findings list, already filtered. */
  findings: (jobId: string, filters: FindingLinkFilters = {}): Href => href(`${job(jobId)}/findings${search(findingParams(filters))}`),
  newFinding: (jobId: string, params: NewFindingParams = {}): Href => href(`${job(jobId)}/findings/new${query(params, NEW_FINDING_ORDER)}`),
  finding: (jobId: string, findingId: string): Href => href(`${job(jobId)}/findings/${e(findingId)}`),
  reinspections: (jobId: string): Href => href(`${job(jobId)}/reinspections`),
  /** A PDF report built in the background: its progress, then the download. */
  report: (jobId: string, reportId: string): Href => href(`${job(jobId)}/reports/${e(reportId)}`),

  /** The levels board: the building (stack of floors, the default) or the table of counts. */
  board: (jobId: string, view?: BoardView): Href => href(`${job(jobId)}/board${query({ view: view === 'table' ? view : undefined }, ['view'])}`),
  /** A level's page on the board. */
  level: (jobId: string, levelId: string): Href => href(level(jobId, levelId)),
  /** Readiness of the job, or of one system. */
  readiness: (jobId: string, systemId?: string): Href => href(`${job(jobId)}/readiness${query({ systemId }, ['systemId'])}`),
  /** Test records (pressure, evacuation, charge, drain, start-up), already filtered. */
  tests: (jobId: string, filters: TestLinkFilters = {}): Href => href(`${job(jobId)}/tests${search(testParams(filters))}`),
  testRecord: (jobId: string, recordId: string): Href => href(`${job(jobId)}/tests/${e(recordId)}`),
  newTestRecord: (jobId: string, params: NewTestParams = {}): Href => href(`${job(jobId)}/tests/new${query(params, NEW_TEST_ORDER)}`),
  /** Sampling audits: the list, the plan form and one audit. */
  audits: (jobId: string): Href => href(`${job(jobId)}/audits`),
  newAudit: (jobId: string): Href => href(`${job(jobId)}/audits/new`),
  audit: (jobId: string, auditId: string): Href => href(`${job(jobId)}/audits/${e(auditId)}`),
  /** Company scorecards, optionally in another order than most overdue first. */
  scorecards: (jobId: string, sort: ScorecardSort = DEFAULT_SCORECARD_SORT): Href => href(`${job(jobId)}/scorecards${search(scorecardParams(sort))}`),
} as const;
