import {
  BUILTIN_CATALOGUE,
  CATALOGUE_GROUPS,
  COMPARISONS,
  JOB_SETTINGS,
  MODEL_LIMITS,
  QUANTITY_KINDS,
  findItem,
  groupPrefix,
  itemsForKind,
  itemsInGroup,
  type CatalogueItem,
  type LimitRef,
  type MeasuredRule,
  type QuantityKind,
} from '../../shared/catalogue';
import { CODE_LIMITS } from '../../shared/calc/limits';
import { SEVERITIES, TRADE_KEYS, UNIT_KIND_KEYS } from '../../shared/words';

/**
 * Code limits are owned by shared/calc/limits.ts (document, edition, section, value, and how the
 * limit is applied). A measured rule naming a code key must name one CODE_LIMITS holds, measure
 * the same quantity, and compare the same way.
 */

const GOVERNS_PHRASES = ["manufacturer's installation manual", 'local codes', 'licensed practice'];
/** Groups whose work is electrical, refrigerant, brazing, lifting or overhead by nature. */
const HAZARDOUS_GROUPS = new Set(['wiring', 'piping', 'mounting']);

const items = BUILTIN_CATALOGUE;
const rules = items.filter((i): i is CatalogueItem & { measuredRule: MeasuredRule } => !!i.measuredRule);

/** The quantity a limit is stated in, or undefined when the key is unknown. */
function limitQuantity(ref: LimitRef): QuantityKind | undefined {
  switch (ref.from) {
    case 'model':
      return MODEL_LIMITS.find((m) => m.key === ref.key)?.quantity;
    case 'job':
      return JOB_SETTINGS.find((s) => s.key === ref.key)?.quantity;
    case 'code':
      return CODE_LIMITS[ref.key]?.quantity;
  }
}

/** Problems with one measured rule; empty when it is well-formed. */
function ruleProblems(rule: MeasuredRule): string[] {
  const problems: string[] = [];
  if (!rule.measure.trim()) problems.push('measure is empty');
  if (!(QUANTITY_KINDS as readonly string[]).includes(rule.quantity)) problems.push(`bad quantity ${rule.quantity}`);
  if (!(COMPARISONS as readonly string[]).includes(rule.comparison)) problems.push(`bad comparison ${rule.comparison}`);

  const checkRef = (name: string, ref: LimitRef | undefined) => {
    if (!ref) {
      problems.push(`${name} missing`);
      return;
    }
    const q = limitQuantity(ref);
    if (q === undefined) problems.push(`${name}: unknown ${ref.from} key ${ref.key}`);
    else if (q !== rule.quantity) problems.push(`${name}: ${ref.key} is a ${q}, rule measures ${rule.quantity}`);
    if (rule.comparison === 'at_least' || rule.comparison === 'at_most') {
      // A minimum is met from above, a maximum from below: the key says which it is.
      const wanted =
        ref.from === 'code'
          ? CODE_LIMITS[ref.key]?.comparison
          : ref.key.startsWith('min_')
            ? 'at_least'
            : ref.key.startsWith('max_')
              ? 'at_most'
              : undefined;
      if (wanted && wanted !== rule.comparison) problems.push(`${name}: ${ref.key} is applied ${wanted}`);
    }
  };

  switch (rule.comparison) {
    case 'yes_no':
      if (rule.quantity !== 'boolean') problems.push('yes_no needs quantity boolean');
      if (typeof rule.expected !== 'boolean') problems.push('yes_no needs expected');
      if (rule.limit || rule.upper || rule.tolerance !== undefined) problems.push('yes_no takes no limit');
      break;
    case 'at_least':
    case 'at_most':
      checkRef('limit', rule.limit);
      if (rule.upper) problems.push(`${rule.comparison} takes no upper`);
      if (rule.tolerance !== undefined) problems.push(`${rule.comparison} takes no tolerance`);
      break;
    case 'between':
      checkRef('limit', rule.limit);
      checkRef('upper', rule.upper);
      if (rule.tolerance !== undefined) problems.push('between takes no tolerance');
      break;
    case 'equal_within':
      checkRef('limit', rule.limit);
      if (rule.upper) problems.push('equal_within takes no upper');
      if (typeof rule.tolerance !== 'number' || !Number.isFinite(rule.tolerance) || rule.tolerance < 0)
        problems.push('equal_within needs a tolerance >= 0');
      break;
  }
  if (rule.comparison !== 'yes_no') {
    if (rule.quantity === 'boolean') problems.push('boolean quantity needs yes_no');
    if (rule.expected !== undefined) problems.push('only yes_no takes expected');
  }
  return problems;
}

