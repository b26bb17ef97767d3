/**
 * Sampling audits. Sources beside each value:
 * - Code letters: ANSI/ASQ Z1.4-2003 (R2018) Table I "Sample size code letters" (= ISO 2859-1:1999
 *   Table 1), general inspection levels I, II, III.
 * - Plans: ANSI/ASQ Z1.4 Table II-A "Single sampling plans for normal inspection" (= ISO 2859-1
 *   Table 2-A), arrows followed to the first plan in their direction, the sample size taken from the
 *   plan's own row (Z1.4 §9.4).
 * - Tiers: a commissioning practice (10 percent of the lot, at least 5 units), not a standard.
 * - Fisher–Yates: Knuth, TAOCP vol. 2, §3.4.2 Algorithm P.
 */
import * as fc from 'fast-check';
import {
  AQLS,
  CODE_LETTERS,
  codeLetter,
  decide,
  drawOrder,
  drawSample,
  fisherYates,
  planTiered,
  planZ14,
  resolvePlan,
  SAMPLE_SIZE_BY_LETTER,
  seededRandom,
  TABLE_II_A,
  type Aql,
  type CodeLetter,
  type SampledResult,
} from '../../../shared/calc/sampling';

describe('Z1.4 Table I, general inspection level II', () => {
  // Z1.4 Table I, level II column; sample sizes from Table II-A's "sample size" column.
  it.each([
    [2, 'A', 2], [8, 'A', 2],
    [9, 'B', 3], [15, 'B', 3],
    [16, 'C', 5], [25, 'C', 5],
    [26, 'D', 8], [50, 'D', 8],
    [51, 'E', 13], [90, 'E', 13],
    [91, 'F', 20], [150, 'F', 20],
    [151, 'G', 32], [280, 'G', 32],
    [281, 'H', 50], [500, 'H', 50],
    [501, 'J', 80], [1200, 'J', 80],
    [1201, 'K', 125], [3200, 'K', 125],
    [3201, 'L', 200], [10000, 'L', 200],
    [10001, 'M', 315], [35000, 'M', 315],
    [35001, 'N', 500], [150000, 'N', 500],
    [150001, 'P', 800], [500000, 'P', 800],
    [500001, 'Q', 1250], [2_000_000, 'Q', 1250],
  ] as const)('lot %i → %s (n %i) [Z1.4 Table I]', (lot, letter, n) => {
    expect(codeLetter(lot, 'II')).toBe(letter);
    expect(SAMPLE_SIZE_BY_LETTER[letter]).toBe(n);
  });

  // Z1.4 Table I, levels I and III at the row of lots 91 to 150 and the first and last rows.
  it.each([
    [120, 'I', 'D'], [120, 'III', 'G'],
    [5, 'I', 'A'], [5, 'III', 'B'],
    [600_000, 'I', 'N'], [600_000, 'III', 'R'],
    [1000, 'I', 'G'], [1000, 'III', 'K'],
  ] as const)('lot %i at level %s → %s [Z1.4 Table I]', (lot, level, letter) => {
    expect(codeLetter(lot, level)).toBe(letter);
  });

  it('refuses a lot of fewer than 2 units', () => {
    expect(() => codeLetter(1, 'II')).toThrow(RangeError);
  });
});

const letters = (s: string) => s.split('') as CodeLetter[];

