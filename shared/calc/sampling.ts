/**
 * Sampling audits: which units of a lot to check, and what their results decide.
 *
 * Two plans:
 * - Acceptance sampling by attributes, ANSI/ASQ Z1.4-2003 (R2018) = ISO 2859-1:1999 (both descend
 *   from MIL-STD-105E): single sampling, normal inspection, general inspection levels I, II and III.
 *   Table I gives the sample size code letter from the lot size; Table II-A gives, per code letter
 *   and AQL, the sample size and the accept (Ac) and reject (Re) numbers. Where Table II-A shows an
 *   arrow, the first plan below (↓) or above (↑) in the same AQL column is used, with ITS sample
 *   size (Z1.4 §9.4 / ISO 2859-1 §10.2: the sample size changes with the plan, not just Ac/Re).
 *   When the sample size equals or exceeds the lot size, every unit is inspected (Z1.4 §9.4) and
 *   the plan's Ac/Re still decide.
 *   Trimout offers AQL 0.065 to 6.5 (percent nonconforming). The corners of Table II-A that would
 *   need more are left out on purpose: the AQL 10 column opens at letter A with an arrow that points
 *   off the table, and the lowest AQL columns only reach a plan at the 2,000-unit letters.
 * - The tiered commissioning scheme: check a random 10 percent of the lot, at least 5 units; if
 *   10 percent or more of those units fail, check another 10 percent; if that tier fails too, check
 *   every unit. This is a COMMISSIONING PRACTICE (fan-coil sampling accepted under a green-building
 *   rating system's existing-buildings guidance: 10 percent or 5 units, whichever is greater, per
 *   make, model or installer), NOT a standard, and is labelled so wherever it is shown.
 *
 * Drawing the sample: the lot's unit ids in a fixed order (sorted), shuffled by Fisher–Yates
 * (Durstenfeld's in-place form, Knuth TAOCP vol. 2 §3.4.2 Algorithm P) driven by the Alea PRNG of
 * the seedrandom package (Johannes Baagøe's Alea, seeded from a text seed). The whole lot is put in
 * draw order once; the sample is its first n units (a class with a smaller plan judges the first
 * units of that order; tier 2 is the next units after tier 1). Anyone with the seed and the lot
 * draws the same units.
 *
 * Pure; no I/O. Trimout records what people observed; it does not certify an installation.
 */
import alea from 'seedrandom/lib/alea';
import type { Severity } from '../words';

export const Z14_SOURCE = 'ANSI/ASQ Z1.4 (ISO 2859-1), single sampling, normal inspection: Table I and Table II-A';
export const TIERED_SOURCE =
  'Commissioning practice (not a standard): 10 percent of the lot, at least 5 units, a second 10 percent if 10 percent or more fail, then every unit';

export const INSPECTION_LEVELS = ['I', 'II', 'III'] as const;
export type InspectionLevel = (typeof INSPECTION_LEVELS)[number];

export const CODE_LETTERS = ['A', 'B', 'C', 'D', 'E', 'F', 'G', 'H', 'J', 'K', 'L', 'M', 'N', 'P', 'Q', 'R'] as const;
export type CodeLetter = (typeof CODE_LETTERS)[number];

/** Z1.4 Table I / Table II-A: the sample size for each code letter. */
export const SAMPLE_SIZE_BY_LETTER: Record<CodeLetter, number> = {
  A: 2, B: 3, C: 5, D: 8, E: 13, F: 20, G: 32, H: 50, J: 80, K: 125, L: 200, M: 315, N: 500, P: 800, Q: 1250, R: 2000,
};

/**
 * Z1.4 Table I, sample size code letters, general inspection levels I, II, III.
 * Rows: [largest lot size of the row, I, II, III]; the last row is "500,001 and over".
 */
