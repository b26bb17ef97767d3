/**
 * The measured-rule engine: one measured value against a limit from the unit's model, a built-in
 * code value, or a job setting.
 *
 * Inclusive limits: a value exactly at a limit passes (at_least: measured ≥ limit; at_most:
 * measured ≤ limit; between: lower ≤ measured ≤ upper; equal_within: |measured − target| ≤ tolerance).
 * Comparisons are made on the margin rounded to 1e-9 base units (roundToResolution), so that two
 * routes to the same value (3.175 mm over 304.8 mm, and 1/8 in per ft) compare equal despite
 * binary floating point. 1e-9 mm, 1e-9 kg, 1e-9 m³ and a slope of 1e-9 are far below any field
 * measurement.
 * Margin is signed, in base units: positive = inside the limit, 0 = at the limit, negative = outside.
 * A missing limit is never a pass: the result is `limit_not_set` with pass = null.
 *
 * This engine knows no code calculation, so the calculations (condensate.ts, supports.ts …) can
 * use it without an import cycle. A catalogue item's rule that names one (MeasuredRule.codeCheck)
 * is evaluated by itemRules.ts evaluateItemRule, which the walk and the server call.
 */
import type {
  EditionChoice,
  JobSettingKey,
  LimitRef,
  MeasuredRule,
  ModelLimitKey,
  QuantityKind,
  ResolvedLimit,
  StatedLimit,
  UnitSystem,
} from '../catalogue/types';
import { JOB_SETTINGS, MODEL_LIMITS } from '../catalogue/types';
import { codeLimitSource, pickCodeLimit } from './limits';
import { formatQuantity, roundToResolution, toBase, unitKind } from './quantity';

export type RuleStatus = 'pass' | 'fail' | 'limit_not_set' | 'not_measured' | 'invalid';

export interface RuleResult {
  status: RuleStatus;
  /** true = pass, false = fail, null = not decided (limit not set, not measured, invalid input). */
  pass: boolean | null;
  /** Signed, base units; positive = inside the limit. null when not decided or for yes/no. */
  margin: number | null;
  /** at_least / at_most / equal_within: the limit; between: the lower bound. Base units. */
  limit: number | null;
  /** between: the upper bound. */
  upper: number | null;
  tolerance: number | null;
  expected: boolean | null;
  measured: number | boolean | null;
  /** Where the limit comes from: "Model VX-24 installation manual, p. 12", "IMC 2018 Table 307.2.2", "Job setting: …". */
  limitSource: string;
  message: string;
}

/** A resolver's answer: the limit, a reason it is missing, or undefined (not set). */
export type LimitLookup = ResolvedLimit | { missing: string } | undefined;
export type LimitResolver = ((ref: LimitRef) => LimitLookup) & {
  /** The code editions behind the resolver's code limits (set by makeLimitResolver), for rules a code calculation decides. */
  editions?: EditionChoice;
  /** What a code calculation needs to know of the unit itself (set by makeLimitResolver). */
  unit?: UnitFacts;
};

/** Facts of one unit a code calculation reads (e.g. IMC Table 307.2.2 sizes a drain from the capacity). */
export interface UnitFacts {
  /** The unit's cooling capacity, W; null when not recorded. */
  capacity?: number | null;
}

export interface EvaluateOptions {
  /** Unit system for messages; default imperial. */
  system?: UnitSystem;
  /** Source named for a yes/no rule (it has no limit reference), e.g. "IMC 2018 Section 307.2.4.1". */
  source?: string;
}

function isMissing(l: LimitLookup): l is { missing: string } | undefined {
  return l === undefined || 'missing' in l;
}

function describeRef(ref: LimitRef): string {
  if (ref.from === 'model') {
    const m = MODEL_LIMITS.find((x) => x.key === ref.key);
    return `model limit "${m?.label ?? ref.key}"`;
  }
  if (ref.from === 'job') {
    const j = JOB_SETTINGS.find((x) => x.key === ref.key);
    return `job setting "${j?.label ?? ref.key}"`;
  }
  return `code limit "${ref.key}"`;
}

