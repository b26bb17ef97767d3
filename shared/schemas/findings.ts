/**
 * Walks, unit checks and findings: request schemas (zod, strict) and response types.
 * The walk screens use these schemas with zodResolver; the server validates every request
 * with the same ones (server/routes/walks.ts, checks.ts, findings.ts, photos.ts).
 * See docs/api-findings.md for the routes, roles and status codes.
 *
 * Every path is under /api/jobs/:jobId. Quantities are sent as the trade types them
 * ("34 in", "4' 10-1/2\"", "1486 mm") and stored in base units (shared/calc/quantity.ts).
 *
 * Stable contract: change it by adding, never by renaming or removing.
 */
import { z } from 'zod';
import type { QuantityKind } from '../catalogue/types';
import type { RuleResult, RuleStatus } from '../calc/rules';
import {
  CHECK_MARKS,
  FINDING_STATUSES,
  SEVERITIES,
  UNIT_KIND_KEYS,
  type CheckMark,
  type FindingStatus,
  type Severity,
  type UnitKindKey,
} from '../words';

// ---------------------------------------------------------------------------------------------
// Building blocks
// ---------------------------------------------------------------------------------------------

export const FINDINGS_LIST_LIMIT_MAX = 200;
export const FINDINGS_LIST_LIMIT_DEFAULT = 50;
/** Items in one unit check (the catalogue holds far fewer per unit kind). */
export const CHECK_ITEMS_MAX = 200;
export const NOTE_MAX = 2000;
export const MEASURED_TEXT_MAX = 60;

const id = (label = 'id') => z.string({ error: `Choose a ${label}.` }).uuid(`Not a valid ${label}.`);

const pageQuery = {
  limit: z.coerce
    .number({ error: `A whole number from 1 to ${FINDINGS_LIST_LIMIT_MAX}.` })
    .int(`A whole number from 1 to ${FINDINGS_LIST_LIMIT_MAX}.`)
    .min(1, `A whole number from 1 to ${FINDINGS_LIST_LIMIT_MAX}.`)
    .max(FINDINGS_LIST_LIMIT_MAX, `At most ${FINDINGS_LIST_LIMIT_MAX}.`)
    .optional(),
  /** Opaque; the server checks it whole (length, signature, types) and answers 400 invalid_cursor. */
  cursor: z.string().optional(),
};

const booleanQuery = z.enum(['true', 'false'], { error: 'Use true or false.' }).transform((v) => v === 'true');

/** A comma-separated list of enum values in a query string: `status=open,fix_submitted`. */
function enumList<T extends readonly [string, ...string[]]>(values: T) {
  return z
    .string()
    .max(200, 'Too long.')
    .transform((s, ctx) => {
      const parts = s
        .split(',')
        .map((p) => p.trim())
        .filter((p) => p !== '');
      const bad = parts.find((p) => !(values as readonly string[]).includes(p));
      if (bad !== undefined || parts.length === 0) {
        ctx.addIssue({ code: 'custom', message: `Use one or more of ${values.join(', ')}, separated by commas.` });
        return z.NEVER;
      }
      return [...new Set(parts)] as T[number][];
    });
}

