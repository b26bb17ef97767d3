/**
 * Stated limits (unit-model limits and job settings): typed text → base number + source.
 */
import { z } from 'zod';
import { JOB_SETTINGS, MODEL_LIMITS, type JobSettingKey, type ModelLimitKey, type QuantityKind } from '../../catalogue/types';
import { unitKind } from '../../calc/quantity';
import { quantityText } from './common';
import { text } from './fields';

/** A limit as entered: the value typed with its unit ("27-1/2 in"), and where it came from. */
export function statedLimitInput(kind: QuantityKind, label: string) {
  return z
    .object({
      value: quantityText(kind, label),
      /** Optional: the unit the source states it in, when the text mixes units (ft and in). */
      unit: z
        .string()
        .trim()
        .max(20)
        .refine((u) => unitKind(u) === kind, `Not a unit of ${kind}.`)
        .optional(),
      source: text('where the value came from (e.g. installation manual, page)', 300),
    })
    .strict();
}

/** A stored limit: base value plus what was typed and its source. */
export interface StatedLimitDto {
  /** Base units (mm for lengths, degrees for angles, ratio for slopes). */
  value: number;
  /** The value in the unit it was stated in. */
  stated: number;
  unit: string;
  /** Exactly what was typed. */
  text: string;
  source: string;
}

function limitsObject<K extends string>(defs: ReadonlyArray<{ key: K; label: string; quantity: QuantityKind }>) {
  const shape: Record<string, z.ZodType> = {};
  for (const d of defs) shape[d.key] = statedLimitInput(d.quantity, d.label).nullable().optional();
  return z.object(shape).strict() as unknown as z.ZodType<Partial<Record<K, StatedLimitInput | null>>, Partial<Record<K, StatedLimitInput | null>>>;
}

export interface StatedLimitInput {
  value: string;
  unit?: string;
  source: string;
}

/** Per-model limits keyed by MODEL_LIMITS keys. null removes a limit in a PATCH. */
export const modelLimitsInputSchema = limitsObject<ModelLimitKey>(MODEL_LIMITS);
/** Job settings keyed by JOB_SETTINGS keys. */
export const jobSettingsInputSchema = limitsObject<JobSettingKey>(JOB_SETTINGS);
