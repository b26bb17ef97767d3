/**
 * Duct external static pressure: typed in in. w.c. or Pa, stored in Pa, and checked against the
 * ducted model's rated range (CT-04, CT-05, CT-06).
 *
 * Source: 1 in. w.c. is the conventional inch of water, 0.0254 m × 1000 kg/m³ × 9.80665 m/s²
 * = 249.08891 Pa (NIST SP 811 (2008) Appendix B.8 lists "inch of water, conventional" as
 * 2.490889 E+02 Pa). Trimout names no water temperature for it; the inch of water at 60 °F is
 * about 0.1 % lower (248.84 Pa, from memory), below a gauge's resolution.
 */
import { BUILTIN_CATALOGUE } from '../../../shared/catalogue';
import { MODEL_LIMITS, QUANTITY_KINDS } from '../../../shared/catalogue/types';
import { evaluateItemRule } from '../../../shared/calc/itemRules';
import { convert, formatQuantity, parseQuantity, PASCALS_PER_INCH_WATER } from '../../../shared/calc/quantity';
import { makeLimitResolver } from '../../../shared/calc/rules';

it('pressure is a quantity kind, with the two rated limits of a ducted model', () => {
  expect(QUANTITY_KINDS).toContain('pressure');
  expect(MODEL_LIMITS.filter((m) => m.quantity === 'pressure').map((m) => m.key)).toEqual(['min_external_static', 'max_external_static']);
});

it('1 in. w.c. = 249.08891 Pa (conventional inch of water, NIST SP 811 B.8)', () => {
  expect(PASCALS_PER_INCH_WATER).toBeCloseTo(249.08891, 9);
  expect(convert(1, 'in. w.c.', 'Pa')).toBeCloseTo(249.08891, 9);
  expect(convert(0.1, 'kPa', 'Pa')).toBe(100);
});

it.each([
  // [typed, Pa]
  ['0.5 in. w.c.', 124.544455],
  ['1 in wc', 249.08891],
  ['0.8 in.w.c.', 199.271128],
  ['0.3"wc', 74.726673],
  ['0.6 iwc', 149.453346],
  ['125 Pa', 125],
  ['0.25 kPa', 250],
])('%s is %p Pa', (typed, pa) => {
  const r = parseQuantity(typed, 'pressure');
  expect(r.ok).toBe(true);
  if (r.ok) expect(r.value).toBeCloseTo(pa, 6);
});

it('a length is not a pressure, and a pressure is not a length', () => {
  expect(parseQuantity('0.5 in', 'pressure').ok).toBe(false);
  expect(parseQuantity('0.5 in. w.c.', 'length').ok).toBe(false);
});

it('formats as the trade writes it: in. w.c. to two decimals (trailing zeros dropped), whole pascals', () => {
  expect(formatQuantity(249.08891, 'pressure', 'imperial')).toBe('1 in. w.c.');
  expect(formatQuantity(124.544455, 'pressure', 'metric')).toBe('125 Pa');
});

describe('ducted units: measured static pressure within the model\'s rated range', () => {
  // Invented demo ranges (not any manufacturer's): low static 0.1 to 0.4 in. w.c., high static 0.2 to 0.8.
  const model = (min: number, max: number) =>
    makeLimitResolver({
      model: {
        name: 'Demo',
        limits: {
          min_external_static: { value: min, unit: 'in. w.c.', source: 'invented demo value' },
          max_external_static: { value: max, unit: 'in. w.c.', source: 'invented demo value' },
        },
      },
    });
  const rule = (code: string) => BUILTIN_CATALOGUE.find((i) => i.code === code)!.measuredRule!;

  it.each([
    ['CT-04', 0.1, 0.4, '0.4 in. w.c.', 'pass'], // at the upper limit: inclusive
    ['CT-04', 0.1, 0.4, '0.5 in. w.c.', 'fail'],
    ['CT-05', 0.2, 0.8, '0.5 in wc', 'pass'],
    ['CT-05', 0.2, 0.8, '0.1 in wc', 'fail'],
    ['CT-06', 0.4, 1.2, '250 Pa', 'pass'], // 250 Pa = 1.004 in. w.c.
  ] as const)('%s range %p to %p in. w.c.: %s → %s', (code, min, max, typed, status) => {
    const parsed = parseQuantity(typed, 'pressure');
    if (!parsed.ok) throw new Error(parsed.error);
    const r = evaluateItemRule(rule(code), parsed.value, model(min, max), { system: 'imperial' });
    expect(r.status).toBe(status);
    expect(r.limitSource).toBe('Model Demo invented demo value');
  });

  it('CT-04, CT-05 and CT-06 are measured pressure ranges, one per ducted kind', () => {
    for (const [code, kind] of [['CT-04', 'ducted_low'], ['CT-05', 'ducted_high'], ['CT-06', 'ducted_very_high']] as const) {
      const item = BUILTIN_CATALOGUE.find((i) => i.code === code)!;
      expect(item.unitKinds).toEqual([kind]);
      expect(item.measuredRule).toMatchObject({ quantity: 'pressure', comparison: 'between', limit: { from: 'model', key: 'min_external_static' }, upper: { from: 'model', key: 'max_external_static' } });
    }
  });

  it('without the model\'s range the limit is not set (never a pass)', () => {
    const r = evaluateItemRule(rule('CT-04'), 100, makeLimitResolver({}), {});
    expect(r).toMatchObject({ status: 'limit_not_set', pass: null });
  });
});
