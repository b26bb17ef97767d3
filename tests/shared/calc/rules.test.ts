/**
 * The measured-rule engine. Model limits below are invented round figures for an invented
 * model (VX-24, DX-48): they stand for what a GC manager enters from a model's installation
 * manual, and none is a real product's rating or a trade rule.
 */
import fc from 'fast-check';
import type { MeasuredRule, ModelLimitKey, QuantityKind, ResolvedLimit, StatedLimit } from '../../../shared/catalogue/types';
import { combineChecks, evaluateRule, makeLimitResolver } from '../../../shared/calc/rules';
import type { LimitResolver, NamedResult } from '../../../shared/calc/rules';
import { parseQuantity } from '../../../shared/calc/quantity';

function q(text: string, kind: QuantityKind): number {
  const r = parseQuantity(text, kind);
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

// Source of every value: invented example model VX-24's invented manual (not a real product).
const modelLimits: Partial<Record<ModelLimitKey, StatedLimit>> = {
  max_pump_lift: { value: 30, unit: 'in', source: 'installation manual, p. 12' }, // invented: 30 in
  max_drain_horizontal_run: { value: 10, unit: 'in', source: 'installation manual, p. 14' }, // invented: 10 in
  min_clearance_top: { value: 6, unit: 'in' }, // invented: 6 in
  min_mount_height: { value: 8, unit: 'ft' }, // invented: 8 ft
  min_distance_to_wall: { value: 1200, unit: 'mm' }, // invented: 1200 mm
  min_clearance_side: { value: 2, unit: 'ft' }, // invented: 2 ft
  max_valve_kit_pipe_length: { value: 6, unit: 'ft' }, // invented: 6 ft
  max_sensor_angle: { value: 30, unit: 'deg' }, // invented: 30°
};
// Invented example model DX-48 (not a real product): pump lift 24 in.
const ducted: Partial<Record<ModelLimitKey, StatedLimit>> = {
  max_pump_lift: { value: 24, unit: 'in' },
};

const resolver = makeLimitResolver({ model: { name: 'VX-24', limits: modelLimits } });

function rule(measure: string, quantity: QuantityKind, comparison: MeasuredRule['comparison'], key: ModelLimitKey): MeasuredRule {
  return { measure, quantity, comparison, limit: { from: 'model', key } };
}

describe('model limits from an installation manual (invented example model VX-24, not a real product)', () => {
  it.each([
    // [measure, kind, comparison, key, measured text, status, margin text or null]
    ['Pump lift', 'length', 'at_most', 'max_pump_lift', '30"', 'pass', 0], // VX-24 invented 30 in
    ['Pump lift', 'length', 'at_most', 'max_pump_lift', '29-1/2"', 'pass', 12.7],
    ['Pump lift', 'length', 'at_most', 'max_pump_lift', '30-1/16"', 'fail', -1.5875],
    ['Horizontal drain run', 'length', 'at_most', 'max_drain_horizontal_run', '10"', 'pass', 0], // VX-24 invented 10 in
    ['Horizontal drain run', 'length', 'at_most', 'max_drain_horizontal_run', '1\' 0"', 'fail', -50.8],
    ['Clearance above', 'length', 'at_least', 'min_clearance_top', '6"', 'pass', 0], // VX-24 invented 6 in
    ['Clearance above', 'length', 'at_least', 'min_clearance_top', '5-7/8"', 'fail', -3.175],
    ['Mounting height', 'length', 'at_least', 'min_mount_height', "8' 0\"", 'pass', 0], // VX-24 invented 8 ft
    ['Mounting height', 'length', 'at_least', 'min_mount_height', "7' 11\"", 'fail', -25.4],
    ['Cassette to wall', 'length', 'at_least', 'min_distance_to_wall', '1200 mm', 'pass', 0], // VX-24 invented 1200 mm
    ['Cassette to wall', 'length', 'at_least', 'min_distance_to_wall', "4' 0\"", 'pass', 19.2],
    ['Cassette to wall', 'length', 'at_least', 'min_distance_to_wall', '1.15 m', 'fail', -50],
    ['Service side clearance', 'length', 'at_least', 'min_clearance_side', "2' 0\"", 'pass', 0], // VX-24 invented 2 ft
    ['Valve kit to coil pipe', 'length', 'at_most', 'max_valve_kit_pipe_length', "6' 0\"", 'pass', 0], // VX-24 invented 6 ft
    ['Valve kit to coil pipe', 'length', 'at_most', 'max_valve_kit_pipe_length', '1830 mm', 'fail', -1.2],
    ['Coil sensor angle', 'angle', 'at_most', 'max_sensor_angle', '30°', 'pass', 0], // VX-24 invented 30°
    ['Coil sensor angle', 'angle', 'at_most', 'max_sensor_angle', '31°', 'fail', -1],
  ] as const)('%s %s %s (%s): %s → %s, margin %p', (measure, kind, comparison, key, text, status, margin) => {
    const r = evaluateRule(rule(measure, kind, comparison, key), q(text, kind), resolver);
    expect(r.status).toBe(status);
    expect(r.pass).toBe(status === 'pass');
    expect(r.margin).toBeCloseTo(margin, 9);
    expect(r.limitSource).toMatch(/^Model VX-24 /);
  });

  it('names the manual page when entered', () => {
    const r = evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), q('31"', 'length'), resolver);
    expect(r.limitSource).toBe('Model VX-24 installation manual, p. 12');
    expect(r.message).toBe(`Pump lift: 2' 7" is 1" over the maximum 2' 6" (Model VX-24 installation manual, p. 12).`);
  });

  it('a value exactly at the limit passes and says limits are inclusive', () => {
    const r = evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), q('30"', 'length'), resolver);
    expect(r.pass).toBe(true);
    expect(r.margin).toBe(0);
    expect(r.message).toMatch(/exactly at the maximum.*inclusive/);
  });

  it('a ducted model with 24 in lift passes 24 in and fails 24-1/16 in (invented example model DX-48)', () => {
    const d = makeLimitResolver({ model: { name: 'DX-48', limits: ducted } });
    const rl = rule('Pump lift', 'length', 'at_most', 'max_pump_lift');
    expect(evaluateRule(rl, q('24"', 'length'), d).pass).toBe(true);
    expect(evaluateRule(rl, q('24-1/16"', 'length'), d).pass).toBe(false);
  });

  it('metric messages for a metric job', () => {
    const r = evaluateRule(rule('Cassette to wall', 'length', 'at_least', 'min_distance_to_wall'), q('1.15 m', 'length'), resolver, { system: 'metric' });
    expect(r.message).toBe('Cassette to wall: 1150 mm is 50 mm below the minimum 1200 mm (Model VX-24 installation manual).');
  });
});

