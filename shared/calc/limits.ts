/**
 * Code limits built into Trimout, as data. Each value carries its document, edition, section or
 * table, the value and unit as the document states it, and how we know it (`provenance`):
 *   - "read": checked against published text of that edition (or a local adoption reproducing it);
 *   - "issue text": given in the product's requirements, not re-read from the document here;
 *   - "from memory": recalled, to be confirmed against the document before relying on it.
 * Values change between editions, so every entry names the editions it covers and a job picks
 * its editions (EditionChoice). A key's entry in CODE_LIMITS is its default edition.
 *
 * Trimout records observations; it does not certify. Local amendments, the adopted edition and
 * the manufacturer's installation manual govern.
 */
import type { CodeDocument, EditionChoice, QuantityKind } from '../catalogue/types';
import { toBase } from './quantity';

export type Provenance = 'read' | 'issue text' | 'from memory';

export interface CodeLimit {
  key: string;
  label: string;
  document: CodeDocument;
  /** Full title of the document. */
  documentTitle: string;
  /** Editions this value is stored for (a job's chosen edition must be listed). */
  editions: readonly string[];
  /** e.g. "Section 307.2.2", "Table 305.4". */
  section: string;
  quantity: QuantityKind;
  /** How the limit is applied: the measured value must be at least / at most the limit. */
  comparison: 'at_least' | 'at_most';
  /** The value and unit as the document states them. */
  value: number;
  unit: string;
  /** The value in base units (shared/calc/quantity.ts). */
  base: number;
  provenance: Provenance;
  note?: string;
}

const TITLES: Record<CodeDocument, string> = {
  IMC: 'International Mechanical Code',
  IRC: 'International Residential Code',
  'NFPA 70': 'NFPA 70, National Electrical Code',
  'ASHRAE 34': 'ANSI/ASHRAE Standard 34, Designation and Safety Classification of Refrigerants',
  'IEC 60335-2-40': 'IEC 60335-2-40, Household and similar electrical appliances: heat pumps, air-conditioners and dehumidifiers',
};

/** The editions a job uses when it has not chosen. */
export const DEFAULT_EDITIONS: Required<EditionChoice> = {
  IMC: '2018',
  IRC: '2018',
  'NFPA 70': '2023',
  'ASHRAE 34': '2019',
  'IEC 60335-2-40': '2018',
};

const IMC_EDITIONS = ['2015', '2018', '2021'] as const;
const IRC_EDITIONS = ['2015', '2018', '2021'] as const;
const NEC_EDITIONS = ['2017', '2020', '2023'] as const;

type Entry = Omit<CodeLimit, 'key' | 'documentTitle' | 'base'>;

function entry(key: string, e: Entry): CodeLimit {
  return { key, documentTitle: TITLES[e.document], base: toBase(e.value, e.unit), ...e };
}

const MEMORY_305 = 'Row and figure from memory: confirm against Table 305.4 of the adopted edition.';

/** A row of IMC Table 305.4 (support spacing, feet, at most), in the adopted IMC editions. */
function supportRow(key: string, label: string, feet: number, provenance: Entry['provenance'], note?: string): CodeLimit {
  return entry(key, { label, document: 'IMC', editions: IMC_EDITIONS, section: 'Table 305.4', quantity: 'length', comparison: 'at_most', value: feet, unit: 'ft', provenance, ...(note ? { note } : {}) });
}

