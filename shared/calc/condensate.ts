/**
 * Condensate drains: slope, pipe size from capacity (IMC Table 307.2.2), manifolded drains,
 * the ductless check valve or trap (IMC 307.2.4.1) and auxiliary drain pans (IMC 307.2.3).
 *
 * Slope decision: IMC 307.2.2 requires "not less than 1/8 unit vertical in 12 units horizontal
 * (1-percent slope)". 1/8 in 12 is 1/96 ≈ 1.0417%; "1-percent" is the code's rounded label. Trimout
 * compares against the exact 1/96, so a drain measured at exactly 1.00% fails by 0.04%. A job whose
 * authority accepts 1% sets the job setting `min_drain_slope` to 1%, which then governs.
 */
import type { EditionChoice, StatedLimit, UnitSystem } from '../catalogue/types';
import { DEFAULT_EDITIONS, pickCodeLimit } from './limits';
import { convert, formatLength, formatQuantity, roundToResolution, unitKind, WATTS_PER_TON } from './quantity';
import type { CheckResult, NamedResult, RuleStatus } from './rules';
import { checkAgainstCode, combineChecks, evaluateRule, makeLimitResolver } from './rules';

/** Slope (rise/run) from a measured drop and horizontal run, both in mm. Run must be > 0. */
export function drainSlope(drop: number, run: number): number {
  if (!Number.isFinite(drop) || !Number.isFinite(run) || run <= 0) {
    throw new RangeError('A drain slope needs a finite drop and a horizontal run greater than zero.');
  }
  return drop / run;
}

export interface DrainSlopeInput {
  /** Vertical drop over the run, mm (negative = the drain rises away from the unit). */
  drop: number | null;
  /** Horizontal run, mm. */
  run: number | null;
  /** The job's own minimum (job setting min_drain_slope); when set it governs instead of the code. */
  jobMinimum?: StatedLimit;
  editions?: EditionChoice;
  system?: UnitSystem;
}

export interface DrainSlopeResult extends NamedResult {
  slope: number | null;
}

/** Measured drain slope against IMC 307.2.2 (or the job's setting). */
export function checkDrainSlope(input: DrainSlopeInput): DrainSlopeResult {
  const { drop, run, editions, system } = input;
  const measure = 'Condensate drain slope';
  let slope: number | null = null;
  let invalid: string | null = null;
  if (drop !== null && run !== null) {
    if (!Number.isFinite(drop) || !Number.isFinite(run) || run <= 0) invalid = 'the horizontal run must be greater than zero';
    else slope = drainSlope(drop, run);
  }
  const rule = input.jobMinimum
    ? { measure, quantity: 'slope' as const, comparison: 'at_least' as const, limit: { from: 'job' as const, key: 'min_drain_slope' as const } }
    : { measure, quantity: 'slope' as const, comparison: 'at_least' as const, limit: { from: 'code' as const, key: 'imc.condensate.min_slope' } };
  const resolver = makeLimitResolver({ editions, job: input.jobMinimum ? { min_drain_slope: input.jobMinimum } : undefined });
  const r = evaluateRule(rule, slope, resolver, { system });
  if (invalid) {
    return { ...r, status: 'invalid', pass: null, margin: null, message: `${measure}: ${invalid}.`, key: 'drain_slope', label: measure, slope };
  }
  let message = r.message;
  if (slope !== null && slope < 0) message += ' The drain rises away from the unit (falls backwards).';
  else if (slope === 0) message += ' The drain is dead level.';
  return { ...r, message, key: 'drain_slope', label: measure, slope };
}

// ------------------------------------------------------------------------------------------------
// Drain pipe size from capacity: IMC Table 307.2.2
// ------------------------------------------------------------------------------------------------

export interface DrainSizeRow {
  /** Upper bound of the row, tons of refrigeration, inclusive ("up to 20", "over 20 to 40"). */
  maxTons: number;
  /** Nominal drain pipe size, inches. */
  size: number;
  label: string;
}

/** IMC Table 307.2.2 (2015, 2018; read in a 2019 local adoption reproducing the 2018 table). */
export const DRAIN_SIZE_TABLE: readonly DrainSizeRow[] = [
  { maxTons: 20, size: 0.75, label: '3/4 in' },
  { maxTons: 40, size: 1, label: '1 in' },
  { maxTons: 90, size: 1.25, label: '1-1/4 in' },
  { maxTons: 125, size: 1.5, label: '1-1/2 in' },
  { maxTons: 250, size: 2, label: '2 in' },
];
export const DRAIN_SIZE_TABLE_SOURCE = {
  document: 'IMC' as const,
  editions: ['2015', '2018', '2021'] as readonly string[],
  section: 'Table 307.2.2',
  provenance: 'read' as const,
};

export type DrainSizeResult =
  | { ok: true; tons: number; size: number; label: string; row: string; source: string }
  | { ok: false; tons: number | null; error: string; source: string };

