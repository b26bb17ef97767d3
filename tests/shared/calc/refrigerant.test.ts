/**
 * Refrigerant concentration and A2L floor area. Sources:
 * - R-410A 26 lb per 1,000 ft³: ASHRAE 34 (current editions, e.g. 34-2019) Table 4-2 (blends) RCL (issue
 *   text); an older edition printed 25 lb/Mcf (issue text; exact edition not confirmed); also printed in
 *   IMC Table 1103.1 (from memory);
 * - R-32 4.8 lb per 1,000 ft³ / 77 g/m³: IMC Table 1103.1 (issue text); also ASHRAE 34 Table 4-1
 *   (single-compound refrigerants; from memory);
 * - institutional occupancy halves the limit: ASHRAE 15 Section 7.2 and IMC Section 1104.3 (both from
 *   memory: confirm the sections);
 * - A_min = (m / (2.5 × LFL^(5/4) × h0))², LFL(R-32) = 0.307 kg/m³, h0 = 0.6 / 1.8 / 2.2 m:
 *   IEC 60335-2-40:2018 Annex GG.2 (issue text); check values from the issue text, asserted to
 *   the printed precision.
 * The lb/Mcf and g/m³ limits are rounded separately in the standard: no exact round trip asserted.
 */
import {
  a2lMinFloorArea,
  checkA2lFloorArea,
  mountPositionOf,
  parseMountPosition,
  checkRefrigerantConcentration,
  CONCENTRATION_LIMITS,
  INSTITUTIONAL_HALVING,
  groupConnectedSpaces,
  limitDensity,
  pickConcentrationLimit,
} from '../../../shared/calc/refrigerant';
import type { ConcentrationSpace } from '../../../shared/calc/refrigerant';
import { fromBase, toBase } from '../../../shared/calc/quantity';

const ft = (v: number): number => toBase(v, 'ft');
const ft2 = (v: number): number => toBase(v, 'ft²');
const lb = (v: number): number => toBase(v, 'lb');

function room(id: string, lengthFt: number, widthFt: number, heightFt: number, extra: Partial<ConcentrationSpace> = {}): ConcentrationSpace {
  return { id, name: id, floorArea: ft2(lengthFt * widthFt), ceilingHeight: ft(heightFt), ...extra };
}

describe('worked example: office 10 × 10 × 8 ft, R-410A at 26 lb/Mcf (ASHRAE 34-2019, issue text)', () => {
  const r = checkRefrigerantConcentration({
    refrigerant: 'R-410A',
    factoryCharge: lb(30),
    fieldCharge: lb(8),
    servedSpaceIds: ['office'],
    spaces: [room('office', 10, 10, 8)],
  });

  it('800 ft³ allows 20.8 lb (26 × 0.8)', () => {
    expect(fromBase(r.governing?.volume ?? 0, 'ft³')).toBeCloseTo(800, 9);
    expect(fromBase(r.governing?.allowedCharge ?? 0, 'lb')).toBeCloseTo(20.8, 9);
  });

  it('38 lb needs 1,461.5 ft³, i.e. 182.7 ft² at 8 ft, and fails', () => {
    expect(fromBase(r.totalCharge, 'lb')).toBeCloseTo(38, 12);
    expect(fromBase(r.governing?.requiredVolume ?? 0, 'ft³')).toBeCloseTo(1461.5, 1);
    expect(fromBase(r.governing?.requiredFloorArea ?? 0, 'ft²')).toBeCloseTo(182.7, 1);
    expect(r.status).toBe('fail');
    expect(r.pass).toBe(false);
    expect(r.limit?.source).toBe('ASHRAE 34 2019 Table 4-2, refrigerant concentration limit (RCL)');
    expect(r.limit?.provenance).toBe('issue text');
    expect(r.limit?.alsoPrintedIn).toEqual(['IMC Table 1103.1 (from memory)']);
    expect(r.message).toContain('38 lb exceeds the 20.8 lb that office (800 ft³) allows at 26 lb/Mcf');
    expect(r.message).toContain('182.7 ft²');
  });

  it('20.8 lb in the same office is exactly at the limit and passes (inclusive)', () => {
    const at = checkRefrigerantConcentration({
      refrigerant: 'R-410A',
      factoryCharge: lb(20.8),
      fieldCharge: 0,
      servedSpaceIds: ['office'],
      spaces: [room('office', 10, 10, 8)],
    });
    expect(at.status).toBe('pass');
  });
});

