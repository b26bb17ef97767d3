/** A level → LevelDto (with its counts and plan metadata). */
import type { LevelPlanDto } from '../../shared/schemas/board';
import type { LevelDto } from '../../shared/schemas/setup';
import type { Level } from '../models';

export function presentLevel(level: Level, counts: { spaces: number; units: number } = { spaces: 0, units: 0 }): LevelDto {
  return {
    id: level.id,
    name: level.name,
    position: level.position,
    spaceCount: counts.spaces,
    unitCount: counts.units,
    version: level.version,
    plan: presentLevelPlan(level),
  };
}

/** The level's plan metadata, or null when it has none. */
export function presentLevelPlan(level: Level): LevelPlanDto | null {
  if (!level.planKey || !level.planContentType || !level.planWidth || !level.planHeight || !level.planUploadedAt) return null;
  return {
    contentType: level.planContentType,
    width: level.planWidth,
    height: level.planHeight,
    version: level.planVersion,
    uploadedAt: level.planUploadedAt.toISOString(),
  };
}
