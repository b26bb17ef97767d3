/**
 * Condensate drains. Sources:
 * - slope: IMC 2018 Section 307.2.2, "not less than 1/8 unit vertical in 12 units horizontal
 *   (1-percent slope)" (read);
 * - size: IMC 2018 Table 307.2.2 (read, as reproduced in a 2019 local adoption): up to 20 tons 3/4 in;
 *   over 20 to 40 tons 1 in; over 40 to 90 tons 1-1/4 in; over 90 to 125 tons 1-1/2 in;
 *   over 125 to 250 tons 2 in; footnote 1 ton = 3.517 kW;
 * - "shall not decrease in size from the drain pan connection to the place of condensate disposal":
 *   IMC 2018 Section 307.2.2 (read);
 * - ductless check valve or trap: IMC 2018 Section 307.2.4.1 (from memory);
 * - auxiliary pan 1-1/2 in deep, 3 in larger: IMC 2018 Section 307.2.3 item 1 (from memory).
 */
import type { QuantityKind } from '../../../shared/catalogue/types';
import {
  checkAuxiliaryPan,
  checkDrainSlope,
  checkDuctlessDrainTrap,
  checkManifoldDrain,
  codeMinimumDrainSlope,
  describeSlope,
  drainPipeSize,
  drainSlope,
  nominalSizeLabel,
} from '../../../shared/calc/condensate';
import { parseQuantity, toBase } from '../../../shared/calc/quantity';

