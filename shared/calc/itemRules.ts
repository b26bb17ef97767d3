/**
 * A catalogue item's measured rule, evaluated the way the walk and the server both do: a rule that
 * names a code calculation (MeasuredRule.codeCheck) is decided by that calculation, so its answer
 * and its source (document, edition, section) are the calculation's own; any other rule goes to
 * the plain engine (rules.ts evaluateRule).
 *
 * This module sits above the calculations and the engine (it imports both; neither imports it), so
 * a calculation may use the engine without an import cycle.
 */
import type { EditionChoice, MeasuredRule } from '../catalogue/types';
import { checkDuctlessDrainTrap } from './condensate';
import { evaluateRule, type EvaluateOptions, type LimitResolver, type RuleResult } from './rules';

function strip<T extends { key: string; label: string }>(r: T): Omit<T, 'key' | 'label'> {
  const { key: _key, label: _label, ...rest } = r;
  return rest;
}

export interface ItemRuleOptions extends EvaluateOptions {
  /** The code editions the job uses; default: the resolver's (the unit's job), else DEFAULT_EDITIONS. */
  editions?: EditionChoice;
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
  switch (rule.codeCheck) {
    case 'ductless_check_valve_or_trap':
      if (rule.expected === true && (m === null || typeof m === 'boolean')) {
        // One answer covers both: the inspector records whether either is present.
        return strip(checkDuctlessDrainTrap({ checkValve: m, trap: m, editions }));
      }
      break;
    default:
      break;
  }
  return evaluateRule(rule, m, resolveLimit, options);
}
