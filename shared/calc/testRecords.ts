/**
 * Test records: the figures Trimout computes for pressure tests, evacuations, charge records and
 * start-up records. Pure functions; the server stores their answers beside what was typed.
 *
 * Base units: pressure in pascals (Pa; gauge or absolute as the name says), temperature in kelvin
 * (K), time in minutes, mass in kilograms, length in millimetres (as shared/calc/quantity.ts),
 * additional-charge factors in kg per metre of liquid line.
 *
 * Conversion factors, NIST SP 811 (2008) Appendix B.8/B.9:
 *   1 psi (lbf/in²)        = 6.894757 kPa
 *   1 mmHg (conventional)  = 133.3224 Pa (the SP 811 figure 1.333224 E+02; often quoted as 133.322)
 *   1 torr                 = 101325/760 Pa (exact by definition: 1/760 of a standard atmosphere)
 *   1 inHg (conventional)  = 3.386389 kPa (often quoted as 3.38639 kPa)
 *   1 micron of mercury    = 0.001 mmHg (the trade's "micron")
 *   1 bar = 100 kPa, 1 mbar = 100 Pa (SI-accepted units)
 *   0 °C = 273.15 K; a Fahrenheit degree is 5/9 of a kelvin, 32 °F = 0 °C.
 * Standard atmosphere 101.325 kPa (NIST SP 811 B.8; the job may set its own site pressure).
 *
 * Temperature correction: for a fixed mass of gas in a fixed volume the ideal gas law gives
 * P2/T2 = P1/T1 with absolute pressures and temperatures (any physics or chemistry handbook). A
 * gauge reads pressure above the atmosphere, so absolute = gauge + atmospheric.
 *
 * Trimout records what people observed; it does not certify the installation. The manufacturer's
 * manual, local codes and licensed practice govern the test pressures, hold times and limits.
 */
import { parseQuantity } from './quantity';

// ------------------------------------------------------------------------------------------------
// Pressure and vacuum units
// ------------------------------------------------------------------------------------------------

export const PA_PER_PSI = 6894.757;
export const PA_PER_MMHG = 133.3224;
export const PA_PER_TORR = 101325 / 760;
export const PA_PER_INHG = 3386.389;
export const PA_PER_MICRON = PA_PER_MMHG / 1000;
export const STANDARD_ATMOSPHERE_PA = 101325;

/** Gauge pressure units a test gauge shows (a reading above the atmosphere). */
export const GAUGE_PRESSURE_UNITS = ['psi', 'kPa', 'bar', 'MPa'] as const;
export type GaugePressureUnit = (typeof GAUGE_PRESSURE_UNITS)[number];

/** Vacuum units the trade writes; every one but inHg vacuum is an absolute pressure. */
export const VACUUM_UNITS = ['micron', 'Pa', 'mbar', 'torr', 'inHg vacuum'] as const;
export type VacuumUnit = (typeof VACUUM_UNITS)[number];

const PA_PER_GAUGE_UNIT: Record<GaugePressureUnit, number> = { psi: PA_PER_PSI, kPa: 1000, bar: 100_000, MPa: 1_000_000 };

/** Absolute pressure units (atmospheric pressure of the site, kPa default). */
const PA_PER_ABSOLUTE_UNIT: Record<string, number> = {
  Pa: 1,
  kPa: 1000,
  mbar: 100,
  hPa: 100,
  bar: 100_000,
  psia: PA_PER_PSI,
  inHg: PA_PER_INHG,
  mmHg: PA_PER_MMHG,
  torr: PA_PER_TORR,
  micron: PA_PER_MICRON,
};

export function gaugeToPa(value: number, unit: GaugePressureUnit): number {
  return value * PA_PER_GAUGE_UNIT[unit];
}
export function paToGauge(pa: number, unit: GaugePressureUnit): number {
  return pa / PA_PER_GAUGE_UNIT[unit];
}