/** "3/4 in" for a nominal size in inches. */
export function nominalSizeLabel(inches: number): string {
  return formatLength(inches * 25.4, 'imperial', { inchesOnly: true }).replace('"', ' in');
}

/**
 * The SI conversion IMC Table 307.2.2 prints with itself: 1 ton = 3.517 kW. A capacity typed in
 * watts or kilowatts is read in tons with this factor, so that a row boundary typed in kW (e.g.
 * 70.34 kW = 20 tons) lands in the row the table means; the exact factor (3.5168528 kW) would put
 * 70.34 kW at 20.0008 tons, "over 20". Capacities typed in tons, Btu/h or MBH use the exact
 * 12,000 Btu/h per ton.
 */
export const TABLE_307_2_2_KW_PER_TON = 3.517;

/** A capacity: W (base units), or the number and unit as typed (so its unit decides the conversion). */
export type DrainCapacity = number | { value: number; unit: string };

/** Tons of refrigeration for Table 307.2.2: metric power by the table's 3.517 kW, the rest exactly. */
export function drainCapacityTons(capacity: DrainCapacity): number {
  if (typeof capacity === 'number') return capacity / WATTS_PER_TON;
  if (unitKind(capacity.unit) !== 'capacity') return Number.NaN;
  const metric = /^(k?w|kilowatts?|watts?)$/i.test(capacity.unit.trim());
  return metric ? convert(capacity.value, capacity.unit, 'kW') / TABLE_307_2_2_KW_PER_TON : convert(capacity.value, capacity.unit, 'ton');
}

/** Minimum drain pipe size for a capacity, per IMC Table 307.2.2. */
export function drainPipeSize(capacity: DrainCapacity, editions: EditionChoice = {}): DrainSizeResult {
  const edition = editions.IMC ?? DEFAULT_EDITIONS.IMC;
  const source = `IMC ${edition} ${DRAIN_SIZE_TABLE_SOURCE.section}`;
  if (!DRAIN_SIZE_TABLE_SOURCE.editions.includes(edition)) {
    return { ok: false, tons: null, source, error: `Table 307.2.2 is not stored for IMC ${edition}; size the drain from that edition.` };
  }
  const rawTons = drainCapacityTons(capacity);
  if (!Number.isFinite(rawTons) || rawTons <= 0) {
    return { ok: false, tons: null, source, error: 'Capacity must be more than zero to size a drain.' };
  }
  // Rounded to 1e-9 ton so that "20 tons" typed and converted back is exactly 20.
  const tons = roundToResolution(rawTons);
  let lowerBound = 0;
  for (const row of DRAIN_SIZE_TABLE) {
    if (tons <= row.maxTons) {
      const rowText = lowerBound === 0 ? `up to ${row.maxTons} tons` : `over ${lowerBound} to ${row.maxTons} tons`;
      return { ok: true, tons, size: row.size, label: row.label, row: rowText, source };
    }
    lowerBound = row.maxTons;
  }
  return {
    ok: false,
    tons,
    source,
    error: `${formatTons(tons)} tons is outside ${source} (it stops at 250 tons): the drain must be sized by design.`,
  };
}

function formatTons(t: number): string {
  return String(Math.round(t * 100) / 100);
}

export interface DrainSegment {
  id: string;
  /** Nominal pipe size of this segment, inches (0.75, 1, 1.25, 1.5, 2 …). */
  size: number;
  /** Capacity of the units whose drains join at the upstream end of this segment: W, or as typed. */
  addedCapacity: DrainCapacity;
}

export interface DrainSegmentResult {
  id: string;
  size: number;
  cumulativeCapacity: number;
  cumulativeTons: number;
  requiredSize: number | null;
  status: RuleStatus;
  pass: boolean | null;
  message: string;
}

export interface ManifoldResult {
  status: RuleStatus;
  pass: boolean | null;
  segments: DrainSegmentResult[];
  message: string;
}

/**
 * A manifolded drain, segments in order from the most upstream to the point of disposal. Each
 * segment carries the capacity of every unit upstream of it; its size must be at least the table
 * size for that capacity, and no segment may be smaller than the one before it (IMC 307.2.2: a drain
 * shall not decrease in size toward the place of disposal).
 */