describe('Z1.4 Table II-A, normal inspection, arrows resolved', () => {
  // Each row: AQL, code letters, resolved sample size, Ac, Re [Z1.4 Table II-A].
  const cases: [Aql, string, number, number, number][] = [
    ['1.0', 'ABCDEF', 13, 0, 1],
    ['1.0', 'GH', 50, 1, 2],
    ['1.0', 'J', 80, 2, 3],
    ['1.0', 'K', 125, 3, 4],
    ['1.0', 'L', 200, 5, 6],
    ['1.0', 'M', 315, 7, 8],
    ['1.0', 'N', 500, 10, 11],
    ['2.5', 'ABCD', 5, 0, 1],
    ['2.5', 'EF', 20, 1, 2],
    ['2.5', 'G', 32, 2, 3],
    ['2.5', 'H', 50, 3, 4],
    ['2.5', 'J', 80, 5, 6],
    ['2.5', 'K', 125, 7, 8],
    ['2.5', 'L', 200, 10, 11],
    ['2.5', 'M', 315, 14, 15],
    ['2.5', 'N', 500, 21, 22],
    ['4.0', 'ABC', 3, 0, 1],
    ['4.0', 'DE', 13, 1, 2],
    ['4.0', 'F', 20, 2, 3],
    ['4.0', 'G', 32, 3, 4],
    ['4.0', 'H', 50, 5, 6],
    ['4.0', 'J', 80, 7, 8],
    ['4.0', 'K', 125, 10, 11],
    ['4.0', 'L', 200, 14, 15],
    ['4.0', 'MN', 315, 21, 22],
  ];
  const rows = cases.flatMap(([aql, ls, n, ac, re]) => letters(ls).map((l) => [aql, l, n, ac, re] as const));
  it.each(rows)('AQL %s, letter %s → n %i, Ac %i / Re %i [Z1.4 Table II-A]', (aql, letter, n, ac, re) => {
    const plan = resolvePlan(letter, aql, 1_000_000);
    expect(plan.tableSampleSize).toBe(n);
    expect(plan.sampleSize).toBe(n);
    expect([plan.accept, plan.reject]).toEqual([ac, re]);
    expect(plan.everyUnit).toBe(false);
  });

  it('every letter and offered AQL resolves to a plan with Re = Ac + 1 (single sampling)', () => {
    for (const letter of CODE_LETTERS) {
      for (const aql of AQLS) {
        const p = resolvePlan(letter, aql, 1_000_000);
        expect(p.reject).toBe(p.accept + 1);
        expect(TABLE_II_A[p.planLetter][AQLS.indexOf(aql)]).toBe(`${p.accept}/${p.reject}`);
      }
    }
  });

  it('a sample as large as the lot inspects every unit, with the plan\'s Ac/Re (Z1.4 §9.4)', () => {
    // Lot of 10 at level II: letter B; AQL 1.0 arrows down to E (n 13) > 10 units.
    const plan = resolvePlan(codeLetter(10, 'II'), '1.0', 10);
    expect(plan).toMatchObject({ letter: 'B', planLetter: 'E', tableSampleSize: 13, sampleSize: 10, accept: 0, reject: 1, everyUnit: true });
  });

  it('the lot of 120 at level II: F; major at AQL 2.5 → 20, 1/2; AQL 1.0 → 13, 0/1 [Z1.4 Tables I and II-A]', () => {
    const plan = planZ14(120, 'II', { critical: { aql: null }, major: { aql: '2.5' }, minor: { aql: '1.0' } });
    expect(plan.letter).toBe('F');
    expect(plan.sampleSize).toBe(20);
    expect(plan.classes.map((c) => [c.severity, c.sampleSize, c.accept, c.reject])).toEqual([
      ['critical', 20, 0, 1],
      ['major', 20, 1, 2],
      ['minor', 13, 0, 1],
    ]);
  });
});

describe('the tiered commissioning scheme (practice, not a standard)', () => {
  it.each([
    // [lot, tier size, second tier, fail at]: 10 percent rounded up, at least 5 units.
    [120, 12, 12, 2],
    [40, 5, 5, 1],
    [3, 3, 0, 1],
    [7, 5, 2, 1],
    [55, 6, 6, 1],
    [200, 20, 20, 2],
  ])('lot %i → tiers of %i and %i, a tier fails at %i failed units', (lot, t1, t2, failAt) => {
    const plan = planTiered(lot);
    expect(plan.tierSizes).toEqual([t1, t2]);
    expect(plan.failAt[0]).toBe(failAt);
  });

  const r = (position: number, checked: boolean, major = 0): SampledResult => ({ position, checked, defects: { major } });

  it('accepts when the first tier is checked below 10 percent failed', () => {
    const plan = planTiered(40); // 5 units, one failure fails the tier
    expect(decide(plan, [1, 2, 3, 4, 5].map((p) => r(p, true))).decision).toBe('accept');
    expect(decide(plan, [1, 2, 3, 4].map((p) => r(p, true))).decision).toBe('continue');
  });

  it('expands to the second tier at 10 percent failed, rejects when the second fails too', () => {
    const plan = planTiered(120); // 12 + 12, fail at 2
    const firstOk = Array.from({ length: 12 }, (_, i) => r(i + 1, true, i < 1 ? 1 : 0));
    expect(decide(plan, firstOk).decision).toBe('accept');
    const firstFails = Array.from({ length: 12 }, (_, i) => r(i + 1, i < 2, i < 2 ? 1 : 0));
    const expanded = decide(plan, firstFails);
    expect(expanded.decision).toBe('expand');
    expect(expanded.activeTier).toBe(2);
    const secondPasses = [...firstFails, ...Array.from({ length: 12 }, (_, i) => r(13 + i, true))];
    expect(decide(plan, secondPasses).decision).toBe('accept');
    const secondFails = [...firstFails, r(13, true, 1), r(14, true, 2)];
    expect(decide(plan, secondFails).decision).toBe('reject');
  });

  it('minor defects do not fail a unit by default', () => {
    const plan = planTiered(40);
    const res = [1, 2, 3, 4, 5].map((p): SampledResult => ({ position: p, checked: true, defects: { minor: 3 } }));
    expect(decide(plan, res).decision).toBe('accept');
  });
});

