/**
 * Disconnect within sight, working space, attic access, copper pipe supports. Sources:
 * - NFPA 70 (2023) Article 100 "In Sight From (Within Sight From, Within Sight)": visible and not
 *   more than 50 ft (15 m); 440.14 requires it for A/C equipment (from memory);
 * - working space at the control side, 30 in deep × 30 in wide: IMC 2018 306.1 for commercial work
 *   (from memory; confirm the section) and IRC 2018 M1305.1 for residential work (from memory);
 * - IMC 2018 306.3: attic passageway ≥ 30 in high, ≥ 22 in wide, ≤ 20 ft long; opening ≥ 20 × 30 in
 *   (from memory; the same figures read in IRC M1305.1.3); 50 ft for a ≥ 6 ft high passageway (from memory);
 * - IMC 2018 Table 305.4, copper or copper-alloy TUBING: ≤ 1-1/4 in 6 ft horizontal, ≥ 1-1/2 in 10 ft, vertical 10 ft
 *   (issue text); copper or copper-alloy PIPE 12 ft / 10 ft, PVC and ABS pipe 4 ft / 10 ft, CPVC ≤ 1 in 3 ft and
 *   ≥ 1-1/4 in 4 ft / 10 ft, steel pipe 12 ft / 15 ft (each row from memory: confirm in the adopted edition);
 * - copper tube nominal size = OD − 1/8 in (ASTM B88 / B280 sizing, from memory).
 */
import type { QuantityKind } from '../../../shared/catalogue/types';
import { checkAtticAccess, checkWorkingSpace } from '../../../shared/calc/clearance';
import { checkDisconnect } from '../../../shared/calc/electrical';
import { parseQuantity } from '../../../shared/calc/quantity';
import { checkPipeSupportSpacing, copperSupportKey, SUPPORT_MATERIALS, SUPPORT_ROWS, supportKey } from '../../../shared/calc/supports';
import { CODE_LIMITS } from '../../../shared/calc/limits';
import * as calc from '../../../shared/calc';

