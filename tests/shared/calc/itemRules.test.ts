/**
 * Every code calculation is reachable from a unit check: a built-in catalogue item whose measured
 * rule names it (MeasuredRule.codeCheck), parsed and evaluated the way the phone and the server
 * both do (parseItemMeasurement + evaluateItemRule).
 *
 * Sources beside each value:
 * - IMC 2018 Table 307.2.2 (condensate drain sizing): up to 20 tons 3/4 in; over 20 to 40 tons 1 in;
 *   over 40 to 90 tons 1-1/4 in; the table's own SI note: 1 ton = 3.517 kW (so 70.34 kW is 20 tons).
 * - IMC 2018 Section 306.1 (commercial working space, 30 in deep and wide; from memory, confirm) and
 *   IRC 2018 M1305.1 (residential, the same 30 in; from memory).
 * - IMC 2018 Section 306.3 (attic access opening, smaller side at least 20 in; from memory).
 * - IMC 2018 Section 307.2.3 item 1 (auxiliary pan at least 1-1/2 in deep and 3 in larger than the
 *   unit each way; from memory).
 * - IMC 2018 Table 305.4: copper tubing 1-1/4 in and smaller 6 ft, 1-1/2 in and larger 10 ft
 *   (issue text); PVC pipe 4 ft; CPVC 1 in and smaller 3 ft (from memory).
 * - Copper tube nominal size = OD − 1/8 in (ASTM B88 / B280 sizing): 1-5/8 in OD is 1-1/2 in nominal.
 */
import { BUILTIN_CATALOGUE } from '../../../shared/catalogue';
import type { EditionChoice, StatedLimit } from '../../../shared/catalogue/types';
import { evaluateItemRule, parseItemMeasurement } from '../../../shared/calc/itemRules';
import { makeLimitResolver } from '../../../shared/calc/rules';
import { WATTS_PER_TON } from '../../../shared/calc/quantity';

function item(code: string) {
  const found = BUILTIN_CATALOGUE.find((i) => i.code === code);
  if (!found?.measuredRule) throw new Error(`${code} has no measured rule`);
  return found as typeof found & { measuredRule: NonNullable<typeof found.measuredRule> };
}

function check(
  code: string,
  text: string,
  ctx: { capacity?: number | null; editions?: EditionChoice; job?: { max_drain_support_spacing?: StatedLimit } } = {},
) {
  const rule = item(code).measuredRule;
  const parsed = parseItemMeasurement(rule, text, { system: 'imperial' });
  if (!parsed.ok) throw new Error(parsed.error);
  const resolver = makeLimitResolver({ editions: ctx.editions ?? {}, job: ctx.job, unit: { capacity: ctx.capacity ?? null } });
  return evaluateItemRule(rule, parsed.value, resolver, { system: 'imperial', given: parsed.given });
}

describe('drain pipe size from the capacity it carries (IMC 2018 Table 307.2.2), DR-17', () => {
  it.each([
    // [measured text, unit capacity (W), status, source fragment]
    ['3/4"', 3 * WATTS_PER_TON, 'pass', 'up to 20 tons'], // a 3-ton unit: 3/4 in
    ['1/2"', 3 * WATTS_PER_TON, 'fail', 'up to 20 tons'],
    ['1 in for 24 tons', null, 'pass', 'over 20 to 40 tons'], // manifolded: 24 tons upstream needs 1 in
    ['3/4 in for 24 tons', null, 'fail', 'over 20 to 40 tons'],
    ['1-1/4 in for 41 tons', null, 'pass', 'over 40 to 90 tons'],
    // The table's own 3.517 kW per ton: 70.34 kW typed is exactly 20 tons, the "up to 20" row. With
    // the exact 3.5168528 kW it would be 20.0008 tons and need 1 in.
    ['3/4 in for 70.34 kW', null, 'pass', 'up to 20 tons'],
    ['3/4 in for 70.4 kW', null, 'fail', 'over 20 to 40 tons'],
    // Metric nominal sizes (DN, ISO 6708) stand for the inch sizes schedules pair them with (common
    // practice; from memory): DN20 is the 3/4 in row although 20 mm ≠ 19.05 mm, and DN15 is 1/2 in.
    ['20 mm', 3 * WATTS_PER_TON, 'pass', 'up to 20 tons'],
    ['19 mm', 3 * WATTS_PER_TON, 'pass', 'up to 20 tons'],
    ['15 mm', 3 * WATTS_PER_TON, 'fail', 'up to 20 tons'],
    ['25 mm for 24 tons', null, 'pass', 'over 20 to 40 tons'],
    ['18 mm', 3 * WATTS_PER_TON, 'fail', 'up to 20 tons'],
  ] as const)('%s (unit capacity %p W) → %s, %s', (text, capacity, status, row) => {
    const r = check('DR-17', text, { capacity });
    expect(r.status).toBe(status);
    expect(r.limitSource).toContain('IMC 2018 Table 307.2.2');
    expect(r.limitSource).toContain(row);
  });

  it('a capacity typed after "for" wins over the unit\'s own, and is shown as typed', () => {
    const r = check('DR-17', '3/4 in for 70.34 kW', { capacity: 100 * WATTS_PER_TON });
    expect(r.status).toBe('pass');
    expect(r.limitSource).toContain('70.34 kW as typed');
  });

  it('no capacity anywhere: the limit is not set, and the message says what to type', () => {
    const r = check('DR-17', '3/4"', { capacity: null });
    expect(r).toMatchObject({ status: 'limit_not_set', pass: null });
    expect(r.message).toMatch(/for 6 tons/);
  });

  it('the job\'s IMC edition names the table', () => {
    expect(check('DR-17', '1 in for 24 tons', { editions: { IMC: '2021' } }).limitSource).toContain('IMC 2021 Table 307.2.2');
  });

  it('what follows "for" must be a capacity', () => {
    const parsed = parseItemMeasurement(item('DR-17').measuredRule, '1 in for lots', { system: 'imperial' });
    expect(parsed.ok).toBe(false);
  });
});

