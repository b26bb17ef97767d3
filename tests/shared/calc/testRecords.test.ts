/**
 * Test-record calculations. Sources beside each value:
 * - P2/T2 = P1/T1 at constant volume with absolute pressure and temperature: the ideal gas law
 *   (any physics or chemistry handbook). Worked examples are done by hand in the comments.
 * - Conversions: NIST SP 811 (2008) Appendix B.8/B.9: 1 psi = 6.894757 kPa, 1 mmHg = 133.322 Pa
 *   (printed 1.333224 E+02), 1 torr = 101325/760 Pa, 1 inHg = 3.38639 kPa (printed 3.386389 E+03 Pa);
 *   0 °C = 273.15 K. Cross-checked against mathjs units (a general-purpose unit library).
 * - 500 microns target vacuum and a 500-micron decay rise: common practice (from memory), not code values.
 */
import * as fc from 'fast-check';
import * as math from 'mathjs';
import {
  correctForTemperature,
  evaluateCharge,
  evaluateDrain,
  evaluateEvacuation,
  evaluatePressureTest,
  evaluateStartup,
  gaugeToPa,
  parseAbsolutePressure,
  parseChargeFactor,
  parseGaugePressure,
  parseTemperature,
  parseVacuum,
  paToGauge,
  paToVacuum,
  PA_PER_INHG,
  PA_PER_MICRON,
  PA_PER_MMHG,
  PA_PER_PSI,
  PA_PER_TORR,
  STANDARD_ATMOSPHERE_PA,
  toKelvin,
  vacuumToPa,
  type PressureTestFigures,
  type SourcedFigure,
} from '../../../shared/calc/testRecords';

const atm: SourcedFigure = { value: STANDARD_ATMOSPHERE_PA, source: 'standard atmosphere', from: 'default' };
const t0 = new Date('2026-12-01T08:00:00Z');
const hoursLater = (h: number) => new Date(t0.getTime() + h * 3_600_000);

function pressure(over: Partial<PressureTestFigures>): PressureTestFigures {
  return {
    startGaugePa: gaugeToPa(600, 'psi'),
    endGaugePa: gaugeToPa(600, 'psi'),
    startKelvin: toKelvin(20, '°C'),
    endKelvin: toKelvin(20, '°C'),
    startAt: t0,
    endAt: hoursLater(24),
    atmosphericPa: atm,
    gaugeResolutionPa: gaugeToPa(1, 'psi'),
    allowedDropPa: null,
    targetPa: null,
    minHoldMinutes: null,
    ...over,
  };
}

describe('conversion factors (NIST SP 811 (2008) B.8/B.9)', () => {
  it.each([
    ['psi', PA_PER_PSI, 6894.757, 'NIST SP 811: 1 psi = 6.894757 kPa'],
    ['mmHg', PA_PER_MMHG, 133.322, 'NIST SP 811: 1 mmHg = 133.322 Pa (1.333224 E+02)'],
    ['torr', PA_PER_TORR, 101325 / 760, 'NIST SP 811: 1 torr = 101325/760 Pa'],
    ['inHg', PA_PER_INHG, 3386.39, 'NIST SP 811: 1 inHg = 3.38639 kPa (3.386389 E+03 Pa)'],
    ['micron', PA_PER_MICRON, 0.133322, '1 micron of mercury = 0.001 mmHg'],
  ])('1 %s = %s Pa agrees with %s (%s) to 6 significant figures', (_u, ours, published) => {
    expect(Math.abs(ours - published) / published).toBeLessThan(5e-6);
  });

  it.each([
    ['psi', 'psi'],
    ['torr', 'torr'],
    ['mmHg', 'mmHg'],
    ['bar', 'bar'],
  ])('our %s agrees with mathjs %s to 1e-5 relative (mathjs rounds mmHg/torr to 133.322)', (ours, theirs) => {
    const mine = ours === 'psi' ? PA_PER_PSI : ours === 'torr' ? PA_PER_TORR : ours === 'mmHg' ? PA_PER_MMHG : 100_000;
    expect(Math.abs(mine - math.unit(1, theirs).toNumber('Pa')) / mine).toBeLessThan(1e-5);
  });

  it('inHg agrees with mathjs as 25.4 mmHg (mathjs has no inHg)', () => {
    const viaMathjs = math.unit(25.4, 'mmHg').toNumber('Pa');
    expect(Math.abs(PA_PER_INHG - viaMathjs) / PA_PER_INHG).toBeLessThan(1e-5);
  });

  it('absolute temperatures agree with mathjs (generated values)', () => {
    fc.assert(
      fc.property(fc.double({ min: -60, max: 150, noNaN: true }), (c) => {
        expect(toKelvin(c, '°C')).toBeCloseTo(math.unit(c, 'degC').toNumber('K'), 9);
        const f = (c * 9) / 5 + 32;
        expect(toKelvin(f, '°F')).toBeCloseTo(math.unit(f, 'degF').toNumber('K'), 9);
      }),
    );
  });

  it('gauge pressures agree with mathjs (generated values)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1000, noNaN: true }), (v) => {
        expect(gaugeToPa(v, 'psi')).toBeCloseTo(math.unit(v, 'psi').toNumber('Pa'), 0);
        expect(gaugeToPa(v, 'bar')).toBeCloseTo(math.unit(v, 'bar').toNumber('Pa'), 6);
        expect(paToGauge(gaugeToPa(v, 'kPa'), 'kPa')).toBeCloseTo(v, 9);
      }),
    );
  });
});

