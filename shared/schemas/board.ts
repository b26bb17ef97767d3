/**
 * The GC's view of a job: levels board, readiness, company scorecards, recurring defects,
 * the open-findings trend, and level plans with pins. Query schemas (zod, strict) and
 * response types shared by the server (server/routes/board.ts, plans.ts) and the screens.
 *
 * Every path is under /api/jobs/:jobId:
 *   GET /board                     BoardResponse      (all roles; a subcontractor's counts cover only their company)
 *   GET /board/systems             FloorSystemsResponse (all roles)
 *   GET /readiness?levelId&systemId ReadinessResponse (all roles)
 *   GET /scorecards                ScorecardsResponse (GC manager, inspector)
 *   GET /recurring                 RecurringResponse  (all roles; subcontractor: own company's rows)
 *   GET /trend?levelId&days        TrendResponse      (all roles)
 *   GET/POST/DELETE /levels/:levelId/plan             (plan image; metadata in LevelPlanDto)
 *
 * Words: "open" on the board means status open (not yet fixed); "unresolved" means open or
 * fix submitted; "overdue" is unresolved and past its due date in the job's time zone.
 *
 * Stable contract: change it by adding, never by renaming or removing.
 */
import { z } from 'zod';
import type { Severity, UnitKindKey } from '../words';
import type { CeilingState } from '../rules/ceilings';

// ---------------------------------------------------------------------------------------------
// Levels board
// ---------------------------------------------------------------------------------------------

/** Counts for one level (or the whole job). Voided findings are never counted. */
export interface BoardCounts {
  /** Status open, any severity. */
  open: number;
  /** Status open and severity critical / major (subsets of `open`). */
  openCritical: number;
  openMajor: number;
  /** Status fix submitted (waiting for re-inspection). */
  fixSubmitted: number;
  closed: number;
  /**
   * Every finding counted here: open + fixSubmitted + closed = total (the three statuses partition
   * it; voided findings are outside it, never counted).
   */
  total: number;
  /** Open or fix submitted: open + fixSubmitted. */
  unresolved: number;
  /**
   * Status open (new or returned) and past due: a share of `open` (a fix waiting for re-inspection
   * waits on the inspector and is never overdue), so the screens show it as "3 of 8 overdue".
   */
  overdue: number;
  /** Units on the level, and those with a complete unit check. */
  unitsTotal: number;
  unitsChecked: number;
}

export interface BoardLevelRow extends BoardCounts {
  levelId: string;
  name: string;
  position: number;
  /**
   * Whether the level's ceilings can close (shared/rules/ceilings.ts): every unit in or above the
   * ceiling checked and no unresolved finding needing access above it; or no such unit at all.
   */
  ceilingState: CeilingState;
  /** ceilingState === 'ready'. */
  ceilingReady: boolean;
  /** How many unresolved findings block closing the ceiling. */
  ceilingBlockers: number;
  /**
   * How many test records the level waits for before its ceilings close (a system's pressure test,
   * a concealed unit's drain test: missing, failed or awaiting a witness); GET /readiness lists them.
   */
  ceilingTestBlockers: number;
  /** Units on the level in or above the ceiling, and those of them without a complete unit check (not counting excluded ones). */
  ceilingUnits: number;
  ceilingUnitsUnchecked: number;
  /** Units in or above the ceiling without a complete unit check that a GC manager excluded from the rule. */
  ceilingUnitsExcluded: number;
  /**
   * Days the oldest fix on the level has waited for the inspector (from the day its latest fix was
   * submitted to today, on the job's clock: shared/rules/waiting.ts); null when none waits.
   * `fixSubmitted` is how many wait.
   */
  longestWaitDays: number | null;
}

export interface BoardResponse {
  levels: BoardLevelRow[];
  totals: BoardCounts;
  /** The longest wait for the inspector in the job (in the caller's scope), as on the rows; null when none waits. */
  longestWaitDays: number | null;
  /** Today in the job's time zone (YYYY-MM-DD): the date "overdue" was judged on. */
  today: string;
  /** Set (to the caller's company) when the counts cover only that company's findings: a subcontractor. */
  companyScope: string | null;
}

/**
 * GET /board/systems: each refrigerant system with the levels its units are on, for the building
 * view of the board (a system over its limit, or waiting for records, is shown on its floors).
 */
export interface FloorSystem {
  systemId: string;
  name: string;
  /** Levels with at least one of its units. */
  levelIds: string[];
  /**
   * The system page's refrigerant checks: `over_limit` when the concentration check or an A2L
   * floor-area check fails; `within_limit` when the concentration check passes and no A2L check
   * fails; `not_judged` otherwise (a charge, space size or limit not entered yet).
   */
  refrigerant: 'over_limit' | 'within_limit' | 'not_judged';
  /** As on readiness: units ready, pressure test and evacuation passed, charge recorded. */
  startupReady: boolean;
  /** Test records start-up waits for (missing, failed or not witnessed): readiness lists them. */
  recordsWaiting: number;
}