export function checkManifoldDrain(segments: readonly DrainSegment[], editions: EditionChoice = {}): ManifoldResult {
  const out: DrainSegmentResult[] = [];
  let cumulative = 0;
  let tonsSoFar = 0;
  let previous: DrainSegment | undefined;
  for (const seg of segments) {
    // Tons are summed segment by segment, each read with the conversion for the unit it was typed in.
    const added = seg.addedCapacity;
    cumulative += typeof added === 'number' ? added : unitKind(added.unit) === 'capacity' ? convert(added.value, added.unit, 'W') : Number.NaN;
    tonsSoFar += drainCapacityTons(added);
    const cumulativeTons = roundToResolution(tonsSoFar);
    const need = drainPipeSize({ value: tonsSoFar, unit: 'ton' }, editions);
    const problems: string[] = [];
    let status: RuleStatus = 'pass';
    if (!Number.isFinite(seg.size) || seg.size <= 0) {
      status = 'invalid';
      problems.push(`segment ${seg.id} has no valid pipe size`);
    } else if (!need.ok) {
      status = 'limit_not_set';
      problems.push(need.error);
    } else if (seg.size < need.size) {
      status = 'fail';
      problems.push(
        `${nominalSizeLabel(seg.size)} is smaller than the ${need.label} ${need.source} requires for ${formatTons(cumulativeTons)} tons upstream (${need.row})`,
      );
    }
    if (previous && Number.isFinite(seg.size) && seg.size < previous.size) {
      status = 'fail';
      problems.push(`the drain gets smaller downstream (${nominalSizeLabel(previous.size)} → ${nominalSizeLabel(seg.size)})`);
    }
    out.push({
      id: seg.id,
      size: seg.size,
      cumulativeCapacity: cumulative,
      cumulativeTons,
      requiredSize: need.ok ? need.size : null,
      status,
      pass: status === 'pass' ? true : status === 'fail' ? false : null,
      message:
        problems.length === 0
          ? `Segment ${seg.id}: ${nominalSizeLabel(seg.size)} carries ${formatTons(cumulativeTons)} tons; ${need.ok ? `${need.label} required` : ''}.`
          : `Segment ${seg.id}: ${problems.join('; ')}.`,
    });
    previous = seg;
  }
  const order: RuleStatus[] = ['fail', 'invalid', 'limit_not_set'];
  const status = segments.length === 0 ? 'not_measured' : (order.find((s) => out.some((o) => o.status === s)) ?? 'pass');
  return {
    status,
    pass: status === 'pass' ? true : status === 'fail' ? false : null,
    segments: out,
    message:
      status === 'pass'
        ? `Manifolded drain: all ${out.length} segments sized per Table 307.2.2 and never smaller downstream.`
        : segments.length === 0
          ? 'Manifolded drain: no segments entered.'
          : out.filter((o) => o.status !== 'pass').map((o) => o.message).join(' '),
  };
}

// ------------------------------------------------------------------------------------------------
// Ductless mini-split: check valve or trap (IMC 307.2.4.1)
// ------------------------------------------------------------------------------------------------

export interface DuctlessTrapInput {
  checkValve: boolean | null;
  trap: boolean | null;
  editions?: EditionChoice;
}

/** Ductless mini-split drain: an in-line check valve or a trap is required (either passes). */
export function checkDuctlessDrainTrap(input: DuctlessTrapInput): NamedResult {
  const edition = input.editions?.IMC ?? DEFAULT_EDITIONS.IMC;
  const source = `IMC ${edition} Section 307.2.4.1`;
  const measure = 'In-line check valve or trap on the ductless unit drain';
  const { checkValve, trap } = input;
  const answer = checkValve === true || trap === true ? true : checkValve === false && trap === false ? false : null;
  const r = evaluateRule({ measure, quantity: 'boolean', comparison: 'yes_no', expected: true }, answer, () => undefined, { source });
  return { ...r, key: 'ductless_check_valve_or_trap', label: measure };
}

// ------------------------------------------------------------------------------------------------
// Auxiliary drain pan (IMC 307.2.3 item 1)
// ------------------------------------------------------------------------------------------------

export interface AuxPanInput {
  /** All lengths in mm. */
  depth: number | null;
  panLength: number | null;
  panWidth: number | null;
  unitLength: number | null;
  unitWidth: number | null;
  editions?: EditionChoice;
  system?: UnitSystem;
}

/** Auxiliary pan: at least 1-1/2 in deep and 3 in larger than the unit in length and in width. */
export function checkAuxiliaryPan(input: AuxPanInput): CheckResult {
  const { editions, system } = input;
  const over = (pan: number | null, unit: number | null): number | null => (pan === null || unit === null ? null : pan - unit);
  return combineChecks(
    [
      checkAgainstCode('imc.aux_pan.min_depth', 'Auxiliary pan depth', input.depth, editions, system),
      checkAgainstCode('imc.aux_pan.min_oversize', 'Pan length beyond the unit length', over(input.panLength, input.unitLength), editions, system),
      checkAgainstCode('imc.aux_pan.min_oversize', 'Pan width beyond the unit width', over(input.panWidth, input.unitWidth), editions, system),
    ],
    'Auxiliary drain pan',
  );
}

/** The stored minimum slope (ratio) in the chosen IMC edition, or null when not stored. */
export function codeMinimumDrainSlope(editions: EditionChoice = {}): number | null {
  const p = pickCodeLimit('imc.condensate.min_slope', editions);
  return p.ok ? p.limit.base : null;
}

/** Display helper: a slope in both trade forms, e.g. "1/8 in/ft (1.04%)". */
export function describeSlope(ratio: number): string {
  return `${formatQuantity(ratio, 'slope', 'imperial')} (${formatQuantity(ratio, 'slope', 'metric')})`;
}
