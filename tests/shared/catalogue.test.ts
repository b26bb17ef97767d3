import {
  BUILTIN_CATALOGUE,
  CATALOGUE_GROUPS,
  COMPARISONS,
  JOB_SETTINGS,
  MODEL_LIMITS,
  QUANTITY_KINDS,
  findItem,
  groupPrefix,
  HAZARDOUS_GROUPS,
  itemsForKind,
  needsCaution,
  itemsInGroup,
  type CatalogueItem,
  type LimitRef,
  type MeasuredRule,
  type QuantityKind,
} from '../../shared/catalogue';
import { CODE_LIMITS } from '../../shared/calc/limits';
import { CODE_CHECK_RULES } from '../../shared/catalogue/types';
import { evaluateItemRule } from '../../shared/calc/itemRules';
import { evaluateRule, makeLimitResolver } from '../../shared/calc/rules';
import { SEVERITIES, TRADE_KEYS, UNIT_KIND_KEYS } from '../../shared/words';

/**
 * Code limits are owned by shared/calc/limits.ts (document, edition, section, value, and how the
 * limit is applied). A measured rule naming a code key must name one CODE_LIMITS holds, measure
 * the same quantity, and compare the same way.
 */

const GOVERNS_PHRASES = ["manufacturer's installation manual", 'local codes', 'licensed practice'];

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

  // A code calculation supplies its own limit; the rule must have the shape the calculation decides.
  const decided = rule.codeCheck ? CODE_CHECK_RULES[rule.codeCheck] : undefined;
  if (rule.codeCheck && !decided) problems.push(`unknown code check ${rule.codeCheck}`);
  if (decided && (decided.comparison !== rule.comparison || decided.quantity !== rule.quantity)) problems.push(`${rule.codeCheck} decides another shape`);
  const checkRef = (name: string, ref: LimitRef | undefined) => {
    if (!ref && decided && name === 'limit') return;
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
      if (needsCaution(item) && !item.caution) throw new Error(`${item.code} needs a caution`);
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

  test('every group but labelling is hazardous; a labelling fix above the ceiling needs a caution too', () => {
    expect([...HAZARDOUS_GROUPS].sort()).toEqual(CATALOGUE_GROUPS.map((g) => g.key).filter((g) => g !== 'labelling').sort());
    expect(needsCaution({ group: 'labelling', needsCeilingAccess: false })).toBe(false);
    expect(needsCaution({ group: 'labelling', needsCeilingAccess: true })).toBe(true);
    expect(needsCaution({ group: 'penetrations', needsCeilingAccess: false })).toBe(true);
  });

  test.each([
    ['drilling an outside wall near live lines', /live cables, gas and water lines/, ['PN-01', 'PN-03']],
    ['relocating a unit: refrigerant, brazing, pressure, electrical, lifting', /Refrigerant work.*Hot work.*Pressure testing.*Electrical work.*Lifting/, ['MT-07', 'CL-01', 'CL-02', 'CL-03']],
    ['flammable (A2L) refrigerant: ignition sources, suitable tools, leak check', /A2L.*ignition sources.*rated for A2L refrigerants.*leak-check/, ['RP-01', 'RP-03', 'RP-10']],
    ['nitrogen in enclosed spaces', /Nitrogen displaces oxygen/, ['RP-01', 'RP-07', 'RP-10']],
    ['attic work', /Attic work/, ['CL-06', 'DR-10', 'MT-10']],
    ['rotating fans', /Rotating fans/, ['PG-03', 'CL-08', 'CT-04']],
  ])('the caution for %s is on the items it concerns', (_what, text, codes) => {
    for (const code of codes) {
      const item = findItem(code);
      if (!item?.caution || !text.test(item.caution)) throw new Error(`${code} lacks the caution ${String(text)}`);
    }
  });

  test('every refrigerant caution carries the flammable (A2L) refrigerant text', () => {
    for (const item of items) {
      if (item.caution?.includes('Refrigerant work') && !item.caution.includes('A2L')) throw new Error(`${item.code} lacks the A2L text`);
    }
  });

  test('no two unit kinds share an identical list of checks', () => {
    const lists = UNIT_KIND_KEYS.map((kind) => ({ kind, codes: itemsForKind(kind).map((i) => i.code).join(' ') }));
    const seen = new Map<string, string>();
    for (const { kind, codes } of lists) {
      const twin = seen.get(codes);
      if (twin) throw new Error(`${kind} has the same checks as ${twin}`);
      seen.set(codes, kind);
    }
  });

  /** Codes only that kind has: what sets it apart from every other kind. */
  const ownCodes = (kind: (typeof UNIT_KIND_KEYS)[number]) =>
    itemsForKind(kind)
      .filter((i) => i.unitKinds.length === 1)
      .map((i) => i.code);

  test.each([
    ['cassette_compact', ['PG-09']],
    ['wall_mounted', ['MT-07', 'MT-08', 'CL-01']],
    ['floor_console', ['CL-07']],
    ['ducted_low', ['CT-04']],
    ['ducted_high', ['CT-05']],
    ['ducted_very_high', ['CT-06']],
    ['ahu_coil_kit', ['MT-09', 'SN-02', 'SN-04', 'RP-08', 'RP-09', 'RP-10', 'RP-11', 'CT-07', 'CT-08']],
  ] as const)('%s has checks of its own: %j', (kind, codes) => {
    expect(ownCodes(kind)).toEqual(codes);
  });

  test('the three ducted kinds differ exactly in their static pressure check', () => {
    const codes = (kind: 'ducted_low' | 'ducted_high' | 'ducted_very_high') => itemsForKind(kind).map((i) => i.code);
    const shared = codes('ducted_low').filter((c) => c !== 'CT-04');
    expect(codes('ducted_high').filter((c) => c !== 'CT-05')).toEqual(shared);
    expect(codes('ducted_very_high').filter((c) => c !== 'CT-06')).toEqual(shared);
    expect(findItem('CT-04')!.title).toMatch(/low static/);
    expect(findItem('CT-06')!.title).toMatch(/very high static/);
  });

  test('cassettes: body height and ceiling opening measured per model; four-way outlets; the compact fits a grid cell', () => {
    for (const kind of ['cassette_4way', 'cassette_2way', 'cassette_compact'] as const) {
      const codes = itemsForKind(kind).map((i) => i.code);
      expect(codes).toEqual(expect.arrayContaining(['PG-04', 'PG-05', 'PG-06', 'PG-07', 'DR-13']));
    }
    expect(findItem('PG-04')!.measuredRule).toMatchObject({ comparison: 'between', limit: { from: 'model', key: 'min_body_to_ceiling' }, upper: { from: 'model', key: 'max_body_to_ceiling' } });
    expect(findItem('PG-06')!.measuredRule).toMatchObject({ comparison: 'between', limit: { from: 'model', key: 'min_ceiling_opening' } });
    expect(findItem('PG-08')!.unitKinds).toEqual(['cassette_4way', 'cassette_compact']);
  });

  test('coil kit: coil internal volume within the kit range, a volume measured against the model', () => {
    expect(findItem('RP-09')!.measuredRule).toMatchObject({ quantity: 'volume', comparison: 'between', limit: { from: 'model', key: 'min_coil_internal_volume' }, upper: { from: 'model', key: 'max_coil_internal_volume' } });
  });

  test('wall unit: the pipe hole falls to the outside by at least the model slope', () => {
    expect(findItem('PN-01')!.measuredRule).toMatchObject({ quantity: 'slope', comparison: 'at_least', limit: { from: 'model', key: 'min_pipe_hole_slope' } });
    expect(findItem('PN-01')!.unitKinds).toContain('wall_mounted');
  });

  test('hanging-rod checks only on kinds that hang: not the coil kit, not the floor console', () => {
    for (const code of ['MT-01', 'MT-02', 'MT-03', 'MT-04', 'MT-05']) {
      const kinds = findItem(code)!.unitKinds;
      expect(kinds).not.toContain('ahu_coil_kit');
      expect(kinds).not.toContain('floor_console');
      expect(kinds).not.toContain('wall_mounted');
    }
  });

  test('a minimum mounting height applies to no floor-standing unit', () => {
    const mount = rules.filter((i) => i.measuredRule.limit?.key === 'min_mount_height');
    expect(mount.map((i) => i.code)).toEqual(['MT-07']);
    for (const item of mount) {
      expect(item.unitKinds).not.toContain('floor_console');
      expect(item.unitKinds).not.toContain('floor_ceiling');
    }
  });

  test('every model limit key is used by a measured rule (no unused keys)', () => {
    const used = new Set(rules.flatMap((i) => [i.measuredRule.limit, i.measuredRule.upper]).filter((r) => r?.from === 'model').map((r) => r!.key));
    expect(MODEL_LIMITS.map((m) => m.key).filter((k) => !used.has(k))).toEqual([]);
  });

  describe('drain traps on ductless units', () => {
    const ductless = ['cassette_4way', 'cassette_2way', 'cassette_compact', 'wall_mounted', 'floor_console', 'floor_ceiling'] as const;
    const codeItem = findItem('DR-12')!;

    test('every ductless kind records what the code asks: a check valve or a trap', () => {
      expect([...codeItem.unitKinds].sort()).toEqual([...ductless].sort());
      expect(codeItem.measuredRule).toMatchObject({ comparison: 'yes_no', expected: true, codeCheck: 'ductless_check_valve_or_trap' });
    });

    test('the rule is decided by the IMC 307.2.4.1 calculation, with the job edition as its source', () => {
      const rule = codeItem.measuredRule!;
      // IMC 2018 Section 307.2.4.1: ductless mini-split drains have a check valve or a trap.
      const yes = evaluateItemRule(rule, true, () => undefined);
      expect(yes).toMatchObject({ status: 'pass', limitSource: 'IMC 2018 Section 307.2.4.1' });
      const no = evaluateItemRule(rule, false, () => undefined, { editions: { IMC: '2021' } });
      expect(no).toMatchObject({ status: 'fail', pass: false, limitSource: 'IMC 2021 Section 307.2.4.1' });
      expect(evaluateItemRule(rule, null, () => undefined).status).toBe('not_measured');
      // The phone and the server pass the unit's resolver: its job's editions name the section.
      const job2021 = evaluateItemRule(rule, true, makeLimitResolver({ editions: { IMC: '2021' } }));
      expect(job2021).toMatchObject({ status: 'pass', limitSource: 'IMC 2021 Section 307.2.4.1' });
      // The same rule without the code check names only the source it was given.
      const plain = evaluateItemRule({ ...rule, codeCheck: undefined }, true, () => undefined, { source: 'DR-12' });
      expect(plain.limitSource).toBe('DR-12');
      // The plain engine knows no code calculation (so the calculations can use it without a cycle).
      expect(evaluateRule(rule, true, () => undefined, { source: 'DR-12' }).limitSource).toBe('DR-12');
    });

    test('"trap where the manual says none" stays a separate practice item that defers to the manual', () => {
      const practice = findItem('DR-07')!;
      expect([...practice.unitKinds].sort()).toEqual([...ductless].sort());
      expect(practice.measuredRule).toBeUndefined();
      expect(practice.description).toMatch(/manual/);
      expect(practice.description).toMatch(/not a code rule/);
      expect(practice.title).toBe('Trap where the manual says none');
    });

    test('no item calls a trap a defect on a ductless unit except the practice item', () => {
      const trapDefects = items.filter((i) => /trap/i.test(i.title) && i.code !== 'DR-12' && i.code !== 'DR-07');
      for (const item of trapDefects) for (const kind of ductless) expect(item.unitKinds).not.toContain(kind);
    });
  });

  describe('disconnect (NFPA 70 440.14)', () => {
    test.each(['EL-01', 'EL-02', 'EL-09', 'EL-10'])('%s applies to every kind', (code) => {
      expect([...findItem(code)!.unitKinds].sort()).toEqual([...UNIT_KIND_KEYS].sort());
    });
    test('readily accessible, and not fastened to an access panel', () => {
      expect(findItem('EL-09')!.title).toMatch(/readily accessible/);
      expect(findItem('EL-09')!.measuredRule).toMatchObject({ comparison: 'yes_no', expected: true });
      expect(findItem('EL-10')!.title).toMatch(/access panel/);
      // Marked as memory until confirmed against the job's edition.
      for (const code of ['EL-09', 'EL-10']) expect(findItem(code)!.description).toMatch(/440\.14; from memory, confirm/);
    });
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
