/**
 * Refrigerant concentration: a system's total charge (factory + field-added) against the
 * concentration limit × volume of the smallest enclosed occupied space its units serve; and the
 * A2L minimum room floor area of IEC 60335-2-40:2018 Annex GG.
 *
 * Spaces joined by permanent openings count together: union-find over the links, volume = sum.
 * Institutional occupancy halves the limit for any group that contains an institutional space
 * (INSTITUTIONAL_HALVING: the sections are from memory, to confirm). The governing group is the one that allows the
 * least charge (usually the smallest volume; a halved group can govern over a smaller one).
 *
 * Limits are published twice, in lb per 1,000 ft³ (lb/Mcf) and g/m³, each rounded on its own, so
 * they are not exact conversions of each other. Trimout computes in the figure printed for the job's
 * unit system: lb/Mcf for imperial jobs, g/m³ for metric jobs. Never expect the two to round-trip.
 *
 * No value is invented: a refrigerant without a stored, published limit (R-454B here) returns
 * `limit_not_set` until the job enters the limit with its source (`override`).
 */
import type { EditionChoice, UnitSystem } from '../catalogue/types';
import type { Refrigerant, UnitKindKey } from '../words';
import type { CodeDocument } from '../catalogue/types';
import { DEFAULT_EDITIONS } from './limits';
import type { Provenance } from './limits';
import { CUBIC_METRES_PER_CUBIC_FOOT, formatQuantity, KG_PER_POUND, roundToResolution } from './quantity';
import type { RuleStatus } from './rules';

export interface ConcentrationLimit {
  refrigerant: Refrigerant;
  /** Safety group (ASHRAE 34): A1 non-flammable, A2L mildly flammable. */
  safetyGroup: 'A1' | 'A2L';
  document: CodeDocument;
  editions: readonly string[];
  section: string;
  lbPerMcf: number;
  gPerM3: number;
  provenance: Provenance;
  note?: string;
  /** Other documents and tables that print the same figure (not used for the check; shown as sources). */
  alsoPrintedIn?: ReadonlyArray<{ document: string; editions: readonly string[]; section: string; provenance: Provenance }>;
}

/**
 * Institutional occupancy: the concentration limit is halved. Where it is written is recalled,
 * not read here: ASHRAE 15 (the safety standard that applies the RCL per occupied space) and the
 * IMC's own refrigerant quantity section. Both sections from memory; confirm them in the edition
 * the job adopts.
 */
export const INSTITUTIONAL_HALVING = {
  factor: 0.5,
  sources: [
    { document: 'ASHRAE 15', section: 'Section 7.2 (institutional occupancies: RCL reduced by 50%)', provenance: 'from memory' as Provenance },
    { document: 'IMC', section: 'Section 1104.3 (institutional occupancies)', provenance: 'from memory' as Provenance },
  ],
  text: 'ASHRAE 15 Section 7.2 and IMC Section 1104.3 (both from memory; confirm the sections)',
} as const;

/**
 * Stored concentration limits (RCL), each under the document and table that prints it. ASHRAE 34
 * prints single-compound refrigerants in Table 4-1 and blends (R-410A) in Table 4-2; the IMC
 * reprints the figures in Table 1103.1. The first entry held for the job's edition is the one
 * applied; the others are kept as where else the figure is printed. R-454B deliberately absent.
 */
export const CONCENTRATION_LIMITS: readonly ConcentrationLimit[] = [
  {
    refrigerant: 'R-410A',
    safetyGroup: 'A1',
    document: 'ASHRAE 34',
    editions: ['2010', '2013', '2016', '2019', '2022'],
    section: 'Table 4-2, refrigerant concentration limit (RCL)',
    lbPerMcf: 26,
    gPerM3: 420,
    provenance: 'issue text',
    note: 'Table 4-2 lists refrigerant blends (R-410A is a zeotropic blend). Current editions print 26 lb/Mcf; the g/m³ figure (420) and the list of editions are from memory.',
    alsoPrintedIn: [{ document: 'IMC', editions: ['2015', '2018', '2021'], section: 'Table 1103.1', provenance: 'from memory' }],
  },
  {
    refrigerant: 'R-410A',
    safetyGroup: 'A1',
    document: 'ASHRAE 34',
    editions: ['pre-2010'],
    section: 'Table of refrigerant concentration limits (older edition)',
    lbPerMcf: 25,
    gPerM3: 400,
    provenance: 'issue text',
    note: 'An older edition printed 25 lb/Mcf (issue text). Which edition exactly is not confirmed here; the g/m³ figure is from memory.',
  },
  {
    refrigerant: 'R-32',
    safetyGroup: 'A2L',
    document: 'IMC',
    editions: ['2018', '2021'],
    section: 'Table 1103.1',
    lbPerMcf: 4.8,
    gPerM3: 77,
    provenance: 'issue text',
    note: 'Values from the issue text; the editions listed are from memory. For A2L systems the IEC 60335-2-40 Annex GG floor-area check also applies.',
    alsoPrintedIn: [
      { document: 'ASHRAE 34', editions: ['2016', '2019', '2022'], section: 'Table 4-1 (single-compound refrigerants), RCL', provenance: 'from memory' },
    ],
  },
];

