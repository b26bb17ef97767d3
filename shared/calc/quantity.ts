/**
 * Field quantities: parse what the trade types, convert exactly, format for the job.
 *
 * Base units (every value the engine stores or compares is in these):
 *   length    millimetre (mm)
 *   slope     ratio rise / run (dimensionless; 1/8 in per ft = 1/96)
 *   area      square metre (m²)
 *   volume    cubic metre (m³)
 *   mass      kilogram (kg)
 *   capacity  watt (W). Watts, not kW, so that every base unit is a coherent SI unit.
 *   angle     degree (°)
 *   pressure  pascal (Pa)
 *   boolean   1 = yes, 0 = no
 *
 * Exact conversion factors (NIST SP 811 (2008) Appendix B; international yard and pound, 1959):
 *   1 in = 25.4 mm, 1 ft = 0.3048 m, 1 lb = 0.45359237 kg, 1 oz = 1/16 lb,
 *   1 ft² = 0.09290304 m², 1 ft³ = 0.028316846592 m³ (both follow from 1 ft = 0.3048 m),
 *   1 US gal = 231 in³, 1 L = 0.001 m³.
 *   1 Btu (International Table) = 1055.05585262 J (NIST SP 811 (2008) B.8), so 1 Btu/h = 0.29307107017 W.
 *   1 ton of refrigeration = 12,000 Btu/h = 3516.8528420667 W. We use this value derived from the IT
 *   Btu rather than the rounded 3.517 kW printed beside code tables ("1 ton = 3.517 kW", IMC Table
 *   307.2.2 footnote), because it is exact given the Btu definition and makes 12,000 Btu/h and 1 ton
 *   the same number; 3.517 kW is that value rounded to four significant figures.
 *   1 MBH = 1,000 Btu/h.
 *   1 in. w.c. (inch of water column, the unit duct static pressure is read in) = 249.08891 Pa:
 *   the conventional inch of water, 0.0254 m × 1000 kg/m³ × 9.80665 m/s² (standard gravity), exact
 *   by that definition. NIST SP 811 (2008) Appendix B lists it as "inch of water, conventional
 *   (inH2O)" = 2.490889 E+02 Pa, beside the inch of water at 39.2 °F (2.49082 E+02 Pa) and at 60 °F
 *   (2.4884 E+02 Pa) (those two from memory; confirm in B.8). Trimout uses the conventional value,
 *   which names no temperature (water at 1000 kg/m³, about 4 °C); the 60 °F value is 0.1 % lower,
 *   far below the resolution of a static pressure gauge. 1 kPa = 1000 Pa.
 *
 * Exactness: numbers are parsed into rationals (bigint numerator / denominator), multiplied by the
 * rational conversion factor and divided once at the end, so `4' 10-1/2"` is 117/2 in × 254/10 =
 * 1485.9 mm as the nearest double, exactly the literal 1485.9. No float drift from summing feet and
 * inches.
 *
 * Formatting (one trade style, documented here):
 *   imperial length  feet and inches to the nearest 1/16 in: `4' 10-1/2"`; below one foot `10-1/2"`;
 *                    whole feet `5' 0"`. Option `inchesOnly` gives `58-1/2"`.
 *   metric length    millimetres to 0.1 mm: `1485.9 mm`, `1486 mm`.
 *   slope            imperial `1/8 in/ft` (fraction when on the 1/16 in/ft grid, else decimals);
 *                    metric percent `1.04%`.
 *   mass             `38 lb` / `17.24 kg` (two decimals, trailing zeros dropped).
 *   capacity         `36,000 Btu/h` / `10.55 kW`.
 *   area, volume     `182.7 ft²` / `28.81 m²`, `800 ft³` / `22.65 m³`.
 *   angle            `30°`. boolean `Yes` / `No`.
 *   pressure         `0.5 in. w.c.` (two decimals, trailing zeros dropped) / `125 Pa` (whole pascals).
 * Every display string parses back: parse(format(x)) === x for imperial lengths on the 1/16 in grid
 * and for metric lengths on the 0.1 mm grid.
 */
import type { QuantityKind, UnitSystem } from '../catalogue/types';

// ------------------------------------------------------------------------------------------------
// Rationals
// ------------------------------------------------------------------------------------------------

/** An exact rational number; d > 0. */
export interface Rational {
  n: bigint;
  d: bigint;
}

function gcd(a: bigint, b: bigint): bigint {
  let x = a < 0n ? -a : a;
  let y = b < 0n ? -b : b;
  while (y !== 0n) {
    const t = x % y;
    x = y;
    y = t;
  }
  return x === 0n ? 1n : x;
}

function rat(n: bigint, d: bigint = 1n): Rational {
  if (d === 0n) throw new RangeError('zero denominator');
  if (d < 0n) {
    n = -n;
    d = -d;
  }
  const g = gcd(n, d);
  return { n: n / g, d: d / g };
}

