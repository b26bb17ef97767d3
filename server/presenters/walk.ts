/** Walks → WalkDto / WalkDetail. */
import type { Coverage, WalkDetail, WalkDto, WalkSummary } from '../../shared/schemas/findings';

/** A walk as read by services/walks.ts (one row with its level's and inspector's names). */
export interface WalkRow {
  id: string;
  level_id: string;
  level_name: string;
  inspector_id: string;
  inspector_name: string;
  started_at: Date;
  finished_at: Date | null;
  check_count: string | number;
  units_checked: string | number;
  units_in_progress: string | number;
  finding_count: string | number;
  /** started_at with microseconds, for the cursor. */
  started_text: string;
}

export function presentWalk(row: WalkRow): WalkDto {
  return {
    id: row.id,
    levelId: row.level_id,
    levelName: row.level_name,
    inspector: { id: row.inspector_id, name: row.inspector_name },
    startedAt: new Date(row.started_at).toISOString(),
    finishedAt: row.finished_at ? new Date(row.finished_at).toISOString() : null,
    checkCount: Number(row.check_count),
    unitsChecked: Number(row.units_checked),
    unitsInProgress: Number(row.units_in_progress),
    findingCount: Number(row.finding_count),
  };
}

export function presentWalkDetail(row: WalkRow, coverage: Coverage, checkedInWalk: number, summary: WalkSummary): WalkDetail {
  return { ...presentWalk(row), coverage, checkedInWalk, summary };
}