/** A vacuum reading in absolute pascals. inHg vacuum is measured down from the atmosphere. */
export function vacuumToPa(value: number, unit: VacuumUnit, atmosphericPa = STANDARD_ATMOSPHERE_PA): number {
  switch (unit) {
    case 'micron':
      return value * PA_PER_MICRON;
    case 'Pa':
      return value;
    case 'mbar':
      return value * 100;
    case 'torr':
      return value * PA_PER_TORR;
    case 'inHg vacuum':
      return atmosphericPa - value * PA_PER_INHG;
  }
}
export function paToVacuum(pa: number, unit: VacuumUnit, atmosphericPa = STANDARD_ATMOSPHERE_PA): number {
  switch (unit) {
    case 'micron':
      return pa / PA_PER_MICRON;
    case 'Pa':
      return pa;
    case 'mbar':
      return pa / 100;
    case 'torr':
      return pa / PA_PER_TORR;
    case 'inHg vacuum':
      return (atmosphericPa - pa) / PA_PER_INHG;
  }
}

// ------------------------------------------------------------------------------------------------
// Parsing what the trade types
// ------------------------------------------------------------------------------------------------

export type Parsed<T> = { ok: true; value: T; text: string } | { ok: false; error: string };

const NUM = String.raw`([0-9]+(?:\.[0-9]*)?|\.[0-9]+)`;

function clean(text: string): string {
  return text.replace(/[\u00a0\u2009\u202f]/g, ' ').replace(/\s+/g, ' ').trim();
}

const GAUGE_SPELLINGS: Array<[RegExp, GaugePressureUnit]> = [
  [/^(psig|psi|lbf\/in2|lb\/in2)$/i, 'psi'],
  [/^(kpa|kpag|kpa\(g\)|kpa g)$/i, 'kPa'],
  [/^(bar|barg|bar\(g\)|bar g)$/i, 'bar'],
  [/^(mpa|mpag|mpa\(g\)|mpa g)$/i, 'MPa'],
];

/** Gauge pressure typed as "600 psig", "600 psi", "4137 kPa", "41.4 bar", "4.14 MPa" → Pa gauge. */
export function parseGaugePressure(text: string): Parsed<{ pa: number; stated: number; unit: GaugePressureUnit }> {
  const s = clean(text);
  const m = new RegExp(`^${NUM} ?(.+)$`).exec(s);
  if (!m) return { ok: false, error: 'Type a gauge pressure with its unit, e.g. 600 psig, 4137 kPa or 41.4 bar.' };
  const stated = Number(m[1]);
  const spelled = (m[2] ?? '').trim();
  const unit = GAUGE_SPELLINGS.find(([re]) => re.test(spelled))?.[1];
  if (!unit) return { ok: false, error: `"${spelled}" is not a gauge pressure unit: psig, kPa, bar or MPa.` };
  return { ok: true, value: { pa: gaugeToPa(stated, unit), stated, unit }, text: s };
}

/** Atmospheric (absolute) pressure typed as "101.325 kPa", "29.92 inHg", "1013 mbar", "14.7 psia". */
export function parseAbsolutePressure(text: string): Parsed<{ pa: number }> {
  const s = clean(text);
  const m = new RegExp(`^${NUM} ?(.+)$`).exec(s);
  const key = m ? Object.keys(PA_PER_ABSOLUTE_UNIT).find((k) => k.toLowerCase() === (m[2] ?? '').trim().toLowerCase()) : undefined;
  if (!m || !key) return { ok: false, error: 'Type an absolute pressure with its unit, e.g. 101.325 kPa, 29.92 inHg or 1013 mbar.' };
  return { ok: true, value: { pa: Number(m[1]) * (PA_PER_ABSOLUTE_UNIT[key] ?? 1) }, text: s };
}

const VACUUM_SPELLINGS: Array<[RegExp, VacuumUnit]> = [
  [/^(microns?|µ|µm|µmhg|um|umhg|micron hg|microns hg|mtorr|millitorr)$/i, 'micron'],
  [/^(pa|pascals?)$/i, 'Pa'],
  [/^(mbar|millibars?)$/i, 'mbar'],
  [/^(torr|mmhg|mm hg)$/i, 'torr'],
  [/^(inhg vacuum|inhg vac|in hg vacuum|in hg vac|"hg vacuum|"hg vac|inhgv|in\. ?hg vac(uum)?)$/i, 'inHg vacuum'],
];

/**
 * A vacuum reading typed the way the trade writes it: "500 microns", "66.7 Pa", "0.667 mbar",
 * "0.5 torr", "29.9 inHg vacuum". Milli-torr and microns are treated as equal (they differ by
 * 0.00003 %, far below any gauge's resolution); mmHg is read as torr for the same reason.
 */
