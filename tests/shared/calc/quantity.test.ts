/**
 * Parsing, exact conversion and formatting of field quantities.
 * Conversion factors: NIST SP 811 (2008) Appendix B.8/B.9 (1 in = 25.4 mm, 1 ft = 0.3048 m,
 * 1 lb = 0.45359237 kg, 1 Btu_IT = 1055.05585262 J), which restate the international yard and
 * pound agreement (1959). 1 ton of refrigeration = 12,000 Btu/h (IMC 2018 Table 307.2.2 footnote
 * prints "1 ton = 3.517 kW", the same value rounded).
 * Every conversion is cross-checked against mathjs units on generated values (fast-check).
 */
import fc from 'fast-check';
import * as math from 'mathjs';
import type { QuantityKind } from '../../../shared/catalogue/types';
import {
  CUBIC_METRES_PER_CUBIC_FOOT,
  convert,
  formatLength,
  formatQuantity,
  formatSlope,
  fromBase,
  parseQuantity,
  toBase,
  unitKind,
  unitsFor,
  WATTS_PER_TON,
} from '../../../shared/calc/quantity';
import { formatQuantity as formatFromFormatModule } from '../../../shared/calc/format';

function value(text: string, kind: QuantityKind, opts?: Parameters<typeof parseQuantity>[2]): number {
  const r = parseQuantity(text, kind, opts);
  if (!r.ok) throw new Error(`expected "${text}" to parse: ${r.error}`);
  return r.value;
}

function error(text: string, kind: QuantityKind, opts?: Parameters<typeof parseQuantity>[2]): string {
  const r = parseQuantity(text, kind, opts);
  if (r.ok) throw new Error(`expected "${text}" to be rejected, got ${r.value}`);
  return r.error;
}

