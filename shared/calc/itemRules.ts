/**
 * A catalogue item's measured rule, evaluated the way the walk and the server both do: a rule that
 * names a code calculation (MeasuredRule.codeCheck, shapes in CODE_CHECK_RULES) is decided by that
 * calculation, so its limit and its source (document, edition, section) are the calculation's own;
 * any other rule goes to the plain engine (rules.ts evaluateRule).
 *
 * Some calculations need more than the measured value. The measured text may add it after "for":
 *   drain pipe size   "1-1/4 in for 24 tons", "1 in for 70.34 kW": the capacity the drain carries,
 *                     as typed (a manifolded drain carries every unit upstream of the point
 *                     measured); without it, the unit's own capacity. A capacity in W or kW is
 *                     read with IMC Table 307.2.2's own 1 ton = 3.517 kW (condensate.ts).
 *   support spacing   "5' 6\" for 1-5/8 in OD", "4 ft for 1 in CPVC": the pipe's size (nominal, or
 *                     OD for copper tubing) and its material as IMC Table 305.4 names its rows.
 *
 * This module sits above the calculations and the engine (it imports both; neither imports it), so
 * a calculation may use the engine without an import cycle.
 */
import { CODE_CHECK_RULES, type EditionChoice, type MeasuredRule, type UnitSystem } from '../catalogue/types';
import { workingSpaceCode, checkAtticAccess, checkWorkingSpace } from './clearance';
import { checkAuxiliaryPan, checkDuctlessDrainTrap, drainPipeSize, type DrainCapacity } from './condensate';
import { parseQuantity, unitKind, type ParseResult } from './quantity';
import { evaluateRule, type EvaluateOptions, type LimitResolver, type RuleResult } from './rules';
import { checkPipeSupportSpacing, type SupportMaterial } from './supports';

/** What the measured text adds after "for" (see the module comment). */
export interface MeasuredGiven {
  /** The capacity a drain carries, as typed. */
  capacity?: { value: number; unit: string };
  /** Pipe size, inches, and whether it is the outside diameter. */
  size?: number;
  basis?: 'nominal' | 'od';
  material?: SupportMaterial;
}

export interface ItemRuleOptions extends EvaluateOptions {
  /** The code editions the job uses; default: the resolver's (the unit's job), else DEFAULT_EDITIONS. */
  editions?: EditionChoice;
  given?: MeasuredGiven;
}

export type ItemParseResult = (ParseResult & { ok: true; given?: MeasuredGiven }) | (ParseResult & { ok: false });

const MATERIAL_WORDS: Array<[RegExp, SupportMaterial]> = [
  [/\bcpvc\b/i, 'cpvc'],
  [/\bpvc\b/i, 'pvc_pipe'],
  [/\babs\b/i, 'abs_pipe'],
  [/\bsteel\b/i, 'steel_pipe'],
  [/\bcopper pipe\b/i, 'copper_pipe'],
  [/\b(copper|acr|tub(e|ing))\b/i, 'copper_tubing'],
];

function parseGiven(kind: 'capacity' | 'pipe', text: string): { ok: true; given: MeasuredGiven } | { ok: false; error: string } {
  if (kind === 'capacity') {
    const m = /^([\d.,]+)\s*([a-z/ ]+)$/i.exec(text.trim());
    const value = m ? Number((m[1] ?? '').replace(/,/g, '')) : Number.NaN;
    const unit = m?.[2]?.trim() ?? '';
    if (!m || !Number.isFinite(value) || unitKind(unit) !== 'capacity') {
      return { ok: false, error: `After "for", give the capacity the drain carries, e.g. "1 in for 6 tons" or "1 in for 21 kW" ("${text.trim()}" is not a capacity).` };
    }
    return { ok: true, given: { capacity: { value, unit } } };
  }
  let rest = text.trim();
  const given: MeasuredGiven = {};
  for (const [re, material] of MATERIAL_WORDS) {
    if (re.test(rest)) {
      given.material = material;
      rest = rest.replace(re, ' ');
      break;
    }
  }
  rest = rest.replace(/\b(pipe|tubing|tube|nominal)\b/gi, ' ');
  if (/\bod\b/i.test(rest)) {
    given.basis = 'od';
    rest = rest.replace(/\bod\b/gi, ' ');
  }
  rest = rest.trim();
  if (rest) {
    const size = parseQuantity(rest, 'length', { defaultUnit: 'in' });
    if (!size.ok) return { ok: false, error: `After "for", give the pipe size and material, e.g. "5 ft for 1-5/8 in OD" or "4 ft for 1 in CPVC": ${size.error}` };
    given.size = size.value / 25.4;
  }
  return { ok: true, given };
}