const dateOnly = z
  .string({ error: 'Enter a date (YYYY-MM-DD).' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter a date as YYYY-MM-DD.')
  .refine(
    (s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s),
    'Not a real date.',
  );

const measuredText = z
  .string({ error: 'Type the measured value with its unit (e.g. 34 in).' })
  .trim()
  .min(1, 'Type the measured value with its unit (e.g. 34 in).')
  .max(MEASURED_TEXT_MAX, `A measured value is at most ${MEASURED_TEXT_MAX} characters.`);

const note = z
  .string({ error: 'The note must be text.' })
  .trim()
  .max(NOTE_MAX, `The note is at most ${NOTE_MAX} characters.`);

/** A plan pin: a fraction of the plan image's width / height, 0..1. */
const pin = () =>
  z
    .number({ error: 'A number from 0 to 1.' })
    .min(0, 'From 0 to 1.')
    .max(1, 'From 0 to 1.');

// ---------------------------------------------------------------------------------------------
// Path parameters
// ---------------------------------------------------------------------------------------------

export const walkParamsSchema = z.object({ jobId: id('job id'), walkId: id('walk id') }).strict();
export const checkUnitParamsSchema = z.object({ jobId: id('job id'), unitId: id('unit id') }).strict();
export const walkLevelParamsSchema = z.object({ jobId: id('job id'), levelId: id('level id') }).strict();
export const findingParamsSchema = z.object({ jobId: id('job id'), findingId: id('finding id') }).strict();
export const photoParamsSchema = z.object({ jobId: id('job id'), photoId: id('photo id') }).strict();

/** A person as shown beside a record. */
export interface PersonRef {
  id: string;
  name: string;
}

// ---------------------------------------------------------------------------------------------
// Walks
// ---------------------------------------------------------------------------------------------

/** POST /walks (inspector, GC manager) → 201 WalkDetail. Idempotency-Key honoured. */
export const createWalkSchema = z.object({ levelId: id('level') }).strict();
export type CreateWalkInput = z.input<typeof createWalkSchema>;

/** POST /walks/:walkId/finish (the walk's inspector or a GC manager), no body → 200 WalkDetail. */
export const finishWalkSchema = z.object({}).strict();

/** GET /walks → ListResponse<WalkDto>, newest first. */
export const walkListQuerySchema = z
  .object({
    levelId: id('level id').optional(),
    inspectorId: id('inspector id').optional(),
    /** true: only walks not finished yet; false: only finished ones. */
    open: booleanQuery.optional(),
    ...pageQuery,
  })
  .strict();
export type WalkListQuery = z.input<typeof walkListQuerySchema>;
export type WalkListQueryParsed = z.output<typeof walkListQuerySchema>;

export interface WalkDto {
  id: string;
  levelId: string;
  levelName: string;
  inspector: PersonRef;
  /** ISO 8601 */
  startedAt: string;
  finishedAt: string | null;
  /** Unit checks recorded within this walk. */
  checkCount: number;
}

/** Units on the level whose current (latest) unit check is complete, of all units on the level. */
export interface Coverage {
  checked: number;
  total: number;
  /** Units on the level with at least one open or fix-submitted finding. */
  withOpenFindings: number;
  /** Units with a current check that is not complete yet. */
  inProgress: number;
}

/** GET /walks/:walkId, POST /walks (201), POST /walks/:walkId/finish. */
export interface WalkDetail extends WalkDto {
  /** The level's coverage now (all walks), and the units checked within this walk. */
  coverage: Coverage;
  checkedInWalk: number;
}

// ---------------------------------------------------------------------------------------------
// A level's units, with their state at a glance (the walk screen's list)
// ---------------------------------------------------------------------------------------------

/**
 * - not_checked:   no unit check yet
 * - in_progress:   the latest unit check is not complete
 * - checked_ok:    the latest unit check is complete and the unit has no open finding
 * - open_findings: the unit has at least one open or fix-submitted finding (whatever its checks)
 */
export const UNIT_WALK_STATES = ['not_checked', 'in_progress', 'checked_ok', 'open_findings'] as const;
export type UnitWalkState = (typeof UNIT_WALK_STATES)[number];
export const UNIT_WALK_STATE_LABELS: Record<UnitWalkState, string> = {
  not_checked: 'Not checked yet',
  in_progress: 'Check in progress',
  checked_ok: 'Checked OK',
  open_findings: 'Open findings',
};

/** GET /levels/:levelId/walk-units → WalkUnitsResponse, ordered by tag. */
export const walkUnitsQuerySchema = z
  .object({
    spaceId: id('space id').optional(),
    systemId: id('system id').optional(),
    kind: z.enum(UNIT_KIND_KEYS, { error: 'Not a unit kind.' }).optional(),
    /** Tag contains (case-insensitive). */
    q: z.string().trim().max(40, 'At most 40 characters.').optional(),
    state: z.enum(UNIT_WALK_STATES, { error: `One of ${UNIT_WALK_STATES.join(', ')}.` }).optional(),
    ...pageQuery,
  })
  .strict();
export type WalkUnitsQuery = z.input<typeof walkUnitsQuerySchema>;
export type WalkUnitsQueryParsed = z.output<typeof walkUnitsQuerySchema>;

export interface WalkUnitDto {
  id: string;
  tag: string;
  kind: UnitKindKey;
  modelName: string | null;
  spaceId: string | null;
  spaceName: string | null;
  systemId: string | null;
  systemName: string | null;
  state: UnitWalkState;
  /** Open + fix-submitted findings on this unit. */
  openFindings: number;
  /** Worst severity among those, or null. */
  worstSeverity: Severity | null;
  lastCheck: { id: string; checkedAt: string; checkedBy: PersonRef; complete: boolean } | null;
}

export interface WalkUnitsResponse {
  items: WalkUnitDto[];
  nextCursor: string | null;
  /** Over the filters given (space, system, kind, q, state), all pages. */
  counts: { total: number; checked: number; notChecked: number; inProgress: number; withOpenFindings: number };
  /** The whole level, whatever the filters. */
  coverage: Coverage;
}

// ---------------------------------------------------------------------------------------------
// Unit checks
// ---------------------------------------------------------------------------------------------

export const checkItemInputSchema = z
  .object({
    catalogueItemId: id('catalogue item'),
    mark: z.enum(CHECK_MARKS, { error: `One of ${CHECK_MARKS.join(', ')}.` }),
    /** Only for items with a measured rule: "34 in", "4' 10-1/2\"", "1486 mm", or yes / no. */
    measuredText: measuredText.nullable().optional(),
  })
  .strict();
export type CheckItemInput = z.input<typeof checkItemInputSchema>;

/**
 * POST /units/:unitId/checks (inspector, GC manager) → 201 UnitCheckDto. Idempotency-Key honoured.
 * Items must apply to the unit's kind and not be retired; each item at most once. A measured
 * item whose value fails its rule is recorded as a defect, whatever mark was sent.
 */
export const recordCheckSchema = z
  .object({
    walkId: id('walk').nullable().optional(),
    items: z
      .array(checkItemInputSchema, { error: 'Send items: the catalogue items checked, each with a mark.' })
      .min(1, 'Mark at least one item.')
      .max(CHECK_ITEMS_MAX, `At most ${CHECK_ITEMS_MAX} items in one check.`)
      .refine((items) => new Set(items.map((i) => i.catalogueItemId)).size === items.length, 'A catalogue item appears twice.'),
    /** true when every item that applies has been marked (the screen's "finish unit"). */
    complete: z.boolean({ error: 'Send complete: true or false.' }),
  })
  .strict();
export type RecordCheckInput = z.input<typeof recordCheckSchema>;

/** A failed measurement's suggested finding: the finding form's prefill. */
export interface ProposedFinding {
  unitId: string;
  levelId: string;
  spaceId: string | null;
  catalogueItemId: string;
  code: string;
  title: string;
  severity: Severity;
  /** The job company whose trades include the item's trade (the first by name), or null. */
  companyId: string | null;
  companyName: string | null;
  /** YYYY-MM-DD, from the job's per-severity policy, counted in the job's time zone. */
  dueOn: string;
  measuredText: string | null;
  /** Base units. */
  measuredValue: number | null;
  limit: number | null;
  upper: number | null;
  limitSource: string;
  message: string;
  walkId: string | null;
  unitCheckId: string;
}

export interface CheckItemDto {
  catalogueItemId: string;
  code: string;
  title: string;
  mark: CheckMark;
  measuredText: string | null;
  /** Base units; null when not measured or a yes/no answer. */
  measuredValue: number | null;
  quantity: QuantityKind | null;
  /** The measured rule's evaluation (shared/calc evaluateRule), or null for an item without one. */
  result: RuleResult | null;
  pass: boolean | null;
  status: RuleStatus | null;
  margin: number | null;
  limitSource: string | null;
  message: string | null;
  /** Present for a measured item that failed. */
  proposedFinding: ProposedFinding | null;
}

export interface UnitCheckDto {
  id: string;
  unitId: string;
  walkId: string | null;
  checkedBy: PersonRef;
  checkedAt: string;
  complete: boolean;
  items: CheckItemDto[];
  counts: { ok: number; defect: number; notApplicable: number; failedMeasurements: number };
}

/** GET /units/:unitId/checks: the unit's state and its check history, newest first. */
export const checkListQuerySchema = z.object({ ...pageQuery }).strict();
export interface UnitChecksResponse {
  unit: WalkUnitDto;
  /** The latest check (the unit's current check), or null. */
  current: UnitCheckDto | null;
  items: UnitCheckDto[];
  nextCursor: string | null;
}

// ---------------------------------------------------------------------------------------------
// Findings
// ---------------------------------------------------------------------------------------------

export const FINDING_EVENT_KINDS = [
  'logged',
  'fix_submitted',
  'accepted',
  'returned',
  'closed_on_walk',
  'voided',
  'reopened',
  'reassigned',
  'severity_changed',
  'due_changed',
  'comment',
  'photo_added',
] as const;
export type FindingEventKind = (typeof FINDING_EVENT_KINDS)[number];

/** Findings still waiting on someone: counted as "open" on boards and unit states. */
export const ACTIVE_FINDING_STATUSES: readonly FindingStatus[] = ['open', 'fix_submitted'];

/**
 * POST /findings → 201 FindingDetail. Idempotency-Key honoured (a retry returns the first answer).
 * Either JSON (no photos) or multipart/form-data with a `data` field holding this JSON and
 * up to 10 files in `photos` (each ≤ 15 MB; JPEG, PNG, WebP or HEIC, decided from the bytes).
 * Attach to a unit, or a space, or a level: the finding's level is derived from the unit or
 * space; a levelId sent beside a unit or space must match it.
 * Omitted severity → the catalogue item's default; omitted companyId → the suggested company
 * (400 when none fits); omitted dueOn → today (job time zone) + the job's days for the severity.
 */
export const createFindingSchema = z
  .object({
    catalogueItemId: id('defect type'),
    unitId: id('unit').nullable().optional(),
    spaceId: id('space').nullable().optional(),
    levelId: id('level').nullable().optional(),
    severity: z.enum(SEVERITIES, { error: `One of ${SEVERITIES.join(', ')}.` }).optional(),
    companyId: id('responsible company').optional(),
    dueOn: dateOnly.optional(),
    note: note.optional(),
    /** For a defect type with a measured rule: the value as typed. */
    measuredText: measuredText.nullable().optional(),
    walkId: id('walk').nullable().optional(),
    unitCheckId: id('unit check').nullable().optional(),
    pinX: pin().nullable().optional(),
    pinY: pin().nullable().optional(),
  })
  .strict()
  .refine((f) => Boolean(f.unitId || f.spaceId || f.levelId), {
    message: 'Attach the finding to a unit, a space or a level.',
    path: ['unitId'],
  })
  .refine((f) => (f.pinX == null) === (f.pinY == null), { message: 'Send both pinX and pinY, or neither.', path: ['pinX'] });
export type CreateFindingInput = z.input<typeof createFindingSchema>;
export type CreateFindingParsed = z.output<typeof createFindingSchema>;

export const FINDING_SORTS = [
  'number',
  '-number',
  'dueOn',
  '-dueOn',
  'loggedAt',
  '-loggedAt',
  'severity',
  '-severity',
] as const;
export type FindingSort = (typeof FINDING_SORTS)[number];

/**
 * GET /findings → FindingListResponse. A subcontractor sees only their company's findings.
 * status / severity take comma-separated lists. Default sort: -number (newest first).
 * `severity` sorts critical first; `-severity` minor first.
 */
export const findingListQuerySchema = z
  .object({
    levelId: id('level id').optional(),
    spaceId: id('space id').optional(),
    unitId: id('unit id').optional(),
    kind: z.enum(UNIT_KIND_KEYS, { error: 'Not a unit kind.' }).optional(),
    status: enumList(FINDING_STATUSES).optional(),
    severity: enumList(SEVERITIES).optional(),
    companyId: id('company id').optional(),
    catalogueItemId: id('defect type id').optional(),
    /** Only findings past their due date and still open or fix-submitted. */
    overdue: booleanQuery.optional(),
    /** Text in the note, the defect type's title or code, the unit's tag, or the number ("214" or "#214"). */
    q: z.string().trim().max(100, 'At most 100 characters.').optional(),
    sort: z.enum(FINDING_SORTS, { error: `One of ${FINDING_SORTS.join(', ')}.` }).optional(),
    ...pageQuery,
  })
  .strict();
export type FindingListQuery = z.input<typeof findingListQuerySchema>;
export type FindingListQueryParsed = z.output<typeof findingListQuerySchema>;

export interface PhotoDto {
  id: string;
  /** GET these with the session cookie; both answer 404 to anyone who may not see the finding. */
  url: string;
  thumbUrl: string;
  contentType: string;
  width: number | null;
  height: number | null;
  bytes: number | null;
  /** null: a photo of the finding as logged; otherwise the fix it was sent with. */
  fixId: string | null;
  uploadedBy: PersonRef | null;
  createdAt: string;
}

export interface FindingDto {
  id: string;
  number: number;
  /** "#214" */
  label: string;
  levelId: string;
  levelName: string;
  spaceId: string | null;
  spaceName: string | null;
  unitId: string | null;
  unitTag: string | null;
  unitKind: UnitKindKey | null;
  catalogueItemId: string;
  code: string;
  title: string;
  severity: Severity;
  status: FindingStatus;
  companyId: string;
  companyName: string;
  dueOn: string;
  /** Past due (in the job's time zone) and still open or fix-submitted. */
  overdue: boolean;
  note: string;
  measuredText: string | null;
  /** Base units. */
  measuredValue: number | null;
  ruleResult: RuleResult | null;
  returnCount: number;
  loggedBy: PersonRef;
  loggedAt: string;
  walkId: string | null;
  pinX: number | null;
  pinY: number | null;
  voidedReason: string | null;
  photoCount: number;
  /** The first photo's thumbnail, for cards; null without photos. */
  thumbUrl: string | null;
  version: number;
}

export interface FindingEventDto {
  id: string;
  kind: FindingEventKind;
  actor: PersonRef;
  at: string;
  from: Record<string, unknown> | null;
  to: Record<string, unknown> | null;
  reason: string | null;
  photoIds: string[];
}

/** GET /findings/:findingId (ETag "v<version>"), POST /findings (201). */
export interface FindingDetail extends FindingDto {
  photos: PhotoDto[];
  /** Oldest first. */
  events: FindingEventDto[];
  catalogue: {
    description: string;
    fixGuidance: string;
    caution: string | null;
    needsCeilingAccess: boolean;
    quantity: QuantityKind | null;
    measure: string | null;
  };
}

export interface FindingListResponse {
  items: FindingDto[];
  nextCursor: string | null;
  /** Findings matching every filter, all pages. */
  total: number;
  /** Matching every filter except status (for status tabs) / except severity. */
  counts: { byStatus: Record<FindingStatus, number>; bySeverity: Record<Severity, number> };
}

/** "#214" */
export function findingLabel(number: number): string {
  return `#${number}`;
}

// ---------------------------------------------------------------------------------------------
// Correction loop (issue 5): fixes, re-inspections, changes, comments, bulk, inbox, queue.
// Paths under /api/jobs/:jobId/findings/:findingId unless said otherwise. See docs/api-findings.md.
// ---------------------------------------------------------------------------------------------

export const REASON_MAX = 1000;
export const COMMENT_MAX = 2000;
export const BULK_FINDINGS_MAX = 200;

const reason = (what = 'a reason') =>
  z
    .string({ error: `Give ${what}.` })
    .trim()
    .min(1, `Give ${what}.`)
    .max(REASON_MAX, `The reason is at most ${REASON_MAX} characters.`);

const optionalReason = z.string({ error: 'The reason must be text.' }).trim().max(REASON_MAX, `The reason is at most ${REASON_MAX} characters.`).optional();

/** The actions of the status machine (server/services/findingStatus.ts). */
export const FINDING_ACTIONS = ['submit_fix', 'accept', 'return', 'close', 'void', 'reopen', 'reassign', 'change_severity', 'change_due'] as const;
export type FindingAction = (typeof FINDING_ACTIONS)[number];
/** Words used in refusals: "This finding is closed; it cannot be voided." */
export const FINDING_ACTION_WORDS: Record<FindingAction, string> = {
  submit_fix: 'given a fix',
  accept: 'accepted',
  return: 'returned',
  close: 'closed',
  void: 'voided',
  reopen: 'reopened',
  reassign: 'reassigned',
  change_severity: 'given another severity',
  change_due: 'given another due date',
};

/**
 * POST /findings/:findingId/fixes (the finding's subcontractor company, GC manager) → 201 FixDetail.
 * multipart/form-data: `data` = this JSON, and 1 to 10 files in `photos` (same rules as findings).
 * Idempotency-Key honoured. Only an open finding takes a fix (409 otherwise).
 */
export const submitFixSchema = z
  .object({
    note: z
      .string({ error: 'Say what was fixed.' })
      .trim()
      .min(1, 'Say what was fixed.')
      .max(NOTE_MAX, `The note is at most ${NOTE_MAX} characters.`),
  })
  .strict();
export type SubmitFixInput = z.input<typeof submitFixSchema>;

export interface FixDto {
  id: string;
  findingId: string;
  note: string;
  submittedBy: PersonRef;
  submittedAt: string;
  photos: PhotoDto[];
}

/** POST /fixes → 201: the fix and the finding as it is now (ETag of the finding). */
export interface FixDetail {
  fix: FixDto;
  finding: FindingDetail;
}

export const REINSPECTION_VERDICTS = ['accept', 'return'] as const;
export type ReinspectionVerdict = (typeof REINSPECTION_VERDICTS)[number];

/**
 * POST /findings/:findingId/reinspections (inspector, GC manager) → 200 FindingDetail (ETag).
 * If-Match required (428 / 412). Idempotency-Key honoured. Only a fix-submitted finding.
 * accept → closed; return → open, returnCount + 1, reason required.
 */
export const reinspectionSchema = z
  .object({
    verdict: z.enum(REINSPECTION_VERDICTS, { error: 'Choose accept or return.' }),
    reason: optionalReason,
  })
  .strict()
  .refine((r) => r.verdict !== 'return' || Boolean(r.reason), { message: 'Say why the fix is returned.', path: ['reason'] });
export type ReinspectionInput = z.input<typeof reinspectionSchema>;

/**
 * PATCH /findings/:findingId → 200 FindingDetail (ETag). If-Match required. The body holds
 * exactly ONE change:
 *   { reassign: { companyId, reason } }           GC manager, inspector; open or fix-submitted
 *   { severity: { to, reason? } }                 GC manager, inspector; open or fix-submitted
 *   { dueOn: { to: 'YYYY-MM-DD', reason? } }      GC manager, inspector; open or fix-submitted
 *   { void: { reason } }                          GC manager, the inspector who logged it; open or fix-submitted
 *   { reopen: { reason } }                        GC manager; closed
 *   { close: { note? } }                          inspector ("closed on walk"); open
 *   { pin: { x, y } | null }                      GC manager, inspector; any status (place, move or remove the plan pin;
 *                                                 no event: a pin is where the item is drawn, not part of its history)
 * A subcontractor gets 403 for every change (nothing written).
 */
export const findingChangeSchema = z
  .object({
    reassign: z.object({ companyId: id('responsible company'), reason: reason('a reason for the reassignment') }).strict().optional(),
    severity: z
      .object({ to: z.enum(SEVERITIES, { error: `One of ${SEVERITIES.join(', ')}.` }), reason: optionalReason })
      .strict()
      .optional(),
    dueOn: z.object({ to: dateOnly, reason: optionalReason }).strict().optional(),
    void: z.object({ reason: reason('a reason for voiding') }).strict().optional(),
    reopen: z.object({ reason: reason('a reason for reopening') }).strict().optional(),
    close: z.object({ note: note.optional() }).strict().optional(),
    /** Where the finding is on its level's plan (fractions 0..1); null removes the pin. */
    pin: z.object({ x: pin(), y: pin() }).strict().nullable().optional(),
  })
  .strict()
  .refine((c) => Object.values(c).filter((v) => v !== undefined).length === 1, {
    message: 'Send exactly one change: reassign, severity, dueOn, void, reopen, close or pin.',
    path: ['change'],
  });
export type FindingChangeInput = z.input<typeof findingChangeSchema>;
export type FindingChangeParsed = z.output<typeof findingChangeSchema>;

/** GET /findings/:findingId/events → { items: FindingEventDto[] } oldest first (every role that sees the finding). */
export interface FindingEventsResponse {
  items: FindingEventDto[];
}

/**
 * POST /findings/:findingId/comments (everyone who can see the finding) → 201 FindingEventDto
 * (kind 'comment', reason = the text). Idempotency-Key honoured. Any status.
 * GET /findings/:findingId/comments → { items: FindingEventDto[] } oldest first.
 */
export const commentSchema = z
  .object({
    text: z
      .string({ error: 'Write a comment.' })
      .trim()
      .min(1, 'Write a comment.')
      .max(COMMENT_MAX, `A comment is at most ${COMMENT_MAX} characters.`),
  })
  .strict();
export type CommentInput = z.input<typeof commentSchema>;
export interface CommentsResponse {
  items: FindingEventDto[];
}

/**
 * POST /api/jobs/:jobId/findings/bulk (GC manager, inspector) → 200 BulkChangeResponse.
 * All or nothing, one transaction. Any id not on the job → 404 with `fields.findingIds` listing
 * them; any finding whose status refuses the change → 409 listing them; nothing is changed.
 * Idempotency-Key honoured.
 */
export const bulkChangeSchema = z
  .object({
    findingIds: z
      .array(id('finding'), { error: 'Send findingIds: a list of finding ids.' })
      .min(1, 'Choose at least one finding.')
      .max(BULK_FINDINGS_MAX, `At most ${BULK_FINDINGS_MAX} findings at once.`)
      .refine((ids) => new Set(ids).size === ids.length, 'A finding appears twice.'),
    change: z
      .object({
        reassign: z.object({ companyId: id('responsible company'), reason: reason('a reason for the reassignment') }).strict().optional(),
        dueOn: z.object({ to: dateOnly, reason: optionalReason }).strict().optional(),
      })
      .strict()
      .refine((c) => (c.reassign === undefined) !== (c.dueOn === undefined), {
        message: 'Send exactly one change: reassign or dueOn.',
      }),
  })
  .strict();
export type BulkChangeInput = z.input<typeof bulkChangeSchema>;
export type BulkChangeParsed = z.output<typeof bulkChangeSchema>;
export interface BulkChangeResponse {
  /** The changed findings, in the order sent, with their new versions. */
  items: FindingDto[];
}

/**
 * GET /api/inbox (subcontractors; other roles 403) → InboxResponse. Their company's open and
 * fix-submitted findings on every job they are a member of: overdue first, then by due date,
 * then by number. groupBy=area → `groups` by job, level and space (same order inside each).
 */
export const INBOX_GROUPINGS = ['none', 'area'] as const;
export const inboxQuerySchema = z
  .object({
    groupBy: z.enum(INBOX_GROUPINGS, { error: 'Use none or area.' }).optional(),
    jobId: id('job id').optional(),
    status: enumList(['open', 'fix_submitted'] as const).optional(),
  })
  .strict();
export type InboxQuery = z.input<typeof inboxQuerySchema>;
export type InboxQueryParsed = z.output<typeof inboxQuerySchema>;

export interface InboxItem extends FindingDto {
  jobId: string;
  jobName: string;
  /** Set when the finding came back from re-inspection (returnCount > 0): the last return's reason. */
  lastReturnReason: string | null;
}
export interface InboxGroup {
  jobId: string;
  jobName: string;
  levelId: string;
  levelName: string;
  /** null: findings on the level itself (no space). */
  spaceId: string | null;
  spaceName: string | null;
  items: InboxItem[];
}
export interface InboxResponse {
  items: InboxItem[];
  /** Only with groupBy=area; ordered by job name, level, space name. */
  groups: InboxGroup[] | null;
  counts: { total: number; overdue: number; returned: number; fixSubmitted: number };
}

/**
 * GET /api/jobs/:jobId/reinspections/queue (inspector, GC manager; subcontractor 403) →
 * ReinspectionQueueResponse: fix-submitted findings grouped by level (level order), each with
 * the latest fix (note, who, photos) and the photos of the finding as logged.
 */
export interface ReinspectionQueueItem {
  finding: FindingDto;
  latestFix: FixDto | null;
  originalPhotos: PhotoDto[];
}
export interface ReinspectionQueueResponse {
  levels: Array<{ levelId: string; levelName: string; items: ReinspectionQueueItem[] }>;
  total: number;
}