describe('limit not set is never a pass', () => {
  it('model without the limit', () => {
    const r = evaluateRule(rule('Clearance below', 'length', 'at_least', 'min_clearance_below'), q('10"', 'length'), resolver);
    expect(r.status).toBe('limit_not_set');
    expect(r.pass).toBeNull();
    expect(r.message).toMatch(/limit not set.*Minimum clearance below the unit/);
  });

  it('no model at all', () => {
    const r = evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), q('10"', 'length'), makeLimitResolver({}));
    expect(r.status).toBe('limit_not_set');
  });

  it('rule without a limit reference', () => {
    const r = evaluateRule({ measure: 'X', quantity: 'length', comparison: 'at_least' }, 1, resolver);
    expect(r.status).toBe('limit_not_set');
    expect(r.message).toMatch(/names no limit/);
  });

  it('code limit in an edition Trimout does not hold', () => {
    const r = evaluateRule(
      { measure: 'Drain slope', quantity: 'slope', comparison: 'at_least', limit: { from: 'code', key: 'imc.condensate.min_slope' } },
      0.02,
      makeLimitResolver({ editions: { IMC: '2009' } }),
    );
    expect(r.status).toBe('limit_not_set');
    expect(r.message).toMatch(/IMC 2009/);
  });

  it('model limit entered in a unit of the wrong kind', () => {
    const bad = makeLimitResolver({ model: { name: 'VX-24', limits: { max_pump_lift: { value: 30, unit: 'lb' } } } });
    const r = evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), 100, bad);
    expect(r.status).toBe('limit_not_set');
    expect(r.message).toMatch(/stated in lb \(mass\), but length is needed/);
  });

  it('equal_within without a tolerance', () => {
    const r = evaluateRule({ ...rule('Level', 'length', 'equal_within', 'max_level_deviation') }, 1, () => ({ value: 0, quantity: 'length', source: 'S' }));
    expect(r.status).toBe('limit_not_set');
  });

  it('between without an upper bound', () => {
    const r = evaluateRule({ ...rule('H', 'length', 'between', 'min_mount_height') }, 3000, resolver);
    expect(r.status).toBe('limit_not_set');
    expect(r.message).toMatch(/no upper bound/);
  });
});