export const TABLE_I: readonly (readonly [number, CodeLetter, CodeLetter, CodeLetter])[] = [
  [8, 'A', 'A', 'B'],
  [15, 'A', 'B', 'C'],
  [25, 'B', 'C', 'D'],
  [50, 'C', 'D', 'E'],
  [90, 'C', 'E', 'F'],
  [150, 'D', 'F', 'G'],
  [280, 'E', 'G', 'H'],
  [500, 'F', 'H', 'J'],
  [1200, 'G', 'J', 'K'],
  [3200, 'H', 'K', 'L'],
  [10000, 'J', 'L', 'M'],
  [35000, 'K', 'M', 'N'],
  [150000, 'L', 'N', 'P'],
  [500000, 'M', 'P', 'Q'],
  [Number.POSITIVE_INFINITY, 'N', 'Q', 'R'],
];

/** The AQLs (percent nonconforming) Trimout offers, in Table II-A's column order. */
export const AQLS = ['0.065', '0.10', '0.15', '0.25', '0.40', '0.65', '1.0', '1.5', '2.5', '4.0', '6.5'] as const;
export type Aql = (typeof AQLS)[number];

/**
 * Z1.4 Table II-A, single sampling plans for normal inspection, the AQL columns 0.065 to 6.5.
 * One string per code letter, one cell per AQL column above: "Ac/Re", "v" (arrow down: use the
 * first plan below) or "^" (arrow up: use the first plan above).
 */
export const TABLE_II_A: Record<CodeLetter, readonly string[]> = {
  //   0.065  0.10   0.15   0.25   0.40   0.65   1.0    1.5    2.5    4.0    6.5
  A: ['v', 'v', 'v', 'v', 'v', 'v', 'v', 'v', 'v', 'v', '0/1'],
  B: ['v', 'v', 'v', 'v', 'v', 'v', 'v', 'v', 'v', '0/1', '^'],
  C: ['v', 'v', 'v', 'v', 'v', 'v', 'v', 'v', '0/1', '^', 'v'],
  D: ['v', 'v', 'v', 'v', 'v', 'v', 'v', '0/1', '^', 'v', '1/2'],
  E: ['v', 'v', 'v', 'v', 'v', 'v', '0/1', '^', 'v', '1/2', '2/3'],
  F: ['v', 'v', 'v', 'v', 'v', '0/1', '^', 'v', '1/2', '2/3', '3/4'],
  G: ['v', 'v', 'v', 'v', '0/1', '^', 'v', '1/2', '2/3', '3/4', '5/6'],
  H: ['v', 'v', 'v', '0/1', '^', 'v', '1/2', '2/3', '3/4', '5/6', '7/8'],
  J: ['v', 'v', '0/1', '^', 'v', '1/2', '2/3', '3/4', '5/6', '7/8', '10/11'],
  K: ['v', '0/1', '^', 'v', '1/2', '2/3', '3/4', '5/6', '7/8', '10/11', '14/15'],
  L: ['0/1', '^', 'v', '1/2', '2/3', '3/4', '5/6', '7/8', '10/11', '14/15', '21/22'],
  M: ['^', 'v', '1/2', '2/3', '3/4', '5/6', '7/8', '10/11', '14/15', '21/22', '^'],
  N: ['v', '1/2', '2/3', '3/4', '5/6', '7/8', '10/11', '14/15', '21/22', '^', '^'],
  P: ['1/2', '2/3', '3/4', '5/6', '7/8', '10/11', '14/15', '21/22', '^', '^', '^'],
  Q: ['2/3', '3/4', '5/6', '7/8', '10/11', '14/15', '21/22', '^', '^', '^', '^'],
  R: ['3/4', '5/6', '7/8', '10/11', '14/15', '21/22', '^', '^', '^', '^', '^'],
};

export function codeLetter(lotSize: number, level: InspectionLevel): CodeLetter {
  if (!Number.isInteger(lotSize) || lotSize < 2) throw new RangeError('A lot needs at least 2 units.');
  const row = TABLE_I.find(([max]) => lotSize <= max)!;
  return row[1 + INSPECTION_LEVELS.indexOf(level)] as CodeLetter;
}

export interface Z14Plan {
  /** The letter Table I gives for the lot. */
  letter: CodeLetter;
  /** The letter whose plan is used after following the arrows (same as letter when no arrow). */
  planLetter: CodeLetter;
  /** The plan's sample size, before capping at the lot. */
  tableSampleSize: number;
  /** Units to check: the plan's sample size, or the whole lot when it is smaller. */
  sampleSize: number;
  accept: number;
  reject: number;
  /** True when every unit of the lot is checked (sample size reached the lot size). */
  everyUnit: boolean;
}

