/** Fix rows with their photos → FixDto. */
import type { FixDto, PhotoDto } from '../../shared/schemas/findings';

export interface FixRow {
  id: string;
  finding_id: string;
  note: string;
  submitted_by: string;
  submitter_name: string;
  submitted_at: Date;
}

export function presentFix(r: FixRow, photos: PhotoDto[]): FixDto {
  return {
    id: r.id,
    findingId: r.finding_id,
    note: r.note,
    submittedBy: { id: r.submitted_by, name: r.submitter_name },
    submittedAt: new Date(r.submitted_at).toISOString(),
    photos,
  };
}