export interface FloorSystemsResponse {
  systems: FloorSystem[];
}

// ---------------------------------------------------------------------------------------------
// Readiness
// ---------------------------------------------------------------------------------------------

export const readinessQuerySchema = z
  .object({
    levelId: z.string().uuid().optional(),
    systemId: z.string().uuid().optional(),
  })
  .strict();
export type ReadinessQuery = z.infer<typeof readinessQuerySchema>;

/** A finding that holds something back. */
export interface ReadinessBlocker {
  findingId: string;
  number: number;
  code: string;
  title: string;
  severity: Severity;
  status: 'open' | 'fix_submitted';
  unitId: string | null;
  unitTag: string | null;
}

export interface UnitReadiness {
  unitId: string;
  tag: string;
  kind: UnitKindKey;
  levelId: string;
  systemId: string | null;
  /** A complete unit check exists (the latest check is complete). */
  checked: boolean;
  /** Ready for startup: checked and no unresolved critical or major finding. */
  ready: boolean;
  /** Unresolved critical or major findings on the unit (by number; at most READINESS_UNIT_BLOCKERS_MAX). */
  blockers: ReadinessBlocker[];
  /** How many there are in all: present only when `blockers` was cut to READINESS_UNIT_BLOCKERS_MAX. */
  blockersTotal?: number;
}

export interface SystemReadiness {
  systemId: string;
  name: string;
  /** All its units are ready (a system with no units is not ready). */
  ready: boolean;
  unitsTotal: number;
  unitsReady: number;
  unitsUnchecked: number;
  units: UnitReadiness[];
}

export interface LevelReadiness {
  levelId: string;
  name: string;
  position: number;
  /** Whether the ceilings can close, and why not (shared/rules/ceilings.ts). */
  ceilingState: CeilingState;
  /** ceilingState === 'ready'. */
  ceilingReady: boolean;
  /** Units on the level in or above the ceiling, and those of them without a complete unit check (not counting excluded ones). */
  ceilingUnits: number;
  ceilingUnitsUnchecked: number;
  /** The unchecked ones by tag (at most READINESS_LEVEL_BLOCKERS_MAX), with the unit's version for If-Match. */
  uncheckedCeilingUnits: { unitId: string; tag: string; version: number }[];
  /** Units without a complete unit check that a GC manager excluded from the rule, and the first of them by tag (at most READINESS_LEVEL_BLOCKERS_MAX). */
  ceilingUnitsExcluded: number;
  excludedCeilingUnits: ExcludedCeilingUnit[];
  /** Unresolved findings whose defect type needs access above the ceiling (by number; at most READINESS_LEVEL_BLOCKERS_MAX). */
  blockers: ReadinessBlocker[];
  /** How many there are in all: present only when `blockers` was cut to READINESS_LEVEL_BLOCKERS_MAX. */
  blockersTotal?: number;
  unitsTotal: number;
  unitsReady: number;
}

/** A unit excluded from the ceiling rule: why, by whom and when (PUT /units/:unitId/ceiling-exclusion). */
export interface ExcludedCeilingUnit {
  unitId: string;
  tag: string;
  version: number;
  reason: string;
  by: { id: string; name: string };
  /** ISO date-time. */
  at: string;
}

/** Readiness lists at most this many blockers per unit / per level (the first by number); `blockersTotal` then gives the full count. */
export const READINESS_UNIT_BLOCKERS_MAX = 5;
export const READINESS_LEVEL_BLOCKERS_MAX = 20;

export interface ReadinessResponse {
  systems: SystemReadiness[];
  levels: LevelReadiness[];
  /** Units not on any system (still judged for startup). */
  unitsWithoutSystem: UnitReadiness[];
  /**
   * Set (to the caller's company) for a subcontractor: blockers are only that company's findings,
   * so `ready` / `ceilingReady` then mean "nothing of this company holds it back".
   */
  companyScope: string | null;
}

// ---------------------------------------------------------------------------------------------
// Company scorecards
// ---------------------------------------------------------------------------------------------