describe('code and job limits', () => {
  it('code limit cites document, edition and section', () => {
    const r = evaluateRule(
      { measure: 'Drain slope', quantity: 'slope', comparison: 'at_least', limit: { from: 'code', key: 'imc.condensate.min_slope' } },
      q('1/4 in/ft', 'slope'),
      makeLimitResolver({ editions: { IMC: '2015' } }),
    );
    expect(r.pass).toBe(true);
    expect(r.limitSource).toBe('IMC 2015 Section 307.2.2');
    expect(r.margin).toBeCloseTo(1 / 96, 9);
  });

  it('job setting names itself as the source', () => {
    const r = evaluateRule(
      { measure: 'Drain slope', quantity: 'slope', comparison: 'at_least', limit: { from: 'job', key: 'min_drain_slope' } },
      0.01,
      makeLimitResolver({ job: { min_drain_slope: { value: 1, unit: '%', source: 'AHJ letter 2026-03' } } }),
    );
    expect(r.pass).toBe(true);
    expect(r.limitSource).toBe('Job setting: Minimum condensate drain slope (AHJ letter 2026-03)');
  });
});

// Synthetic limits below (100 to 200 mm, 1 ± 0.1 mm): engine arithmetic only, no external source.
describe('between, equal_within, yes_no', () => {
  const fixed = (lo: number, hi: number): LimitResolver => (ref) =>
    ref.from === 'model' && ref.key === 'min_clearance_below'
      ? { value: lo, quantity: 'length', source: 'Lower S' }
      : { value: hi, quantity: 'length', source: 'Upper S' };
  const between: MeasuredRule = {
    measure: 'Height',
    quantity: 'length',
    comparison: 'between',
    limit: { from: 'model', key: 'min_clearance_below' },
    upper: { from: 'model', key: 'min_mount_height' },
  };

  it.each([
    [100, 'pass', 0],
    [150, 'pass', 50],
    [200, 'pass', 0],
    [99, 'fail', -1],
    [201, 'fail', -1],
  ])('between 100 and 200 mm inclusive: %p → %s (margin %p)', (m, status, margin) => {
    const r = evaluateRule(between, m, fixed(100, 200), { system: 'metric' });
    expect(r.status).toBe(status);
    expect(r.margin).toBe(margin);
    expect(r.limitSource).toBe('lower: Lower S; upper: Upper S');
  });

  it('between with crossed bounds is invalid', () => {
    expect(evaluateRule(between, 150, fixed(200, 100)).status).toBe('invalid');
  });

  const within: MeasuredRule = { measure: 'Drain support span', quantity: 'length', comparison: 'equal_within', limit: { from: 'job', key: 'max_drain_support_spacing' }, tolerance: 0.1 };
  const target: LimitResolver = () => ({ value: 1, quantity: 'length', source: 'T' });
  it.each([
    [1.1, 'pass'], // |1.1 − 1| = 0.10000000000000009 in binary; the 1e-9 resolution treats it as 0.1
    [0.9, 'pass'],
    [1, 'pass'],
    [1.2, 'fail'],
  ])('equal_within ±0.1 of 1: %p → %s', (m, status) => {
    expect(evaluateRule(within, m, target).status).toBe(status);
  });

  it('negative tolerance is invalid', () => {
    expect(evaluateRule({ ...within, tolerance: -1 }, 1, target).status).toBe('invalid');
  });

  const yn: MeasuredRule = { measure: 'Trap or check valve fitted', quantity: 'boolean', comparison: 'yes_no', expected: true };
  it.each([
    [true, 'pass', true],
    [false, 'fail', false],
    [null, 'not_measured', null],
  ] as const)('yes_no expecting yes: %p → %s', (answer, status, pass) => {
    const r = evaluateRule(yn, answer, () => undefined, { source: 'IMC 2018 Section 307.2.4.1' });
    expect(r.status).toBe(status);
    expect(r.pass).toBe(pass);
    expect(r.margin).toBeNull();
  });

  it('yes_no without an expected answer is limit not set', () => {
    expect(evaluateRule({ ...yn, expected: undefined }, true, () => undefined).status).toBe('limit_not_set');
  });

  it('wrong kinds of input are invalid, not pass', () => {
    expect(evaluateRule(yn, 1, () => undefined).status).toBe('invalid');
    expect(evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), true, resolver).status).toBe('invalid');
    expect(evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), Number.NaN, resolver).status).toBe('invalid');
    const angleLimit: LimitResolver = () => ({ value: 30, quantity: 'angle', source: 'S' });
    expect(evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), 1, angleLimit).status).toBe('invalid');
  });

  it('not measured yet', () => {
    const r = evaluateRule(rule('Pump lift', 'length', 'at_most', 'max_pump_lift'), null, resolver);
    expect(r.status).toBe('not_measured');
    expect(r.limit).toBe(762);
  });
});