describe('vacuum units typed the trade’s way', () => {
  it.each([
    ['500 microns', 500 * 0.1333224, 'micron = 0.001 mmHg (NIST SP 811 mmHg)'],
    ['500 micron', 500 * 0.1333224, 'same'],
    ['66.7 Pa', 66.7, 'SI'],
    ['0.667 mbar', 66.7, '1 mbar = 100 Pa'],
    ['0.5 torr', 0.5 * (101325 / 760), 'NIST SP 811 torr'],
    ['29.9 inHg vacuum', 101325 - 29.9 * 3386.389, 'inHg vacuum below the standard atmosphere, NIST SP 811 inHg'],
    ['29.9 inHg vac', 101325 - 29.9 * 3386.389, 'same'],
  ])('%s is %s Pa absolute (%s)', (text, pa) => {
    const r = parseVacuum(text);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.value.pa).toBeCloseTo(pa, 6);
  });

  it('500 microns agrees with mathjs as 0.5 mmHg', () => {
    expect(vacuumToPa(500, 'micron')).toBeCloseTo(math.unit(0.5, 'mmHg').toNumber('Pa'), 2);
  });

  it.each([['500'], ['500 psi'], ['abc microns'], ['31 inHg vacuum']])('refuses %s with a reason', (text) => {
    const r = parseVacuum(text);
    expect(r.ok).toBe(false);
  });

  it('every vacuum unit round-trips', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 5000, noNaN: true }), fc.constantFrom('micron', 'Pa', 'mbar', 'torr') as fc.Arbitrary<'micron' | 'Pa' | 'mbar' | 'torr'>, (v, unit) => {
        expect(paToVacuum(vacuumToPa(v, unit), unit)).toBeCloseTo(v, 6);
      }),
    );
  });
});

describe('other typed figures', () => {
  it.each([
    ['600 psig', 600 * 6894.757],
    ['600 psi', 600 * 6894.757],
    ['4137 kPa', 4_137_000],
    ['41.4 bar', 4_140_000],
    ['4.14 MPa', 4_140_000],
  ])('gauge %s = %s Pa', (text, pa) => {
    const r = parseGaugePressure(text);
    expect(r.ok && r.value.pa).toBeCloseTo(pa, 6);
  });
  it.each([
    ['20 °C', 293.15],
    ['20C', 293.15],
    ['68 °F', 293.15],
    ['-4 F', 253.15],
    ['293.15 K', 293.15],
  ])('temperature %s = %s K (0 °C = 273.15 K; °F = 5/9 K above 32 °F)', (text, k) => {
    const r = parseTemperature(text);
    expect(r.ok && r.value.kelvin).toBeCloseTo(k, 9);
  });
  it.each([
    ['101.325 kPa', 101325],
    ['29.92 inHg', 29.92 * 3386.389],
    ['1013 mbar', 101300],
  ])('atmospheric %s = %s Pa', (text, pa) => {
    const r = parseAbsolutePressure(text);
    expect(r.ok && r.value.pa).toBeCloseTo(pa, 6);
  });
  it.each([
    ['0.35 lb/ft', 0.35 * 0.45359237 / 0.3048, 'NIST SP 811: 1 lb = 0.45359237 kg, 1 ft = 0.3048 m'],
    ['0.6 oz/ft', (0.6 / 16) * 0.45359237 / 0.3048, '1 oz = 1/16 lb'],
    ['0.054 kg/m', 0.054, 'SI'],
    ['54 g/m', 0.054, 'SI'],
  ])('charge factor %s = %s kg/m (%s)', (text, kgPerM) => {
    const r = parseChargeFactor(text);
    expect(r.ok && r.value.kgPerM).toBeCloseTo(kgPerM, 12);
  });
});