describe('editions and refrigerants', () => {
  const office = [room('office', 10, 10, 8)];
  it('the older ASHRAE 34 edition (25 lb/Mcf, issue text) allows 20.0 lb in 800 ft³', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-410A',
      factoryCharge: lb(20.5),
      fieldCharge: 0,
      servedSpaceIds: ['office'],
      spaces: office,
      editions: { 'ASHRAE 34': 'pre-2010' },
    });
    expect(fromBase(r.governing?.allowedCharge ?? 0, 'lb')).toBeCloseTo(20, 9);
    expect(r.status).toBe('fail'); // 20.5 lb passes at 26 but fails at 25
    expect(r.limit?.value).toBe(25);
  });

  it('an ASHRAE 34 edition without a stored value asks for the limit', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-410A', factoryCharge: 1, fieldCharge: 0, servedSpaceIds: ['office'], spaces: office, editions: { 'ASHRAE 34': '1997' },
    });
    expect(r.status).toBe('limit_not_set');
  });

  it('R-32 at 4.8 lb/Mcf (IMC Table 1103.1, issue text): 800 ft³ allows 3.84 lb', () => {
    const r = checkRefrigerantConcentration({ refrigerant: 'R-32', factoryCharge: lb(3.84), fieldCharge: 0, servedSpaceIds: ['office'], spaces: office });
    expect(fromBase(r.governing?.allowedCharge ?? 0, 'lb')).toBeCloseTo(3.84, 9);
    expect(r.status).toBe('pass');
    expect(r.limit?.source).toBe('IMC 2018 Table 1103.1');
    expect(r.limit?.alsoPrintedIn).toEqual(['ASHRAE 34 Table 4-1 (single-compound refrigerants), RCL (from memory)']);
  });

  it('R-454B: no confirmed value is stored; the job must enter the limit with its source', () => {
    expect(pickConcentrationLimit('R-454B')).toBeUndefined();
    const r = checkRefrigerantConcentration({ refrigerant: 'R-454B', factoryCharge: 5, fieldCharge: 1, servedSpaceIds: ['office'], spaces: office });
    expect(r.status).toBe('limit_not_set');
    expect(r.pass).toBeNull();
    expect(r.message).toMatch(/No confirmed published concentration limit for R-454B.*must enter the limit with its source/);
  });

  it('a job-entered override is used and cited (the value here is a test number, not a published limit)', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-454B',
      factoryCharge: lb(4),
      fieldCharge: 0,
      servedSpaceIds: ['office'],
      spaces: office,
      override: { value: 10, unit: 'lb/Mcf', source: 'Engineer of record letter (test value)' },
    });
    expect(fromBase(r.governing?.allowedCharge ?? 0, 'lb')).toBeCloseTo(8, 9);
    expect(r.status).toBe('pass');
    expect(r.limit?.source).toBe('Job entry: Engineer of record letter (test value)');
  });

  it('an override without a source is refused', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-454B', factoryCharge: 1, fieldCharge: 0, servedSpaceIds: ['office'], spaces: office, override: { value: 10, unit: 'lb/Mcf', source: ' ' },
    });
    expect(r.status).toBe('invalid');
  });

  it('lb/Mcf and g/m³ figures are separately rounded: close (within 1%) but not asserted equal', () => {
    for (const l of CONCENTRATION_LIMITS) {
      const a = limitDensity(l.lbPerMcf, 'lb/Mcf');
      const b = limitDensity(l.gPerM3, 'g/m³');
      expect(Math.abs(a - b) / b).toBeLessThan(0.01);
    }
  });

  it('a metric job computes with the g/m³ figure (420 g/m³ for R-410A, from memory)', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-410A', factoryCharge: 9, fieldCharge: 0, servedSpaceIds: ['office'], spaces: office, system: 'metric',
    });
    expect(r.limit?.unit).toBe('g/m³');
    expect(r.governing?.allowedCharge).toBeCloseTo(0.42 * 22.6534772736, 9);
  });
});