/** Table II-A resolved for one code letter and AQL: arrows followed, sample size from the plan's row. */
export function resolvePlan(letter: CodeLetter, aql: Aql, lotSize: number): Z14Plan {
  const column = AQLS.indexOf(aql);
  if (column < 0) throw new RangeError(`AQL ${aql} is not offered.`);
  let row = CODE_LETTERS.indexOf(letter);
  // An arrow points to the first plan in its direction; arrows in one column never point at each other.
  const first = TABLE_II_A[letter][column]!;
  const step = first === 'v' ? 1 : first === '^' ? -1 : 0;
  while (step !== 0 && !/\//.test(TABLE_II_A[CODE_LETTERS[row]!][column]!)) {
    row += step;
    if (row < 0 || row >= CODE_LETTERS.length) throw new RangeError(`Table II-A has no plan for ${letter} at AQL ${aql}.`);
  }
  const planLetter = CODE_LETTERS[row]!;
  const [accept, reject] = TABLE_II_A[planLetter][column]!.split('/').map(Number) as [number, number];
  const tableSampleSize = SAMPLE_SIZE_BY_LETTER[planLetter];
  const sampleSize = Math.min(tableSampleSize, lotSize);
  return { letter, planLetter, tableSampleSize, sampleSize, accept, reject, everyUnit: tableSampleSize >= lotSize };
}

/** A class's rule: an AQL from Table II-A, or none allowed (Ac 0 / Re 1 on the whole sample). */
export type ClassRule = { aql: Aql } | { aql: null };
export type ClassRules = Partial<Record<Severity, ClassRule>>;

export interface ClassPlan {
  severity: Severity;
  aql: Aql | null;
  sampleSize: number;
  accept: number;
  reject: number;
  planLetter: CodeLetter | null;
  everyUnit: boolean;
}

export interface Z14AuditPlan {
  kind: 'z14';
  level: InspectionLevel;
  lotSize: number;
  letter: CodeLetter;
  /** One sample, the largest any class needs; each class judges the first `sampleSize` units drawn. */
  sampleSize: number;
  classes: ClassPlan[];
  source: string;
}

const SEVERITY_ORDER: Severity[] = ['critical', 'major', 'minor'];

export function planZ14(lotSize: number, level: InspectionLevel, rules: ClassRules): Z14AuditPlan {
  const letter = codeLetter(lotSize, level);
  const withAql: ClassPlan[] = [];
  const zero: Severity[] = [];
  for (const severity of SEVERITY_ORDER) {
    const rule = rules[severity];
    if (!rule) continue;
    if (rule.aql === null) {
      zero.push(severity);
      continue;
    }
    const p = resolvePlan(letter, rule.aql, lotSize);
    withAql.push({ severity, aql: rule.aql, sampleSize: p.sampleSize, accept: p.accept, reject: p.reject, planLetter: p.planLetter, everyUnit: p.everyUnit });
  }
  // With no AQL class, the letter's own sample size is drawn (Table I).
  const sampleSize = withAql.length
    ? Math.max(...withAql.map((c) => c.sampleSize))
    : Math.min(SAMPLE_SIZE_BY_LETTER[letter], lotSize);
  const zeroPlans: ClassPlan[] = zero.map((severity) => ({
    severity, aql: null, sampleSize, accept: 0, reject: 1, planLetter: null, everyUnit: sampleSize >= lotSize,
  }));
  const classes = [...zeroPlans, ...withAql].sort((a, b) => SEVERITY_ORDER.indexOf(a.severity) - SEVERITY_ORDER.indexOf(b.severity));
  return { kind: 'z14', level, lotSize, letter, sampleSize, classes, source: Z14_SOURCE };
}

// ------------------------------------------------------------------------------------------------
// The tiered commissioning scheme (practice, not a standard)
// ------------------------------------------------------------------------------------------------

export const TIER_SHARE = 0.1;
export const TIER_MINIMUM = 5;

