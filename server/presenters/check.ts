/** Unit checks → UnitCheckDto / CheckItemDto (rows as read by services/checks.ts). */
import type { RuleResult } from '../../shared/calc/rules';
import type { CheckItemDto, ProposedFinding, UnitCheckDto } from '../../shared/schemas/findings';
import type { CheckMark } from '../../shared/words';

export interface CheckRow {
  id: string;
  unit_id: string;
  walk_id: string | null;
  checked_by: string;
  checker_name: string;
  checked_at: Date;
  checked_text: string;
  complete: boolean;
}

export interface CheckItemRow {
  unit_check_id: string;
  catalogue_item_id: string;
  code: string;
  title: string;
  mark: CheckMark;
  measured_text: string | null;
  measured_value: number | null;
  result: RuleResult | null;
  quantity: string | null;
}

export function presentCheckItem(row: CheckItemRow, proposedFinding: ProposedFinding | null): CheckItemDto {
  const r = row.result;
  return {
    catalogueItemId: row.catalogue_item_id,
    code: row.code,
    title: row.title,
    mark: row.mark,
    measuredText: row.measured_text,
    measuredValue: row.measured_value,
    quantity: (row.quantity as CheckItemDto['quantity']) ?? null,
    result: r,
    pass: r ? r.pass : null,
    status: r ? r.status : null,
    margin: r ? r.margin : null,
    limitSource: r ? r.limitSource || null : null,
    message: r ? r.message : null,
    proposedFinding,
  };
}

export function presentCheck(row: CheckRow, items: CheckItemDto[]): UnitCheckDto {
  return {
    id: row.id,
    unitId: row.unit_id,
    walkId: row.walk_id,
    checkedBy: { id: row.checked_by, name: row.checker_name },
    checkedAt: new Date(row.checked_at).toISOString(),
    complete: row.complete,
    items,
    counts: {
      ok: items.filter((i) => i.mark === 'ok').length,
      defect: items.filter((i) => i.mark === 'defect').length,
      notApplicable: items.filter((i) => i.mark === 'not_applicable').length,
      failedMeasurements: items.filter((i) => i.status === 'fail').length,
    },
  };
}