export function parseVacuum(text: string, atmosphericPa = STANDARD_ATMOSPHERE_PA): Parsed<{ pa: number; stated: number; unit: VacuumUnit }> {
  const s = clean(text);
  const m = new RegExp(`^${NUM} ?(.+)$`).exec(s);
  if (!m) return { ok: false, error: 'Type a vacuum with its unit, e.g. 500 microns, 66.7 Pa, 0.667 mbar, 0.5 torr or 29.9 inHg vacuum.' };
  const stated = Number(m[1]);
  const spelled = (m[2] ?? '').trim();
  const unit = VACUUM_SPELLINGS.find(([re]) => re.test(spelled))?.[1];
  if (!unit) return { ok: false, error: `"${spelled}" is not a vacuum unit: microns, Pa, mbar, torr or inHg vacuum.` };
  const pa = vacuumToPa(stated, unit, atmosphericPa);
  if (pa < 0) return { ok: false, error: `${s} is below a perfect vacuum at the job's atmospheric pressure.` };
  return { ok: true, value: { pa, stated, unit }, text: s };
}

/** A temperature typed as "20 °C", "20 C", "68 °F", "68F", "293.15 K" → kelvin. */
export function parseTemperature(text: string): Parsed<{ kelvin: number; stated: number; unit: '°C' | '°F' | 'K' }> {
  const s = clean(text).replace(/−/g, '-');
  const m = /^(-?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)) ?(°? ?[cfk]|deg ?[cf]|degrees ?[cf])$/i.exec(s);
  if (!m) return { ok: false, error: 'Type a temperature with its unit, e.g. 20 °C, 68 °F or 293.15 K.' };
  const stated = Number(m[1]);
  const letter = (m[2] ?? '').slice(-1).toUpperCase();
  const unit = letter === 'C' ? '°C' : letter === 'F' ? '°F' : 'K';
  const kelvin = toKelvin(stated, unit);
  if (!(kelvin > 0)) return { ok: false, error: `${s} is at or below absolute zero.` };
  return { ok: true, value: { kelvin, stated, unit }, text: s };
}

export function toKelvin(value: number, unit: '°C' | '°F' | 'K'): number {
  if (unit === '°C') return value + 273.15;
  if (unit === '°F') return ((value - 32) * 5) / 9 + 273.15;
  return value;
}

/** A length typed the trade's way ("120 ft", "36.5 m", `40' 6"`) → mm (shared/calc/quantity.ts). */
export function parseLength(text: string): Parsed<{ mm: number }> {
  const r = parseQuantity(text, 'length');
  return r.ok ? { ok: true, value: { mm: r.value }, text: clean(text) } : { ok: false, error: r.error };
}

/** A mass typed the trade's way ("12 lb 6 oz", "5.6 kg") → kg. */
export function parseMass(text: string): Parsed<{ kg: number }> {
  const r = parseQuantity(text, 'mass');
  return r.ok ? { ok: true, value: { kg: r.value }, text: clean(text) } : { ok: false, error: r.error };
}

export const KG_PER_M_PER_LB_PER_FT = 0.45359237 / 0.3048;
export const KG_PER_M_PER_OZ_PER_FT = 0.45359237 / 16 / 0.3048;

/** An additional-charge factor as the outdoor unit's manual prints it: "0.35 lb/ft", "22 g/m", "0.054 kg/m", "0.6 oz/ft". */
export function parseChargeFactor(text: string): Parsed<{ kgPerM: number }> {
  const s = clean(text);
  const m = new RegExp(`^${NUM} ?(lb/ft|lbs/ft|oz/ft|kg/m|g/m)$`, 'i').exec(s.replace(/\s*\/\s*/g, '/'));
  if (!m) return { ok: false, error: 'Type the factor with its unit as the manual prints it, e.g. 0.35 lb/ft, 0.6 oz/ft, 0.054 kg/m or 54 g/m.' };
  const v = Number(m[1]);
  const u = (m[2] ?? '').toLowerCase();
  const kgPerM = u === 'kg/m' ? v : u === 'g/m' ? v / 1000 : u === 'oz/ft' ? v * KG_PER_M_PER_OZ_PER_FT : v * KG_PER_M_PER_LB_PER_FT;
  return { ok: true, value: { kgPerM }, text: s };
}

// ------------------------------------------------------------------------------------------------
// Settings that decide pass and fail: each with its source
// ------------------------------------------------------------------------------------------------