/**
 * Parse an item's measured text: the measured value, and for a calculation that takes it, what
 * follows "for". Without "for" it is parseQuantity itself.
 */
export function parseItemMeasurement(rule: MeasuredRule, text: string, options: { system?: UnitSystem; allowNegative?: boolean } = {}): ItemParseResult {
  const takes = rule.codeCheck ? CODE_CHECK_RULES[rule.codeCheck].given : undefined;
  const split = takes ? /^(.*?)\s+for\s+(.+)$/i.exec(text.trim()) : null;
  if (!takes || !split) return parseQuantity(text, rule.quantity, options);
  const main = parseQuantity(split[1] ?? '', rule.quantity, options);
  if (!main.ok) return main;
  const given = parseGiven(takes, split[2] ?? '');
  if (!given.ok) return { ok: false, error: given.error };
  return { ...main, display: `${main.display} for ${(split[2] ?? '').trim()}`, given: given.given };
}

/** A calculation's named result as the engine's result: only the RuleResult fields (it is stored as sent). */
/**
 * Metric nominal pipe sizes (DN, ISO 6708) and the inch nominal sizes they stand for, as pipe
 * schedules pair them: DN15 1/2, DN20 3/4, DN25 1, DN32 1-1/4, DN40 1-1/2, DN50 2, DN65 2-1/2,
 * DN80 3, DN100 4 (common practice; the pairing from memory, confirm against the job's pipe
 * specification). A drain size typed as "20 mm" is DN20, the 3/4 in row, not 20 mm against 19.05.
 */
const DN_TO_INCHES: ReadonlyArray<readonly [number, number]> = [
  [15, 0.5],
  [20, 0.75],
  [25, 1],
  [32, 1.25],
  [40, 1.5],
  [50, 2],
  [65, 2.5],
  [80, 3],
  [100, 4],
];

/** A measured drain size (mm) as the nominal size it names: a DN within 0.5 mm, an inch size within 0.5 mm, else as measured. */
export function nominalDrainSize(mm: number): number {
  for (const [dn, inches] of DN_TO_INCHES) {
    if (Math.abs(mm - dn) <= 0.5 || Math.abs(mm - inches * 25.4) <= 0.5) return inches * 25.4;
  }
  return mm;
}

function strip(r: RuleResult): RuleResult {
  const { status, pass, margin, limit, upper, tolerance, expected, measured, limitSource, message } = r;
  return { status, pass, margin, limit, upper, tolerance, expected, measured, limitSource, message };
}

function undecided(status: 'limit_not_set' | 'invalid', measured: number | boolean | null, message: string, limitSource = ''): RuleResult {
  return { status, pass: null, margin: null, limit: null, upper: null, tolerance: null, expected: null, measured, limitSource, message };
}