function base(partial: Partial<RuleResult> & Pick<RuleResult, 'status' | 'message'>): RuleResult {
  return {
    pass: null,
    margin: null,
    limit: null,
    upper: null,
    tolerance: null,
    expected: null,
    measured: null,
    limitSource: '',
    ...partial,
  };
}

/**
 * Evaluate one measured rule. `measured` is in base units (number) or a yes/no answer (boolean);
 * null / undefined means not measured yet.
 */
export function evaluateRule(
  rule: MeasuredRule,
  measured: number | boolean | null | undefined,
  resolveLimit: LimitResolver,
  options: EvaluateOptions = {},
): RuleResult {
  const system = options.system ?? 'imperial';
  const fmt = (v: number): string => formatQuantity(v, rule.quantity, system);
  const what = rule.measure;
  const m = measured ?? null;

  if (rule.comparison === 'yes_no') {
    const source = options.source ?? 'Expected answer';
    if (rule.expected === undefined) {
      return base({ status: 'limit_not_set', measured: m, limitSource: source, message: `${what}: limit not set — the rule has no expected answer.` });
    }
    const exp = rule.expected;
    if (m === null) {
      return base({ status: 'not_measured', expected: exp, limitSource: source, message: `${what}: not answered yet.` });
    }
    if (typeof m !== 'boolean') {
      return base({ status: 'invalid', expected: exp, measured: m, limitSource: source, message: `${what}: a yes/no answer is expected, got a number.` });
    }
    const pass = m === exp;
    const yn = (b: boolean): string => (b ? 'yes' : 'no');
    return base({
      status: pass ? 'pass' : 'fail',
      pass,
      expected: exp,
      measured: m,
      limitSource: source,
      message: pass
        ? `${what}: ${yn(m)}, as required (${source}).`
        : `${what}: ${yn(m)}, but ${yn(exp)} is required (${source}).`,
    });
  }

  // Numeric comparisons: resolve the limit(s) first.
  if (!rule.limit) {
    return base({ status: 'limit_not_set', measured: m, message: `${what}: limit not set — the rule names no limit.` });
  }
  const lower = resolveLimit(rule.limit);
  if (isMissing(lower)) {
    const why = lower?.missing ?? `no value entered for the ${describeRef(rule.limit)}`;
    return base({ status: 'limit_not_set', measured: m, message: `${what}: limit not set — ${why}.` });
  }
  let upper: ResolvedLimit | undefined;
  if (rule.comparison === 'between') {
    if (!rule.upper) {
      return base({ status: 'limit_not_set', measured: m, limit: lower.value, limitSource: lower.source, message: `${what}: limit not set — the rule names no upper bound.` });
    }
    const u = resolveLimit(rule.upper);
    if (isMissing(u)) {
      const why = u?.missing ?? `no value entered for the ${describeRef(rule.upper)}`;
      return base({ status: 'limit_not_set', measured: m, limit: lower.value, limitSource: lower.source, message: `${what}: upper limit not set — ${why}.` });
    }
    upper = u;
  }
  const limitSource =
    upper && upper.source !== lower.source ? `lower: ${lower.source}; upper: ${upper.source}` : lower.source;
  const common = { limit: lower.value, upper: upper?.value ?? null, limitSource, measured: m };

  for (const l of [lower, upper]) {
    if (l && l.quantity !== rule.quantity) {
      return base({ ...common, status: 'invalid', message: `${what}: the limit from ${l.source} is ${l.quantity}, but the rule measures ${rule.quantity}.` });
    }
    if (l && !Number.isFinite(l.value)) {
      return base({ ...common, status: 'invalid', message: `${what}: the limit from ${l.source} is not a number.` });
    }
  }
  if (upper && upper.value < lower.value) {
    return base({ ...common, status: 'invalid', message: `${what}: the lower limit ${fmt(lower.value)} is above the upper limit ${fmt(upper.value)}.` });
  }
  let tolerance: number | null = null;
  if (rule.comparison === 'equal_within') {
    if (rule.tolerance === undefined) {
      return base({ ...common, status: 'limit_not_set', message: `${what}: limit not set — the rule has no tolerance.` });
    }
    if (!Number.isFinite(rule.tolerance) || rule.tolerance < 0) {
      return base({ ...common, status: 'invalid', message: `${what}: the tolerance must be zero or more.` });
    }
    tolerance = rule.tolerance;
  }
  if (m === null) {
    return base({ ...common, tolerance, status: 'not_measured', message: `${what}: not measured yet.` });
  }
  if (typeof m !== 'number' || !Number.isFinite(m)) {
    return base({ ...common, tolerance, status: 'invalid', message: `${what}: a measured ${rule.quantity} is expected.` });
  }

  const L = lower.value;
  let margin: number;
  let message: string;
  const src = limitSource;
  switch (rule.comparison) {
    case 'at_least': {
      margin = roundToResolution(m - L);
      message =
        margin > 0
          ? `${what}: ${fmt(m)} meets the minimum ${fmt(L)} (${src}) with ${fmt(margin)} to spare.`
          : margin === 0
            ? `${what}: ${fmt(m)} is exactly at the minimum ${fmt(L)} (${src}); limits are inclusive, so it passes.`
            : `${what}: ${fmt(m)} is ${fmt(-margin)} below the minimum ${fmt(L)} (${src}).`;
      break;
    }
    case 'at_most': {
      margin = roundToResolution(L - m);
      message =
        margin > 0
          ? `${what}: ${fmt(m)} is within the maximum ${fmt(L)} (${src}) by ${fmt(margin)}.`
          : margin === 0
            ? `${what}: ${fmt(m)} is exactly at the maximum ${fmt(L)} (${src}); limits are inclusive, so it passes.`
            : `${what}: ${fmt(m)} is ${fmt(-margin)} over the maximum ${fmt(L)} (${src}).`;
      break;
    }
    case 'between': {
      const U = upper?.value ?? L;
      const below = roundToResolution(m - L);
      const above = roundToResolution(U - m);
      margin = Math.min(below, above);
      message =
        margin >= 0
          ? `${what}: ${fmt(m)} is within ${fmt(L)} to ${fmt(U)} (${src}), inclusive.`
          : below < 0
            ? `${what}: ${fmt(m)} is ${fmt(-below)} below the range ${fmt(L)} to ${fmt(U)} (${src}).`
            : `${what}: ${fmt(m)} is ${fmt(-above)} above the range ${fmt(L)} to ${fmt(U)} (${src}).`;
      break;
    }
    case 'equal_within': {
      const tol = tolerance ?? 0;
      const dev = roundToResolution(Math.abs(m - L));
      margin = roundToResolution(tol - dev);
      message =
        margin >= 0
          ? `${what}: ${fmt(m)} is within ±${fmt(tol)} of ${fmt(L)} (${src}).`
          : `${what}: ${fmt(m)} is ${fmt(dev)} from ${fmt(L)}, more than the ±${fmt(tol)} allowed (${src}).`;
      break;
    }
  }
  const pass = margin >= 0;
  return base({ ...common, tolerance, status: pass ? 'pass' : 'fail', pass, margin, message });
}