function q(text: string, kind: QuantityKind): number {
  const r = parseQuantity(text, kind);
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

describe('drain slope (IMC 2018 Section 307.2.2)', () => {
  it('the code minimum is exactly 1/8 in per 12 in = 1/96 ≈ 1.0417%', () => {
    expect(codeMinimumDrainSlope()).toBe(1 / 96);
    expect(describeSlope(1 / 96)).toBe('1/8 in/ft (1.04%)');
  });

  it.each([
    // [drop, run, status, source]
    ['1/8"', "1' 0\"", 'pass', 'exactly 1/8 in per ft: at the limit, inclusive'],
    ['3.175 mm', '304.8 mm', 'pass', 'the same slope typed in mm (1/8 in = 3.175 mm, NIST SP 811 (2008) B.8)'],
    ['2-1/2"', "20' 0\"", 'pass', '1/8 in/ft over 20 ft'],
    ['1/4"', "1' 0\"", 'pass', '1/4 in/ft'],
    ['10 mm', '1000 mm', 'fail', '1.00% is below 1/96 (1.0417%): the code\'s "1-percent" is a label'],
    ['2-7/16"', "20' 0\"", 'fail', '1/16 in short over 20 ft'],
    ['0"', "10' 0\"", 'fail', 'dead level'],
  ])('drop %s over %s → %s (%s)', (drop, run, status) => {
    const r = checkDrainSlope({ drop: q(drop, 'length'), run: q(run, 'length') });
    expect(r.status).toBe(status);
    expect(r.limitSource).toBe('IMC 2018 Section 307.2.2');
  });

  it('1% measured misses 1/96 by 1/96 − 1/100 (margin in base units)', () => {
    const r = checkDrainSlope({ drop: 10, run: 1000 });
    expect(r.margin).toBeCloseTo(0.01 - 1 / 96, 9);
    expect(r.message).toMatch(/1% is 0.04% below the minimum 1.04%|0.12 in\/ft/);
  });

  it('a job whose authority accepts 1% sets min_drain_slope, which then governs (job setting)', () => {
    const r = checkDrainSlope({ drop: 10, run: 1000, jobMinimum: { value: 1, unit: '%', source: 'AHJ accepts 1%' } });
    expect(r.status).toBe('pass');
    expect(r.margin).toBe(0);
    expect(r.limitSource).toMatch(/^Job setting: Minimum condensate drain slope/);
  });

  it('backfall fails and says so', () => {
    const r = checkDrainSlope({ drop: -5, run: 1000 });
    expect(r.status).toBe('fail');
    expect(r.message).toMatch(/falls backwards/);
  });

  it('zero or missing run is invalid / not measured, not a pass', () => {
    expect(checkDrainSlope({ drop: 5, run: 0 }).status).toBe('invalid');
    expect(checkDrainSlope({ drop: 5, run: null }).status).toBe('not_measured');
    expect(() => drainSlope(1, 0)).toThrow(/greater than zero/);
  });

  it('slope = drop / run', () => {
    expect(drainSlope(q('1/8"', 'length'), q("1' 0\"", 'length'))).toBeCloseTo(1 / 96, 15);
  });
});

describe('drain pipe size from capacity (IMC 2018 Table 307.2.2)', () => {
  it.each([
    // [capacity typed, nominal size, label]
    ['1 ton', 0.75, '3/4 in'],
    ['12000 Btu/h', 0.75, '3/4 in'],
    ['20 tons', 0.75, '3/4 in'], // "up to 20 tons" includes 20
    ['240,000 Btu/h', 0.75, '3/4 in'], // = 20 tons
    ['20.01 tons', 1, '1 in'], // "over 20"
    ['40 tons', 1, '1 in'],
    ['40.5 tons', 1.25, '1-1/4 in'],
    ['90 tons', 1.25, '1-1/4 in'],
    ['91 tons', 1.5, '1-1/2 in'],
    ['125 tons', 1.5, '1-1/2 in'],
    ['126 tons', 2, '2 in'],
    ['250 tons', 2, '2 in'],
  ])('%s → %p in (%s)', (text, size, label) => {
    const r = drainPipeSize(q(text, 'capacity'));
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.size).toBe(size);
    expect(r.label).toBe(label);
    expect(r.source).toBe('IMC 2018 Table 307.2.2');
  });

  it('70.34 kW (20 tons at the printed 3.517 kW) sits at the 3/4 → 1 in boundary; 70 kW is 3/4 in', () => {
    expect(drainPipeSize(70000)).toMatchObject({ ok: true, size: 0.75 });
  });

  // IMC 2018 Table 307.2.2 prints its own SI conversion, 1 ton = 3.517 kW (read): each boundary
  // typed in kW lands in the row the table means, and 0.01 kW more is the next row.
  it.each([
    // [kW as typed, tons by the table's 3.517, size at the boundary, size just over it]
    [70.34, 20, 0.75, 1],
    [140.68, 40, 1, 1.25],
    [316.53, 90, 1.25, 1.5],
    [439.625, 125, 1.5, 2],
  ] as const)('%p kW = %p tons at 3.517 kW per ton: %p in; 0.01 kW more: %p in', (kW, tons, size, over) => {
    const at = drainPipeSize({ value: kW, unit: 'kW' });
    expect(at).toMatchObject({ ok: true, tons, size });
    expect(drainPipeSize({ value: kW + 0.01, unit: 'kW' })).toMatchObject({ ok: true, size: over });
    // The same boundary typed in W, and the exact factor would have put it over the row.
    expect(drainPipeSize({ value: kW * 1000, unit: 'W' })).toMatchObject({ ok: true, size });
    expect(drainPipeSize(kW * 1000)).toMatchObject({ ok: true, size: over });
  });

  it('879.25 kW (250 tons at 3.517) is still in the table; 879.26 kW is over it', () => {
    expect(drainPipeSize({ value: 879.25, unit: 'kW' })).toMatchObject({ ok: true, tons: 250, size: 2 });
    expect(drainPipeSize({ value: 879.26, unit: 'kW' })).toMatchObject({ ok: false, error: expect.stringMatching(/outside IMC 2018 Table 307.2.2/) });
  });

  it('tons, Btu/h and MBH typed keep the exact 12,000 Btu/h per ton', () => {
    expect(drainPipeSize({ value: 240000, unit: 'Btu/h' })).toMatchObject({ ok: true, tons: 20, size: 0.75 });
    expect(drainPipeSize({ value: 240, unit: 'MBH' })).toMatchObject({ ok: true, tons: 20, size: 0.75 });
    expect(drainPipeSize({ value: 20, unit: 'tons' })).toMatchObject({ ok: true, tons: 20, size: 0.75 });
    expect(drainPipeSize({ value: 20, unit: 'mm' })).toMatchObject({ ok: false });
  });

  it('a manifolded drain adds segments typed in kW by the table\'s 3.517 (IMC 2018 Table 307.2.2)', () => {
    const r = checkManifoldDrain([
      { id: 'A', size: 0.75, addedCapacity: { value: 35.17, unit: 'kW' } }, // 10 tons
      { id: 'B', size: 0.75, addedCapacity: { value: 35.17, unit: 'kW' } }, // 20 tons: still 3/4 in
    ]);
    expect(r.status).toBe('pass');
    expect(r.segments[1]!.cumulativeTons).toBe(20);
  });

  it('over 250 tons is outside the table and says so', () => {
    const r = drainPipeSize(q('251 tons', 'capacity'));
    expect(r.ok).toBe(false);
    expect(!r.ok && r.error).toMatch(/251 tons is outside IMC 2018 Table 307.2.2.*250 tons.*by design/);
  });

  it('zero capacity and an unstored edition are errors', () => {
    expect(drainPipeSize(0)).toMatchObject({ ok: false, error: expect.stringMatching(/more than zero/) });
    expect(drainPipeSize(1000, { IMC: '2006' })).toMatchObject({ ok: false, error: expect.stringMatching(/not stored for IMC 2006/) });
  });

  it.each([
    [0.75, '3/4 in'],
    [1, '1 in'],
    [1.25, '1-1/4 in'],
    [1.5, '1-1/2 in'],
    [2, '2 in'],
  ])('nominal size %p → %s', (s, label) => {
    expect(nominalSizeLabel(s)).toBe(label);
  });
});