describe('parseQuantity: what the trade types', () => {
  // 58-1/2 in × 25.4 mm/in (NIST SP 811 (2008) B.8) = 1485.9 mm, exactly the double 1485.9
  it.each([
    [`4' 10-1/2"`],
    [`4'10-1/2"`],
    [`4'-10 1/2"`], // architectural separator
    [`4' 10 1/2"`],
    ['4 ft 10.5 in'],
    ['4 ft 10-1/2 in'],
    ['4 feet 10.5 inches'],
    ['58.5"'],
    ['58 1/2 in'],
    ['58-1/2"'],
    ['58.5 in'],
    ['58.5 in.'], // abbreviation with a full stop
    ['4 ft. 10.5 in.'],
    ['4\u2019 10\u00bd\u201d'], // phone keyboards: curly apostrophe, ½, curly double quote
    ['4\u2032 10-1/2\u2033'], // prime and double prime
  ])('%s = exactly 1485.9 mm (NIST SP 811 (2008) B.8: 1 in = 25.4 mm)', (text) => {
    expect(value(text, 'length')).toBe(1485.9);
  });

  it.each([
    // [text, kind, base value, source]
    ['1486 mm', 'length', 1486, 'SI'],
    ['1.486 m', 'length', 1486, 'SI'],
    ['148.6 cm', 'length', 1486, 'SI'],
    ['3/8"', 'length', 9.525, 'NIST SP 811 (2008) B.8: 3/8 × 25.4'],
    ['50 ft', 'length', 15240, 'NIST SP 811 (2008) B.8: 1 ft = 0.3048 m'],
    ['38 lb', 'mass', 17.23651006, 'NIST SP 811 (2008) B.8: 1 lb = 0.45359237 kg'],
    ['38 lbs', 'mass', 17.23651006, 'same'],
    ['38 lbs.', 'mass', 17.23651006, 'same'],
    ['12 lb 6 oz', 'mass', 5.61320557875, 'NIST SP 811 (2008) B.8: 1 oz = 1/16 lb'],
    ['17.2 kg', 'mass', 17.2, 'SI'],
    ['500 g', 'mass', 0.5, 'SI'],
    ['3 tons', 'capacity', 10550.5585262, '36,000 Btu/h × 1055.05585262 J / 3600 s (NIST SP 811 (2008) B.8, Btu_IT)'],
    ['36000 Btu/h', 'capacity', 10550.5585262, 'same'],
    ['36,000 Btu/h', 'capacity', 10550.5585262, 'same, thousands separator'],
    ['36 MBH', 'capacity', 10550.5585262, '1 MBH = 1,000 Btu/h (common practice, no published source)'],
    ['36000 BTUH', 'capacity', 10550.5585262, 'same'],
    ['10.5 kW', 'capacity', 10500, 'SI'],
    ['2500 W', 'capacity', 2500, 'SI'],
    ['1/8 in/ft', 'slope', 1 / 96, 'IMC 2018 Section 307.2.2 wording: 1/8 unit vertical in 12 units horizontal'],
    ['1/8" per ft', 'slope', 1 / 96, 'same'],
    ['1/8 inch per foot', 'slope', 1 / 96, 'same'],
    ['1/4 in/ft', 'slope', 1 / 48, 'arithmetic'],
    ['1%', 'slope', 0.01, 'definition of percent'],
    ['1 %', 'slope', 0.01, 'same'],
    ['1:100', 'slope', 0.01, 'ratio rise:run'],
    ['10 mm/m', 'slope', 0.01, 'SI'],
    ['100 sq ft', 'area', 9.290304, 'NIST SP 811 (2008) B.8: 1 ft² = 0.09290304 m²'],
    ['100 ft²', 'area', 9.290304, 'same'],
    ['9.29 m2', 'area', 9.29, 'SI'],
    ['800 ft³', 'volume', 22.6534772736, 'NIST SP 811 (2008) B.8: 1 ft³ = 0.028316846592 m³'],
    ['800 cu ft', 'volume', 22.6534772736, 'same'],
    ['1 gal', 'volume', 0.003785411784, 'NIST SP 811 (2008) B.8: 1 US gal = 231 in³'],
    ['22.65 m³', 'volume', 22.65, 'SI'],
    ['30°', 'angle', 30, 'degree'],
    ['30 deg', 'angle', 30, 'degree'],
  ] as const)('%s (%s) = %p in base units — %s', (text, kind, expected, _source) => {
    expect(value(text, kind)).toBe(expected);
  });

  it.each([
    ['yes', 1],
    ['Y', 1],
    ['no', 0],
    ['N', 0],
  ])('boolean %s → %p', (text, v) => {
    expect(value(text, 'boolean')).toBe(v);
  });

  it('takes a bare number only when the field names a default unit', () => {
    expect(value('58.5', 'length', { defaultUnit: 'in' })).toBe(1485.9);
    expect(value('30', 'angle', { defaultUnit: 'deg' })).toBe(30);
  });

  it('allows one minus sign when asked (e.g. level deviation)', () => {
    expect(value('-1/4"', 'length', { allowNegative: true })).toBe(-6.35);
  });

  it('returns a display string in the typed unit system, or the one asked for', () => {
    const r = parseQuantity('1486 mm', 'length');
    expect(r.ok && r.display).toBe('1486 mm');
    const s = parseQuantity('1486 mm', 'length', { system: 'imperial' });
    expect(s.ok && s.display).toBe(`4' 10-1/2"`); // 1486 mm = 58.504 in → nearest 1/16 is 58-1/2
  });
});

describe('parseQuantity: rejections say why', () => {
  it.each([
    // [input, expected kind, what the message must say]
    [`4''`, 'length', /two apostrophes \(''\).*double quote/],
    [`4' 10''`, 'length', /two apostrophes/],
    ['--3', 'length', /more than one sign/],
    ['--3 in', 'length', /more than one sign/],
    ['+-3 in', 'length', /more than one sign/],
    ['1/0 in', 'length', /Zero denominator in 1\/0/],
    ['10-1/0"', 'length', /Zero denominator/],
    ['1:0', 'slope', /cannot divide by zero/],
    ['58', 'length', /bare number: a length needs a unit/],
    ['38', 'mass', /bare number: a mass needs a unit/],
    ['', 'length', /Enter a value/],
    ['   ', 'mass', /Enter a value/],
    ['58 furlongs', 'length', /Unknown unit "furlongs"/],
    ['58 inx', 'length', /Unknown unit "inx"/],
    ['38 lb', 'length', /is a mass \(lb\), but a length is expected/],
    ['1486 mm', 'mass', /is a length \(mm\), but a mass is expected/],
    ['1/8 in', 'slope', /is a length \(in\), but a slope is expected/],
    ['3 tons', 'mass', /is a capacity \(ton\), but a mass is expected/],
    ['1:100', 'length', /is a slope: a height difference stated that way needs the width it applies across/],
    ['4 ft 3 lb', 'length', /mixes a length \(ft\) and a mass \(lb\)/],
    ['5 ft 3 m', 'length', /only feet-and-inches or pounds-and-ounces/],
    [`10" 4'`, 'length', /out of order/],
    [`4.5' 3"`, 'length', /must be a whole number/],
    ['4 ft 10', 'length', /inches after the feet need a unit/],
    ['-3 in', 'length', /negative/],
    ['10-3/2"', 'length', /proper fraction/],
    ['1,5 m', 'length', /use a point for decimals/],
    ['1.2.3 in', 'length', /comma or point that cannot be read/],
    ['1.5/2 in', 'length', /fraction that cannot be read/],
    ['about 5 ft', 'length', /does not start with a number/],
    ['maybe', 'boolean', /answer yes or no/],
  ] as const)('%p as %s is rejected: %p', (text, kind, why) => {
    expect(error(text, kind)).toMatch(why);
  });
});