describe('pressure test: temperature correction (ideal gas law at constant volume)', () => {
  /*
   * Worked by hand: nitrogen at 600 psig and 20 °C, read again at 10 °C.
   *   P1 = 600 × 6.894757 kPa = 4136.8542 kPa gauge; + 101.325 = 4238.1792 kPa absolute
   *   T1 = 20 + 273.15 = 293.15 K; T2 = 10 + 273.15 = 283.15 K
   *   P2 = P1 × T2 / T1 = 4238.1792 − 4238.1792 × 10 / 293.15 = 4238.1792 − 144.5738 = 4093.6054 kPa abs
   *   gauge: 4093.6054 − 101.325 = 3992.2804 kPa = 3992.2804 / 6.894757 = 579.03 psig
   * A gauge that reads 579 psig has dropped 21 psi as read, but only 0.03 psi once corrected.
   */
  it('600 psig at 20 °C read at 10 °C: 579.03 psig expected; 579 psig passes with a 1 psi gauge', () => {
    const r = evaluatePressureTest(pressure({ endKelvin: toKelvin(10, '°C'), endGaugePa: gaugeToPa(579, 'psi') }));
    expect(r.startAbsolutePa / 1000).toBeCloseTo(4238.1792, 4);
    expect(paToGauge(r.expectedEndGaugePa, 'psi')).toBeCloseTo(579.03, 2);
    expect(paToGauge(r.uncorrectedChangePa, 'psi')).toBeCloseTo(-21, 9);
    expect(paToGauge(r.correctedChangePa, 'psi')).toBeCloseTo(-0.03, 2);
    expect(r.allowedDrop.from).toBe('default');
    expect(r.passed).toBe(true);
    expect(r.holdMinutes).toBe(24 * 60);
  });

  it('the same test read at 575 psig fails: 4.03 psi lost beyond the temperature', () => {
    const r = evaluatePressureTest(pressure({ endKelvin: toKelvin(10, '°C'), endGaugePa: gaugeToPa(575, 'psi') }));
    expect(paToGauge(r.correctedChangePa, 'psi')).toBeCloseTo(-4.03, 2);
    expect(r.passed).toBe(false);
    expect(r.reasons).toContain('The pressure dropped more than allowed after temperature correction.');
  });

  /*
   * Worked by hand, metric: 4000 kPa gauge at 15 °C read at 30 °C.
   *   P1 = 4101.325 kPa abs; T1 = 288.15 K; T2 = 303.15 K
   *   P2 = 4101.325 × 303.15 / 288.15 = 4101.325 + 4101.325 × 15 / 288.15 = 4101.325 + 213.4995 = 4314.8245 kPa abs
   *   gauge 4213.4995 kPa: warming alone raises the gauge 213.5 kPa, so an unchanged 4000 kPa hides a leak.
   */
  it('4000 kPa at 15 °C read at 30 °C: 4213.50 kPa expected; 4000 kPa read fails', () => {
    const r = evaluatePressureTest(
      pressure({ startGaugePa: 4_000_000, endGaugePa: 4_000_000, startKelvin: toKelvin(15, '°C'), endKelvin: toKelvin(30, '°C'), gaugeResolutionPa: 10_000 }),
    );
    expect(r.expectedEndGaugePa / 1000).toBeCloseTo(4213.4995, 3);
    expect(r.uncorrectedChangePa).toBe(0);
    expect(r.correctedChangePa / 1000).toBeCloseTo(-213.4995, 3);
    expect(r.passed).toBe(false);
  });

  it('correctForTemperature cross-checked with mathjs units (kelvin from °C, Pa from psi)', () => {
    const p1 = math.unit(600, 'psi').toNumber('Pa') + 101325;
    const viaMathjs = (p1 * math.unit(10, 'degC').toNumber('K')) / math.unit(20, 'degC').toNumber('K');
    expect(correctForTemperature(gaugeToPa(600, 'psi') + STANDARD_ATMOSPHERE_PA, 293.15, 283.15)).toBeCloseTo(viaMathjs, -1);
  });

  it('a job’s allowed change, site pressure, target and minimum hold are used with their sources', () => {
    const r = evaluatePressureTest(
      pressure({
        endGaugePa: gaugeToPa(595, 'psi'),
        allowedDropPa: { value: gaugeToPa(5, 'psi'), source: 'Job spec 23 23 00 §3.4', from: 'job' },
        atmosphericPa: { value: 84_000, source: 'site at 1,600 m', from: 'job' },
        targetPa: { value: gaugeToPa(550, 'psi'), source: 'Outdoor unit manual p. 31', from: 'record' },
        minHoldMinutes: { value: 25 * 60, source: 'Job spec', from: 'job' },
      }),
    );
    expect(r.allowedDrop.source).toBe('Job spec 23 23 00 §3.4');
    expect(r.startAbsolutePa).toBeCloseTo(gaugeToPa(600, 'psi') + 84_000, 6);
    expect(r.reachedTarget).toBe(true);
    expect(r.heldLongEnough).toBe(false);
    expect(r.passed).toBe(false);
  });

  it('property: equal start and end absolute pressure over temperature passes for any temperature pair', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 50_000, max: 6_000_000, noNaN: true }),
        fc.double({ min: 230, max: 330, noNaN: true }),
        fc.double({ min: 230, max: 330, noNaN: true }),
        (startGauge, t1, t2) => {
          const endGauge = ((startGauge + STANDARD_ATMOSPHERE_PA) * t2) / t1 - STANDARD_ATMOSPHERE_PA;
          const r = evaluatePressureTest(pressure({ startGaugePa: startGauge, endGaugePa: endGauge, startKelvin: t1, endKelvin: t2, gaugeResolutionPa: 0 }));
          expect(r.passed).toBe(true);
        },
      ),
    );
  });

  it('property: the expected end pressure rises and the corrected change falls as the end temperature rises', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 50_000, max: 6_000_000, noNaN: true }),
        fc.double({ min: 230, max: 330, noNaN: true }),
        fc.double({ min: 230, max: 330, noNaN: true }),
        fc.double({ min: 0.01, max: 50, noNaN: true }),
        (startGauge, t1, t2, step) => {
          const a = evaluatePressureTest(pressure({ startGaugePa: startGauge, startKelvin: t1, endKelvin: t2 }));
          const b = evaluatePressureTest(pressure({ startGaugePa: startGauge, startKelvin: t1, endKelvin: t2 + step }));
          expect(b.expectedEndGaugePa).toBeGreaterThan(a.expectedEndGaugePa);
          expect(b.correctedChangePa).toBeLessThan(a.correctedChangePa);
        },
      ),
    );
  });
});