describe('inclusiveness as a property (fast-check)', () => {
  const limitArb = fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true });
  const kinds: QuantityKind[] = ['length', 'slope', 'area', 'volume', 'mass', 'capacity', 'angle'];

  it('a value exactly at the limit passes with margin 0 for at_least, at_most, between and equal_within', () => {
    fc.assert(
      fc.property(limitArb, fc.constantFrom(...kinds), (L, kind) => {
        const res: LimitResolver = (): ResolvedLimit => ({ value: L, quantity: kind, source: 'S' });
        const ref = { from: 'model' as const, key: 'max_pump_lift' as const };
        const rules: MeasuredRule[] = [
          { measure: 'm', quantity: kind, comparison: 'at_least', limit: ref },
          { measure: 'm', quantity: kind, comparison: 'at_most', limit: ref },
          { measure: 'm', quantity: kind, comparison: 'between', limit: ref, upper: ref },
          { measure: 'm', quantity: kind, comparison: 'equal_within', limit: ref, tolerance: 0 },
        ];
        return rules.every((rl) => {
          const r = evaluateRule(rl, L, res);
          return r.pass === true && r.margin === 0;
        });
      }),
    );
  });

  it('a value clearly outside the limit fails, and the margin sign says which side', () => {
    fc.assert(
      fc.property(limitArb, fc.double({ min: 1e-6, max: 1e3, noNaN: true }), (L, d) => {
        const res: LimitResolver = () => ({ value: L, quantity: 'length', source: 'S' });
        const ref = { from: 'model' as const, key: 'max_pump_lift' as const };
        const atLeast = evaluateRule({ measure: 'm', quantity: 'length', comparison: 'at_least', limit: ref }, L - d, res);
        const atMost = evaluateRule({ measure: 'm', quantity: 'length', comparison: 'at_most', limit: ref }, L + d, res);
        const inside = evaluateRule({ measure: 'm', quantity: 'length', comparison: 'at_least', limit: ref }, L + d, res);
        return (
          atLeast.pass === false && (atLeast.margin ?? 0) < 0 &&
          atMost.pass === false && (atMost.margin ?? 0) < 0 &&
          inside.pass === true && (inside.margin ?? 0) > 0
        );
      }),
    );
  });
});

describe('combineChecks', () => {
  const named = (status: NamedResult['status']): NamedResult => ({
    key: status,
    label: status,
    status,
    pass: status === 'pass' ? true : status === 'fail' ? false : null,
    margin: null,
    limit: null,
    upper: null,
    tolerance: null,
    expected: null,
    measured: null,
    limitSource: '',
    message: status,
  });
  it.each([
    [['pass', 'pass'], 'pass', true],
    [['pass', 'fail'], 'fail', false],
    [['pass', 'limit_not_set'], 'limit_not_set', null],
    [['not_measured', 'limit_not_set'], 'limit_not_set', null],
    [['fail', 'invalid'], 'fail', false],
  ] as const)('%p → %s', (statuses, status, pass) => {
    const c = combineChecks(statuses.map(named));
    expect(c.status).toBe(status);
    expect(c.pass).toBe(pass);
  });
});
