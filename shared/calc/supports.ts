/**
 * Support spacing for copper or copper-alloy pipe and tubing (refrigerant lines, copper
 * condensate drains), IMC Table 305.4: 1-1/4 in and smaller 6 ft horizontal; 1-1/2 in and larger
 * 10 ft horizontal; vertical 10 ft. Sizes in the table are nominal.
 * Refrigerant (ACR) tube is sold by outside diameter; copper tube nominal size = OD − 1/8 in
 * (e.g. 1-3/8 in OD is 1-1/4 in nominal), so `basis: 'od'` converts before looking up the row.
 * A measured spacing exactly at the maximum passes.
 */
import type { EditionChoice, UnitSystem } from '../catalogue/types';
import { nominalSizeLabel } from './condensate';
import type { NamedResult } from './rules';
import { checkAgainstCode } from './rules';

export interface PipeSupportInput {
  /** Pipe size in inches: nominal, or outside diameter when basis is 'od'. */
  size: number;
  basis?: 'nominal' | 'od';
  orientation: 'horizontal' | 'vertical';
  /** Measured spacing between supports, mm. */
  spacing: number | null;
  editions?: EditionChoice;
  system?: UnitSystem;
}

/** Which Table 305.4 key applies; an error when the size falls between the table's rows. */
export function copperSupportKey(
  nominal: number,
  orientation: 'horizontal' | 'vertical',
): { ok: true; key: string } | { ok: false; error: string } {
  if (!Number.isFinite(nominal) || nominal <= 0) return { ok: false, error: 'The pipe size must be more than zero.' };
  if (orientation === 'vertical') return { ok: true, key: 'imc.copper_support.vertical' };
  if (nominal <= 1.25) return { ok: true, key: 'imc.copper_support.horizontal_small' };
  if (nominal >= 1.5) return { ok: true, key: 'imc.copper_support.horizontal_large' };
  return { ok: false, error: `${nominal} in is not a nominal size in IMC Table 305.4 (rows: 1-1/4 in and smaller, 1-1/2 in and larger).` };
}

export function checkPipeSupportSpacing(input: PipeSupportInput): NamedResult & { nominalSize: number } {
  const nominal = input.basis === 'od' ? input.size - 0.125 : input.size;
  const label = `Support spacing, ${input.orientation}, ${Number.isFinite(nominal) && nominal > 0 ? nominalSizeLabel(nominal) : '?'} nominal copper`;
  const pick = copperSupportKey(nominal, input.orientation);
  if (!pick.ok) {
    return {
      key: 'copper_support',
      label,
      nominalSize: nominal,
      status: 'invalid',
      pass: null,
      margin: null,
      limit: null,
      upper: null,
      tolerance: null,
      expected: null,
      measured: input.spacing,
      limitSource: 'IMC Table 305.4',
      message: pick.error,
    };
  }
  const r = checkAgainstCode(pick.key, label, input.spacing, input.editions, input.system);
  return { ...r, key: pick.key, label, nominalSize: nominal };
}
