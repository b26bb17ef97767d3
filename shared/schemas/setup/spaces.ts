/**
 * Spaces.
 */
import { z } from 'zod';
import { pastedNames } from './levels';
import { quantityText } from './common';
import { id, text, pageQuery } from './fields';

export const OCCUPANCIES = ['general', 'institutional'] as const;
export type Occupancy = (typeof OCCUPANCIES)[number];

const spaceFields = {
  levelId: id('level'),
  name: text('a space name', 120),
  /** Floor area as typed: "120 sq ft", "11.2 m²". */
  floorArea: quantityText('area', 'Floor area').nullable().optional(),
  /** Ceiling height as typed: "10' 6\"", "3.2 m". */
  ceilingHeight: quantityText('length', 'Ceiling height').nullable().optional(),
  occupancy: z.enum(OCCUPANCIES, { error: 'Choose general or institutional.' }).optional(),
  /** An enclosed occupied space counts for the refrigerant check. Default true. */
  enclosed: z.boolean({ error: 'Say whether the space is enclosed.' }).optional(),
  /**
   * Spaces joined to this one by a permanent opening (they count as one volume in the
   * refrigerant check). Replaces the whole set of this space's links; links are symmetric.
   */
  linkedSpaceIds: z
    .array(id('space id'))
    .max(50, 'At most 50 linked spaces.')
    .refine((ids) => new Set(ids).size === ids.length, 'A linked space appears twice.')
    .optional(),
};

export const createSpaceSchema = z.object(spaceFields).strict();
export type CreateSpaceInput = z.input<typeof createSpaceSchema>;
export const updateSpaceSchema = z
  .object({ ...spaceFields, levelId: spaceFields.levelId.optional(), name: spaceFields.name.optional() })
  .strict();
export type UpdateSpaceInput = z.input<typeof updateSpaceSchema>;
export const spaceListQuerySchema = z.object({ levelId: id('level id').optional(), ...pageQuery }).strict();

export interface SpaceDto {
  id: string;
  levelId: string;
  levelName: string;
  name: string;
  /** m² */
  floorArea: number | null;
  /** mm */
  ceilingHeight: number | null;
  /** m³ (floor area × ceiling height) */
  volume: number | null;
  occupancy: Occupancy;
  enclosed: boolean;
  linkedSpaceIds: string[];
  unitCount: number;
  version: number;
}

/** POST /spaces/bulk: several spaces on one level at once (names only; area and height later); all or none. */
export const bulkSpacesSchema = z.object({ levelId: id('level'), names: pastedNames('a space name', 120) }).strict();
export type BulkSpacesInput = z.input<typeof bulkSpacesSchema>;

/** POST /spaces/import: at most this many rooms per request. */
export const SPACE_IMPORT_MAX_ROWS = 2000;
/** The longest cell a room row may carry (names are checked against their own limits per line). */
const IMPORT_CELL_MAX = 300;
const importCell = (label: string) =>
  z.string({ error: `${label}: send text.` }).max(IMPORT_CELL_MAX, `${label} is at most ${IMPORT_CELL_MAX} characters.`);

/**
 * One room of a room schedule. Names and quantities are checked per line by the import itself, so
 * that a preview can list every line's problem at once; this schema checks only the shape.
 */
export const spaceImportRowSchema = z
  .object({
    level: importCell('Level'),
    space: importCell('Room'),
    /** As typed, with its unit ("120 sq ft", "11.2 m²"); left out, the space's area stays. */
    area: importCell('Floor area').optional(),
    /** As typed ("10' 6\"", "2700 mm"); left out, the space's height stays. */
    height: importCell('Ceiling height').optional(),
    /** The file's line, said in the messages (the row's position otherwise). */
    line: z.number().int().min(1).max(1_000_000).optional(),
  })
  .strict();

/**
 * POST /spaces/import: a room schedule. apply false answers the preview and writes nothing; apply
 * true writes it all in one transaction, or nothing with a 400 naming every line's problem.
 */
export const spaceImportSchema = z
  .object({
    rows: z
      .array(spaceImportRowSchema, { error: 'Send the rooms as a list.' })
      .min(1, 'The file has no rooms.')
      .max(SPACE_IMPORT_MAX_ROWS, `At most ${SPACE_IMPORT_MAX_ROWS.toLocaleString('en-US')} rooms at once: split the file.`),
    apply: z.boolean({ error: 'Say whether to apply the import (apply: true) or preview it (apply: false).' }),
  })
  .strict();
export type SpaceImportInput = z.input<typeof spaceImportSchema>;

export interface SpaceImportRoom {
  /** Index in rows. */
  row: number;
  line: number | null;
  level: string;
  space: string;
}

/** One line's problem: `field` is the body path ("rows.3.area"), as in a 400's fields. */
export interface SpaceImportProblem {
  row: number;
  line: number | null;
  field: string;
  message: string;
}

export interface SpaceImportReport {
  applied: boolean;
  /** Levels the job lacks, in file order: appended after its levels. */
  newLevels: string[];
  /** Spaces to create (m², mm; null when the file gives none). */
  created: Array<SpaceImportRoom & { newLevel: boolean; floorArea: number | null; ceilingHeight: number | null }>;
  /** Spaces whose area or height changes (only what the file gives), old → new. */
  changed: Array<SpaceImportRoom & { spaceId: string; floorArea?: { from: number | null; to: number }; ceilingHeight?: { from: number | null; to: number } }>;
  unchanged: Array<SpaceImportRoom & { spaceId: string }>;
  problems: SpaceImportProblem[];
}
