/**
 * A re-measurement's resolver (fix or re-inspection) keeps the original limits and hands every
 * other question to the unit's own resolver, including the code editions of the job: a yes/no rule
 * the code decides (the ductless drain's check valve or trap) names the section in the job's
 * edition, not the default one.
 * Source: IMC (International Mechanical Code) Section 307.2.4.1, ductless mini-split drains (the
 * section number is the same in the 2018 and 2021 editions; from memory, confirm in the job's copy).
 */
import { evaluateItemRule } from '../../../shared/calc/itemRules';
import { makeLimitResolver } from '../../../shared/calc/rules';
import { BUILTIN_CATALOGUE } from '../../../shared/catalogue';
import { sameLimitResolver } from '../../../shared/rules/remeasure';

const trap = BUILTIN_CATALOGUE.find((i) => i.measuredRule?.codeCheck === 'ductless_check_valve_or_trap');

it('the catalogue has a check valve or trap item the code decides', () => {
  expect(trap?.measuredRule).toMatchObject({ comparison: 'yes_no', expected: true });
});

it('keeps the job’s code editions: the section is named in the job’s edition', () => {
  const rule = trap!.measuredRule!;
  const unitResolver = makeLimitResolver({ editions: { IMC: '2021' } });
  const original = evaluateItemRule(rule, false, unitResolver);
  expect(original.limitSource).toBe('IMC 2021 Section 307.2.4.1');
  const again = sameLimitResolver(rule, original, unitResolver);
  expect(again.editions).toEqual({ IMC: '2021' });
  const result = evaluateItemRule(rule, true, again);
  expect({ pass: result.pass, source: result.limitSource }).toEqual({ pass: true, source: 'IMC 2021 Section 307.2.4.1' });
});