export interface TieredAuditPlan {
  kind: 'tiered';
  lotSize: number;
  /** Units per tier: [first tier, second tier]; the second is 0 when the first covers the lot. */
  tierSizes: [number, number];
  /** A tier fails when this many of its units fail (10 percent of the tier, rounded up). */
  failAt: [number, number];
  /** A unit fails when it has a defect of one of these classes. */
  failClasses: Severity[];
  sampleSize: number;
  source: string;
}

/** 10 percent of n rounded up, so "10 percent or more fail" is `failed >= tenPercent(n)`. */
function tenPercent(n: number): number {
  return Math.max(1, Math.ceil(n * TIER_SHARE - 1e-9));
}

export function planTiered(lotSize: number, failClasses: Severity[] = ['critical', 'major']): TieredAuditPlan {
  if (!Number.isInteger(lotSize) || lotSize < 1) throw new RangeError('A lot needs at least 1 unit.');
  const tier = Math.min(lotSize, Math.max(TIER_MINIMUM, Math.ceil(lotSize * TIER_SHARE - 1e-9)));
  const second = Math.min(lotSize - tier, tier);
  return {
    kind: 'tiered',
    lotSize,
    tierSizes: [tier, second],
    failAt: [tenPercent(tier), second > 0 ? tenPercent(second) : 0],
    failClasses,
    sampleSize: tier + second,
    source: TIERED_SOURCE,
  };
}

export type AuditPlan = Z14AuditPlan | TieredAuditPlan;

// ------------------------------------------------------------------------------------------------
// The draw
// ------------------------------------------------------------------------------------------------

/** A new seed: 16 hex digits from the platform's random source (recorded with the audit). */
export function newSeed(random: () => number = Math.random): string {
  let s = '';
  for (let i = 0; i < 16; i += 1) s += Math.floor(random() * 16).toString(16);
  return s;
}

/** Seeded random numbers in [0, 1): seedrandom's Alea. */
export function seededRandom(seed: string): () => number {
  const prng = alea(seed);
  return () => prng();
}

/** Fisher–Yates (Durstenfeld): a uniformly random order of `items`, a new array. */
export function fisherYates<T>(items: readonly T[], random: () => number): T[] {
  const out = items.slice();
  for (let i = out.length - 1; i > 0; i -= 1) {
    const j = Math.floor(random() * (i + 1));
    const t = out[i]!;
    out[i] = out[j]!;
    out[j] = t;
  }
  return out;
}

/** The lot in draw order: ids sorted (so the lot's own order never matters), shuffled by the seed. */
export function drawOrder(lot: readonly string[], seed: string): string[] {
  const sorted = [...new Set(lot)].sort();
  return fisherYates(sorted, seededRandom(seed));
}

export interface DrawnUnit {
  unitId: string;
  /** 1-based place in the draw. */
  position: number;
  /** Z1.4: always 1; tiered: 1 or 2. */
  tier: 1 | 2;
}

/** The sample of a plan: the first sampleSize units of the draw order, with their tier. */
export function drawSample(lot: readonly string[], seed: string, plan: AuditPlan): DrawnUnit[] {
  const order = drawOrder(lot, seed).slice(0, plan.sampleSize);
  const firstTier = plan.kind === 'tiered' ? plan.tierSizes[0] : plan.sampleSize;
  return order.map((unitId, i) => ({ unitId, position: i + 1, tier: i < firstTier ? 1 : 2 }));
}

// ------------------------------------------------------------------------------------------------
// The decision
// ------------------------------------------------------------------------------------------------

export type AuditDecision = 'accept' | 'reject' | 'continue' | 'expand';

/** What is known of one sampled unit: checked or not, and its defects by class. */
export interface SampledResult {
  position: number;
  checked: boolean;
  defects: Partial<Record<Severity, number>>;
}

export interface ClassState {
  severity: Severity;
  aql: Aql | null;
  sampleSize: number;
  accept: number;
  reject: number;
  checked: number;
  defects: number;
  decision: 'accept' | 'reject' | 'continue';
}

export interface TierState {
  tier: 1 | 2;
  size: number;
  failAt: number;
  checked: number;
  failed: number;
  decision: 'pass' | 'fail' | 'continue' | 'not_needed';
}

