/**
 * A new measurement of a logged defect (with a fix, or at re-inspection) is judged by the same
 * rule and the same limit as the finding as logged, so a model or job limit edited since then
 * cannot move the goalposts: the phone shows the verdict as it is typed, the server decides it.
 *
 * - the rule: the defect type's measured rule (its comparison and quantity);
 * - the limit: the one the finding's own result was judged against (value and source), when
 *   that result had one; otherwise whatever the unit's limits say now (`fallback`).
 */
import { formatQuantity } from '../calc/format';
import type { LimitResolver, RuleResult } from '../calc/rules';
import type { LimitRef, MeasuredRule, UnitSystem } from '../catalogue/types';

/** What a finding carries that decides its re-measurement. */
export interface MeasuredFinding {
  measuredText: string | null;
  ruleResult: RuleResult | null;
}

/**
 * True when a fix must bring a new measurement: the defect type has a measured rule and the
 * finding was logged with a measured value (the fix proves it now meets the rule).
 */
export function fixNeedsMeasurement(rule: MeasuredRule | null | undefined, finding: MeasuredFinding): boolean {
  return Boolean(rule) && finding.measuredText !== null;
}

/** The refusal of a fix without its new measurement (the form and the server say the same). */
export function newMeasurementNeeded(rule: Pick<MeasuredRule, 'measure'>): string {
  return `Measure ${rule.measure.charAt(0).toLowerCase()}${rule.measure.slice(1)} again after the fix and type the new value.`;
}

/** True when the defect type takes a measured value at all (a fix or re-inspection may record one). */
export function takesMeasurement(rule: MeasuredRule | null | undefined): rule is MeasuredRule {
  return Boolean(rule);
}

/**
 * The resolver of a re-measurement: the original result's lower limit for the rule's `limit`,
 * its upper for the rule's `upper`, in the rule's quantity, with the original source; any
 * reference the original did not decide goes to `fallback`.
 */
export function sameLimitResolver(rule: MeasuredRule, original: RuleResult | null, fallback: LimitResolver): LimitResolver {
  const same = (a: LimitRef | undefined, b: LimitRef) => a !== undefined && a.from === b.from && a.key === b.key;
  const sources = original?.limitSource.match(/^lower: (.*); upper: (.*)$/);
  const lowerSource = sources?.[1] ?? original?.limitSource ?? '';
  const upperSource = sources?.[2] ?? original?.limitSource ?? '';
  const resolve: LimitResolver = (ref) => {
    if (original && original.limit !== null && same(rule.limit, ref)) return { value: original.limit, quantity: rule.quantity, source: lowerSource };
    if (original && original.upper !== null && same(rule.upper, ref)) return { value: original.upper, quantity: rule.quantity, source: upperSource };
    return fallback(ref);
  };
  // A yes/no rule the code decides names the section in the job's own edition, as the fallback knows it.
  resolve.editions = fallback.editions;
  resolve.unit = fallback.unit;
  return resolve;
}

/** A resolver that knows no limit (the phone without the unit's model: the server still decides). */
export const noLimits: LimitResolver = () => undefined;

/**
 * The verdict of a measurement in the product's words: "Within the limit of 30 in (installation
 * manual, p. 12)", "Outside the limit of 30 in (…)", or the rule's own message when it could not
 * decide (limit not set).
 */
export function measurementVerdict(rule: Pick<MeasuredRule, 'quantity' | 'comparison'>, result: RuleResult, system: UnitSystem): string {
  if (result.pass === null) return result.message;
  if (rule.comparison === 'yes_no' || rule.quantity === 'boolean' || result.limit === null) {
    return result.pass ? `Pass: ${result.message}` : `Fail: ${result.message}`;
  }
  const fmt = (v: number) => formatQuantity(v, rule.quantity, system);
  let limit = result.upper !== null ? `${fmt(result.limit)} to ${fmt(result.upper)}` : fmt(result.limit);
  if (result.tolerance !== null) limit += ` ± ${fmt(result.tolerance)}`;
  const source = result.limitSource ? ` (${result.limitSource})` : '';
  return `${result.pass ? 'Within' : 'Outside'} the limit of ${limit}${source}`;
}
