/** Fix rows with their photos → FixDto. */
import type { RuleResult } from '../../shared/calc/rules';
import type { FixDto, PhotoDto } from '../../shared/schemas/findings';

export interface FixRow {
  id: string;
  finding_id: string;
  note: string;
  submitted_by: string;
  submitter_name: string;
  submitted_at: Date;
  measured_text: string | null;
  rule_result: RuleResult | null;
}

export function presentFix(r: FixRow, photos: PhotoDto[]): FixDto {
  return {
    id: r.id,
    findingId: r.finding_id,
    note: r.note,
    submittedBy: { id: r.submitted_by, name: r.submitter_name },
    submittedAt: new Date(r.submitted_at).toISOString(),
    measuredText: r.measured_text,
    ruleResult: r.rule_result,
    photos,
  };
}