/** A figure a decision used, with where it came from. */
export interface SourcedFigure {
  value: number;
  source: string;
  /** 'job' when the job set it; 'default' for Trimout's stated default; 'record' when typed on the record. */
  from: 'job' | 'default' | 'record';
}

export const DEFAULT_ATMOSPHERE_SOURCE = 'Standard atmosphere, 101.325 kPa (NIST SP 811); Trimout default until the job sets its site pressure';
/** 500 microns: a target the trade commonly uses; not a code value. */
export const DEFAULT_TARGET_VACUUM_PA = 500 * PA_PER_MICRON;
export const DEFAULT_TARGET_VACUUM_SOURCE = '500 microns: common practice, not a code value; the outdoor unit’s manual governs';
/** Rise allowed over the decay test: common practice, from memory. */
export const DEFAULT_DECAY_RISE_PA = 500 * PA_PER_MICRON;
export const DEFAULT_DECAY_RISE_SOURCE = 'Rise of at most 500 microns over the hold: common practice (from memory), not a code value; the manual governs';
export const DEFAULT_DECAY_HOLD_MINUTES = 10;
export const DEFAULT_DECAY_HOLD_SOURCE = 'Hold of at least 10 minutes: common practice (from memory), not a code value; the manual governs';
export const DEFAULT_ALLOWED_DROP_SOURCE = 'No drop beyond the gauge’s resolution after temperature correction: Trimout default until the job sets its allowed change';

// ------------------------------------------------------------------------------------------------
// Pressure test
// ------------------------------------------------------------------------------------------------

export interface PressureTestFigures {
  /** Gauge pressures, Pa. */
  startGaugePa: number;
  endGaugePa: number;
  /** Absolute temperatures, K. */
  startKelvin: number;
  endKelvin: number;
  startAt: Date;
  endAt: Date;
  atmosphericPa: SourcedFigure;
  /** The smallest step the gauge shows, Pa (gauge). */
  gaugeResolutionPa: number;
  /** A job setting (Pa) with its source; null: no drop beyond the gauge's resolution. */
  allowedDropPa: SourcedFigure | null;
  /** Target test pressure (Pa gauge) with its source, when given. */
  targetPa: SourcedFigure | null;
  /** Minimum hold (minutes) with its source, when the job sets one. */
  minHoldMinutes: SourcedFigure | null;
}

export interface PressureTestResult {
  startAbsolutePa: number;
  endAbsolutePa: number;
  /** end − start gauge pressure, Pa: negative is a drop, as read. */
  uncorrectedChangePa: number;
  /** What the start pressure becomes at the end temperature with no leak (P1 × T2 / T1), gauge Pa. */
  expectedEndGaugePa: number;
  /** end − expected end, Pa: negative is a drop the temperature does not explain. */
  correctedChangePa: number;
  holdMinutes: number;
  allowedDrop: SourcedFigure;
  reachedTarget: boolean | null;
  heldLongEnough: boolean | null;
  passed: boolean;
  /** Plain reasons for a fail, empty when passed. */
  reasons: string[];
}

/** P2 = P1 × T2 / T1 (absolute), the ideal gas law at constant volume. */
export function correctForTemperature(p1AbsolutePa: number, t1Kelvin: number, t2Kelvin: number): number {
  return (p1AbsolutePa * t2Kelvin) / t1Kelvin;
}