describe('evacuation (500 microns target and 500-micron rise: common practice, from memory)', () => {
  const defaults = {
    targetPa: { value: 500 * PA_PER_MICRON, source: 'common practice', from: 'default' as const },
    riseLimitPa: { value: 500 * PA_PER_MICRON, source: 'common practice', from: 'default' as const },
    minHoldMinutes: { value: 10, source: 'common practice', from: 'default' as const },
  };
  it.each([
    ['deep and tight', 350, 380, 610, 15, true, 'rise 230 microns'],
    ['exactly at the target and the limit', 500, 300, 800, 10, true, 'boundary passes'],
    ['not deep enough', 700, 700, 750, 15, false, 'deepest 700 > 500'],
    ['rises too much (moisture or a leak)', 300, 300, 1500, 15, false, 'rise 1200 > 500'],
    ['held too short', 300, 300, 350, 5, false, 'hold 5 < 10 min'],
  ])('%s: deepest %s, isolated %s, after hold %s microns over %s min → %s (%s)', (_n, deepest, iso, after, minutes, passed) => {
    const r = evaluateEvacuation({
      deepestPa: vacuumToPa(deepest as number, 'micron'),
      isolatedPa: vacuumToPa(iso as number, 'micron'),
      afterHoldPa: vacuumToPa(after as number, 'micron'),
      holdMinutes: minutes as number,
      ...defaults,
    });
    expect(r.passed).toBe(passed);
    expect(paToVacuum(r.risePa, 'micron')).toBeCloseTo((after as number) - (iso as number), 6);
  });
});