export type LimitUnit = 'lb/Mcf' | 'g/m³' | 'kg/m³';

/** A limit the job enters itself, with its source (required for refrigerants we hold no value for). */
export interface LimitOverride {
  value: number;
  unit: LimitUnit;
  source: string;
}

export interface ConcentrationSpace {
  id: string;
  name?: string;
  /** m³; or give floorArea and ceilingHeight. */
  volume?: number;
  /** m² */
  floorArea?: number;
  /** mm */
  ceilingHeight?: number;
  institutional?: boolean;
}

export interface ConcentrationInput {
  refrigerant: Refrigerant;
  /** kg */
  factoryCharge: number;
  /** kg, added in the field for line length */
  fieldCharge: number;
  /** Ids of the spaces the system's indoor units serve. */
  servedSpaceIds: readonly string[];
  spaces: readonly ConcentrationSpace[];
  /** Pairs of space ids joined by a permanent opening. */
  openings?: ReadonlyArray<readonly [string, string]>;
  editions?: EditionChoice;
  override?: LimitOverride;
  system?: UnitSystem;
}

export interface SpaceGroupResult {
  spaceIds: string[];
  names: string[];
  /** m³ */
  volume: number;
  /** m², null when a space was given by volume only */
  floorArea: number | null;
  /** mm: volume ÷ floor area (the ceiling height of a single space) */
  ceilingHeight: number | null;
  institutional: boolean;
  /** kg/m³ after any institutional halving */
  limitDensity: number;
  /** kg */
  allowedCharge: number;
  /** m³ the total charge needs */
  requiredVolume: number;
  /** m² the total charge needs at this group's ceiling height */
  requiredFloorArea: number | null;
  pass: boolean;
}

export interface ConcentrationResult {
  status: RuleStatus;
  pass: boolean | null;
  refrigerant: Refrigerant;
  /** kg */
  totalCharge: number;
  limit: {
    value: number;
    unit: LimitUnit;
    density: number;
    source: string;
    /** How the stored figure is known (absent for a job's own entry). */
    provenance?: Provenance;
    /** Where else the same figure is printed ("IMC Table 1103.1 (from memory)"). */
    alsoPrintedIn?: string[];
  } | null;
  /** Where the institutional halving is written, when it applied. */
  halvingSource: string | null;
  governing: SpaceGroupResult | null;
  groups: SpaceGroupResult[];
  message: string;
}

/** kg/m³ for a limit in any of the accepted units. lb/Mcf uses the exact lb and ft³. */
export function limitDensity(value: number, unit: LimitUnit): number {
  if (unit === 'lb/Mcf') return (value * KG_PER_POUND) / (1000 * CUBIC_METRES_PER_CUBIC_FOOT);
  if (unit === 'g/m³') return value / 1000;
  return value;
}

/** The stored limit for a refrigerant in the job's chosen edition; undefined when none is stored. */
export function pickConcentrationLimit(refrigerant: Refrigerant, editions: EditionChoice = {}): ConcentrationLimit | undefined {
  return CONCENTRATION_LIMITS.find((l) => {
    if (l.refrigerant !== refrigerant) return false;
    const ed = editions[l.document] ?? DEFAULT_EDITIONS[l.document];
    return l.editions.includes(ed);
  });
}

