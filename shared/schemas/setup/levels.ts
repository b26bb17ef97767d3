/**
 * Levels.
 */
import { z } from 'zod';
import type { LevelPlanDto } from '../board';
import { id, text, pageQuery } from './fields';

export const createLevelSchema = z.object({ name: text('a level name', 80) }).strict();
export type CreateLevelInput = z.input<typeof createLevelSchema>;
/** A pasted list of names, one per line: at most this many at once. */
export const BULK_NAMES_MAX = 200;

/** Names pasted one per line (empty lines dropped); the same name twice (any case) is refused. */
export function pastedNames(subject: string, max: number) {
  return z
    .array(text(subject, max), { error: 'Send the names as a list.' })
    .min(1, 'Paste at least one name.')
    .max(BULK_NAMES_MAX, `At most ${BULK_NAMES_MAX} at once.`)
    .superRefine((names, ctx) => {
      const seen = new Map<string, number>();
      names.forEach((n, i) => {
        const key = n.trim().toLowerCase();
        const first = seen.get(key);
        if (first !== undefined) ctx.addIssue({ code: 'custom', path: [i], message: `"${n.trim()}" is on lines ${first + 1} and ${i + 1}.` });
        else seen.set(key, i);
      });
    });
}

/** POST /levels/bulk: several levels at once, appended last in the order given; all or none. */
export const bulkLevelsSchema = z.object({ names: pastedNames('a level name', 80) }).strict();
export type BulkLevelsInput = z.input<typeof bulkLevelsSchema>;

/** The lines of a pasted list: trimmed, empty lines dropped. */
export function pastedLines(text: string): string[] {
  return text
    .split(/\r\n|\r|\n/)
    .map((l) => l.trim())
    .filter((l) => l !== '');
}

/**
 * The paste box's form: one text, checked line by line with the bulk schema's own words, the
 * first problem said on the box with its line ("Line 3: ...").
 */
export function pastedNamesForm(subject: string, max: number) {
  const names = pastedNames(subject, max);
  return z.object({
    text: z.string().superRefine((value, ctx) => {
      const parsed = names.safeParse(pastedLines(value));
      if (parsed.success) return;
      const issue = parsed.error.issues[0]!;
      const line = typeof issue.path[0] === 'number' ? `Line ${issue.path[0] + 1}: ` : '';
      ctx.addIssue({ code: 'custom', message: `${line}${issue.message}` });
    }),
  });
}

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