describe('spaces joined by permanent openings count together (union-find)', () => {
  it('groups connected spaces', () => {
    expect(groupConnectedSpaces(['a', 'b', 'c', 'd'], [['a', 'b'], ['c', 'b']])).toEqual([['a', 'b', 'c'], ['d']]);
    expect(groupConnectedSpaces(['a', 'b'], [['a', 'zz']])).toEqual([['a'], ['b']]);
  });

  it('a small office opening onto a large open area is checked with their combined volume', () => {
    const spaces = [room('office', 10, 10, 8), room('open area', 40, 30, 8)];
    const closed = checkRefrigerantConcentration({ refrigerant: 'R-410A', factoryCharge: lb(38), fieldCharge: 0, servedSpaceIds: ['office'], spaces });
    expect(closed.status).toBe('fail');
    const open = checkRefrigerantConcentration({
      refrigerant: 'R-410A', factoryCharge: lb(38), fieldCharge: 0, servedSpaceIds: ['office'], spaces, openings: [['office', 'open area']],
    });
    expect(open.status).toBe('pass');
    expect(fromBase(open.governing?.volume ?? 0, 'ft³')).toBeCloseTo(800 + 9600, 6);
  });

  it('the smallest served group governs', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-410A',
      factoryCharge: lb(30),
      fieldCharge: 0,
      servedSpaceIds: ['a', 'c'],
      spaces: [room('a', 10, 10, 8), room('b', 30, 30, 8), room('c', 12, 12, 9)],
      openings: [['a', 'b']],
    });
    expect(r.governing?.spaceIds).toEqual(['c']);
    expect(fromBase(r.governing?.allowedCharge ?? 0, 'lb')).toBeCloseTo(26 * 1.296, 9); // 12 × 12 × 9 = 1,296 ft³
    expect(r.groups).toHaveLength(2);
  });

  it('institutional occupancy halves the limit (ASHRAE 15 7.2 / IMC 1104.3, from memory) and can make a larger room govern', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-410A',
      factoryCharge: lb(10),
      fieldCharge: 0,
      servedSpaceIds: ['office', 'patient room'],
      spaces: [room('office', 10, 10, 8), room('patient room', 12, 12, 8, { institutional: true })],
    });
    expect(r.governing?.spaceIds).toEqual(['patient room']);
    expect(r.governing?.institutional).toBe(true);
    expect(fromBase(r.governing?.allowedCharge ?? 0, 'lb')).toBeCloseTo(13 * 1.152, 9); // 26/2 × 1,152 ft³
    expect(r.message).toMatch(/halved: institutional occupancy, ASHRAE 15 Section 7\.2 and IMC Section 1104\.3 \(both from memory; confirm the sections\)/);
    expect(r.halvingSource).toMatch(/from memory/);
  });

  it('rejects missing data with a reason', () => {
    expect(
      checkRefrigerantConcentration({ refrigerant: 'R-410A', factoryCharge: 1, fieldCharge: 0, servedSpaceIds: [], spaces: [room('a', 1, 1, 1)] }).message,
    ).toMatch(/serves no spaces/);
    expect(
      checkRefrigerantConcentration({ refrigerant: 'R-410A', factoryCharge: 1, fieldCharge: 0, servedSpaceIds: ['x'], spaces: [room('a', 1, 1, 1)] }).message,
    ).toMatch(/Unknown served space/);
    expect(
      checkRefrigerantConcentration({ refrigerant: 'R-410A', factoryCharge: 1, fieldCharge: 0, servedSpaceIds: ['a'], spaces: [{ id: 'a', name: 'Lobby' }] }).message,
    ).toMatch(/without a volume.*Lobby/);
    expect(
      checkRefrigerantConcentration({ refrigerant: 'R-410A', factoryCharge: -1, fieldCharge: 0, servedSpaceIds: ['a'], spaces: [room('a', 1, 1, 1)] }).status,
    ).toBe('invalid');
  });

  it('a space given by volume only still works (no floor area to report)', () => {
    const r = checkRefrigerantConcentration({
      refrigerant: 'R-410A', factoryCharge: lb(38), fieldCharge: 0, servedSpaceIds: ['a'], spaces: [{ id: 'a', volume: toBase(800, 'ft³') }],
    });
    expect(r.status).toBe('fail');
    expect(r.governing?.requiredFloorArea).toBeNull();
  });
});