function add(a: Rational, b: Rational): Rational {
  return rat(a.n * b.d + b.n * a.d, a.d * b.d);
}

function mul(a: Rational, b: Rational): Rational {
  return rat(a.n * b.n, a.d * b.d);
}

function div(a: Rational, b: Rational): Rational {
  return rat(a.n * b.d, a.d * b.n);
}

/** A decimal string ("25.4", "0.45359237", "1055.05585262") as an exact rational. */
function ratDec(text: string): Rational {
  const [whole, frac = ''] = text.split('.');
  return rat(BigInt((whole ?? '') + frac || '0'), 10n ** BigInt(frac.length));
}

const MAX_EXACT = 2n ** 53n;

/** The nearest double to an exact rational (correctly rounded while both parts fit in 53 bits). */
export function rationalToNumber(r: Rational): number {
  const an = r.n < 0n ? -r.n : r.n;
  if (an <= MAX_EXACT && r.d <= MAX_EXACT) return Number(r.n) / Number(r.d);
  // Large parts: scale to 17 significant digits with integer division, then one rounding.
  const scale = 10n ** 20n;
  const q = (r.n * scale) / r.d;
  return Number(q) / 1e20;
}

// ------------------------------------------------------------------------------------------------
// Units
// ------------------------------------------------------------------------------------------------

/** Quantity kinds that carry a unit (boolean does not). */
export type DimensionedKind = Exclude<QuantityKind, 'boolean'>;

interface UnitDef {
  /** Canonical symbol used in messages and by `convert`. */
  symbol: string;
  kind: DimensionedKind;
  /** Value of one of this unit in base units, exact. */
  factor: Rational;
  system: UnitSystem | 'both';
  /** Compound order: feet before inches, pounds before ounces. */
  rank?: number;
}

const IN_MM = ratDec('25.4');
const FT_MM = ratDec('304.8');
const LB_KG = ratDec('0.45359237');
const BTU_J = ratDec('1055.05585262');
const BTUH_W = div(BTU_J, rat(3600n));
const TON_W = mul(rat(12000n), BTUH_W);
const IN_M = ratDec('0.0254');
/** The conventional inch of water: 0.0254 m × 1000 kg/m³ × 9.80665 m/s² = 249.08891 Pa. */
const INWC_PA = mul(mul(IN_M, rat(1000n)), ratDec('9.80665'));
const FT_M = ratDec('0.3048');

/** Exact factors, exported for tests and documentation. */
export const FACTORS = {
  inchToMm: IN_MM,
  footToMm: FT_MM,
  poundToKg: LB_KG,
  btuToJoule: BTU_J,
  btuPerHourToWatt: BTUH_W,
  inchWaterToPascal: INWC_PA,
  tonToWatt: TON_W,
  cubicFootToCubicMetre: mul(mul(FT_M, FT_M), FT_M),
  squareFootToSquareMetre: mul(FT_M, FT_M),
} as const;

/** 1 ton of refrigeration in watts (12,000 Btu/h with the IT Btu): 3516.8528420667 W. */
export const WATTS_PER_TON = rationalToNumber(TON_W);
/** 1 ft³ in m³: 0.028316846592 exactly. */
export const CUBIC_METRES_PER_CUBIC_FOOT = rationalToNumber(FACTORS.cubicFootToCubicMetre);
export const MM_PER_INCH = 25.4;
/** 1 in. w.c. (conventional inch of water) in pascals: 249.08891. */
export const PASCALS_PER_INCH_WATER = rationalToNumber(INWC_PA);
export const MM_PER_FOOT = 304.8;
export const KG_PER_POUND = 0.45359237;

const UNIT_LIST: Array<[string[], UnitDef]> = [];
function unit(spellings: string[], def: UnitDef): void {
  UNIT_LIST.push([spellings, def]);
}

