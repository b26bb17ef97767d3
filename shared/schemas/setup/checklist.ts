/**
 * GET /api/jobs/:jobId/setup/checklist (GC manager): what is missing before a walk makes sense.
 * Each line names how many, the first few by name, and the set-up section that fixes it.
 */
import { z } from 'zod';

/** The checklist takes no query. */
export const setupChecklistQuerySchema = z.object({}).strict();

export const SETUP_CHECK_KEYS = [
  'no_levels',
  'levels_without_spaces',
  'spaces_without_size',
  'systems_without_charge',
  'systems_without_limit',
  'no_units',
  'units_without_space',
  'units_without_system',
  'models_without_limits',
  'pending_invitations',
] as const;
export type SetupCheckKey = (typeof SETUP_CHECK_KEYS)[number];

export interface SetupCheckLine {
  key: SetupCheckKey;
  /** How many rows the line is about (levels, spaces, systems, units, models or invitations). */
  count: number;
  /** The first few by name (at most SETUP_CHECK_EXAMPLES), for the line's words. */
  examples: string[];
  /** The set-up section where it is fixed. */
  section: 'levels' | 'spaces' | 'systems' | 'units' | 'models' | 'members';
}

export const SETUP_CHECK_EXAMPLES = 3;

export interface SetupChecklist {
  /** Nothing missing: the screens hide the checklist. */
  complete: boolean;
  lines: SetupCheckLine[];
}