describe('charge: additional charge from liquid-line lengths × the model’s per-size factor', () => {
  // Factors here are invented round figures for the test, not a real product's rating.
  const factors = [
    { size: '3/8"', kgPerM: 0.054, text: '0.054 kg/m', source: 'invented for the test' },
    { size: '1/4"', kgPerM: 0.022, text: '0.022 kg/m', source: 'invented for the test' },
  ];
  it('30 m of 3/8" and 45 m of 1/4": 1.62 + 0.99 = 2.61 kg; 2.7 kg weighed in is 0.09 kg over', () => {
    const r = evaluateCharge({
      factoryCharge: { value: 11.8, source: 'outdoor unit nameplate', from: 'record' },
      liquidLines: [
        { size: '3/8 in', lengthMm: 30_000 },
        { size: '1/4"', lengthMm: 45_000 },
      ],
      factors,
      weighedInKg: 2.7,
    });
    expect(r.lines[0]?.additionalKg).toBeCloseTo(1.62, 12);
    expect(r.lines[1]?.additionalKg).toBeCloseTo(0.99, 12);
    expect(r.additionalKg).toBeCloseTo(2.61, 12);
    expect(r.differenceKg).toBeCloseTo(0.09, 12);
    expect(r.totalChargeKg).toBeCloseTo(14.5, 12);
    expect(r.missingFactors).toEqual([]);
  });
  it('a size with no factor on the model leaves the additional charge unknown (never invented)', () => {
    const r = evaluateCharge({ factoryCharge: null, liquidLines: [{ size: '1/2"', lengthMm: 10_000 }], factors, weighedInKg: 1 });
    expect(r.missingFactors).toEqual(['1/2"']);
    expect(r.additionalKg).toBeNull();
    expect(r.differenceKg).toBeNull();
    expect(r.totalChargeKg).toBeNull();
  });
});

describe('start-up and drain', () => {
  it('return − supply per unit, in kelvin (a difference: 1 K = 1 °C = 9/5 °F)', () => {
    const r = evaluateStartup(
      [
        { unitId: 'a', answers: true, addressed: true, faultShown: false, supplyKelvin: toKelvin(13, '°C'), returnKelvin: toKelvin(24, '°C') },
        { unitId: 'b', answers: true, addressed: true, faultShown: false, supplyKelvin: toKelvin(40, '°C'), returnKelvin: toKelvin(21, '°C') },
      ],
      ['a', 'b'],
    );
    expect(r.units[0]?.differenceK).toBeCloseTo(11, 9);
    expect(r.units[1]?.differenceK).toBeCloseTo(-19, 9);
    expect(r.passed).toBe(true);
  });
  it('a unit showing a fault or missing from the record fails the start-up', () => {
    const r = evaluateStartup([{ unitId: 'a', answers: true, addressed: true, faultShown: true, supplyKelvin: null, returnKelvin: null }], ['a', 'b']);
    expect(r.missingUnitIds).toEqual(['b']);
    expect(r.passed).toBe(false);
  });
  it.each([
    ['gravity drain', { pumpFitted: false, pumpRunsAndLifts: null, floatSwitchFitted: false, floatSwitchStopsUnit: null }, true, false],
    ['pump and float switch both proven', { pumpFitted: true, pumpRunsAndLifts: true, floatSwitchFitted: true, floatSwitchStopsUnit: true }, true, true],
    ['pump fitted, not run', { pumpFitted: true, pumpRunsAndLifts: null, floatSwitchFitted: false, floatSwitchStopsUnit: null }, false, true],
  ])('drain, %s → passed %s, needs power %s', (_name, over, passed, needsPower) => {
    const r = evaluateDrain({ waterPoured: true, reachesTermination: true, noLeakAtJoints: true, ...over });
    expect(r.passed).toBe(passed);
    expect(r.needsPower).toBe(needsPower);
  });
});