/** Union-find over space ids. Returns groups of ids (each sorted), in first-seen order. */
export function groupConnectedSpaces(ids: readonly string[], links: ReadonlyArray<readonly [string, string]>): string[][] {
  const parent = new Map<string, string>();
  for (const id of ids) parent.set(id, id);
  const find = (x: string): string => {
    let r = x;
    while (parent.get(r) !== r) r = parent.get(r) ?? r;
    let c = x;
    while (parent.get(c) !== r) {
      const next = parent.get(c) ?? r;
      parent.set(c, r);
      c = next;
    }
    return r;
  };
  for (const [a, b] of links) {
    if (!parent.has(a) || !parent.has(b)) continue;
    const ra = find(a);
    const rb = find(b);
    if (ra !== rb) parent.set(rb, ra);
  }
  const groups = new Map<string, string[]>();
  for (const id of ids) {
    const r = find(id);
    const g = groups.get(r) ?? [];
    g.push(id);
    groups.set(r, g);
  }
  return [...groups.values()];
}

function spaceVolume(s: ConcentrationSpace): number | null {
  if (s.volume !== undefined) return Number.isFinite(s.volume) && s.volume > 0 ? s.volume : null;
  if (s.floorArea !== undefined && s.ceilingHeight !== undefined) {
    const v = (s.floorArea * s.ceilingHeight) / 1000;
    return Number.isFinite(v) && v > 0 ? v : null;
  }
  return null;
}