// length
unit(["'", 'ft', 'ft.', 'feet', 'foot'], { symbol: 'ft', kind: 'length', factor: FT_MM, system: 'imperial', rank: 1 });
unit(['"', 'in', 'in.', 'inch', 'inches'], { symbol: 'in', kind: 'length', factor: IN_MM, system: 'imperial', rank: 2 });
unit(['mm', 'millimetre', 'millimetres', 'millimeter', 'millimeters'], { symbol: 'mm', kind: 'length', factor: rat(1n), system: 'metric' });
unit(['cm', 'centimetre', 'centimetres', 'centimeter', 'centimeters'], { symbol: 'cm', kind: 'length', factor: rat(10n), system: 'metric' });
unit(['m', 'metre', 'metres', 'meter', 'meters'], { symbol: 'm', kind: 'length', factor: rat(1000n), system: 'metric' });
// slope
{
  const nums: Array<[string[], Rational, UnitSystem]> = [
    [['in', 'inch', 'inches', '"'], IN_MM, 'imperial'],
    [['mm'], rat(1n), 'metric'],
    [['cm'], rat(10n), 'metric'],
  ];
  const dens: Array<[string[], Rational]> = [
    [['ft', 'foot', 'feet', "'"], FT_MM],
    [['m', 'metre', 'meter'], rat(1000n)],
  ];
  for (const [ns, nf, sys] of nums) {
    for (const [ds, df] of dens) {
      const spellings: string[] = [];
      for (const a of ns) for (const b of ds) spellings.push(`${a}/${b}`, `${a} per ${b}`);
      const symbol = `${ns[0] ?? ''}/${ds[0] ?? ''}`;
      unit(spellings, { symbol, kind: 'slope', factor: div(nf, df), system: sys });
    }
  }
}
unit(['%', 'percent', 'pct'], { symbol: '%', kind: 'slope', factor: rat(1n, 100n), system: 'metric' });
// area
unit(['ft²', 'ft2', 'sq ft', 'sqft', 'sf', 'square feet', 'square foot'], { symbol: 'ft²', kind: 'area', factor: FACTORS.squareFootToSquareMetre, system: 'imperial' });
unit(['in²', 'in2', 'sq in', 'square inches'], { symbol: 'in²', kind: 'area', factor: mul(IN_M, IN_M), system: 'imperial' });
unit(['m²', 'm2', 'sq m', 'square metres', 'square meters'], { symbol: 'm²', kind: 'area', factor: rat(1n), system: 'metric' });
// volume
unit(['ft³', 'ft3', 'cu ft', 'cuft', 'cf', 'cubic feet', 'cubic foot'], { symbol: 'ft³', kind: 'volume', factor: FACTORS.cubicFootToCubicMetre, system: 'imperial' });
unit(['mcf'], { symbol: 'Mcf', kind: 'volume', factor: mul(rat(1000n), FACTORS.cubicFootToCubicMetre), system: 'imperial' });
unit(['in³', 'in3', 'cu in'], { symbol: 'in³', kind: 'volume', factor: mul(mul(IN_M, IN_M), IN_M), system: 'imperial' });
unit(['gal', 'gallon', 'gallons'], { symbol: 'gal', kind: 'volume', factor: mul(rat(231n), mul(mul(IN_M, IN_M), IN_M)), system: 'imperial' });
unit(['m³', 'm3', 'cu m', 'cubic metres', 'cubic meters'], { symbol: 'm³', kind: 'volume', factor: rat(1n), system: 'metric' });
unit(['l', 'litre', 'litres', 'liter', 'liters'], { symbol: 'L', kind: 'volume', factor: rat(1n, 1000n), system: 'metric' });
// mass
unit(['lb', 'lb.', 'lbs', 'lbs.', 'pound', 'pounds', '#'], { symbol: 'lb', kind: 'mass', factor: LB_KG, system: 'imperial', rank: 1 });
unit(['oz', 'oz.', 'ounce', 'ounces'], { symbol: 'oz', kind: 'mass', factor: div(LB_KG, rat(16n)), system: 'imperial', rank: 2 });
unit(['kg', 'kilogram', 'kilograms', 'kgs'], { symbol: 'kg', kind: 'mass', factor: rat(1n), system: 'metric' });
unit(['g', 'gram', 'grams'], { symbol: 'g', kind: 'mass', factor: rat(1n, 1000n), system: 'metric' });
// capacity
unit(['btu/h', 'btu/hr', 'btuh', 'btu per hour', 'btu per hr'], { symbol: 'Btu/h', kind: 'capacity', factor: BTUH_W, system: 'imperial' });
unit(['mbh', 'mbtu/h', 'mbtuh'], { symbol: 'MBH', kind: 'capacity', factor: mul(rat(1000n), BTUH_W), system: 'imperial' });
unit(['ton', 'tons', 'tr', 'rt', 'ton of refrigeration', 'tons of refrigeration'], { symbol: 'ton', kind: 'capacity', factor: TON_W, system: 'imperial' });
unit(['w', 'watt', 'watts'], { symbol: 'W', kind: 'capacity', factor: rat(1n), system: 'metric' });
unit(['kw', 'kilowatt', 'kilowatts'], { symbol: 'kW', kind: 'capacity', factor: rat(1000n), system: 'metric' });
// angle
unit(['°', 'deg', 'degree', 'degrees'], { symbol: '°', kind: 'angle', factor: rat(1n), system: 'both' });
// pressure (duct static pressure)
unit(
  ['in. w.c.', 'in w.c.', 'in.w.c.', 'in wc', 'in. wc', 'inwc', 'in. w.g.', 'in w.g.', 'in wg', 'in h2o', 'inh2o', 'in. h2o', 'iwc', '"wc', '" wc', '" w.c.', 'inches of water', 'inch of water'],
  { symbol: 'in. w.c.', kind: 'pressure', factor: INWC_PA, system: 'imperial' },
);
unit(['pa', 'pascal', 'pascals'], { symbol: 'Pa', kind: 'pressure', factor: rat(1n), system: 'metric' });
unit(['kpa', 'kilopascal', 'kilopascals'], { symbol: 'kPa', kind: 'pressure', factor: rat(1000n), system: 'metric' });

