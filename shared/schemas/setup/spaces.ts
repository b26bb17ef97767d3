/**
 * Spaces.
 */
import { z } from 'zod';
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
