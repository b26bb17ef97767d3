/**
 * A finding as answered: its event kinds, photos, list item, detail and list response.
 */
import type { MeasuredRule, QuantityKind } from '../../catalogue/types';
import type { RuleResult } from '../../calc/rules';
import type { FindingStatus, Severity, UnitKindKey } from '../../words';
import type { PersonRef } from './common';

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
 * What a photo shows: the defect (as logged, or added while the finding is open), the fixed work
 * (with a fix), or the inspector's own photo at re-inspection.
 */
export const PHOTO_STAGES = ['finding', 'fix', 'reinspection'] as const;
export type PhotoStage = (typeof PHOTO_STAGES)[number];

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
  /** finding: the defect; fix: with the fix `fixId`; reinspection: the inspector's, with a verdict. */
  stage: PhotoStage;
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
  /** Photos of the defect (as logged and added later); fix and re-inspection photos are not counted. */
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
    /** The defect type's measured rule, for a fix's or re-inspection's new measurement (null: none). */
    rule: MeasuredRule | null;
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