/** Every stored variant of every key (one per group of editions with the same value). */
export const CODE_LIMIT_VARIANTS: Readonly<Record<string, readonly CodeLimit[]>> = {
  'imc.condensate.min_slope': [
    entry('imc.condensate.min_slope', {
      label: 'Minimum condensate drain slope: 1/8 unit vertical in 12 units horizontal (1-percent slope)',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 307.2.2',
      quantity: 'slope',
      comparison: 'at_least',
      value: 0.125,
      unit: 'in/ft',
      provenance: 'read',
      note:
        'The code states 1/8 in per 12 in (= 1/96 ≈ 1.04%) and labels it "1-percent slope". Trimout compares against the exact 1/8 in per ft; a job that accepts 1% sets the job setting min_drain_slope.',
    }),
  ],
  'imc.aux_pan.min_depth': [
    entry('imc.aux_pan.min_depth', {
      label: 'Auxiliary drain pan minimum depth',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 307.2.3, item 1',
      quantity: 'length',
      comparison: 'at_least',
      value: 1.5,
      unit: 'in',
      provenance: 'from memory',
    }),
  ],
  'imc.aux_pan.min_oversize': [
    entry('imc.aux_pan.min_oversize', {
      label: 'Auxiliary drain pan: larger than the unit or coil in length and in width by at least',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 307.2.3, item 1',
      quantity: 'length',
      comparison: 'at_least',
      value: 3,
      unit: 'in',
      provenance: 'from memory',
    }),
  ],
  'nec.disconnect.max_distance': [
    entry('nec.disconnect.max_distance', {
      label: 'Disconnecting means within sight: visible and not more than 50 ft (15 m) away',
      document: 'NFPA 70',
      editions: NEC_EDITIONS,
      section: 'Article 100, "In Sight From (Within Sight From, Within Sight)"; 440.14',
      quantity: 'length',
      comparison: 'at_most',
      value: 50,
      unit: 'ft',
      provenance: 'from memory',
      note: 'The code prints 15 m as the metric equivalent; Trimout applies 50 ft = 15.24 m exactly.',
    }),
  ],
  // Working space at an appliance's control side: the IMC for commercial work (306.1), the IRC for
  // one- and two-family dwellings and townhouses (M1305.1). NFPA 70 110.26 is the working space about
  // electrical equipment, a different rule. Both mechanical sections from memory: confirm them.
  'imc.working_space.min_depth': [
    entry('imc.working_space.min_depth', {
      label: 'Level working space in front of the control side of an appliance: depth',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.1',
      quantity: 'length',
      comparison: 'at_least',
      value: 30,
      unit: 'in',
      provenance: 'from memory',
      note: 'From memory; confirm the section (306.1, access and service space) in the adopted edition.',
    }),
  ],
  'imc.working_space.min_width': [
    entry('imc.working_space.min_width', {
      label: 'Level working space in front of the control side of an appliance: width',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.1',
      quantity: 'length',
      comparison: 'at_least',
      value: 30,
      unit: 'in',
      provenance: 'from memory',
      note: 'From memory; confirm the section (306.1, access and service space) in the adopted edition.',
    }),
  ],
  'irc.working_space.min_depth': [
    entry('irc.working_space.min_depth', {
      label: 'Level working space in front of the control side: depth',
      document: 'IRC',
      editions: IRC_EDITIONS,
      section: 'Section M1305.1',
      quantity: 'length',
      comparison: 'at_least',
      value: 30,
      unit: 'in',
      provenance: 'from memory',
    }),
  ],
  'irc.working_space.min_width': [
    entry('irc.working_space.min_width', {
      label: 'Level working space in front of the control side: width',
      document: 'IRC',
      editions: IRC_EDITIONS,
      section: 'Section M1305.1',
      quantity: 'length',
      comparison: 'at_least',
      value: 30,
      unit: 'in',
      provenance: 'from memory',
    }),
  ],
  'imc.attic.passage_min_height': [
    entry('imc.attic.passage_min_height', {
      label: 'Attic passageway to the appliance: height',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.3',
      quantity: 'length',
      comparison: 'at_least',
      value: 30,
      unit: 'in',
      provenance: 'from memory',
      note: 'Same figures read in IRC M1305.1.3 (30 in high, 22 in wide, 20 ft long, opening 20 in by 30 in).',
    }),
  ],
  'imc.attic.passage_min_width': [
    entry('imc.attic.passage_min_width', {
      label: 'Attic passageway to the appliance: width',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.3',
      quantity: 'length',
      comparison: 'at_least',
      value: 22,
      unit: 'in',
      provenance: 'from memory',
    }),
  ],
  'imc.attic.passage_max_length': [
    entry('imc.attic.passage_max_length', {
      label: 'Attic passageway length, opening to appliance, along its centre line',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.3',
      quantity: 'length',
      comparison: 'at_most',
      value: 20,
      unit: 'ft',
      provenance: 'from memory',
    }),
  ],
  'imc.attic.passage_max_length_tall': [
    entry('imc.attic.passage_max_length_tall', {
      label: 'Attic passageway length where it is unobstructed, at least 6 ft high and 22 in wide throughout',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.3, exception',
      quantity: 'length',
      comparison: 'at_most',
      value: 50,
      unit: 'ft',
      provenance: 'from memory',
      note: 'The IRC (M1305.1.3, exception 2) does not limit the length of such a passageway; confirm the IMC figure in the adopted edition.',
    }),
  ],
  'imc.attic.opening_min_width': [
    entry('imc.attic.opening_min_width', {
      label: 'Attic access opening: smaller clear dimension',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.3',
      quantity: 'length',
      comparison: 'at_least',
      value: 20,
      unit: 'in',
      provenance: 'from memory',
    }),
  ],
  'imc.attic.opening_min_height': [
    entry('imc.attic.opening_min_height', {
      label: 'Attic access opening: larger clear dimension',
      document: 'IMC',
      editions: IMC_EDITIONS,
      section: 'Section 306.3',
      quantity: 'length',
      comparison: 'at_least',
      value: 30,
      unit: 'in',
      provenance: 'from memory',
    }),
  ],
  // IMC Table 305.4 lists each material and form on its own row (pipe apart from tubing, sizes
  // apart where the table splits them). The copper_support keys are the copper TUBING rows: the
  // refrigerant line sets and copper drains Trimout checks are tubing, sold by outside diameter.
  'imc.copper_support.horizontal_small': [supportRow('imc.copper_support.horizontal_small', 'Copper or copper-alloy tubing, 1-1/4 in diameter and smaller: maximum horizontal support spacing', 6, 'issue text')],
  'imc.copper_support.horizontal_large': [supportRow('imc.copper_support.horizontal_large', 'Copper or copper-alloy tubing, 1-1/2 in diameter and larger: maximum horizontal support spacing', 10, 'issue text')],
  'imc.copper_support.vertical': [supportRow('imc.copper_support.vertical', 'Copper or copper-alloy tubing (either size row): maximum vertical support spacing', 10, 'issue text')],
  'imc.copper_pipe_support.horizontal': [supportRow('imc.copper_pipe_support.horizontal', 'Copper or copper-alloy pipe: maximum horizontal support spacing', 12, 'from memory', MEMORY_305)],
  'imc.copper_pipe_support.vertical': [supportRow('imc.copper_pipe_support.vertical', 'Copper or copper-alloy pipe: maximum vertical support spacing', 10, 'from memory', MEMORY_305)],
  'imc.pvc_support.horizontal': [supportRow('imc.pvc_support.horizontal', 'PVC pipe (a plastic condensate drain): maximum horizontal support spacing', 4, 'from memory', MEMORY_305)],
  'imc.pvc_support.vertical': [supportRow('imc.pvc_support.vertical', 'PVC pipe (a plastic condensate drain): maximum vertical support spacing', 10, 'from memory', 'Row and figure from memory: confirm against Table 305.4 of the adopted edition. The table adds a mid-story guide for sizes 2 in and smaller (footnote, from memory).')],
  'imc.cpvc_support.horizontal_small': [supportRow('imc.cpvc_support.horizontal_small', 'CPVC pipe or tubing, 1 in and smaller: maximum horizontal support spacing', 3, 'from memory', MEMORY_305)],
  'imc.cpvc_support.horizontal_large': [supportRow('imc.cpvc_support.horizontal_large', 'CPVC pipe or tubing, 1-1/4 in and larger: maximum horizontal support spacing', 4, 'from memory', MEMORY_305)],
  'imc.cpvc_support.vertical': [supportRow('imc.cpvc_support.vertical', 'CPVC pipe or tubing: maximum vertical support spacing', 10, 'from memory', 'Row and figure from memory: confirm against Table 305.4 of the adopted edition. The table adds a mid-story guide for sizes 2 in and smaller (footnote, from memory).')],
  'imc.abs_support.horizontal': [supportRow('imc.abs_support.horizontal', 'ABS pipe: maximum horizontal support spacing', 4, 'from memory', MEMORY_305)],
  'imc.abs_support.vertical': [supportRow('imc.abs_support.vertical', 'ABS pipe: maximum vertical support spacing', 10, 'from memory', 'Row and figure from memory: confirm against Table 305.4 of the adopted edition. The table adds a mid-story guide for sizes 2 in and smaller (footnote, from memory).')],
  'imc.steel_pipe_support.horizontal': [supportRow('imc.steel_pipe_support.horizontal', 'Steel pipe: maximum horizontal support spacing', 12, 'from memory', MEMORY_305)],
  'imc.steel_pipe_support.vertical': [supportRow('imc.steel_pipe_support.vertical', 'Steel pipe: maximum vertical support spacing', 15, 'from memory', MEMORY_305)],
};