describe('A2L minimum floor area (IEC 60335-2-40:2018 Annex GG.2; check values: issue text)', () => {
  it.each([
    // [charge kg, mount, A_min m², decimals printed]
    [1.84, 'floor', 28.81, 2],
    [2.0, 'floor', 34.04, 2],
    [3.0, 'floor', 76.6, 1],
    [1.84, 'wall', 3.2, 2],
    [1.84, 'ceiling', 2.14, 2],
  ] as const)('R-32 %p kg, %s-mounted → %p m²', (m, mount, area, decimals) => {
    expect(a2lMinFloorArea(m, mount)).toBeCloseTo(area, decimals);
  });

  it('explicit h0 equals the named position', () => {
    expect(a2lMinFloorArea(1.84, 0.6)).toBe(a2lMinFloorArea(1.84, 'floor'));
    expect(() => a2lMinFloorArea(1, 0)).toThrow(/release height/);
  });

  it('room check between m1 and m2: at or above A_min passes', () => {
    // 2.0 kg R-32 is above m1 (1.842 kg) and below m2 (7.982 kg): A_min applies (34.04 m² floor-standing).
    const above = checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 2.0, floorArea: 35, mount: 'floor' });
    expect(above).toMatchObject({ status: 'pass', pass: true, band: 'm1_to_m2', releaseHeight: 0.6 });
    expect(checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 2.0, floorArea: 30, mount: 'floor' })).toMatchObject({ status: 'fail', pass: false });
    const exact = a2lMinFloorArea(2.0, 'wall');
    expect(checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 2.0, floorArea: exact, mount: 'wall' }).status).toBe('pass');
    expect(checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 2.0, floorArea: null, mount: 'wall' }).status).toBe('not_measured');
  });

  it('R-454B: no LFL stored, so the job must enter it', () => {
    const r = checkA2lFloorArea({ refrigerant: 'R-454B', chargeKg: 2, floorArea: 30, mount: 'floor' });
    expect(r.status).toBe('limit_not_set');
    expect(r.message).toMatch(/No LFL is stored for R-454B/);
  });
});

