/**
 * Built-in code limits: every value as data with document, edition, section, value and unit.
 * Sources in each row. "from memory" = recalled, not re-read for this test; "issue text" = given
 * in the product requirements; "read" = checked against published text.
 */
import { CODE_DOCUMENTS } from '../../../shared/catalogue/types';
import {
  CODE_LIMITS,
  CODE_LIMIT_KEYS,
  CODE_LIMIT_VARIANTS,
  codeLimitSource,
  DEFAULT_EDITIONS,
  pickCodeLimit,
} from '../../../shared/calc/limits';
import { toBase } from '../../../shared/calc/quantity';

describe('CODE_LIMITS holds the keys the catalogue references', () => {
  it.each([
    // [key, document, section contains, value, unit, base (mm or ratio), source of the check value]
    ['imc.condensate.min_slope', 'IMC', '307.2.2', 0.125, 'in/ft', 1 / 96, 'IMC 2018 Section 307.2.2 (read)'],
    ['imc.aux_pan.min_depth', 'IMC', '307.2.3', 1.5, 'in', 38.1, 'IMC 2018 Section 307.2.3 item 1 (from memory)'],
    ['imc.aux_pan.min_oversize', 'IMC', '307.2.3', 3, 'in', 76.2, 'IMC 2018 Section 307.2.3 item 1 (from memory)'],
    ['nec.disconnect.max_distance', 'NFPA 70', '440.14', 50, 'ft', 15240, 'NFPA 70 (2023) Article 100 "In Sight From"; 440.14 (from memory)'],
    ['imc.working_space.min_depth', 'IMC', '306.1', 30, 'in', 762, 'IMC 2018 306.1 (from memory; confirm the section)'],
    ['imc.working_space.min_width', 'IMC', '306.1', 30, 'in', 762, 'IMC 2018 306.1 (from memory; confirm the section)'],
    ['irc.working_space.min_depth', 'IRC', 'M1305.1', 30, 'in', 762, 'IRC 2018 M1305.1 (from memory)'],
    ['irc.working_space.min_width', 'IRC', 'M1305.1', 30, 'in', 762, 'IRC 2018 M1305.1 (from memory)'],
    ['imc.attic.passage_min_height', 'IMC', '306.3', 30, 'in', 762, 'IMC 2018 306.3 (from memory; same figure read in IRC M1305.1.3)'],
    ['imc.attic.passage_min_width', 'IMC', '306.3', 22, 'in', 558.8, 'IMC 2018 306.3 (from memory; IRC M1305.1.3 read)'],
    ['imc.attic.passage_max_length', 'IMC', '306.3', 20, 'ft', 6096, 'IMC 2018 306.3 (from memory; IRC M1305.1.3 read)'],
    ['imc.attic.opening_min_width', 'IMC', '306.3', 20, 'in', 508, 'IMC 2018 306.3 (from memory; IRC M1305.1.3 read)'],
    ['imc.attic.opening_min_height', 'IMC', '306.3', 30, 'in', 762, 'IMC 2018 306.3 (from memory; IRC M1305.1.3 read)'],
    ['imc.copper_support.horizontal_small', 'IMC', '305.4', 6, 'ft', 1828.8, 'IMC 2018 Table 305.4 (issue text)'],
    ['imc.copper_support.horizontal_large', 'IMC', '305.4', 10, 'ft', 3048, 'IMC 2018 Table 305.4 (issue text)'],
    ['imc.copper_support.vertical', 'IMC', '305.4', 10, 'ft', 3048, 'IMC 2018 Table 305.4 (issue text)'],
    ['imc.copper_pipe_support.horizontal', 'IMC', '305.4', 12, 'ft', 3657.6, 'IMC 2018 Table 305.4, copper pipe (from memory)'],
    ['imc.copper_pipe_support.vertical', 'IMC', '305.4', 10, 'ft', 3048, 'IMC 2018 Table 305.4, copper pipe (from memory)'],
    ['imc.pvc_support.horizontal', 'IMC', '305.4', 4, 'ft', 1219.2, 'IMC 2018 Table 305.4, PVC pipe (from memory)'],
    ['imc.pvc_support.vertical', 'IMC', '305.4', 10, 'ft', 3048, 'IMC 2018 Table 305.4, PVC pipe (from memory)'],
    ['imc.cpvc_support.horizontal_small', 'IMC', '305.4', 3, 'ft', 914.4, 'IMC 2018 Table 305.4, CPVC ≤ 1 in (from memory)'],
    ['imc.cpvc_support.horizontal_large', 'IMC', '305.4', 4, 'ft', 1219.2, 'IMC 2018 Table 305.4, CPVC ≥ 1-1/4 in (from memory)'],
    ['imc.abs_support.horizontal', 'IMC', '305.4', 4, 'ft', 1219.2, 'IMC 2018 Table 305.4, ABS pipe (from memory)'],
    ['imc.steel_pipe_support.horizontal', 'IMC', '305.4', 12, 'ft', 3657.6, 'IMC 2018 Table 305.4, steel pipe (from memory)'],
    ['imc.steel_pipe_support.vertical', 'IMC', '305.4', 15, 'ft', 4572, 'IMC 2018 Table 305.4, steel pipe (from memory)'],
  ] as const)('%s: %s §%s %p %s = %p base (%s)', (key, doc, section, v, unit, baseValue, _source) => {
    const l = CODE_LIMITS[key];
    expect(l).toBeDefined();
    if (!l) return;
    expect(l.key).toBe(key);
    expect(l.document).toBe(doc);
    expect(l.section).toContain(section);
    expect(l.value).toBe(v);
    expect(l.unit).toBe(unit);
    expect(l.base).toBeCloseTo(baseValue, 12);
    expect(l.editions.length).toBeGreaterThan(0);
    expect(['read', 'issue text', 'from memory']).toContain(l.provenance);
    expect(l.documentTitle.length).toBeGreaterThan(3);
  });

  it('every stored limit names its document, editions, section and converts its unit to the base value', () => {
    for (const key of CODE_LIMIT_KEYS) {
      for (const l of CODE_LIMIT_VARIANTS[key] ?? []) {
        expect(CODE_DOCUMENTS).toContain(l.document);
        expect(l.section).not.toBe('');
        expect(l.base).toBe(toBase(l.value, l.unit));
      }
    }
  });

  it('the condensate minimum is the exact 1/96 and the code labels it "1-percent" (IMC 2018 Section 307.2.2)', () => {
    const l = CODE_LIMITS['imc.condensate.min_slope'];
    expect(l?.base).toBe(1 / 96);
    expect(l?.label).toContain('1-percent');
    expect(l?.base).not.toBe(0.01);
  });
});

