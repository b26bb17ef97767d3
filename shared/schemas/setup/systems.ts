/**
 * Systems (refrigerant circuits) and their refrigerant checks.
 */
import { z } from 'zod';
import type { A2lAreaResult, ConcentrationResult, MountPosition, MountSource } from '../../calc/refrigerant';
import { REFRIGERANTS, type Refrigerant } from '../../words';
import { chargeBasisInputSchema, type ChargeBasisDto } from '../testRecords';
import { quantityText } from './common';
import { id, text, optionalText, pageQuery } from './fields';

export const CONCENTRATION_LIMIT_UNITS = ['lb/Mcf', 'g/m³', 'kg/m³'] as const;

export const concentrationOverrideSchema = z
  .object({
    value: z.number({ error: 'Limit: a number.' }).positive('Limit: more than zero.').max(10_000, 'Limit: too large.'),
    unit: z.enum(CONCENTRATION_LIMIT_UNITS, { error: 'Limit unit: lb/Mcf, g/m³ or kg/m³.' }),
    source: text('the limit’s source (document, edition, table)', 300),
  })
  .strict();
export type ConcentrationOverride = z.infer<typeof concentrationOverrideSchema>;

const systemFields = {
  name: text('a system name', 80),
  outdoorModel: optionalText('Outdoor unit model', 120),
  refrigerant: z.enum(REFRIGERANTS, { error: `Choose a refrigerant: ${REFRIGERANTS.join(', ')}.` }),
  /** As typed: "38 lb", "12 lb 6 oz", "17.2 kg". */
  factoryCharge: quantityText('mass', 'Factory charge').nullable().optional(),
  fieldCharge: quantityText('mass', 'Field-added charge').nullable().optional(),
  /** A job-entered concentration limit, for refrigerants without a stored one (R-454B). */
  concentrationLimitOverride: concentrationOverrideSchema.nullable().optional(),
  /** The company responsible for the system's pipework and its test records; null: the job's mechanical companies. */
  companyId: id('responsible company').nullable().optional(),
  /** The outdoor unit's factory-charge source and per-size additional-charge factors from its manual. */
  chargeBasis: chargeBasisInputSchema.nullable().optional(),
};
export const createSystemSchema = z.object(systemFields).strict();
export type CreateSystemInput = z.input<typeof createSystemSchema>;
export const updateSystemSchema = z
  .object({ ...systemFields, name: systemFields.name.optional(), refrigerant: systemFields.refrigerant.optional() })
  .strict();
export type UpdateSystemInput = z.input<typeof updateSystemSchema>;
export const systemListQuerySchema = z.object({ ...pageQuery }).strict();

export interface SystemDto {
  id: string;
  name: string;
  outdoorModel: string | null;
  refrigerant: Refrigerant;
  /** kg */
  factoryCharge: number | null;
  /** kg */
  fieldCharge: number | null;
  /** kg, factory + field (missing counts as 0) */
  totalCharge: number;
  concentrationLimitOverride: ConcentrationOverride | null;
  /** The company responsible for the system's test records; null: the job's mechanical companies. */
  companyId: string | null;
  chargeBasis: ChargeBasisDto | null;
  unitCount: number;
  version: number;
}

/** GET /systems/:systemId: the system with its refrigerant checks. */
export interface SystemDetail extends SystemDto {
  /** shared/calc checkRefrigerantConcentration over the spaces its units serve (and their links). */
  /** shared/calc checkRefrigerantConcentration with the field charge from chargeRecord when there is one. */
  concentration: ConcentrationResult;
  /** The latest current charge record (its weighed-in amount is the field charge the checks use), or null: the typed field charge. */
  chargeRecord: { recordId: string; weighedInKg: number; recordedAt: string } | null;
  /** A2L only: IEC 60335-2-40 Annex GG minimum floor area per unit's space; empty otherwise. */
  a2lFloorArea: Array<{
    unitId: string;
    tag: string;
    spaceId: string | null;
    spaceName: string | null;
    /** The position that applies (unit, else model, else kind); null when not recorded for a kind that can be either way up. */
    mount: MountPosition | null;
    mountFrom: MountSource | null;
    result: A2lAreaResult;
  }>;
}
