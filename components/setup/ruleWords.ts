/** A measured rule said in plain words, with where its limit comes from. */
import { formatQuantity } from '../../shared/calc/format';
import { CODE_LIMITS } from '../../shared/calc/limits';
import { JOB_SETTINGS, MODEL_LIMITS, type LimitRef, type MeasuredRule, type UnitSystem } from '../../shared/catalogue/types';

export function limitRefWords(ref: LimitRef | undefined): string {
  if (!ref) return 'a limit not named';
  if (ref.from === 'model') {
    const label = MODEL_LIMITS.find((m) => m.key === ref.key)?.label ?? ref.key;
    return `the unit model's "${label.toLowerCase()}" (from its installation manual)`;
  }
  if (ref.from === 'job') {
    const label = JOB_SETTINGS.find((s) => s.key === ref.key)?.label ?? ref.key;
    return `the job setting "${label}"`;
  }
  const code = CODE_LIMITS[ref.key];
  return code ? `${code.document} ${code.editions.join('/')} ${code.section}: ${code.label}` : `code limit ${ref.key}`;
}

export function ruleWords(rule: MeasuredRule, system: UnitSystem): string {
  switch (rule.comparison) {
    case 'at_least':
      return `${rule.measure}: at least ${limitRefWords(rule.limit)}.`;
    case 'at_most':
      return `${rule.measure}: at most ${limitRefWords(rule.limit)}.`;
    case 'between':
      return `${rule.measure}: between ${limitRefWords(rule.limit)} and ${limitRefWords(rule.upper)}.`;
    case 'equal_within':
      return `${rule.measure}: equal to ${limitRefWords(rule.limit)}, within ${
        rule.tolerance !== undefined && rule.quantity !== 'boolean' ? formatQuantity(rule.tolerance, rule.quantity, system) : 'a tolerance'
      }.`;
    case 'yes_no':
      return `${rule.measure}: passes when the answer is ${rule.expected ? 'yes' : 'no'}.`;
  }
}