// m1 = 6 m³ × LFL and m2 = 26 m³ × LFL (IEC 60335-2-40:2018 Annex GG.1, from memory: confirm the
// clause); R-32 LFL 0.307 kg/m³ (IEC 60335-2-40:2018 Annex BB) → m1 1.842 kg, m2 7.982 kg.
describe('A2L charge bands (IEC 60335-2-40:2018 Annex GG.1, m1 and m2 from memory)', () => {
  it('1.5 kg of R-32 in a 15 m² room passes: below m1, no room-area requirement', () => {
    const r = checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 1.5, floorArea: 15, mount: 'ceiling' });
    expect(r).toMatchObject({ status: 'pass', pass: true, band: 'below_m1', minArea: null });
    expect(r.m1).toBeCloseTo(1.842, 9);
    expect(r.m2).toBeCloseTo(7.982, 9);
    expect(r.message).toMatch(/below m1: no room-area requirement/);
    expect(r.message).toMatch(/from memory, confirm the clause/);
  });

  it.each([
    // [charge kg, floor area m², status, band]
    [1.842, 1, 'pass', 'below_m1'], // exactly m1: not above it
    [1.843, 1, 'fail', 'm1_to_m2'], // just above m1: A_min applies
    [7.982, 1000, 'pass', 'm1_to_m2'], // exactly m2: still A_min
    [7.983, 1000, 'additional_measures', 'above_m2'],
  ] as const)('R-32 %p kg in %p m² → %s (%s)', (charge, area, status, band) => {
    const r = checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: charge, floorArea: area, mount: 'wall' });
    expect(r.status).toBe(status);
    expect(r.band).toBe(band);
  });

  it('above m2 is neither pass nor fail: the design must show additional measures', () => {
    const r = checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 9, floorArea: 500, mount: 'ceiling' });
    expect(r.status).toBe('additional_measures');
    expect(r.pass).toBeNull();
    expect(r.minArea).toBeNull();
    expect(r.message).toMatch(/design must show additional measures \(ventilation, leak detection, shut-off\)/);
  });

  it('the release height follows the mounting position (Annex GG: floor 0.6 m, wall 1.8 m, ceiling 2.2 m)', () => {
    const floor = checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 3, floorArea: 20, mount: 'floor' });
    const ceiling = checkA2lFloorArea({ refrigerant: 'R-32', chargeKg: 3, floorArea: 20, mount: 'ceiling' });
    expect(floor).toMatchObject({ status: 'fail', releaseHeight: 0.6 });
    expect(floor.minArea).toBeCloseTo(76.6, 1);
    expect(ceiling).toMatchObject({ status: 'pass', releaseHeight: 2.2 });
  });
});

describe('mounting position for the release height (unit, else model, else what the kind can only be)', () => {
  it.each([
    // [kind, unit field, model field, mount, from]
    ['ducted_low', null, null, null, null], // a ducted unit may hang or stand: not guessed
    ['ahu_coil_kit', null, 'floor', 'floor', 'model'], // an air handler standing in a closet
    ['ahu_coil_kit', 'ceiling', 'floor', 'ceiling', 'unit'], // the unit's own field wins
    ['floor_ceiling', null, null, null, null],
    ['wall_mounted', null, null, 'wall', 'kind'],
    ['cassette_compact', null, null, 'ceiling', 'kind'],
    ['floor_console', null, null, 'floor', 'kind'],
  ] as const)('%s, unit %p, model %p → %p (%p)', (kind, unit, model, mount, from) => {
    expect(mountPositionOf({ kind, unit, model })).toEqual({ mount, from });
  });

  it.each([
    ['floor', 'floor'],
    ['Floor-standing', 'floor'],
    [' wall mounted ', 'wall'],
    ['CEILING_MOUNTED', 'ceiling'],
    ['roof', null],
    ['', null],
  ] as const)('reads %p as %p', (text, mount) => {
    expect(parseMountPosition(text)).toBe(mount);
  });
});

describe('each concentration limit sits under the document and table that prints it', () => {
  it('ASHRAE 34 prints blends in Table 4-2 and single compounds in Table 4-1; the IMC reprints them in Table 1103.1', () => {
    for (const l of CONCENTRATION_LIMITS) {
      if (l.document === 'ASHRAE 34') expect(l.section).toMatch(/^Table 4-[12]|older edition/);
      if (l.document === 'IMC') expect(l.section).toBe('Table 1103.1');
      for (const a of l.alsoPrintedIn ?? []) expect(['IMC', 'ASHRAE 34']).toContain(a.document);
    }
    const r32 = CONCENTRATION_LIMITS.find((l) => l.refrigerant === 'R-32')!;
    expect(r32.alsoPrintedIn?.[0]?.section).toMatch(/^Table 4-1/); // R-32 is a single compound
    const r410 = CONCENTRATION_LIMITS.find((l) => l.refrigerant === 'R-410A')!;
    expect(r410.section).toMatch(/^Table 4-2/); // R-410A is a blend
    expect(INSTITUTIONAL_HALVING.sources.every((x) => x.provenance === 'from memory')).toBe(true);
  });
});