describe('editions', () => {
  it('uses the default edition when the job chose none', () => {
    const p = pickCodeLimit('imc.condensate.min_slope');
    expect(p.ok && p.edition).toBe(DEFAULT_EDITIONS.IMC);
  });

  it.each(['2015', '2018', '2021'])('IMC %s is stored for the slope (IMC 2015/2018/2021 Section 307.2.2)', (ed) => {
    const p = pickCodeLimit('imc.condensate.min_slope', { IMC: ed });
    expect(p.ok).toBe(true);
  });

  it('an edition without a stored value is an error saying what to do, never a silent fallback', () => {
    const p = pickCodeLimit('imc.condensate.min_slope', { IMC: '2009' });
    expect(p.ok).toBe(false);
    expect(!p.ok && p.error).toMatch(/No value of imc.condensate.min_slope is stored for IMC 2009.*job setting/);
  });

  it('unknown key', () => {
    const p = pickCodeLimit('imc.nope');
    expect(!p.ok && p.error).toMatch(/Unknown code limit/);
  });

  it('cites document, edition and section', () => {
    const l = CODE_LIMITS['imc.condensate.min_slope'];
    expect(l && codeLimitSource(l, '2015')).toBe('IMC 2015 Section 307.2.2');
    expect(l && codeLimitSource(l)).toBe('IMC 2018 Section 307.2.2');
  });
});