export interface CompanyScorecard {
  companyId: string;
  name: string;
  /** The first of the company's trades on this job (a TradeKey), or null. */
  trade: string | null;
  /** All its trades on this job (TradeKey values). */
  trades: string[];
  /** Status open. */
  open: number;
  /** Unresolved and past due. */
  overdue: number;
  /** Fix submitted, waiting for re-inspection. */
  fixesWaiting: number;
  /** Days the company's oldest waiting fix has waited for the inspector (job's clock); null when none waits. */
  longestWaitDays: number | null;
  /** Findings closed by an accepted fix. */
  accepted: number;
  /** Of those, accepted on their first re-inspection (never returned). */
  acceptedFirstPass: number;
  /** acceptedFirstPass / accepted, 0..1; null when nothing was accepted yet. */
  firstPassRate: number | null;
  /** Median days from assignment (logging or reassignment to this company) to the accepted fix; null when none. */
  medianDaysToAccept: number | null;
  /** Re-inspections that returned a fix to this company. */
  returns: number;
}

export interface ScorecardsResponse {
  companies: CompanyScorecard[];
}

// ---------------------------------------------------------------------------------------------
// Recurring defects
// ---------------------------------------------------------------------------------------------

/** The job's thresholds (`recurringThresholds` on the job, schema in ./setup.ts): a defect type is
 * recurring when found on at least `minUnits` units and at least `minShare` (0..1) of the checked
 * units of the kinds it applies to. Default: 3 units and 10 %. */
export interface RecurringThresholdsView {
  minUnits: number;
  minShare: number;
}

export interface RecurringDefect {
  /** One per defect: the type's id, or for "Something else" `other:` and its normalised title. */
  key: string;
  /** For "Something else": the job's other type (shared by every such defect; `title` tells them apart). */
  catalogueItemId: string;
  code: string;
  title: string;
  /** Distinct units with a (non-voided) finding of this type. */
  unitCount: number;
  /** The denominator: units of the kinds the type applies to whose latest check is complete,
   * plus the units the type was found on that are not among them (they were looked at). */
  checkedUnits: number;
  /** unitCount / checkedUnits, 0..1. */
  share: number;
  /** When the type crossed the thresholds (ISO date-time): used by the digest to say "new". */
  recurringSince: string;
  byLevel: { levelId: string; name: string; count: number }[];
  byCompany: { companyId: string; name: string; count: number }[];
  /**
   * Each company's units split by the crew that installed them (a crew of that same company);
   * `crewId` and `name` null for the company's units with no such crew recorded. Per company the
   * counts add up to its `byCompany` count.
   */
  byCrew: RecurringCrewCount[];
}

export interface RecurringCrewCount {
  companyId: string;
  companyName: string;
  crewId: string | null;
  name: string | null;
  count: number;
}

export interface RecurringResponse {
  thresholds: RecurringThresholdsView;
  items: RecurringDefect[];
  /** Set (to the caller's company) for a subcontractor: counted over that company's findings only. */
  companyScope: string | null;
}

// ---------------------------------------------------------------------------------------------
// Trend
// ---------------------------------------------------------------------------------------------

export const trendQuerySchema = z
  .object({
    levelId: z.string().uuid().optional(),
    days: z.coerce.number().int().min(7).max(365).optional(),
  })
  .strict();
export type TrendQuery = z.infer<typeof trendQuerySchema>;
/** Days in the trend when `days` is not given. */
export const TREND_DAYS_DEFAULT = 30;

export interface TrendPoint {
  /** YYYY-MM-DD in the job's time zone; counts are as at the end of that day. */
  date: string;
  open: number;
  fixSubmitted: number;
}

export interface TrendResponse {
  levelId: string | null;
  points: TrendPoint[];
  /** Set (to the caller's company) for a subcontractor: that company's findings only. */
  companyScope: string | null;
}

// ---------------------------------------------------------------------------------------------
// Plans and pins
// ---------------------------------------------------------------------------------------------

/** A level's plan image, as it appears on the level (`plan` field, null when none). */
export interface LevelPlanDto {
  contentType: 'image/png' | 'image/jpeg';
  width: number;
  height: number;
  /** Bumped on each upload; use as a cache key in the image URL. */
  version: number;
  uploadedAt: string;
}

/** A pin is a point on the level's plan, as fractions of its width and height (0..1). */
export const pinSchema = z
  .object({
    x: z.number().min(0).max(1),
    y: z.number().min(0).max(1),
  })
  .strict();
export type Pin = z.infer<typeof pinSchema>;

/** GET /levels/:levelId/plan?v=N: `v` is the plan version the URL was made for (a cache key). */
export const planImageQuerySchema = z
  .object({
    v: z.coerce.number().int().min(1).max(2_147_483_647).optional(),
  })
  .strict();
export type PlanImageQuery = z.infer<typeof planImageQuerySchema>;

/** The URL of a level's plan image, with its version as the cache key. */
export function planImageUrl(jobId: string, levelId: string, version: number): string {
  return `/api/jobs/${encodeURIComponent(jobId)}/levels/${encodeURIComponent(levelId)}/plan?v=${version}`;
}