describe('the Z1.4 decision at the exact Ac and Re', () => {
  const plan = planZ14(120, 'II', { major: { aql: '2.5' }, minor: { aql: '1.0' } }); // major 20 1/2, minor 13 0/1
  const all = (defects: (p: number) => SampledResult['defects'], upTo = 20) =>
    Array.from({ length: upTo }, (_, i): SampledResult => ({ position: i + 1, checked: true, defects: defects(i + 1) }));

  it('major defects = Ac (1) with all 20 checked: accept', () => {
    expect(decide(plan, all((p) => (p === 20 ? { major: 1 } : {}))).decision).toBe('accept');
  });
  it('major defects = Re (2): reject, even before the sample is checked', () => {
    const res = all((p) => (p <= 2 ? { major: 1 } : {}), 3);
    expect(decide(plan, res).decision).toBe('reject');
  });
  it('a minor defect on unit 14 (beyond minor\'s 13) does not count for minor', () => {
    const s = decide(plan, all((p) => (p === 14 ? { minor: 1 } : {})));
    expect(s.classes.find((c) => c.severity === 'minor')!.defects).toBe(0);
    expect(s.decision).toBe('accept');
  });
  it('a minor defect on unit 13 rejects (Ac 0 / Re 1)', () => {
    expect(decide(plan, all((p) => (p === 13 ? { minor: 1 } : {}))).decision).toBe('reject');
  });
  it('unchecked units keep it open', () => {
    expect(decide(plan, all(() => ({}), 19)).decision).toBe('continue');
  });
});

describe('the draw (property tests)', () => {
  const lotArb = fc.uniqueArray(fc.uuid(), { minLength: 2, maxLength: 300 });
  const seedArb = fc.string({ minLength: 1, maxLength: 24 });

  it('the sample has the planned size, no duplicates, only lot members', () => {
    fc.assert(
      fc.property(lotArb, seedArb, fc.constantFrom('I', 'II', 'III' as const), fc.constantFrom(...AQLS), (lot, seed, level, aql) => {
        for (const plan of [planZ14(lot.length, level, { major: { aql } }), planTiered(lot.length)]) {
          const sample = drawSample(lot, seed, plan);
          expect(sample).toHaveLength(plan.sampleSize);
          expect(new Set(sample.map((s) => s.unitId)).size).toBe(sample.length);
          const members = new Set(lot);
          expect(sample.every((s) => members.has(s.unitId))).toBe(true);
          expect(sample.map((s) => s.position)).toEqual(sample.map((_, i) => i + 1));
        }
      }),
    );
  });

  it('the same seed draws the same units, whatever order the lot is listed in', () => {
    fc.assert(
      fc.property(lotArb, seedArb, (lot, seed) => {
        expect(drawOrder([...lot].reverse(), seed)).toEqual(drawOrder(lot, seed));
      }),
    );
  });

  it('a known seed draws a known order (the draw is pinned: a changed PRNG or shuffle fails here)', () => {
    expect(drawOrder(['a', 'b', 'c', 'd', 'e', 'f'], 'x1')).toEqual(['c', 'b', 'a', 'e', 'f', 'd']);
  });

  it('Fisher–Yates reaches every order of 3 items, each about a sixth of the time', () => {
    const counts = new Map<string, number>();
    const random = seededRandom('uniform');
    for (let i = 0; i < 6000; i += 1) {
      const key = fisherYates(['x', 'y', 'z'], random).join('');
      counts.set(key, (counts.get(key) ?? 0) + 1);
    }
    expect(counts.size).toBe(6);
    for (const n of counts.values()) expect(Math.abs(n - 1000)).toBeLessThan(150);
  });
});
