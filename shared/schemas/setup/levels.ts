/**
 * Levels.
 */
import { z } from 'zod';
import type { LevelPlanDto } from '../board';
import { id, text, pageQuery } from './fields';

export const createLevelSchema = z.object({ name: text('a level name', 80) }).strict();
export type CreateLevelInput = z.input<typeof createLevelSchema>;
export const updateLevelSchema = z.object({ name: text('a level name', 80) }).strict();
export type UpdateLevelInput = z.input<typeof updateLevelSchema>;
/** POST /levels/order: every level id of the job, in the new order (no If-Match; the list must be complete). */
export const reorderLevelsSchema = z
  .object({
    levelIds: z
      .array(id('level id'), { error: 'Send levelIds: every level id in the new order.' })
      .min(1, 'Send every level id in the new order.')
      .max(500, 'At most 500 levels.')
      .refine((ids) => new Set(ids).size === ids.length, 'A level id appears twice.'),
  })
  .strict();
export type ReorderLevelsInput = z.input<typeof reorderLevelsSchema>;
export const levelListQuerySchema = z.object({ ...pageQuery }).strict();

export interface LevelDto {
  id: string;
  name: string;
  /** 1-based, dense: 1, 2, 3 ... */
  position: number;
  spaceCount: number;
  unitCount: number;
  version: number;
  /** The level's plan image (GET/POST/DELETE /levels/:levelId/plan), null when none. */
  plan: LevelPlanDto | null;
}
