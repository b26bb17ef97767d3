/**
 * Support spacing for piping and tubing, IMC Table 305.4 (values in shared/calc/limits.ts, each
 * with its provenance). The table lists each material and form on its own row, and splits some by
 * size; Trimout keeps the rows apart the same way:
 *   copper or copper-alloy tubing, 1-1/4 in and smaller: 6 ft horizontal, 10 ft vertical
 *   copper or copper-alloy tubing, 1-1/2 in and larger: 10 ft horizontal, 10 ft vertical
 *   copper or copper-alloy pipe: 12 ft horizontal, 10 ft vertical
 *   PVC pipe, ABS pipe: 4 ft horizontal, 10 ft vertical (plastic condensate drains)
 *   CPVC pipe or tubing, 1 in and smaller: 3 ft; 1-1/4 in and larger: 4 ft; 10 ft vertical
 *   steel pipe: 12 ft horizontal, 15 ft vertical
 * The tubing rows come from the product's requirements; the other rows are from memory (see each
 * limit's note). Sizes in the table are nominal. Refrigerant (ACR) tube is sold by outside
 * diameter; copper tube nominal size = OD − 1/8 in (e.g. 1-3/8 in OD is 1-1/4 in nominal), so
 * `basis: 'od'` converts before looking up the row (copper tubing only). A measured spacing exactly
 * at the maximum passes.
 */
import type { EditionChoice, UnitSystem } from '../catalogue/types';
import { nominalSizeLabel } from './condensate';
import type { NamedResult } from './rules';
import { checkAgainstCode } from './rules';

export const SUPPORT_MATERIALS = ['copper_tubing', 'copper_pipe', 'pvc_pipe', 'cpvc', 'abs_pipe', 'steel_pipe'] as const;
export type SupportMaterial = (typeof SUPPORT_MATERIALS)[number];

/** One row of Table 305.4 as the table prints it: a material and form, and a size range where it splits. */
export interface SupportRow {
  material: SupportMaterial;
  /** As the table names the row. */
  label: string;
  /** Inclusive nominal size bounds, inches; absent where the row covers every size. */
  maxSize?: number;
  minSize?: number;
  horizontal: string;
  vertical: string;
}

export const SUPPORT_ROWS: readonly SupportRow[] = [
  {
    material: 'copper_tubing',
    label: 'Copper or copper-alloy tubing, 1-1/4 in diameter and smaller',
    maxSize: 1.25,
    horizontal: 'imc.copper_support.horizontal_small',
    vertical: 'imc.copper_support.vertical',
  },
  {
    material: 'copper_tubing',
    label: 'Copper or copper-alloy tubing, 1-1/2 in diameter and larger',
    minSize: 1.5,
    horizontal: 'imc.copper_support.horizontal_large',
    vertical: 'imc.copper_support.vertical',
  },
  { material: 'copper_pipe', label: 'Copper or copper-alloy pipe', horizontal: 'imc.copper_pipe_support.horizontal', vertical: 'imc.copper_pipe_support.vertical' },
  { material: 'pvc_pipe', label: 'PVC pipe', horizontal: 'imc.pvc_support.horizontal', vertical: 'imc.pvc_support.vertical' },
  { material: 'cpvc', label: 'CPVC pipe or tubing, 1 in and smaller', maxSize: 1, horizontal: 'imc.cpvc_support.horizontal_small', vertical: 'imc.cpvc_support.vertical' },
  { material: 'cpvc', label: 'CPVC pipe or tubing, 1-1/4 in and larger', minSize: 1.25, horizontal: 'imc.cpvc_support.horizontal_large', vertical: 'imc.cpvc_support.vertical' },
  { material: 'abs_pipe', label: 'ABS pipe', horizontal: 'imc.abs_support.horizontal', vertical: 'imc.abs_support.vertical' },
  { material: 'steel_pipe', label: 'Steel pipe', horizontal: 'imc.steel_pipe_support.horizontal', vertical: 'imc.steel_pipe_support.vertical' },
];

export type SupportPick = { ok: true; key: string; row: SupportRow } | { ok: false; error: string };

/** Which Table 305.4 row and key apply; an error when the size falls between the table's rows. */
export function supportKey(material: SupportMaterial, nominal: number, orientation: 'horizontal' | 'vertical'): SupportPick {
  if (!Number.isFinite(nominal) || nominal <= 0) return { ok: false, error: 'The pipe size must be more than zero.' };
  const rows = SUPPORT_ROWS.filter((r) => r.material === material);
  const row = rows.find((r) => (r.maxSize === undefined || nominal <= r.maxSize) && (r.minSize === undefined || nominal >= r.minSize));
  if (!row) {
    const sizes = rows.map((r) => r.label.replace(/^.*, /, '')).join(', ');
    return { ok: false, error: `${nominal} in is not a nominal size in IMC Table 305.4 for ${rows[0]?.label.split(',')[0] ?? material} (rows: ${sizes}).` };
  }
  return { ok: true, key: orientation === 'vertical' ? row.vertical : row.horizontal, row };
}

/** The copper tubing rows (refrigerant line sets and copper drains). */
export function copperSupportKey(
  nominal: number,
  orientation: 'horizontal' | 'vertical',
): { ok: true; key: string } | { ok: false; error: string } {
  const pick = supportKey('copper_tubing', nominal, orientation);
  return pick.ok ? { ok: true, key: pick.key } : pick;
}

export interface PipeSupportInput {
  /** The Table 305.4 row's material and form; copper tubing (refrigerant line sets) when left out. */
  material?: SupportMaterial;
  /** Pipe size in inches: nominal, or outside diameter when basis is 'od' (copper tubing only). */
  size: number;
  basis?: 'nominal' | 'od';
  orientation: 'horizontal' | 'vertical';
  /** Measured spacing between supports, mm. */
  spacing: number | null;
  editions?: EditionChoice;
  system?: UnitSystem;
}

export function checkPipeSupportSpacing(input: PipeSupportInput): NamedResult & { nominalSize: number; material: SupportMaterial } {
  const material = input.material ?? 'copper_tubing';
  const nominal = input.basis === 'od' ? input.size - 0.125 : input.size;
  const sizeText = Number.isFinite(nominal) && nominal > 0 ? `${nominalSizeLabel(nominal)} nominal` : '?';
  const pick: SupportPick =
    input.basis === 'od' && material !== 'copper_tubing'
      ? { ok: false, error: 'An outside diameter converts to a nominal size only for copper tubing: give the nominal size.' }
      : supportKey(material, nominal, input.orientation);
  const rowLabel = pick.ok ? pick.row.label : (SUPPORT_ROWS.find((r) => r.material === material)?.label.split(',')[0] ?? material);
  const label = `Support spacing, ${input.orientation}, ${sizeText} (${rowLabel})`;
  if (!pick.ok) {
    return {
      key: `${material}_support`,
      label,
      material,
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
  return { ...r, key: pick.key, label, material, nominalSize: nominal };
}
