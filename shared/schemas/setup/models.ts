/**
 * Unit models.
 */
import { z } from 'zod';
import type { ModelLimitKey } from '../../catalogue/types';
import type { MountPosition } from '../../calc/refrigerant';
import { UNIT_KIND_KEYS, type UnitKindKey } from '../../words';
import { quantityText } from './common';
import { text, optionalText, pageQuery } from './fields';
import { type StatedLimitDto, modelLimitsInputSchema } from './limits';
import { mountPositionSchema } from './units';

const modelFields = {
  name: text('a model name', 120),
  modelNumber: optionalText('Model number', 80),
  unitKind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind.' }),
  /** As typed: "3 tons", "36000 Btu/h", "10.5 kW". */
  nominalCapacity: quantityText('capacity', 'Nominal capacity').nullable().optional(),
  /** Per-model limits from the installation manual, by MODEL_LIMITS key. */
  limits: modelLimitsInputSchema.optional(),
  /** Installation position from the manual (floor, wall, ceiling); null: not recorded. */
  mountPosition: mountPositionSchema.nullable().optional(),
};
export const createModelSchema = z.object(modelFields).strict();
export type CreateModelInput = z.input<typeof createModelSchema>;
/** In a PATCH, `limits` merges by key: a key set to null is removed, keys not sent are kept. */
export const updateModelSchema = z
  .object({ ...modelFields, name: modelFields.name.optional(), unitKind: modelFields.unitKind.optional() })
  .strict();
export type UpdateModelInput = z.input<typeof updateModelSchema>;
export const modelListQuerySchema = z
  .object({ unitKind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind from the list.' }).optional(), ...pageQuery })
  .strict();

export interface UnitModelDto {
  id: string;
  name: string;
  modelNumber: string | null;
  unitKind: UnitKindKey;
  /** W */
  nominalCapacity: number | null;
  limits: Partial<Record<ModelLimitKey, StatedLimitDto>>;
  mountPosition: MountPosition | null;
  unitCount: number;
  version: number;
}