export interface AuditState {
  decision: AuditDecision;
  /** Units of the active sample that are checked, and the size of that sample. */
  checked: number;
  sampleSize: number;
  classes: ClassState[];
  tiers: TierState[];
  /** The tier being checked now (tiered scheme), else 1. */
  activeTier: 1 | 2;
}

function classDecision(defects: number, checked: number, sampleSize: number, accept: number, reject: number): ClassState['decision'] {
  if (defects >= reject) return 'reject';
  if (checked >= sampleSize && defects <= accept) return 'accept';
  return 'continue';
}

/**
 * Z1.4: each class judges the first `sampleSize` units of the draw. A class rejects as soon as its
 * defects reach Re (more checks cannot lower a count); it accepts once all its units are checked with
 * defects at most Ac. The lot is rejected when any class rejects, accepted when every class accepts.
 * Tiered: a tier fails as soon as failed units reach its 10 percent, passes once all its units are
 * checked below it; a first-tier failure expands to the second tier, a second-tier failure rejects.
 */
export function decide(plan: AuditPlan, results: readonly SampledResult[]): AuditState {
  const byPosition = [...results].sort((a, b) => a.position - b.position);
  if (plan.kind === 'z14') {
    const classes = plan.classes.map((c): ClassState => {
      const mine = byPosition.filter((r) => r.position <= c.sampleSize);
      const checked = mine.filter((r) => r.checked).length;
      const defects = mine.reduce((sum, r) => sum + (r.defects[c.severity] ?? 0), 0);
      return { severity: c.severity, aql: c.aql, sampleSize: c.sampleSize, accept: c.accept, reject: c.reject, checked, defects, decision: classDecision(defects, checked, c.sampleSize, c.accept, c.reject) };
    });
    const decision: AuditDecision = classes.some((c) => c.decision === 'reject')
      ? 'reject'
      : classes.length > 0 && classes.every((c) => c.decision === 'accept')
        ? 'accept'
        : 'continue';
    const checked = byPosition.filter((r) => r.position <= plan.sampleSize && r.checked).length;
    return { decision, checked, sampleSize: plan.sampleSize, classes, tiers: [], activeTier: 1 };
  }
  const failedUnit = (r: SampledResult) => plan.failClasses.some((s) => (r.defects[s] ?? 0) > 0);
  const tierState = (tier: 1 | 2): TierState => {
    const size = plan.tierSizes[tier - 1];
    const start = tier === 1 ? 0 : plan.tierSizes[0];
    const mine = byPosition.filter((r) => r.position > start && r.position <= start + size);
    const checked = mine.filter((r) => r.checked).length;
    const failed = mine.filter(failedUnit).length;
    const failAt = plan.failAt[tier - 1];
    const decision = size === 0 ? 'not_needed' : failed >= failAt ? 'fail' : checked >= size ? 'pass' : 'continue';
    return { tier, size, failAt, checked, failed, decision };
  };
  const first = tierState(1);
  if (first.decision !== 'fail') {
    const second: TierState = { ...tierState(2), decision: 'not_needed' };
    const decision = first.decision === 'pass' ? 'accept' : 'continue';
    return { decision, checked: first.checked, sampleSize: first.size, classes: [], tiers: [first, second], activeTier: 1 };
  }
  const second = tierState(2);
  // A failed first tier on a lot it covered whole leaves nothing to expand into: reject.
  const decision: AuditDecision =
    second.decision === 'not_needed' || second.decision === 'fail' ? 'reject' : second.decision === 'pass' ? 'accept' : 'expand';
  return { decision, checked: first.checked + second.checked, sampleSize: first.size + second.size, classes: [], tiers: [first, second], activeTier: 2 };
}

/** True once the decision is final (accept or reject). */
export function isFinal(decision: AuditDecision): boolean {
  return decision === 'accept' || decision === 'reject';
}

/** Words for the decisions, one list for screens and exports. */
export const DECISION_LABELS: Record<AuditDecision, string> = {
  accept: 'Accept the lot',
  reject: 'Reject: check every unit',
  continue: 'Keep checking',
  expand: 'Check the next tier',
};
