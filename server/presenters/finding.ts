/** Finding rows (the finding queries' SELECT, server/services/findingQueries.ts) → FindingDto / FindingDetail. */
import type { MeasuredRule } from '../../shared/catalogue/types';
import type { RuleResult } from '../../shared/calc/rules';
import { findingLabel, type FindingDetail, type FindingDto, type FindingEventDto, type PhotoDto } from '../../shared/schemas/findings';
import type { FindingStatus, Severity, UnitKindKey } from '../../shared/words';
import { photoUrls } from './photo';

export interface FindingRow {
  id: string;
  number: number;
  level_id: string;
  level_name: string;
  space_id: string | null;
  space_name: string | null;
  unit_id: string | null;
  unit_tag: string | null;
  unit_kind: UnitKindKey | null;
  catalogue_item_id: string;
  code: string;
  title: string;
  severity: Severity;
  status: FindingStatus;
  company_id: string;
  company_name: string;
  due_on: string;
  overdue: boolean;
  note: string;
  measured_text: string | null;
  measured_value: number | null;
  rule_result: RuleResult | null;
  return_count: number;
  logged_by: string;
  logged_by_name: string;
  logged_at: Date;
  walk_id: string | null;
  pin_x: number | null;
  pin_y: number | null;
  voided_reason: string | null;
  photo_count: string | number;
  first_photo_id: string | null;
  version: number;
  sort_key: string | number;
  description: string;
  fix_guidance: string;
  caution: string | null;
  needs_ceiling_access: boolean;
  measured_rule: MeasuredRule | null;
}

export function presentFinding(jobId: string, row: FindingRow): FindingDto {
  return {
    id: row.id,
    number: row.number,
    label: findingLabel(row.number),
    levelId: row.level_id,
    levelName: row.level_name,
    spaceId: row.space_id,
    spaceName: row.space_name,
    unitId: row.unit_id,
    unitTag: row.unit_tag,
    unitKind: row.unit_kind,
    catalogueItemId: row.catalogue_item_id,
    code: row.code,
    title: row.title,
    severity: row.severity,
    status: row.status,
    companyId: row.company_id,
    companyName: row.company_name,
    dueOn: row.due_on,
    overdue: Boolean(row.overdue),
    note: row.note,
    measuredText: row.measured_text,
    measuredValue: row.measured_value,
    ruleResult: row.rule_result,
    returnCount: row.return_count,
    loggedBy: { id: row.logged_by, name: row.logged_by_name },
    loggedAt: new Date(row.logged_at).toISOString(),
    walkId: row.walk_id,
    pinX: row.pin_x,
    pinY: row.pin_y,
    voidedReason: row.voided_reason,
    photoCount: Number(row.photo_count),
    thumbUrl: row.first_photo_id ? photoUrls(jobId, row.first_photo_id).thumbUrl : null,
    version: row.version,
  };
}

/** One finding with its photos (its own and its fixes'), its history and its defect type's texts. */
export function presentFindingDetail(jobId: string, row: FindingRow, photos: PhotoDto[], events: FindingEventDto[]): FindingDetail {
  return {
    ...presentFinding(jobId, row),
    photos,
    events,
    catalogue: {
      description: row.description,
      fixGuidance: row.fix_guidance,
      caution: row.caution,
      needsCeilingAccess: row.needs_ceiling_access,
      quantity: row.measured_rule?.quantity ?? null,
      measure: row.measured_rule?.measure ?? null,
      rule: row.measured_rule ?? null,
    },
  };
}