// ------------------------------------------------------------------------------------------------
// Resolving limits
// ------------------------------------------------------------------------------------------------

export interface LimitSources {
  /** The unit's model and the limits entered from its installation manual. */
  model?: { name: string; limits: Partial<Record<ModelLimitKey, StatedLimit>> };
  /** The job's settings. */
  job?: Partial<Record<JobSettingKey, StatedLimit>>;
  /** The code editions the job uses (defaults: DEFAULT_EDITIONS in limits.ts). */
  editions?: EditionChoice;
  /** The unit's own facts, for rules a code calculation decides. */
  unit?: UnitFacts;
}

function stated(s: StatedLimit, quantity: QuantityKind, source: string, what: string): LimitLookup {
  const kind = unitKind(s.unit);
  if (!kind) return { missing: `the ${what} is stated in an unknown unit "${s.unit}"` };
  if (kind !== quantity) return { missing: `the ${what} is stated in ${s.unit} (${kind}), but ${quantity} is needed` };
  if (!Number.isFinite(s.value)) return { missing: `the ${what} is not a number` };
  return { value: toBase(s.value, s.unit), quantity, source };
}

/** A resolver over a unit's model limits, the job's settings and the built-in code limits. */
export function makeLimitResolver(sources: LimitSources): LimitResolver {
  const resolver = (ref: LimitRef): LimitLookup => {
    if (ref.from === 'code') {
      const picked = pickCodeLimit(ref.key, sources.editions);
      if (!picked.ok) return { missing: picked.error };
      const l = picked.limit;
      return { value: l.base, quantity: l.quantity, source: codeLimitSource(l, picked.edition) };
    }
    if (ref.from === 'model') {
      const def = MODEL_LIMITS.find((x) => x.key === ref.key);
      if (!def) return { missing: `unknown model limit "${ref.key}"` };
      const model = sources.model;
      const s = model?.limits[ref.key];
      if (!model || !s) return undefined;
      const source = `Model ${model.name} ${s.source ?? 'installation manual'}`;
      return stated(s, def.quantity, source, `model limit "${def.label}"`);
    }
    const def = JOB_SETTINGS.find((x) => x.key === ref.key);
    if (!def) return { missing: `unknown job setting "${ref.key}"` };
    const s = sources.job?.[ref.key];
    if (!s) return undefined;
    const source = `Job setting: ${def.label.replace(/ \(job setting\)$/, '')}${s.source ? ` (${s.source})` : ''}`;
    return stated(s, def.quantity, source, `job setting "${def.label}"`);
  };
  return Object.assign(resolver, { editions: sources.editions, unit: sources.unit });
}