describe('exact conversions', () => {
  it('1 ton of refrigeration = 12,000 Btu/h = 3516.8528… W; 3.517 kW is the rounded figure (IMC 2018 Table 307.2.2 footnote)', () => {
    expect(WATTS_PER_TON).toBeCloseTo(3516.8528420667, 9); // 12000 × 1055.05585262 / 3600 (NIST SP 811 (2008) B.8)
    expect(Math.round(WATTS_PER_TON) / 1000).toBe(3.517);
    expect(convert(1, 'ton', 'Btu/h')).toBe(12000);
  });

  it('1 ft³ = 0.028316846592 m³ exactly (NIST SP 811 (2008) B.8)', () => {
    expect(CUBIC_METRES_PER_CUBIC_FOOT).toBe(0.028316846592);
  });

  it.each([
    ['in', 'mm', 1, 25.4, 'NIST SP 811 (2008) B.8'],
    ['ft', 'm', 1, 0.3048, 'NIST SP 811 (2008) B.8'],
    ['lb', 'kg', 1, 0.45359237, 'NIST SP 811 (2008) B.8'],
    ['ft³', 'm³', 1, 0.028316846592, 'NIST SP 811 (2008) B.8'],
    ['ft²', 'm²', 1, 0.09290304, 'NIST SP 811 (2008) B.8'],
    ['in/ft', '%', 0.125, 1.0416666666666667, 'arithmetic: 1/96 = 1.0417% (IMC 2018 307.2.2 labels it "1-percent")'],
  ] as const)('%s → %s: %p → %p (%s)', (from, to, v, expected, _source) => {
    expect(convert(v, from, to)).toBeCloseTo(expected, 12);
  });

  it('refuses to convert across kinds', () => {
    expect(() => convert(1, 'lb', 'mm')).toThrow(/Cannot convert lb \(mass\) to mm \(length\)/);
    expect(() => toBase(1, 'furlong')).toThrow(/Unknown unit/);
  });

  it('knows every unit it offers', () => {
    for (const k of ['length', 'slope', 'area', 'volume', 'mass', 'capacity', 'angle'] as const) {
      for (const u of unitsFor(k)) expect(unitKind(u)).toBe(k);
    }
  });
});