/** System charge against the smallest served space (or connected group of spaces). */
export function checkRefrigerantConcentration(input: ConcentrationInput): ConcentrationResult {
  const system = input.system ?? 'imperial';
  const totalCharge = input.factoryCharge + input.fieldCharge;
  const mass = (kg: number): string => formatQuantity(kg, 'mass', system);
  const empty = { refrigerant: input.refrigerant, totalCharge, governing: null, groups: [] as SpaceGroupResult[], halvingSource: null };

  if (!Number.isFinite(totalCharge) || input.factoryCharge < 0 || input.fieldCharge < 0) {
    return { ...empty, status: 'invalid', pass: null, limit: null, message: 'Charges must be zero or more (factory and field-added, kg).' };
  }

  let limit: ConcentrationResult['limit'];
  if (input.override) {
    const o = input.override;
    if (!Number.isFinite(o.value) || o.value <= 0 || o.source.trim() === '') {
      return { ...empty, status: 'invalid', pass: null, limit: null, message: 'An entered concentration limit needs a value above zero and its source.' };
    }
    limit = { value: o.value, unit: o.unit, density: limitDensity(o.value, o.unit), source: `Job entry: ${o.source}` };
  } else {
    const stored = pickConcentrationLimit(input.refrigerant, input.editions);
    if (!stored) {
      const anyStored = CONCENTRATION_LIMITS.some((l) => l.refrigerant === input.refrigerant);
      return {
        ...empty,
        status: 'limit_not_set',
        pass: null,
        limit: null,
        message: anyStored
          ? `No ${input.refrigerant} concentration limit is stored for the chosen edition: the job must enter the limit with its source (document, edition, table).`
          : `No confirmed published concentration limit for ${input.refrigerant} is stored: the job must enter the limit with its source (document, edition, table).`,
      };
    }
    const ed = input.editions?.[stored.document] ?? DEFAULT_EDITIONS[stored.document];
    const unit: LimitUnit = system === 'imperial' ? 'lb/Mcf' : 'g/m³';
    const value = unit === 'lb/Mcf' ? stored.lbPerMcf : stored.gPerM3;
    limit = {
      value,
      unit,
      density: limitDensity(value, unit),
      source: `${stored.document} ${ed} ${stored.section}`,
      provenance: stored.provenance,
      alsoPrintedIn: (stored.alsoPrintedIn ?? []).map((a) => `${a.document} ${a.section} (${a.provenance})`),
    };
  }

  const served = new Set(input.servedSpaceIds);
  const byId = new Map(input.spaces.map((s) => [s.id, s]));
  const missing = [...served].filter((id) => !byId.has(id));
  if (served.size === 0 || missing.length > 0) {
    return {
      ...empty,
      status: 'invalid',
      pass: null,
      limit,
      message: served.size === 0 ? 'The system serves no spaces: assign its units to spaces.' : `Unknown served space(s): ${missing.join(', ')}.`,
    };
  }
  const noVolume = input.spaces.filter((s) => spaceVolume(s) === null).map((s) => s.name ?? s.id);
  if (noVolume.length > 0) {
    return { ...empty, status: 'invalid', pass: null, limit, message: `Space(s) without a volume (floor area and ceiling height): ${noVolume.join(', ')}.` };
  }

  const groups: SpaceGroupResult[] = [];
  for (const ids of groupConnectedSpaces(input.spaces.map((s) => s.id), input.openings ?? [])) {
    if (!ids.some((id) => served.has(id))) continue;
    const spaces = ids.map((id) => byId.get(id)).filter((s): s is ConcentrationSpace => s !== undefined);
    const volume = spaces.reduce((sum, s) => sum + (spaceVolume(s) ?? 0), 0);
    const areas = spaces.map((s) => s.floorArea);
    const floorArea = areas.every((a): a is number => a !== undefined && a > 0) ? areas.reduce((x, y) => x + y, 0) : null;
    const ceilingHeight = floorArea ? (volume / floorArea) * 1000 : null;
    const institutional = spaces.some((s) => s.institutional === true);
    const density = institutional ? limit.density * INSTITUTIONAL_HALVING.factor : limit.density;
    const allowedCharge = density * volume;
    const requiredVolume = totalCharge / density;
    groups.push({
      spaceIds: ids,
      names: spaces.map((s) => s.name ?? s.id),
      volume,
      floorArea,
      ceilingHeight,
      institutional,
      limitDensity: density,
      allowedCharge,
      requiredVolume,
      requiredFloorArea: ceilingHeight ? requiredVolume / (ceilingHeight / 1000) : null,
      pass: roundToResolution(allowedCharge - totalCharge) >= 0,
    });
  }
  const governing = groups.reduce<SpaceGroupResult | null>((g, x) => (g === null || x.allowedCharge < g.allowedCharge ? x : g), null);
  if (!governing) {
    return { ...empty, status: 'invalid', pass: null, limit, message: 'No served space found.' };
  }
  const pass = governing.pass;
  const where = governing.names.join(' + ');
  const half = governing.institutional ? ` (halved: institutional occupancy, ${INSTITUTIONAL_HALVING.text})` : '';
  const need = governing.requiredFloorArea !== null
    ? ` It would need ${formatQuantity(governing.requiredVolume, 'volume', system)}, i.e. ${formatQuantity(governing.requiredFloorArea, 'area', system)} of floor at its ${formatQuantity(governing.ceilingHeight ?? 0, 'length', system)} ceiling.`
    : ` It would need ${formatQuantity(governing.requiredVolume, 'volume', system)}.`;
  const message = pass
    ? `${input.refrigerant} ${mass(totalCharge)} is within the ${mass(governing.allowedCharge)} that ${where} (${formatQuantity(governing.volume, 'volume', system)}) allows at ${limit.value} ${limit.unit}${half} (${limit.source}).`
    : `${input.refrigerant} ${mass(totalCharge)} exceeds the ${mass(governing.allowedCharge)} that ${where} (${formatQuantity(governing.volume, 'volume', system)}) allows at ${limit.value} ${limit.unit}${half} (${limit.source}).${need}`;
  const halvingSource = governing.institutional ? INSTITUTIONAL_HALVING.text : null;
  return { status: pass ? 'pass' : 'fail', pass, refrigerant: input.refrigerant, totalCharge, limit, governing, groups, message, halvingSource };
}

// ------------------------------------------------------------------------------------------------
// A2L minimum floor area: IEC 60335-2-40:2018 Annex GG
// ------------------------------------------------------------------------------------------------

/** Lower flammability limits, kg/m³ (IEC 60335-2-40:2018 Annex BB / ISO 817). R-454B not stored. */
export const LFL: Partial<Record<Refrigerant, { value: number; source: string }>> = {
  'R-32': { value: 0.307, source: 'IEC 60335-2-40:2018 (R-32 LFL 0.307 kg/m³; issue text)' },
};

/** Release heights h0 of Annex GG, m: floor-standing 0.6, wall-mounted 1.8, ceiling-mounted 2.2. */
export const RELEASE_HEIGHTS = { floor: 0.6, wall: 1.8, ceiling: 2.2 } as const;
export type MountPosition = keyof typeof RELEASE_HEIGHTS;
/** The mounting positions a model or unit may record (the keys of RELEASE_HEIGHTS). */
export const MOUNT_POSITIONS = ['floor', 'wall', 'ceiling'] as const satisfies readonly MountPosition[];