// ------------------------------------------------------------------------------------------------
// Several checks as one
// ------------------------------------------------------------------------------------------------

export interface NamedResult extends RuleResult {
  key: string;
  label: string;
}

export interface CheckResult {
  status: RuleStatus;
  pass: boolean | null;
  checks: NamedResult[];
  message: string;
}

/** Combine checks: any fail → fail; else any undecided → that status; else pass. */
export function combineChecks(checks: NamedResult[], summary?: string): CheckResult {
  const order: RuleStatus[] = ['fail', 'invalid', 'limit_not_set', 'not_measured'];
  const status = order.find((s) => checks.some((c) => c.status === s)) ?? 'pass';
  const pass = status === 'pass' ? true : status === 'fail' ? false : null;
  const notes = checks.filter((c) => c.status !== 'pass').map((c) => c.message);
  const message =
    status === 'pass'
      ? `${summary ? `${summary}: ` : ''}all ${checks.length} checks pass.`
      : `${summary ? `${summary}: ` : ''}${notes.join(' ')}`;
  return { status, pass, checks, message };
}

/** A named check against a built-in code limit. */
export function checkAgainstCode(
  key: string,
  measure: string,
  measured: number | null | undefined,
  editions: EditionChoice | undefined,
  system: UnitSystem | undefined,
): NamedResult {
  const picked = pickCodeLimit(key, editions);
  const quantity = picked.ok ? picked.limit.quantity : 'length';
  const comparison = picked.ok ? picked.limit.comparison : 'at_least';
  const r = evaluateRule(
    { measure, quantity, comparison, limit: { from: 'code', key } },
    measured,
    makeLimitResolver({ editions }),
    { system },
  );
  return { ...r, key, label: picked.ok ? picked.limit.label : key };
}