/** Every code limit key Trimout holds (catalogue data references these). */
export const CODE_LIMIT_KEYS: readonly string[] = Object.keys(CODE_LIMIT_VARIANTS);

function defaultVariant(key: string, variants: readonly CodeLimit[]): CodeLimit {
  const first = variants[0];
  if (!first) throw new Error(`No stored value for code limit ${key}`);
  const wanted = DEFAULT_EDITIONS[first.document];
  return variants.find((v) => v.editions.includes(wanted)) ?? first;
}

/** Each key's value in its default edition (DEFAULT_EDITIONS). */
export const CODE_LIMITS: Readonly<Record<string, CodeLimit>> = Object.fromEntries(
  Object.entries(CODE_LIMIT_VARIANTS).map(([k, vs]) => [k, defaultVariant(k, vs)]),
);

export type PickResult =
  | { ok: true; limit: CodeLimit; edition: string }
  | { ok: false; error: string };

/**
 * The value of `key` in the edition the job chose for its document (or the default edition).
 * An edition we hold no value for is an error, not a silent fallback.
 */
export function pickCodeLimit(key: string, editions: EditionChoice = {}): PickResult {
  const variants = CODE_LIMIT_VARIANTS[key];
  const first = variants?.[0];
  if (!variants || !first) return { ok: false, error: `Unknown code limit "${key}".` };
  const edition = editions[first.document] ?? DEFAULT_EDITIONS[first.document];
  const limit = variants.find((v) => v.editions.includes(edition));
  if (!limit) {
    const held = variants.flatMap((v) => v.editions).join(', ');
    return {
      ok: false,
      error: `No value of ${key} is stored for ${first.document} ${edition} (stored: ${held}). Enter the limit as a job setting with its source.`,
    };
  }
  return { ok: true, limit, edition };
}

/** "IMC 2018 Section 307.2.2" — the citation shown beside a result. */
export function codeLimitSource(limit: CodeLimit, edition?: string): string {
  const ed = edition ?? (limit.editions.includes(DEFAULT_EDITIONS[limit.document]) ? DEFAULT_EDITIONS[limit.document] : limit.editions[0]);
  return `${limit.document} ${ed ?? ''} ${limit.section}`.replace(/\s+/g, ' ').trim();
}