/** Every accepted spelling (lower case) → its unit. Longest spellings are tried first. */
const SPELLINGS: Array<[string, UnitDef]> = UNIT_LIST.flatMap(([ss, def]) =>
  ss.map((s): [string, UnitDef] => [s.toLowerCase(), def]),
).sort((a, b) => b[0].length - a[0].length);

function escapeChar(c: string): string {
  if (c === ' ') return '\\s+';
  if (c === '/') return '\\s*/\\s*';
  return c.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

/** Spelling matchers, compiled once: spaces match any run of spaces, "/" may have spaces around it. */
const MATCHERS: Array<{ re: RegExp; wordEnd: boolean; def: UnitDef }> = SPELLINGS.map(([spelling, def]) => ({
  re: new RegExp(`^${spelling.split('').map(escapeChar).join('')}`),
  wordEnd: /[a-z]$/.test(spelling),
  def,
}));

function findUnit(name: string): UnitDef | undefined {
  const key = normaliseSpaces(name.toLowerCase());
  return SPELLINGS.find(([s]) => s === key)?.[1];
}

/** Canonical unit symbols accepted by `toBase` / `fromBase` / `convert`, per kind. */
export function unitsFor(kind: DimensionedKind): string[] {
  return UNIT_LIST.filter(([, d]) => d.kind === kind).map(([, d]) => d.symbol);
}

const KIND_WORDS: Record<QuantityKind, string> = {
  length: 'a length',
  slope: 'a slope',
  area: 'an area',
  volume: 'a volume',
  mass: 'a mass',
  capacity: 'a capacity',
  angle: 'an angle',
  pressure: 'a pressure',
  boolean: 'a yes/no answer',
};

const KIND_EXAMPLES: Record<QuantityKind, string> = {
  length: `4' 10-1/2", 58.5 in or 1486 mm`,
  slope: '1/8 in/ft, 1% or 1:100',
  area: '100 ft² or 9.29 m²',
  volume: '800 ft³ or 22.65 m³',
  mass: '38 lb, 12 lb 6 oz or 17.2 kg',
  capacity: '36000 Btu/h, 3 tons or 10.5 kW',
  angle: '30°',
  pressure: '0.5 in. w.c. or 125 Pa',
  boolean: 'yes or no',
};

/** Convert a value in `unitName` to base units (throws on an unknown unit name). */
export function toBase(value: number, unitName: string): number {
  const u = requireUnit(unitName);
  return value * rationalToNumber(u.factor);
}

/** Convert a value in base units to `unitName`. */
export function fromBase(value: number, unitName: string): number {
  const u = requireUnit(unitName);
  return value / rationalToNumber(u.factor);
}

/** Convert between two units of the same kind, using one exact combined factor. */
export function convert(value: number, fromUnit: string, toUnit: string): number {
  const a = requireUnit(fromUnit);
  const b = requireUnit(toUnit);
  if (a.kind !== b.kind) {
    throw new RangeError(`Cannot convert ${a.symbol} (${a.kind}) to ${b.symbol} (${b.kind})`);
  }
  return value * rationalToNumber(div(a.factor, b.factor));
}

/** The kind a unit name measures, or undefined when the name is not a known unit. */
export function unitKind(unitName: string): DimensionedKind | undefined {
  return findUnit(unitName)?.kind;
}

function requireUnit(name: string): UnitDef {
  const u = findUnit(name);
  if (!u) throw new RangeError(`Unknown unit '${name}'`);
  return u;
}

// ------------------------------------------------------------------------------------------------
// Parsing
// ------------------------------------------------------------------------------------------------

export interface ParseOptions {
  /** System for the returned display string; defaults to the system of the unit typed. */
  system?: UnitSystem;
  /** Allow one leading minus sign (e.g. a level deviation). Default false. */
  allowNegative?: boolean;
  /** Unit for a bare number (a field with a unit picker); without it a bare number is rejected. */
  defaultUnit?: string;
}

export type ParseResult =
  | { ok: true; value: number; kind: QuantityKind; display: string }
  | { ok: false; error: string };

function fail(error: string): ParseResult {
  return { ok: false, error };
}

function normaliseSpaces(s: string): string {
  return s.replace(/\s+/g, ' ').replace(/\s*\/\s*/g, '/').trim();
}

const UNICODE_FRACTIONS: Record<string, string> = {
  '½': '1/2', '¼': '1/4', '¾': '3/4', '⅛': '1/8', '⅜': '3/8', '⅝': '5/8', '⅞': '7/8',
};

function normalise(text: string): string {
  let s = text.replace(/[\u00a0\u2009\u202f]/g, ' ');
  s = s.replace(/[\u2032\u2019\u2018\u00b4`]/g, "'"); // prime, curly apostrophes, accents → feet
  s = s.replace(/[\u2033\u201c\u201d]/g, '"'); // double prime, curly quotes → inches
  s = s.replace(/[\u2212\u2013\u2014]/g, '-'); // minus sign, en/em dash → hyphen
  s = s.replace(/(\d)\s*([½¼¾⅛⅜⅝⅞])/g, (_m, d: string, f: string) => `${d} ${UNICODE_FRACTIONS[f] ?? f}`);
  s = s.replace(/[½¼¾⅛⅜⅝⅞]/g, (f) => UNICODE_FRACTIONS[f] ?? f);
  return s.trim();
}

interface Term {
  amount: Rational;
  unit: UnitDef;
  text: string;
  whole: boolean;
}

// mixed number (10-1/2, 10 1/2) | fraction (3/8) | number with thousands separators | decimal
const NUMBER_RE = /^(?:(\d+)(?:-|\s+)(\d+)\/(\d+)|(\d+)\/(\d+)|(\d{1,3}(?:,\d{3})+(?:\.\d+)?)|(\d+(?:\.\d*)?|\.\d+))/;

type NumberScan =
  | { ok: true; value: Rational; whole: boolean; length: number }
  | { ok: false; error: string }
  | null;

function scanNumber(s: string): NumberScan {
  const m = NUMBER_RE.exec(s);
  if (!m) return null;
  const [all, mw, mn, md, fn, fd, thousands, dec] = m;
  if (mw !== undefined && mn !== undefined && md !== undefined) {
    if (BigInt(md) === 0n) return { ok: false, error: `Zero denominator in ${mn}/${md}: a fraction cannot divide by zero.` };
    if (BigInt(mn) >= BigInt(md)) {
      return { ok: false, error: `In ${all.trim()} the fraction ${mn}/${md} is 1 or more; a mixed number needs a proper fraction (e.g. 10-1/2).` };
    }
    return { ok: true, value: add(rat(BigInt(mw)), rat(BigInt(mn), BigInt(md))), whole: false, length: all.length };
  }
  if (fn !== undefined && fd !== undefined) {
    if (BigInt(fd) === 0n) return { ok: false, error: `Zero denominator in ${fn}/${fd}: a fraction cannot divide by zero.` };
    return { ok: true, value: rat(BigInt(fn), BigInt(fd)), whole: false, length: all.length };
  }
  const digits = (thousands ?? dec ?? '').replace(/,/g, '');
  const value = ratDec(digits.endsWith('.') ? digits.slice(0, -1) : digits);
  return { ok: true, value, whole: !digits.includes('.'), length: all.length };
}

/** Match the longest known unit spelling at the start of `s` (which has no leading space). */
function scanUnit(s: string): { unit: UnitDef; length: number } | null {
  const lower = s.toLowerCase();
  for (const { re, wordEnd, def } of MATCHERS) {
    const m = re.exec(lower);
    if (!m) continue;
    const next = lower.charAt(m[0].length);
    // a word spelling must end at a word boundary ("in" must not match "inx" or "in²")
    if (wordEnd && /[a-z0-9²³]/.test(next)) continue;
    return { unit: def, length: m[0].length };
  }
  return null;
}

/**
 * Parse a quantity typed the way the trade writes it. Rejections say why.
 * Accepted, for example: `4' 10-1/2"`, `4'-10 1/2"`, `4 ft 10.5 in`, `58.5"`, `58 1/2 in`, `3/8"`,
 * `1486 mm`, `1.486 m`, `38 lb`, `12 lb 6 oz`, `17.2 kg`, `3 tons`, `36,000 Btu/h`, `36 MBH`,
 * `10.5 kW`, `1/8 in/ft`, `1/8" per ft`, `1%`, `1:100`, `30°`, `yes`/`no`; a length also as a tilt across a
 * width: `1° across 840 mm`, `1:100 over 32 in`.
 */
export function parseQuantity(text: string, expected: QuantityKind, options: ParseOptions = {}): ParseResult {
  if (typeof text !== 'string' || text.trim() === '') {
    return fail(`Enter a value: ${KIND_WORDS[expected]} is expected (e.g. ${KIND_EXAMPLES[expected]}).`);
  }
  const original = text.trim();
  if (expected === 'boolean') return parseBoolean(original);
  if (expected === 'length') {
    const across = /^(.+?)\s+(?:across|over)\s+(.+)$/i.exec(original);
    if (across) return parseTiltAcross(original, across[1] ?? '', across[2] ?? '', options);
  }

  const s0 = normalise(original);
  if (/''/.test(s0)) {
    return fail(
      `"${original}" has two apostrophes ('') where a double quote (") is meant: write inches with " (e.g. 4") and feet with a single ' (e.g. 4').`,
    );
  }
  const signMatch = /^([+-][\s+-]*)/.exec(s0);
  let negative = false;
  let s = s0;
  if (signMatch) {
    const signs = signMatch[1]?.replace(/\s/g, '') ?? '';
    if (signs.length > 1) {
      return fail(`"${original}" starts with more than one sign (${signs}): write at most one minus sign.`);
    }
    negative = signs === '-';
    s = s0.slice(signMatch[0].length);
    if (negative && !options.allowNegative) {
      return fail(`"${original}" is negative: ${KIND_WORDS[expected]} here cannot be below zero.`);
    }
  }
  if (!/^[\d.]/.test(s) && !/^[½¼¾⅛⅜⅝⅞]/.test(s)) {
    return fail(`"${original}" does not start with a number: ${KIND_WORDS[expected]} is expected (e.g. ${KIND_EXAMPLES[expected]}).`);
  }

  // Ratio 1:100 (slope only)
  const ratio = /^(\d+(?:\.\d+)?)\s*:\s*(\d+(?:\.\d+)?)$/.exec(s);
  if (ratio) {
    const rise = ratDec(ratio[1] ?? '0');
    const run = ratDec(ratio[2] ?? '0');
    if (run.n === 0n) return fail(`Zero run in "${original}": a ratio cannot divide by zero.`);
    if (expected === 'length') {
      return fail(`"${original}" is a slope: a height difference stated that way needs the width it applies across, e.g. "1:100 across 840 mm".`);
    }
    if (expected !== 'slope') {
      return fail(`"${original}" is a ratio (a slope), but ${KIND_WORDS[expected]} is expected (e.g. ${KIND_EXAMPLES[expected]}).`);
    }
    const value = signed(rationalToNumber(div(rise, run)), negative);
    return { ok: true, value, kind: 'slope', display: formatQuantity(value, 'slope', options.system ?? 'metric') };
  }

  const terms: Term[] = [];
  let rest = s;
  while (rest.length > 0) {
    const num = scanNumber(rest);
    if (num === null) {
      return fail(`Unexpected text "${rest}" in "${original}": ${KIND_WORDS[expected]} is expected (e.g. ${KIND_EXAMPLES[expected]}).`);
    }
    if (!num.ok) return fail(num.error);
    const numText = rest.slice(0, num.length);
    rest = rest.slice(num.length);
    if (/^[,\d]/.test(rest) || /^\.\d/.test(rest)) {
      return fail(
        `"${original}" has a comma or point that cannot be read: use a point for decimals (1.5) and commas only to group thousands (36,000).`,
      );
    }
    if (/^\/\s*\d/.test(rest) || /^\/\s*$/.test(rest)) {
      return fail(`"${original}" has a fraction that cannot be read: write fractions with whole numbers, e.g. 10-1/2 or 3/8.`);
    }
    const afterSpace = rest.replace(/^\s+/, '');
    if (afterSpace.length === 0) {
      // bare number
      if (terms.length > 0) {
        const prev = terms[terms.length - 1];
        if (prev && prev.unit.symbol === 'ft' && expected === 'length') {
          return fail(`"${original}": the inches after the feet need a unit (e.g. 4' 10").`);
        }
        return fail(`"${original}": the last number has no unit.`);
      }
      if (options.defaultUnit) {
        const du = findUnit(options.defaultUnit);
        if (!du) return fail(`Unknown default unit "${options.defaultUnit}".`);
        terms.push({ amount: num.value, unit: du, text: numText, whole: num.whole });
        break;
      }
      return fail(
        `"${original}" is a bare number: ${KIND_WORDS[expected]} needs a unit (e.g. ${KIND_EXAMPLES[expected]}).`,
      );
    }
    const u = scanUnit(afterSpace);
    if (!u) {
      const word = /^[^\s\d]+/.exec(afterSpace)?.[0] ?? afterSpace;
      return fail(
        `Unknown unit "${word}" in "${original}": ${KIND_WORDS[expected]} is expected (e.g. ${KIND_EXAMPLES[expected]}).`,
      );
    }
    terms.push({ amount: num.value, unit: u.unit, text: numText, whole: num.whole });
    rest = afterSpace.slice(u.length).replace(/^\s+/, '');
    // trade separator after feet: 4'-10 1/2"
    if (u.unit.symbol === 'ft' && /^-\s*\d/.test(rest)) rest = rest.replace(/^-\s*/, '');
    if (rest.length > 0 && !/^[\d.]/.test(rest)) {
      if (/^[+-]/.test(rest)) {
        return fail(`"${original}" has a sign in the middle: write one value, e.g. 4' 10-1/2".`);
      }
      const word = /^[^\s\d]+/.exec(rest)?.[0] ?? rest;
      return fail(`Unknown unit "${word}" in "${original}": ${KIND_WORDS[expected]} is expected (e.g. ${KIND_EXAMPLES[expected]}).`);
    }
  }

  const first = terms[0];
  if (!first) return fail(`Enter a value: ${KIND_WORDS[expected]} is expected (e.g. ${KIND_EXAMPLES[expected]}).`);
  for (const t of terms) {
    if (t.unit.kind !== first.unit.kind) {
      return fail(`"${original}" mixes ${KIND_WORDS[first.unit.kind]} (${first.unit.symbol}) and ${KIND_WORDS[t.unit.kind]} (${t.unit.symbol}).`);
    }
  }
  if (expected === 'length' && (first.unit.kind === 'angle' || first.unit.kind === 'slope')) {
    return fail(
      `"${original}" is ${KIND_WORDS[first.unit.kind]}: a height difference stated that way needs the width it applies across, e.g. "${first.unit.kind === 'angle' ? '1°' : '1:100'} across 840 mm".`,
    );
  }
  if (first.unit.kind !== expected) {
    return fail(
      `"${original}" is ${KIND_WORDS[first.unit.kind]} (${first.unit.symbol}), but ${KIND_WORDS[expected]} is expected here (e.g. ${KIND_EXAMPLES[expected]}).`,
    );
  }
  if (terms.length > 1) {
    for (let i = 0; i < terms.length; i++) {
      const t = terms[i];
      if (!t) continue;
      if (t.unit.rank === undefined) {
        return fail(`"${original}" has more than one value: only feet-and-inches or pounds-and-ounces can be combined.`);
      }
      const prev = terms[i - 1];
      if (prev && (prev.unit.rank ?? 0) >= t.unit.rank) {
        return fail(`"${original}" has its parts out of order or repeated: write the larger unit first, once (e.g. 4' 10" or 12 lb 6 oz).`);
      }
      if (i < terms.length - 1 && !t.whole) {
        return fail(`"${original}": in a compound value the ${t.unit.symbol} must be a whole number (e.g. 4' 10-1/2").`);
      }
    }
  }
  let total = rat(0n);
  for (const t of terms) total = add(total, mul(t.amount, t.unit.factor));
  const value = signed(rationalToNumber(total), negative);
  const system: UnitSystem = options.system ?? (first.unit.system === 'metric' ? 'metric' : 'imperial');
  return { ok: true, value, kind: expected, display: formatQuantity(value, expected, system) };
}

/**
 * A height difference stated as a tilt across a width ("1° across 840 mm", "1:100 over 32 in",
 * "5 mm/m across 1.2 m"), as manuals state a level tolerance: width × tan(angle), or width × rise/run.
 * No step is rounded; the result is a length like any other.
 */
function parseTiltAcross(original: string, tiltText: string, widthText: string, options: ParseOptions): ParseResult {
  const width = parseQuantity(widthText, 'length', { system: options.system });
  if (!width.ok) return fail(`In "${original}", the width after "across": ${width.error}`);
  if (!(width.value > 0)) return fail(`In "${original}", the width after "across" must be more than zero.`);
  const asAngle = /(°|\bdeg(rees?)?)\s*$/i.test(tiltText.trim());
  const tilt = parseQuantity(tiltText, asAngle ? 'angle' : 'slope', { system: options.system });
  if (!tilt.ok) {
    return fail(`In "${original}", the tilt before "across" is not an angle (e.g. 1°) or a slope (e.g. 1:100, 1%, 1/8 in/ft): ${tilt.error}`);
  }
  if (asAngle && !(tilt.value < 45)) return fail(`In "${original}", a tilt of ${tilt.display} is not a level tolerance: type less than 45°.`);
  const ratio = asAngle ? Math.tan((tilt.value * Math.PI) / 180) : tilt.value;
  const value = ratio * width.value;
  const system: UnitSystem = options.system ?? (/\b(mm|cm|m)\b/.test(widthText) ? 'metric' : 'imperial');
  return { ok: true, value, kind: 'length', display: formatQuantity(value, 'length', system) };
}

function signed(v: number, negative: boolean): number {
  return negative && v !== 0 ? -v : v;
}

function parseBoolean(text: string): ParseResult {
  const t = text.trim().toLowerCase();
  if (['yes', 'y', 'true', 'pass'].includes(t)) return { ok: true, value: 1, kind: 'boolean', display: 'Yes' };
  if (['no', 'n', 'false', 'fail'].includes(t)) return { ok: true, value: 0, kind: 'boolean', display: 'No' };
  return fail(`"${text}" is not a yes/no answer: answer yes or no.`);
}

// ------------------------------------------------------------------------------------------------
// Formatting
// ------------------------------------------------------------------------------------------------

export interface FormatOptions {
  /** Imperial lengths in inches only (`58-1/2"`) instead of feet and inches. */
  inchesOnly?: boolean;
}

/** Fixed decimals with trailing zeros dropped, thousands grouped on request, never "-0". */
export function formatNumber(x: number, decimals: number, group = false): string {
  const factor = 10 ** decimals;
  // toPrecision(12) first, so 12.374999999999998 (12 lb 6 oz via kg) rounds as 12.375 would.
  let r = Math.round(Number(Math.abs(x).toPrecision(12)) * factor) / factor;
  if (!Number.isFinite(r)) r = Math.abs(x);
  let s = r.toFixed(decimals);
  if (s.includes('.')) s = s.replace(/0+$/, '').replace(/\.$/, '');
  if (group) {
    const [w = '', f] = s.split('.');
    s = w.replace(/\B(?=(\d{3})+(?!\d))/g, ',') + (f !== undefined ? `.${f}` : '');
  }
  const neg = x < 0 && Number(s.replace(/,/g, '')) !== 0;
  return (neg ? '-' : '') + s;
}

function reduceSixteenths(n: number): string {
  let num = n;
  let den = 16;
  while (num % 2 === 0 && den > 1) {
    num /= 2;
    den /= 2;
  }
  return `${num}/${den}`;
}

/** Whole sixteenths → `10-1/2"`, `3/8"`, `0"` (no sign). */
function inchesText(sixteenths: number): string {
  const whole = Math.floor(sixteenths / 16);
  const frac = sixteenths % 16;
  if (frac === 0) return `${whole}"`;
  if (whole === 0) return `${reduceSixteenths(frac)}"`;
  return `${whole}-${reduceSixteenths(frac)}"`;
}

/** A length in mm for display, rounded to 1/16 in (imperial) or 0.1 mm (metric). */
export function formatLength(mm: number, system: UnitSystem, options: FormatOptions = {}): string {
  if (system === 'metric') return `${formatNumber(mm, 1)} mm`;
  const sixteenths = Math.round(Math.abs(mm / 25.4) * 16);
  const sign = mm < 0 && sixteenths !== 0 ? '-' : '';
  if (options.inchesOnly || sixteenths < 192) return sign + inchesText(sixteenths);
  const feet = Math.floor(sixteenths / 192);
  return `${sign}${feet}' ${inchesText(sixteenths % 192)}`;
}

/** A slope ratio: imperial in in/ft (fraction on the 1/16 grid), metric in percent. */
export function formatSlope(ratio: number, system: UnitSystem): string {
  if (system === 'metric') return `${formatNumber(ratio * 100, 2)}%`;
  const inPerFt = ratio * 12;
  const sixteenths = Math.abs(inPerFt) * 16;
  const rounded = Math.round(sixteenths);
  if (Math.abs(sixteenths - rounded) < 1e-9) {
    const sign = inPerFt < 0 && rounded !== 0 ? '-' : '';
    return `${sign}${inchesText(rounded).replace('"', '')} in/ft`;
  }
  return `${formatNumber(inPerFt, 3)} in/ft`;
}

/** Any quantity, in the job's unit system. Value in base units. */
export function formatQuantity(value: number, kind: QuantityKind, system: UnitSystem, options: FormatOptions = {}): string {
  const imperial = system === 'imperial';
  switch (kind) {
    case 'length':
      return formatLength(value, system, options);
    case 'slope':
      return formatSlope(value, system);
    case 'area':
      return imperial ? `${formatNumber(fromBase(value, 'ft²'), 1, true)} ft²` : `${formatNumber(value, 2, true)} m²`;
    case 'volume':
      return imperial ? `${formatNumber(fromBase(value, 'ft³'), 1, true)} ft³` : `${formatNumber(value, 2, true)} m³`;
    case 'mass':
      return imperial ? `${formatNumber(fromBase(value, 'lb'), 2)} lb` : `${formatNumber(value, 2)} kg`;
    case 'capacity':
      return imperial ? `${formatNumber(fromBase(value, 'Btu/h'), 0, true)} Btu/h` : `${formatNumber(value / 1000, 2)} kW`;
    case 'angle':
      return `${formatNumber(value, 1)}°`;
    case 'pressure':
      return imperial ? `${formatNumber(fromBase(value, 'in. w.c.'), 2)} in. w.c.` : `${formatNumber(value, 0, true)} Pa`;
    case 'boolean':
      return value ? 'Yes' : 'No';
  }
}

/** Round to the engine's comparison resolution (1e-9 base units). */
export function roundToResolution(x: number): number {
  const r = Math.round(x * 1e9) / 1e9;
  return r === 0 ? 0 : r;
}