describe('built-in defect catalogue', () => {
  test('has at least 40 items', () => {
    expect(items.length).toBeGreaterThanOrEqual(40);
  });

  test('codes are unique, well-formed and carry their group prefix', () => {
    const codes = items.map((i) => i.code);
    expect(new Set(codes).size).toBe(codes.length);
    for (const item of items) {
      expect(item.code).toMatch(/^[A-Z]{2}-\d{2}$/);
      expect(item.code.slice(0, 2)).toBe(groupPrefix(item.group));
    }
  });

  test('group prefixes are unique', () => {
    const prefixes = CATALOGUE_GROUPS.map((g) => g.prefix);
    expect(new Set(prefixes).size).toBe(prefixes.length);
  });

  test('every group has at least two items', () => {
    for (const group of CATALOGUE_GROUPS) {
      const count = itemsInGroup(group.key).length;
      if (count < 2) throw new Error(`${group.key} has only ${count} items`);
    }
  });

  test('unit kinds are valid, non-empty and not repeated', () => {
    for (const item of items) {
      expect(item.unitKinds.length).toBeGreaterThan(0);
      expect(new Set(item.unitKinds).size).toBe(item.unitKinds.length);
      for (const kind of item.unitKinds) expect(UNIT_KIND_KEYS).toContain(kind);
    }
  });

  test('every unit kind has at least ten applicable items', () => {
    for (const kind of UNIT_KIND_KEYS) {
      const count = itemsForKind(kind).length;
      if (count < 10) throw new Error(`${kind} has only ${count} items`);
    }
  });

  test('severities and trades are valid; words are filled in', () => {
    for (const item of items) {
      expect(SEVERITIES).toContain(item.defaultSeverity);
      expect(TRADE_KEYS).toContain(item.trade);
      expect(item.title.trim().length).toBeGreaterThan(0);
      expect(item.title.length).toBeLessThanOrEqual(60);
      expect(item.description.trim().length).toBeGreaterThan(0);
      expect(item.fixGuidance.trim().length).toBeGreaterThan(0);
      expect(typeof item.needsCeilingAccess).toBe('boolean');
    }
  });

  test('titles are unique', () => {
    const titles = items.map((i) => i.title.toLowerCase());
    expect(new Set(titles).size).toBe(titles.length);
  });

  test('uses all three severities', () => {
    for (const s of SEVERITIES) expect(items.some((i) => i.defaultSeverity === s)).toBe(true);
  });

  test('at least twelve items carry a measured rule', () => {
    expect(rules.length).toBeGreaterThanOrEqual(12);
  });

  test('every measured rule is well-formed and names a known limit of the right quantity', () => {
    const bad = rules
      .map((i) => ({ code: i.code, problems: ruleProblems(i.measuredRule) }))
      .filter((r) => r.problems.length > 0);
    expect(bad).toEqual([]);
  });

  test('the rule checker itself rejects malformed rules', () => {
    expect(ruleProblems({ measure: 'x', quantity: 'length', comparison: 'at_most' })).not.toEqual([]);
    expect(
      ruleProblems({ measure: 'x', quantity: 'length', comparison: 'at_most', limit: { from: 'code', key: 'no.such.key' } }),
    ).not.toEqual([]);
    expect(
      ruleProblems({ measure: 'x', quantity: 'angle', comparison: 'at_most', limit: { from: 'model', key: 'max_pump_lift' } }),
    ).not.toEqual([]);
    expect(ruleProblems({ measure: 'x', quantity: 'boolean', comparison: 'yes_no' })).not.toEqual([]);
    expect(
      ruleProblems({ measure: 'x', quantity: 'length', comparison: 'at_least', limit: { from: 'code', key: 'nec.disconnect.max_distance' } }),
    ).not.toEqual([]);
    expect(
      ruleProblems({ measure: 'x', quantity: 'length', comparison: 'at_most', limit: { from: 'model', key: 'min_mount_height' } }),
    ).not.toEqual([]);
    expect(
      ruleProblems({ measure: 'x', quantity: 'length', comparison: 'between', limit: { from: 'model', key: 'min_mount_height' } }),
    ).not.toEqual([]);
    expect(ruleProblems({ measure: 'x', quantity: 'boolean', comparison: 'yes_no', expected: true })).toEqual([]);
  });

  test('items touching hazardous work carry a caution that defers to the manual, codes and licensed practice', () => {
    for (const item of items) {
      const needsCaution = HAZARDOUS_GROUPS.has(item.group) || item.needsCeilingAccess;
      if (needsCaution && !item.caution) throw new Error(`${item.code} needs a caution`);
      if (item.caution) {
        for (const phrase of GOVERNS_PHRASES) {
          if (!item.caution.includes(phrase)) throw new Error(`${item.code} caution lacks "${phrase}"`);
        }
      }
    }
  });

  test('kinds follow the checks: pump lift not on floor or wall units, top clearance on wall units only', () => {
    const byModelKey = (key: string) =>
      rules.filter((i) => i.measuredRule.limit?.from === 'model' && i.measuredRule.limit.key === key);
    const pump = byModelKey('max_pump_lift');
    expect(pump.length).toBeGreaterThan(0);
    for (const item of pump) {
      expect(item.unitKinds).not.toContain('floor_console');
      expect(item.unitKinds).not.toContain('wall_mounted');
    }
    const top = byModelKey('min_clearance_top');
    expect(top.length).toBeGreaterThan(0);
    for (const item of top) expect(item.unitKinds).toEqual(['wall_mounted']);
  });

  test('the catalogue cannot be changed at run time', () => {
    expect(Object.isFrozen(BUILTIN_CATALOGUE)).toBe(true);
    expect(Object.isFrozen(BUILTIN_CATALOGUE[0])).toBe(true);
  });

  test('items are in group order', () => {
    const order = CATALOGUE_GROUPS.map((g) => g.key as string);
    const positions = items.map((i) => order.indexOf(i.group));
    expect(positions).toEqual([...positions].sort((a, b) => a - b));
  });
});

describe('catalogue helpers', () => {
  test('findItem finds by code, forgiving case and spaces', () => {
    const first = items[0]!;
    expect(findItem(first.code)).toBe(first);
    expect(findItem(` ${first.code.toLowerCase()} `)).toBe(first);
    expect(findItem('ZZ-99')).toBeUndefined();
  });

  test('itemsForKind returns exactly the items listing the kind, in catalogue order', () => {
    const wall = itemsForKind('wall_mounted');
    expect(wall.every((i) => i.unitKinds.includes('wall_mounted'))).toBe(true);
    expect(wall.length).toBe(items.filter((i) => i.unitKinds.includes('wall_mounted')).length);
    expect(wall.map((i) => items.indexOf(i))).toEqual(
      [...wall.map((i) => items.indexOf(i))].sort((a, b) => a - b),
    );
  });

  test('helpers work on a job catalogue passed in', () => {
    const jobCatalogue = items.slice(0, 3);
    expect(findItem(items[5]!.code, jobCatalogue)).toBeUndefined();
    expect(itemsInGroup('labelling', jobCatalogue)).toEqual([]);
    expect(itemsForKind('cassette_4way', jobCatalogue).length).toBeLessThanOrEqual(3);
  });
});