describe('conversions cross-checked against mathjs units (fast-check)', () => {
  // pairs: [our unit, mathjs unit, our base unit expressed in mathjs]
  const pairs: Array<[string, string, string]> = [
    ['in', 'inch', 'mm'],
    ['ft', 'ft', 'mm'],
    ['m', 'm', 'mm'],
    ['cm', 'cm', 'mm'],
    ['lb', 'lb', 'kg'],
    ['oz', 'oz', 'kg'],
    ['g', 'g', 'kg'],
    ['ft²', 'sqft', 'm^2'],
    ['in²', 'sqin', 'm^2'],
    ['ft³', 'cuft', 'm^3'],
    ['in³', 'cuin', 'm^3'],
    ['m³', 'm^3', 'm^3'],
    ['m²', 'm^2', 'm^2'],
    ['W', 'W', 'W'],
    ['gal', 'gal', 'm^3'],
    ['L', 'L', 'm^3'],
    ['Btu/h', 'BTU/h', 'W'],
    ['kW', 'kW', 'W'],
    ['°', 'deg', 'deg'],
  ];

  it.each(pairs)('toBase(%s) agrees with mathjs %s → %s to 1e-12 relative', (ours, theirs, baseUnit) => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1e6, noNaN: true, noDefaultInfinity: true }), (v) => {
        const expected = math.unit(v, theirs).toNumber(baseUnit);
        const got = toBase(v, ours);
        return Math.abs(got - expected) <= 1e-12 * Math.max(1, Math.abs(expected));
      }),
    );
  });

  it('tons agree with mathjs via 12,000 BTU/h (mathjs "ton" is a mass, not used)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1e4, noNaN: true, noDefaultInfinity: true }), (t) => {
        const expected = math.unit(t * 12000, 'BTU/h').toNumber('W');
        return Math.abs(toBase(t, 'ton') - expected) <= 1e-9 * Math.max(1, expected);
      }),
    );
  });

  it('MBH agrees with mathjs as 1,000 BTU/h (mathjs has no prefixed BTU)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1e4, noNaN: true, noDefaultInfinity: true }), (v) => {
        const expected = math.unit(v * 1000, 'BTU/h').toNumber('W');
        return Math.abs(toBase(v, 'MBH') - expected) <= 1e-12 * Math.max(1, expected);
      }),
    );
  });

  it('parsed feet-inches-sixteenths agree with mathjs', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 200 }), fc.integer({ min: 0, max: 11 }), fc.integer({ min: 0, max: 15 }), (ft, inch, s) => {
        const text = s === 0 ? `${ft}' ${inch}"` : `${ft}' ${inch}-${s}/16"`;
        const expected = math.unit(ft, 'ft').toNumber('mm') + math.unit(inch + s / 16, 'inch').toNumber('mm');
        return Math.abs(value(text, 'length') - expected) <= 1e-9;
      }),
    );
  });

  it('parsed slopes agree with mathjs (in/ft as inch/ft)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 64 }), (sixteenths) => {
        const expected = math.unit(sixteenths / 16, 'inch').toNumber('mm') / math.unit(1, 'ft').toNumber('mm');
        return Math.abs(value(`${sixteenths}/16 in/ft`, 'slope') - expected) <= 1e-15;
      }),
    );
  });

  it('conversions are monotonic', () => {
    const units = ['in', 'ft', 'mm', 'lb', 'kg', 'ton', 'Btu/h', 'ft³', 'm³', 'in/ft', '%'];
    fc.assert(
      fc.property(
        fc.constantFrom(...units),
        fc.double({ min: 0, max: 1e7, noNaN: true, noDefaultInfinity: true }),
        fc.double({ min: 0, max: 1e7, noNaN: true, noDefaultInfinity: true }),
        (u, a, b) => {
          const [lo, hi] = a <= b ? [a, b] : [b, a];
          return toBase(lo, u) <= toBase(hi, u) && fromBase(lo, u) <= fromBase(hi, u);
        },
      ),
    );
  });

  it('parsing is monotonic on the 1/16 in grid', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 100000 }), fc.integer({ min: 1, max: 1000 }), (n, d) => {
        return value(`${n}/16"`, 'length') < value(`${n + d}/16"`, 'length');
      }),
    );
  });
});

describe('formatting (feet-inches to 1/16 in; mm to 0.1 mm)', () => {
  it.each([
    [1485.9, `4' 10-1/2"`],
    [1485.91, `4' 10-1/2"`], // rounds to the nearest 1/16
    [9.525, '3/8"'],
    [0, '0"'],
    [304.8, `1' 0"`],
    [1524, `5' 0"`],
    [303.2125, '11-15/16"'],
    [304.5, `1' 0"`], // 11.988 in rounds up to 12 in and carries into feet
    [-6.35, '-1/4"'],
  ])('imperial length %p mm → %s', (mm, text) => {
    expect(formatLength(mm, 'imperial')).toBe(text);
  });

  it('inches-only style for short runs', () => {
    expect(formatLength(1485.9, 'imperial', { inchesOnly: true })).toBe('58-1/2"');
  });

  it.each([
    [1485.9, '1485.9 mm'],
    [1486, '1486 mm'],
    [9.525, '9.5 mm'],
  ])('metric length %p mm → %s', (mm, text) => {
    expect(formatLength(mm, 'metric')).toBe(text);
  });

  it.each([
    [1 / 96, 'imperial', '1/8 in/ft'],
    [1 / 48, 'imperial', '1/4 in/ft'],
    [0.01, 'imperial', '0.12 in/ft'],
    [1 / 96, 'metric', '1.04%'],
    [0.01, 'metric', '1%'],
  ] as const)('slope %p (%s) → %s', (ratio, sys, text) => {
    expect(formatSlope(ratio, sys)).toBe(text);
  });

  it.each([
    [10550.5585262, 'capacity', 'imperial', '36,000 Btu/h'],
    [10550.5585262, 'capacity', 'metric', '10.55 kW'],
    [17.23651006, 'mass', 'imperial', '38 lb'],
    [5.61320557875, 'mass', 'imperial', '12.38 lb'],
    [17.23651006, 'mass', 'metric', '17.24 kg'],
    [22.6534772736, 'volume', 'imperial', '800 ft³'],
    [22.6534772736, 'volume', 'metric', '22.65 m³'],
    [9.290304, 'area', 'imperial', '100 ft²'],
    [30, 'angle', 'metric', '30°'],
    [1, 'boolean', 'metric', 'Yes'],
  ] as const)('%p %s (%s) → %s', (v, kind, sys, text) => {
    expect(formatQuantity(v, kind, sys)).toBe(text);
    expect(formatFromFormatModule(v, kind, sys)).toBe(text);
  });

  it('parse(format(x)) round-trips every imperial length on the 1/16 in grid', () => {
    fc.assert(
      fc.property(fc.integer({ min: -200000, max: 200000 }), fc.boolean(), (n, inchesOnly) => {
        const x = value(`${n < 0 ? '-' : ''}${Math.abs(n)}/16"`, 'length', { allowNegative: true });
        const text = formatQuantity(x, 'length', 'imperial', { inchesOnly });
        return value(text, 'length', { allowNegative: true }) === x;
      }),
    );
  });

  it('parse(format(x)) round-trips every metric length on the 0.1 mm grid', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 10_000_000 }), (k) => {
        const x = k / 10;
        return value(formatLength(x, 'metric'), 'length') === x;
      }),
    );
  });

  it('parse(format(x)) round-trips imperial slopes on the 1/16 in/ft grid', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 192 }), (n) => {
        const x = value(`${n}/16 in/ft`, 'slope');
        return value(formatSlope(x, 'imperial'), 'slope') === x;
      }),
    );
  });
});