function q(text: string, kind: QuantityKind = 'length'): number {
  const r = parseQuantity(text, kind);
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

describe('disconnect within sight (NFPA 70 2023 Art. 100 "In Sight From"; 440.14)', () => {
  it.each([
    // [visible, distance, status, why]
    [true, "50' 0\"", 'pass', 'exactly 50 ft: inclusive'],
    [true, "10' 0\"", 'pass', ''],
    [true, '15 m', 'pass', '15 m (the code\'s metric figure) is inside 50 ft = 15.24 m'],
    [true, '15.24 m', 'pass', '= 50 ft'],
    [true, "50' 0-1/16\"", 'fail', 'over 50 ft'],
    [true, '15.3 m', 'fail', 'over 50 ft'],
    [false, "10' 0\"", 'fail', 'not visible'],
    [false, "60' 0\"", 'fail', 'neither'],
    [null, "10' 0\"", 'not_measured', 'visibility not answered'],
  ] as const)('visible %p at %s → %s %s', (visible, distance, status, _why) => {
    const r = checkDisconnect({ visible, distance: q(distance) });
    expect(r.status).toBe(status);
  });

  it('explains the reason and cites the code', () => {
    const r = checkDisconnect({ visible: false, distance: q("60' 0\"") });
    expect(r.message).toMatch(/Disconnect visible from the unit: no, but yes is required \(NFPA 70 2023 Article 100, "In Sight From"; 440.14\)/);
    expect(r.message).toMatch(/10' 0" over the maximum 50' 0"/);
    const ok = checkDisconnect({ visible: true, distance: null });
    expect(ok.status).toBe('not_measured');
  });

  it('uses the chosen NEC edition in the citation', () => {
    const r = checkDisconnect({ visible: true, distance: 1000, editions: { 'NFPA 70': '2020' } });
    expect(r.checks[1]?.limitSource).toContain('NFPA 70 2020');
  });
});

describe('working space at the control side (IMC 2018 306.1 and IRC 2018 M1305.1, 30 × 30 in, both from memory)', () => {
  it('commercial work is checked against the IMC, residential work against the IRC', () => {
    const depth = q('30"');
    const imc = checkWorkingSpace({ depth, width: depth });
    expect(imc.checks.map((r) => r.limitSource)).toEqual(['IMC 2018 Section 306.1', 'IMC 2018 Section 306.1']);
    const irc = checkWorkingSpace({ code: 'IRC', depth, width: depth });
    expect(irc.checks.map((r) => r.limitSource)).toEqual(['IRC 2018 Section M1305.1', 'IRC 2018 Section M1305.1']);
  });

  it.each([
    ['30"', '30"', 'pass'], // at the limit
    ['36"', "3' 0\"", 'pass'],
    ['29-15/16"', '30"', 'fail'],
    ['30"', '762 mm', 'pass'], // 30 in = 762 mm exactly (NIST SP 811 (2008) B.8)
    ['30"', '761 mm', 'fail'],
  ])('%s deep × %s wide → %s', (depth, width, status) => {
    expect(checkWorkingSpace({ depth: q(depth), width: q(width) }).status).toBe(status);
    expect(checkWorkingSpace({ code: 'IRC', depth: q(depth), width: q(width) }).status).toBe(status);
  });
});

describe('attic access (IMC 2018 306.3)', () => {
  const ok = {
    passageHeight: q('30"'),
    passageWidth: q('22"'),
    passageLength: q("20' 0\""),
    openingWidth: q('20"'),
    openingHeight: q('30"'),
  };
  it('everything exactly at its limit passes (inclusive)', () => {
    expect(checkAtticAccess(ok).status).toBe('pass');
  });
  it.each([
    ['passageHeight', '29-7/8"'],
    ['passageWidth', '21-1/2"'],
    ['passageLength', "20' 0-1/16\""],
    ['openingWidth', '19-1/2"'],
    ['openingHeight', '29"'],
  ] as const)('%s = %s fails', (field, text) => {
    const r = checkAtticAccess({ ...ok, [field]: q(text) });
    expect(r.status).toBe('fail');
  });
  it('the opening may be either way round (30 × 20 = 20 × 30)', () => {
    expect(checkAtticAccess({ ...ok, openingWidth: q('30"'), openingHeight: q('20"') }).status).toBe('pass');
  });
  it('a tall passageway may run 50 ft (IMC 306.3 exception, from memory)', () => {
    expect(checkAtticAccess({ ...ok, passageLength: q("30' 0\"") }).status).toBe('fail');
    expect(checkAtticAccess({ ...ok, passageLength: q("30' 0\""), tallPassageway: true }).status).toBe('pass');
  });
});

describe('copper tubing support spacing (IMC 2018 Table 305.4, tubing rows: issue text)', () => {
  it.each([
    // [size in, basis, orientation, spacing, status, key]
    [0.75, 'nominal', 'horizontal', "6' 0\"", 'pass', 'imc.copper_support.horizontal_small'],
    [1.25, 'nominal', 'horizontal', "6' 0\"", 'pass', 'imc.copper_support.horizontal_small'],
    [1.25, 'nominal', 'horizontal', "6' 1\"", 'fail', 'imc.copper_support.horizontal_small'],
    [1.5, 'nominal', 'horizontal', "10' 0\"", 'pass', 'imc.copper_support.horizontal_large'],
    [2, 'nominal', 'horizontal', "10' 1\"", 'fail', 'imc.copper_support.horizontal_large'],
    [0.375, 'nominal', 'vertical', "10' 0\"", 'pass', 'imc.copper_support.vertical'],
    [0.375, 'nominal', 'vertical', "10' 1/2\"", 'fail', 'imc.copper_support.vertical'],
    [1.375, 'od', 'horizontal', "8' 0\"", 'fail', 'imc.copper_support.horizontal_small'], // 1-3/8 OD = 1-1/4 nominal
    [1.625, 'od', 'horizontal', "8' 0\"", 'pass', 'imc.copper_support.horizontal_large'], // 1-5/8 OD = 1-1/2 nominal
    [0.875, 'od', 'horizontal', "6' 0\"", 'pass', 'imc.copper_support.horizontal_small'], // 7/8 OD = 3/4 nominal
  ] as const)('%p in (%s), %s, %s → %s', (size, basis, orientation, spacing, status, key) => {
    const r = checkPipeSupportSpacing({ size, basis, orientation, spacing: q(spacing) });
    expect(r.status).toBe(status);
    expect(r.key).toBe(key);
    expect(r.limitSource).toBe('IMC 2018 Table 305.4');
  });

  it('a size between the table rows is refused with a reason', () => {
    const r = checkPipeSupportSpacing({ size: 1.375, orientation: 'horizontal', spacing: 1000 });
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/not a nominal size in IMC Table 305.4/);
    expect(copperSupportKey(0, 'horizontal').ok).toBe(false);
  });
});

describe('each material and form on its own row, as IMC 2018 Table 305.4 prints it (rows other than copper tubing from memory)', () => {
  it.each([
    // [material, nominal size in, orientation, spacing, status, key, source of the row value]
    ['copper_pipe', 1, 'horizontal', "12' 0\"", 'pass', 'imc.copper_pipe_support.horizontal'], // copper pipe 12 ft (from memory)
    ['copper_pipe', 1, 'horizontal', "12' 1\"", 'fail', 'imc.copper_pipe_support.horizontal'],
    ['copper_tubing', 1, 'horizontal', "12' 0\"", 'fail', 'imc.copper_support.horizontal_small'], // the same span on tubing ≤ 1-1/4 in (6 ft) fails
    ['copper_pipe', 2, 'vertical', "10' 0\"", 'pass', 'imc.copper_pipe_support.vertical'], // 10 ft (from memory)
    ['pvc_pipe', 0.75, 'horizontal', "4' 0\"", 'pass', 'imc.pvc_support.horizontal'], // PVC pipe 4 ft (from memory): a plastic drain
    ['pvc_pipe', 0.75, 'horizontal', "4' 1\"", 'fail', 'imc.pvc_support.horizontal'],
    ['pvc_pipe', 1, 'vertical', "10' 0\"", 'pass', 'imc.pvc_support.vertical'], // 10 ft (from memory)
    ['cpvc', 1, 'horizontal', "3' 0\"", 'pass', 'imc.cpvc_support.horizontal_small'], // CPVC ≤ 1 in 3 ft (from memory)
    ['cpvc', 1, 'horizontal', "3' 1\"", 'fail', 'imc.cpvc_support.horizontal_small'],
    ['cpvc', 1.25, 'horizontal', "4' 0\"", 'pass', 'imc.cpvc_support.horizontal_large'], // CPVC ≥ 1-1/4 in 4 ft (from memory)
    ['abs_pipe', 1.5, 'horizontal', "4' 1\"", 'fail', 'imc.abs_support.horizontal'], // ABS 4 ft (from memory)
    ['steel_pipe', 2, 'vertical', "15' 0\"", 'pass', 'imc.steel_pipe_support.vertical'], // steel 15 ft vertical (from memory)
  ] as const)('%s %p in, %s, %s → %s', (material, size, orientation, spacing, status, key) => {
    const r = checkPipeSupportSpacing({ material, size, orientation, spacing: q(spacing) });
    expect(r.status).toBe(status);
    expect(r.key).toBe(key);
    expect(r.limitSource).toBe('IMC 2018 Table 305.4');
  });

  it('every row names its material and form and has its own horizontal and vertical values', () => {
    for (const m of SUPPORT_MATERIALS) expect(SUPPORT_ROWS.some((r) => r.material === m)).toBe(true);
    for (const row of SUPPORT_ROWS) {
      expect(CODE_LIMITS[row.horizontal]?.label.startsWith(row.label.split(',')[0]!)).toBe(true);
      expect(CODE_LIMITS[row.vertical]?.label.startsWith(row.label.split(',')[0]!)).toBe(true);
    }
    // No label mixes pipe and tubing rows.
    for (const key of Object.keys(CODE_LIMITS).filter((k) => k.includes('_support'))) {
      expect(CODE_LIMITS[key]!.label).not.toMatch(/pipe or tubing.*copper|copper.*pipe or tubing/i);
    }
  });

  it('a CPVC size between the rows is refused; an outside diameter converts only for copper tubing', () => {
    expect(supportKey('cpvc', 1.1, 'horizontal')).toMatchObject({ ok: false, error: expect.stringMatching(/not a nominal size in IMC Table 305.4 for CPVC/) });
    expect(checkPipeSupportSpacing({ material: 'pvc_pipe', size: 0.875, basis: 'od', orientation: 'horizontal', spacing: 1000 }).status).toBe('invalid');
  });
});

describe('index re-exports the public API', () => {
  it.each([
    'parseQuantity', 'formatQuantity', 'convert', 'toBase', 'fromBase', 'evaluateRule', 'makeLimitResolver',
    'pickCodeLimit', 'checkDrainSlope', 'drainPipeSize', 'checkManifoldDrain', 'checkDuctlessDrainTrap',
    'checkAuxiliaryPan', 'checkRefrigerantConcentration', 'a2lMinFloorArea', 'checkA2lFloorArea',
    'checkDisconnect', 'checkWorkingSpace', 'checkAtticAccess', 'checkPipeSupportSpacing',
  ])('%s', (name) => {
    expect(typeof (calc as Record<string, unknown>)[name]).toBe('function');
  });
  it('CODE_LIMITS', () => {
    expect(Object.keys(calc.CODE_LIMITS).length).toBeGreaterThanOrEqual(14);
  });
});