describe('working space (IMC 306.1 commercial, IRC M1305.1 residential), CL-06 depth and CL-09 width', () => {
  it.each([
    // [code, text, editions, status, source]
    ['CL-09', '30"', {}, 'pass', 'IMC 2018 Section 306.1'], // 30 in wide: exactly the minimum passes
    ['CL-09', '29-1/2"', {}, 'fail', 'IMC 2018 Section 306.1'],
    ['CL-06', '2\' 6"', {}, 'pass', 'IMC 2018 Section 306.1'],
    ['CL-06', '28"', { IMC: '2018', IRC: '2018' }, 'fail', 'IMC 2018 Section 306.1'], // both chosen: commercial
    ['CL-06', '28"', { IRC: '2018' }, 'fail', 'IRC 2018 Section M1305.1'], // the IRC alone: residential work
    ['CL-09', '30"', { IRC: '2018' }, 'pass', 'IRC 2018 Section M1305.1'],
  ] as const)('%s %s with %j → %s (%s)', (code, text, editions, status, source) => {
    const r = check(code, text, { editions });
    expect(r.status).toBe(status);
    expect(r.limitSource).toBe(source);
  });
});

describe('attic access opening (IMC 2018 Section 306.3: smaller side at least 20 in), CL-10', () => {
  it.each([
    ['20"', 'pass'],
    ['22"', 'pass'],
    ['19-1/2"', 'fail'],
  ] as const)('%s → %s', (text, status) => {
    const r = check('CL-10', text);
    expect(r.status).toBe(status);
    expect(r.limitSource).toBe('IMC 2018 Section 306.3');
  });
});

describe('auxiliary drain pan (IMC 2018 Section 307.2.3 item 1), DR-18 depth and DR-19 size', () => {
  it.each([
    ['DR-18', '1-1/2"', 'pass'], // 1-1/2 in deep: exactly the minimum
    ['DR-18', '1-1/4"', 'fail'],
    ['DR-19', '3"', 'pass'], // 3 in larger than the unit
    ['DR-19', '2-1/2"', 'fail'],
  ] as const)('%s %s → %s', (code, text, status) => {
    const r = check(code, text);
    expect(r.status).toBe(status);
    expect(r.limitSource).toBe('IMC 2018 Section 307.2.3, item 1');
  });
});

describe('support spacing by size and material (IMC 2018 Table 305.4), RP-05 and DR-02', () => {
  it.each([
    // [code, text, status, limit in mm]
    ['RP-05', "6' 0\"", 'pass', 1828.8], // copper tubing up to 1-1/4 in: 6 ft
    ['RP-05', "8' 0\"", 'fail', 1828.8],
    ['RP-05', "8' 0\" for 1-5/8 in OD", 'pass', 3048], // 1-5/8 OD = 1-1/2 nominal: 10 ft
    ['RP-05', "8' 0\" for 1-3/8 OD", 'fail', 1828.8], // 1-3/8 OD = 1-1/4 nominal: 6 ft
    ['DR-02', "4' 0\"", 'pass', 1219.2], // no job spacing: PVC pipe 4 ft
    ['DR-02', "4' 6\"", 'fail', 1219.2],
    ['DR-02', "3' 6\" for 3/4 in CPVC", 'fail', 914.4], // CPVC 1 in and smaller: 3 ft
  ] as const)('%s %s → %s against %p mm', (code, text, status, limit) => {
    const r = check(code, text);
    expect(r.status).toBe(status);
    expect(r.limit).toBeCloseTo(limit, 6);
    expect(r.limitSource).toBe('IMC 2018 Table 305.4');
  });

  it('DR-02: the job\'s own spacing governs where the job has one', () => {
    const job = { max_drain_support_spacing: { value: 5, unit: 'ft', source: 'project specification 22 13 16' } };
    const r = check('DR-02', "4' 6\"", { job });
    expect(r.status).toBe('pass');
    expect(r.limitSource).toMatch(/^Job setting/);
  });

  it('RP-05 speaks of copper tubing, the row of Table 305.4 it reads', () => {
    expect(item('RP-05').measuredRule.measure).toMatch(/copper tubing/);
  });
});