export function evaluatePressureTest(f: PressureTestFigures): PressureTestResult {
  const atm = f.atmosphericPa.value;
  const startAbsolutePa = f.startGaugePa + atm;
  const endAbsolutePa = f.endGaugePa + atm;
  const expectedEndAbsolute = correctForTemperature(startAbsolutePa, f.startKelvin, f.endKelvin);
  const expectedEndGaugePa = expectedEndAbsolute - atm;
  const correctedChangePa = endAbsolutePa - expectedEndAbsolute;
  const holdMinutes = (f.endAt.getTime() - f.startAt.getTime()) / 60_000;
  const allowedDrop: SourcedFigure = f.allowedDropPa ?? {
    value: f.gaugeResolutionPa,
    source: DEFAULT_ALLOWED_DROP_SOURCE,
    from: 'default',
  };
  const reasons: string[] = [];
  // A relative epsilon keeps a drop of exactly the allowance (typed in other units) a pass.
  const eps = 1e-9 * Math.max(1, Math.abs(startAbsolutePa));
  if (-correctedChangePa > allowedDrop.value + eps) reasons.push('The pressure dropped more than allowed after temperature correction.');
  const reachedTarget = f.targetPa ? f.startGaugePa + f.gaugeResolutionPa + eps >= f.targetPa.value : null;
  if (reachedTarget === false) reasons.push('The start pressure is below the target test pressure.');
  const heldLongEnough = f.minHoldMinutes ? holdMinutes + 1e-9 >= f.minHoldMinutes.value : null;
  if (heldLongEnough === false) reasons.push('The hold was shorter than the required time.');
  if (holdMinutes <= 0) reasons.push('The end time is not after the start time.');
  return {
    startAbsolutePa,
    endAbsolutePa,
    uncorrectedChangePa: f.endGaugePa - f.startGaugePa,
    expectedEndGaugePa,
    correctedChangePa,
    holdMinutes,
    allowedDrop,
    reachedTarget,
    heldLongEnough,
    passed: reasons.length === 0,
    reasons,
  };
}

// ------------------------------------------------------------------------------------------------
// Evacuation
// ------------------------------------------------------------------------------------------------

export interface EvacuationFigures {
  /** Absolute Pa. */
  deepestPa: number;
  isolatedPa: number;
  afterHoldPa: number;
  holdMinutes: number;
  targetPa: SourcedFigure;
  riseLimitPa: SourcedFigure;
  minHoldMinutes: SourcedFigure;
}

export interface EvacuationResult {
  reachedTarget: boolean;
  /** after hold − at isolation, Pa (a rise is positive). */
  risePa: number;
  riseWithinLimit: boolean;
  heldLongEnough: boolean;
  target: SourcedFigure;
  riseLimit: SourcedFigure;
  minHold: SourcedFigure;
  passed: boolean;
  reasons: string[];
}

export function evaluateEvacuation(f: EvacuationFigures): EvacuationResult {
  const eps = 1e-9;
  const reachedTarget = f.deepestPa <= f.targetPa.value + eps;
  const risePa = f.afterHoldPa - f.isolatedPa;
  const riseWithinLimit = risePa <= f.riseLimitPa.value + eps;
  const heldLongEnough = f.holdMinutes + eps >= f.minHoldMinutes.value;
  const reasons: string[] = [];
  if (!reachedTarget) reasons.push('The deepest reading did not reach the target vacuum.');
  if (!riseWithinLimit) reasons.push('The vacuum rose more than the limit during the hold.');
  if (!heldLongEnough) reasons.push('The hold was shorter than the required time.');
  return {
    reachedTarget,
    risePa,
    riseWithinLimit,
    heldLongEnough,
    target: f.targetPa,
    riseLimit: f.riseLimitPa,
    minHold: f.minHoldMinutes,
    passed: reasons.length === 0,
    reasons,
  };
}

// ------------------------------------------------------------------------------------------------
// Charge
// ------------------------------------------------------------------------------------------------

/** A per-size additional-charge factor entered on the outdoor unit's model from its manual. */
export interface ChargeFactor {
  /** The liquid-line size as the manual names it, e.g. `3/8"`, `9.52 mm`. */
  size: string;
  kgPerM: number;
  text: string;
  source: string;
}

export interface ChargeFigures {
  /** kg, from the outdoor unit's model with its source; null when not entered. */
  factoryCharge: SourcedFigure | null;
  liquidLines: Array<{ size: string; lengthMm: number }>;
  factors: ChargeFactor[];
  weighedInKg: number;
}

export interface ChargeLine {
  size: string;
  lengthMm: number;
  factor: ChargeFactor | null;
  /** kg; null when the size has no factor on the model. */
  additionalKg: number | null;
}

export interface ChargeResult {
  lines: ChargeLine[];
  /** Sizes typed on the record with no factor entered on the model (Trimout never invents one). */
  missingFactors: string[];
  /** kg; null while a factor is missing. */
  additionalKg: number | null;
  weighedInKg: number;
  /** weighed in − additional, kg (positive: more went in than the lengths call for). */
  differenceKg: number | null;
  /** factory + weighed in, kg: what the system now holds (feeds the concentration check). */
  totalChargeKg: number | null;
  factoryCharge: SourcedFigure | null;
}