/** Each mounting position in words, with its release height (IEC 60335-2-40:2018 Annex GG). */
export const MOUNT_POSITION_LABELS: Record<MountPosition, string> = {
  floor: 'Floor-standing (release height 0.6 m)',
  wall: 'Wall-mounted (release height 1.8 m)',
  ceiling: 'Ceiling-mounted (release height 2.2 m)',
};

/** Where a recorded mounting position came from: the unit's own field wins over its model's. */
export type MountSource = 'unit' | 'model' | 'kind';

/**
 * The mounting position of a unit for its release height: the unit's own field, else its
 * model's installation position, else what its kind can only be (a wall-mounted unit is on a
 * wall, a cassette in a ceiling, a floor console on the floor). A ducted unit, a coil kit and a
 * floor/ceiling unit may be either way up, so without a recorded position the answer is null.
 */
export function mountPositionOf(input: {
  kind: UnitKindKey;
  unit?: MountPosition | null;
  model?: MountPosition | null;
}): { mount: MountPosition | null; from: MountSource | null } {
  if (input.unit) return { mount: input.unit, from: 'unit' };
  if (input.model) return { mount: input.model, from: 'model' };
  const byKind = KIND_MOUNT[input.kind];
  return byKind ? { mount: byKind, from: 'kind' } : { mount: null, from: null };
}

/** "floor", "Wall-mounted", "ceiling mounted", "floor-standing" → the position; null for anything else. */
export function parseMountPosition(text: string): MountPosition | null {
  const t = text.trim().toLowerCase().replace(/[\s_-]+/g, ' ');
  const m = /^(floor|wall|ceiling)( (mounted|standing|hung))?$/.exec(t);
  return m ? (m[1] as MountPosition) : null;
}

/** Kinds whose mounting position follows from the kind itself (common practice: what the kind is). */
const KIND_MOUNT: Partial<Record<UnitKindKey, MountPosition>> = {
  wall_mounted: 'wall',
  cassette_4way: 'ceiling',
  cassette_2way: 'ceiling',
  cassette_compact: 'ceiling',
  floor_console: 'floor',
};

/**
 * Charge thresholds of IEC 60335-2-40:2018 Annex GG for A2L refrigerants, as room volumes times
 * the LFL: m1 = 6 m³ × LFL (about 1.84 kg for R-32), m2 = 26 m³ × LFL (about 7.98 kg for R-32).
 * From memory, confirm the clause (GG.1 and the A2L factor on m1) in the adopted edition.
 */
export const A2L_CHARGE_FACTORS = {
  m1: 6,
  m2: 26,
  source: 'IEC 60335-2-40:2018 Annex GG.1 (m1 = 6 m³ × LFL for A2L, m2 = 26 m³ × LFL; from memory, confirm the clause)',
} as const;

/**
 * A_min = (m / (2.5 × LFL^(5/4) × h0))², m², for charge m in kg, LFL in kg/m³, h0 in m.
 * (IEC 60335-2-40:2018 Annex GG.2.)
 */
export function a2lMinFloorArea(chargeKg: number, mount: MountPosition | number, lfl = 0.307): number {
  const h0 = typeof mount === 'number' ? mount : RELEASE_HEIGHTS[mount];
  if (!(chargeKg >= 0) || !(h0 > 0) || !(lfl > 0)) {
    throw new RangeError('A_min needs a charge ≥ 0 kg, a release height > 0 m and an LFL > 0 kg/m³.');
  }
  return (chargeKg / (2.5 * lfl ** 1.25 * h0)) ** 2;
}

/**
 * The third outcome beside pass and fail: above m2 the standard asks for other measures
 * (ventilation, leak detection, shut-off) that Trimout cannot judge from a floor area.
 */
export type A2lAreaStatus = RuleStatus | 'additional_measures';

/** Which charge band of Annex GG the system falls in. */
export type A2lChargeBand = 'below_m1' | 'm1_to_m2' | 'above_m2';