describe('a height difference stated as a tilt across a width (level tolerances)', () => {
  // Reference: mathjs with 64-digit BigNumber arithmetic (tan of the angle in degrees, the
  // width converted by mathjs units), an implementation outside the project.
  const big = math.create(math.all, { number: 'BigNumber', precision: 64 });
  const mm = (width: string) => big.bignumber(math.unit(width).toNumber('mm'));
  const tanDeg = (deg: number) => big.tan(big.unit(big.bignumber(deg), 'deg'));

  it('an angle across a width is width × tan(angle)', () => {
    const expected = big.multiply(tanDeg(1), mm('840 mm')) as math.BigNumber;
    expect(value('1° across 840 mm', 'length')).toBeCloseTo(expected.toNumber(), 10);
    expect(value('0.5 deg across 33 in', 'length')).toBeCloseTo((big.multiply(tanDeg(0.5), mm('33 in')) as math.BigNumber).toNumber(), 10);
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4400 }), fc.integer({ min: 100, max: 3000 }), (hundredthsDeg, widthMm) => {
        const deg = hundredthsDeg / 100;
        const ref = (big.multiply(tanDeg(deg), big.bignumber(widthMm)) as math.BigNumber).toNumber();
        return Math.abs(value(`${deg}° across ${widthMm} mm`, 'length') - ref) <= 1e-9 * Math.max(1, ref);
      }),
    );
  });

  it('a slope across a width is width × rise / run, in any slope notation', () => {
    expect(value('1:100 over 32 in', 'length')).toBeCloseTo(math.unit('32 in').toNumber('mm') / 100, 12);
    expect(value('1% across 1.2 m', 'length')).toBeCloseTo(12, 12);
    // 1/8 in per ft over 4 ft is 1/2 in (12.7 mm): NIST SP 811 B.8 factors.
    expect(value('1/8 in/ft across 4 ft', 'length')).toBeCloseTo(12.7, 12);
    expect(parseQuantity('1° across 840 mm', 'length')).toMatchObject({ ok: true, display: '14.7 mm' });
  });

  it('refuses what cannot be converted, and says how to write it', () => {
    const error = (t: string) => {
      const r = parseQuantity(t, 'length');
      if (r.ok) throw new Error(`expected "${t}" to be refused`);
      return r.error;
    };
    expect(error('1°')).toMatch(/needs the width it applies across, e\.g\. "1° across 840 mm"/);
    expect(error('1:100')).toMatch(/needs the width it applies across/);
    expect(error('1° across')).toMatch(/Unknown unit "across"/);
    expect(error('1° across 30°')).toMatch(/the width after "across"/);
    expect(error('5 kg across 840 mm')).toMatch(/not an angle \(e\.g\. 1°\) or a slope/);
    expect(error('50° across 840 mm')).toMatch(/less than 45°/);
    // A slope or an angle asked for itself keeps its own meaning.
    expect(value('1:100', 'slope')).toBe(0.01);
  });
});