/** Evaluate one catalogue item's rule: its code calculation when it names one, else the plain engine. */
export function evaluateItemRule(
  rule: MeasuredRule,
  measured: number | boolean | null | undefined,
  resolveLimit: LimitResolver,
  options: ItemRuleOptions = {},
): RuleResult {
  const m = measured ?? null;
  const editions = options.editions ?? resolveLimit.editions;
  const system = options.system;
  const given = options.given ?? {};
  const shape = rule.codeCheck ? CODE_CHECK_RULES[rule.codeCheck] : undefined;
  if (!rule.codeCheck || !shape || shape.comparison !== rule.comparison || shape.quantity !== rule.quantity) {
    return evaluateRule(rule, m, resolveLimit, options);
  }
  if (rule.comparison === 'yes_no') {
    if (rule.expected !== true || (m !== null && typeof m !== 'boolean')) return evaluateRule(rule, m, resolveLimit, options);
  } else if (typeof m === 'boolean') {
    return undecided('invalid', m, `${rule.measure}: a measured ${rule.quantity} is expected.`);
  }
  const n = typeof m === 'number' ? m : null;
  switch (rule.codeCheck) {
    case 'ductless_check_valve_or_trap':
      // One answer covers both: the inspector records whether either is present.
      return strip(checkDuctlessDrainTrap({ checkValve: m as boolean | null, trap: m as boolean | null, editions }));
    case 'drain_pipe_size': {
      const capacity: DrainCapacity | null = given.capacity ?? resolveLimit.unit?.capacity ?? null;
      if (capacity === null) {
        return undecided(
          'limit_not_set',
          m,
          `${rule.measure}: limit not set — the unit has no capacity recorded: type the capacity the drain carries after the size, e.g. "1 in for 6 tons" (on a manifolded drain, every unit upstream).`,
        );
      }
      const need = drainPipeSize(capacity, editions);
      if (!need.ok) return undecided('limit_not_set', m, `${rule.measure}: limit not set — ${need.error}`, need.source);
      const carried = `${Math.round(need.tons * 100) / 100} tons carried${given.capacity ? ` (${given.capacity.value} ${given.capacity.unit} as typed)` : ", the unit's own capacity"}`;
      const source = `${need.source}, ${need.row}: ${need.label} for ${carried}`;
      const sized = { ...rule, limit: { from: 'code' as const, key: 'imc.condensate.drain_size' } };
      const size = typeof m === 'number' ? nominalDrainSize(m) : m;
      return evaluateRule(sized, size, () => ({ value: need.size * 25.4, quantity: 'length', source }), options);
    }
    case 'aux_pan_depth':
      return strip(checkAuxiliaryPan({ depth: n, panLength: null, unitLength: null, panWidth: null, unitWidth: null, editions, system }).checks[0]!);
    case 'aux_pan_oversize':
      // The inspector measures the pan's overhang beyond the unit on its shorter side: the pan less the unit.
      return strip(checkAuxiliaryPan({ depth: null, panLength: n, unitLength: n === null ? null : 0, panWidth: null, unitWidth: null, editions, system }).checks[1]!);
    case 'working_space_depth':
    case 'working_space_width': {
      const code = workingSpaceCode(editions);
      const r = checkWorkingSpace({ code, depth: n, width: n, editions, system });
      return strip(r.checks[rule.codeCheck === 'working_space_depth' ? 0 : 1]!);
    }
    case 'attic_opening':
      // The smaller side of the opening against the code's smaller dimension (20 in); the larger is checked by eye.
      return strip(
        checkAtticAccess({ passageHeight: null, passageWidth: null, passageLength: null, openingWidth: n, openingHeight: n === null ? null : Infinity, editions, system }).checks[3]!,
      );
    case 'drain_support_spacing':
    case 'pipe_support_spacing': {
      if (rule.codeCheck === 'drain_support_spacing') {
        // The job's own spacing governs where it has one; otherwise the plastic drain rows of IMC Table 305.4.
        const job = resolveLimit({ from: 'job', key: 'max_drain_support_spacing' });
        if (job && !('missing' in job)) return evaluateRule({ ...rule, limit: { from: 'job', key: 'max_drain_support_spacing' } }, m, resolveLimit, options);
      }
      const material = given.material ?? (rule.codeCheck === 'drain_support_spacing' ? 'pvc_pipe' : 'copper_tubing');
      // Without a size: the smaller copper tubing row (indoor-unit line sets), or any size of a row that does not split.
      const size = given.size ?? (material === 'cpvc' ? 1 : 1.25);
      const r = checkPipeSupportSpacing({ material, size, basis: given.basis, orientation: 'horizontal', spacing: n, editions, system });
      return strip(r);
    }
  }
  return evaluateRule(rule, m, resolveLimit, options);
}