export interface A2lAreaResult {
  status: A2lAreaStatus;
  /** null for additional_measures: neither a pass nor a fail. */
  pass: boolean | null;
  band: A2lChargeBand | null;
  /** kg */
  m1: number | null;
  /** kg */
  m2: number | null;
  /** m², only between m1 and m2 (where A_min applies). */
  minArea: number | null;
  margin: number | null;
  /** m, the release height used (from the mounting position); null when the position is not recorded. */
  releaseHeight: number | null;
  message: string;
}

/** Room floor area (m²) against IEC 60335-2-40 Annex GG for the charge and mounting position. */
export function checkA2lFloorArea(input: {
  refrigerant: Refrigerant;
  chargeKg: number;
  floorArea: number | null;
  /** null: not recorded (only matters between m1 and m2, where A_min depends on it). */
  mount: MountPosition | null;
  /** kg/m³; required for refrigerants without a stored LFL. */
  lfl?: number;
  system?: UnitSystem;
}): A2lAreaResult {
  const releaseHeight = input.mount === null ? null : RELEASE_HEIGHTS[input.mount];
  const none = { band: null, m1: null, m2: null, minArea: null, margin: null, releaseHeight };
  const lfl = input.lfl ?? LFL[input.refrigerant]?.value;
  if (lfl === undefined) {
    return { ...none, status: 'limit_not_set', pass: null, message: `No LFL is stored for ${input.refrigerant}: enter it with its source.` };
  }
  if (!(input.chargeKg >= 0) || !(lfl > 0)) {
    return { ...none, status: 'invalid', pass: null, message: 'The charge must be zero or more and the LFL above zero.' };
  }
  const sys = input.system ?? 'metric';
  const m1 = A2L_CHARGE_FACTORS.m1 * lfl;
  const m2 = A2L_CHARGE_FACTORS.m2 * lfl;
  const charge = `${input.refrigerant} ${formatQuantity(input.chargeKg, 'mass', sys)}`;
  const bands = `m1 ${formatQuantity(m1, 'mass', sys)}, m2 ${formatQuantity(m2, 'mass', sys)}; ${A2L_CHARGE_FACTORS.source}`;
  // At exactly m1 the charge is not above it: no area requirement (the band is "above m1").
  if (roundToResolution(input.chargeKg - m1) <= 0) {
    return {
      ...none,
      m1,
      m2,
      band: 'below_m1',
      status: 'pass',
      pass: true,
      message: `${charge} is below m1: no room-area requirement (${bands}).`,
    };
  }
  if (roundToResolution(input.chargeKg - m2) > 0) {
    return {
      ...none,
      m1,
      m2,
      band: 'above_m2',
      status: 'additional_measures',
      pass: null,
      message: `${charge} is above m2: design must show additional measures (ventilation, leak detection, shut-off); a floor area alone neither passes nor fails it (${bands}).`,
    };
  }
  if (input.mount === null) {
    return {
      ...none,
      m1,
      m2,
      band: 'm1_to_m2',
      status: 'not_measured',
      pass: null,
      message: `${charge} is between m1 and m2, so A_min depends on the release height: record whether the unit is floor-standing, wall-mounted or ceiling-mounted (on the unit or its model).`,
    };
  }
  const minArea = a2lMinFloorArea(input.chargeKg, input.mount, lfl);
  // The standard states h0 in metres; shown as it states it.
  const where = `${input.mount}-mounted (release height h0 ${RELEASE_HEIGHTS[input.mount]} m)`;
  if (input.floorArea === null) {
    return {
      ...none,
      m1,
      m2,
      band: 'm1_to_m2',
      minArea,
      status: 'not_measured',
      pass: null,
      message: `Room floor area not entered; ${charge}, ${where}, needs ${formatQuantity(minArea, 'area', sys)} (A_min, IEC 60335-2-40:2018 Annex GG.2).`,
    };
  }
  const margin = roundToResolution(input.floorArea - minArea);
  const pass = margin >= 0;
  return {
    ...none,
    m1,
    m2,
    band: 'm1_to_m2',
    minArea,
    margin,
    status: pass ? 'pass' : 'fail',
    pass,
    message: `${charge}, ${where}, is between m1 and m2 and needs ${formatQuantity(minArea, 'area', sys)} of floor (A_min, IEC 60335-2-40:2018 Annex GG.2); the room has ${formatQuantity(input.floorArea, 'area', sys)}.`,
  };
}