export function normaliseLineSize(size: string): string {
  return size.replace(/[\u2033\u201c\u201d]/g, '"').replace(/\s+/g, '').replace(/(in|inch|")$/i, '"').toLowerCase();
}

export function evaluateCharge(f: ChargeFigures): ChargeResult {
  const byName = new Map(f.factors.map((x) => [normaliseLineSize(x.size), x]));
  const lines: ChargeLine[] = f.liquidLines.map((l) => {
    const factor = byName.get(normaliseLineSize(l.size)) ?? null;
    return { size: l.size, lengthMm: l.lengthMm, factor, additionalKg: factor ? (factor.kgPerM * l.lengthMm) / 1000 : null };
  });
  const missingFactors = [...new Set(lines.filter((l) => !l.factor).map((l) => l.size))];
  const additionalKg = missingFactors.length ? null : lines.reduce((s, l) => s + (l.additionalKg ?? 0), 0);
  return {
    lines,
    missingFactors,
    additionalKg,
    weighedInKg: f.weighedInKg,
    differenceKg: additionalKg === null ? null : f.weighedInKg - additionalKg,
    totalChargeKg: f.factoryCharge ? f.factoryCharge.value + f.weighedInKg : null,
    factoryCharge: f.factoryCharge,
  };
}

// ------------------------------------------------------------------------------------------------
// Start-up
// ------------------------------------------------------------------------------------------------

export type StartupMode = 'cooling' | 'heating' | 'fan';

export interface StartupUnitFigures {
  unitId: string;
  answers: boolean;
  addressed: boolean;
  faultShown: boolean;
  supplyKelvin: number | null;
  returnKelvin: number | null;
}

export interface StartupUnitResult {
  unitId: string;
  /** return − supply, K: positive when the unit cools the air, negative when it heats it. */
  differenceK: number | null;
  ok: boolean;
}

export interface StartupResult {
  units: StartupUnitResult[];
  /** Units of the system with no line on the record. */
  missingUnitIds: string[];
  passed: boolean;
  reasons: string[];
}

export function evaluateStartup(units: StartupUnitFigures[], systemUnitIds: readonly string[]): StartupResult {
  const seen = new Set(units.map((u) => u.unitId));
  const missingUnitIds = systemUnitIds.filter((id) => !seen.has(id));
  const rows = units.map((u) => ({
    unitId: u.unitId,
    differenceK: u.supplyKelvin !== null && u.returnKelvin !== null ? u.returnKelvin - u.supplyKelvin : null,
    ok: u.answers && u.addressed && !u.faultShown,
  }));
  const reasons: string[] = [];
  if (rows.some((r) => !r.ok)) reasons.push('A unit did not answer, is not addressed or shows a fault.');
  if (missingUnitIds.length) reasons.push('Not every indoor unit of the system is on the record.');
  return { units: rows, missingUnitIds, passed: reasons.length === 0, reasons };
}

/** A temperature difference in kelvin shown in the job's units (a difference: no 32 °F offset). */
export function temperatureDifferenceIn(k: number, unit: '°C' | '°F' | 'K'): number {
  return unit === '°F' ? (k * 9) / 5 : k;
}

// ------------------------------------------------------------------------------------------------
// Drain test
// ------------------------------------------------------------------------------------------------

export interface DrainFigures {
  waterPoured: boolean;
  reachesTermination: boolean;
  pumpFitted: boolean;
  pumpRunsAndLifts: boolean | null;
  floatSwitchFitted: boolean;
  floatSwitchStopsUnit: boolean | null;
  noLeakAtJoints: boolean;
}

export interface DrainResult {
  /** A pump or float switch can only be proven with the unit powered. */
  needsPower: boolean;
  passed: boolean;
  reasons: string[];
}

export function evaluateDrain(f: DrainFigures): DrainResult {
  const reasons: string[] = [];
  if (!f.waterPoured) reasons.push('No water was poured.');
  if (!f.reachesTermination) reasons.push('The water did not reach its termination.');
  if (f.pumpFitted && f.pumpRunsAndLifts !== true) reasons.push('The pump did not run and lift.');
  if (f.floatSwitchFitted && f.floatSwitchStopsUnit !== true) reasons.push('The overflow or float switch did not stop the unit.');
  if (!f.noLeakAtJoints) reasons.push('A joint leaked.');
  return { needsPower: f.pumpFitted || f.floatSwitchFitted, passed: reasons.length === 0, reasons };
}
