/**
 * The unit check's measured items, computed on the phone as the inspector types: parse the text
 * the trade's way (shared/calc parseItemMeasurement: parseQuantity, and what a code calculation
 * takes after "for"), then evaluate the item's rule against the limit
 * from the unit's model, the job's settings or a built-in code value (shared/calc evaluateItemRule).
 * The server evaluates the same rule again when the check is saved.
 */
import { unitLimitResolver, unitLimitSources } from '../../shared/rules/limits';
import { formatQuantity } from '../../shared/calc/format';
import { evaluateItemRule, parseItemMeasurement, type MeasuredGiven } from '../../shared/calc/itemRules';
import type { LimitResolver, LimitSources, RuleResult } from '../../shared/calc/rules';
import type { MeasuredRule, UnitSystem } from '../../shared/catalogue/types';
import type { JobDetail, UnitDto, UnitModelDto } from '../../shared/schemas/setup';

export type MeasurementView =
  /** Nothing typed: the limit is shown so the inspector knows what to look for. */
  | { kind: 'empty'; result: RuleResult }
  /** The text does not parse: the parser's own message says why. */
  | { kind: 'parse_error'; error: string; result: RuleResult }
  | { kind: 'result'; value: number | boolean; display: string; result: RuleResult };

export function limitSourcesFor(model: Pick<UnitModelDto, 'name' | 'limits'> | null | undefined, job: Pick<JobDetail, 'settings' | 'codeEditions'> | null | undefined): LimitSources {
  return unitLimitSources({ model, job });
}

/** The phone's resolver: the same rule the server checks a saved unit against (shared/rules/limits). */
export function limitResolverFor(
  model: Pick<UnitModelDto, 'name' | 'limits'> | null | undefined,
  job: Pick<JobDetail, 'settings' | 'codeEditions'> | null | undefined,
  unit?: Pick<UnitDto, 'capacity'> | null,
): LimitResolver {
  return unitLimitResolver({ model, job, unit });
}

/** Parse and evaluate one measured item's text (or yes/no answer). */
export function measure(rule: MeasuredRule, text: string, resolve: LimitResolver, system: UnitSystem): MeasurementView {
  const evaluate = (v: number | boolean | null, given?: MeasuredGiven) => evaluateItemRule(rule, v, resolve, { system, given });
  if (text.trim() === '') return { kind: 'empty', result: evaluate(null) };
  const parsed = parseItemMeasurement(rule, text, { system });
  if (!parsed.ok) return { kind: 'parse_error', error: parsed.error, result: evaluate(null) };
  const value = rule.quantity === 'boolean' ? parsed.value === 1 : parsed.value;
  return { kind: 'result', value, display: parsed.display, result: evaluate(value, parsed.given) };
}

const COMPARISON_WORDS = { at_least: 'at least', at_most: 'at most' } as const;

/** "at least 30-1/2"", "between 1' 0" and 2' 0"", "30° ± 2°", "yes" — the limit in words. */
export function describeLimit(rule: MeasuredRule, result: RuleResult, system: UnitSystem): string | null {
  const fmt = (v: number) => formatQuantity(v, rule.quantity, system);
  switch (rule.comparison) {
    case 'yes_no':
      return result.expected === null ? null : result.expected ? 'must be yes' : 'must be no';
    case 'at_least':
    case 'at_most':
      return result.limit === null ? null : `${COMPARISON_WORDS[rule.comparison]} ${fmt(result.limit)}`;
    case 'between':
      return result.limit === null || result.upper === null ? null : `between ${fmt(result.limit)} and ${fmt(result.upper)}`;
    case 'equal_within':
      return result.limit === null || result.tolerance === null ? null : `${fmt(result.limit)} ± ${fmt(result.tolerance)}`;
  }
}

/** The margin in words: "2-1/2" to spare" / "1-1/4" short" (null when undecided or yes/no). */
export function describeMargin(rule: MeasuredRule, result: RuleResult, system: UnitSystem): string | null {
  if (result.margin === null || rule.quantity === 'boolean') return null;
  const fmt = (v: number) => formatQuantity(v, rule.quantity, system);
  if (result.margin > 0) return `${fmt(result.margin)} to spare`;
  if (result.margin === 0) return 'exactly at the limit (limits are inclusive)';
  return `${fmt(-result.margin)} outside the limit`;
}