describe('manifolded drain (IMC 2018 Section 307.2.2 and Table 307.2.2)', () => {
  const tons = (t: number): number => toBase(t, 'ton');

  it('sized up as capacity accumulates: passes', () => {
    const r = checkManifoldDrain([
      { id: 'A', size: 0.75, addedCapacity: tons(15) }, // 15 tons → 3/4
      { id: 'B', size: 1, addedCapacity: tons(15) }, // 30 tons → 1
      { id: 'C', size: 1.25, addedCapacity: tons(15) }, // 45 tons → 1-1/4
    ]);
    expect(r.status).toBe('pass');
    expect(r.segments.map((s) => s.requiredSize)).toEqual([0.75, 1, 1.25]);
    expect(r.segments.map((s) => s.cumulativeTons)).toEqual([15, 30, 45]);
  });

  it('a segment below the table size for its upstream capacity fails', () => {
    const r = checkManifoldDrain([
      { id: 'A', size: 0.75, addedCapacity: tons(12) },
      { id: 'B', size: 0.75, addedCapacity: tons(12) }, // 24 tons needs 1 in
    ]);
    expect(r.status).toBe('fail');
    expect(r.segments[1]?.status).toBe('fail');
    expect(r.segments[1]?.message).toMatch(/3\/4 in is smaller than the 1 in IMC 2018 Table 307.2.2 requires for 24 tons/);
  });

  it('a drain that gets smaller downstream fails even where the table would allow the smaller size', () => {
    const r = checkManifoldDrain([
      { id: 'A', size: 1, addedCapacity: tons(5) },
      { id: 'B', size: 0.75, addedCapacity: tons(5) },
    ]);
    expect(r.status).toBe('fail');
    expect(r.segments[1]?.message).toMatch(/gets smaller downstream \(1 in → 3\/4 in\)/);
  });

  it('upstream capacity beyond 250 tons is outside the table, not a pass', () => {
    const r = checkManifoldDrain([
      { id: 'A', size: 2, addedCapacity: tons(200) },
      { id: 'B', size: 2, addedCapacity: tons(60) },
    ]);
    expect(r.status).toBe('limit_not_set');
    expect(r.pass).toBeNull();
    expect(r.segments[1]?.message).toMatch(/outside/);
  });

  it('no segments: not measured', () => {
    expect(checkManifoldDrain([]).status).toBe('not_measured');
  });
});

describe('ductless mini-split: check valve or trap (IMC 2018 Section 307.2.4.1, from memory)', () => {
  it.each([
    [true, false, 'pass'],
    [false, true, 'pass'],
    [true, true, 'pass'],
    [false, false, 'fail'],
    [null, null, 'not_measured'],
    [false, null, 'not_measured'],
    [null, true, 'pass'],
  ] as const)('check valve %p, trap %p → %s', (checkValve, trap, status) => {
    const r = checkDuctlessDrainTrap({ checkValve, trap });
    expect(r.status).toBe(status);
    expect(r.limitSource).toBe('IMC 2018 Section 307.2.4.1');
  });
});

describe('auxiliary drain pan (IMC 2018 Section 307.2.3 item 1, from memory)', () => {
  it.each([
    // [depth, pan L, pan W, unit L, unit W, status]
    ['1-1/2"', '39"', '27"', '36"', '24"', 'pass'], // exactly at 1-1/2 in deep and 3 in larger: inclusive
    ['1-7/16"', '39"', '27"', '36"', '24"', 'fail'],
    ['2"', '38-15/16"', '27"', '36"', '24"', 'fail'],
    ['2"', '40"', '26"', '36"', '24"', 'fail'],
  ])('depth %s, pan %s × %s, unit %s × %s → %s', (d, pl, pw, ul, uw, status) => {
    const r = checkAuxiliaryPan({
      depth: q(d, 'length'),
      panLength: q(pl, 'length'),
      panWidth: q(pw, 'length'),
      unitLength: q(ul, 'length'),
      unitWidth: q(uw, 'length'),
    });
    expect(r.status).toBe(status);
    expect(r.checks).toHaveLength(3);
  });

  it('missing measurement → not measured', () => {
    const r = checkAuxiliaryPan({ depth: 50, panLength: null, panWidth: 1000, unitLength: 900, unitWidth: 900 });
    expect(r.status).toBe('not_measured');
  });
});
