/**
 * Reading an equipment schedule as schedules are written: unit kinds in the trade's own words
 * ("4-WAY CASSETTE", "Wall mount", "Ducted HSP") and column headers with or without a unit in
 * brackets or after the name ("Capacity (Btu/h)", "Nominal cooling [MBH]", "Capacity kW"). The import screen's preview and the
 * server's import both use these, so what the screen guesses is what the server applies.
 */
import { unitKind, type DimensionedKind } from '../calc/quantity';
import { UNIT_KINDS, type UnitKindKey } from '../words';

/**
 * A kind cell or header in a form that can be compared: lower case, number words as digits, every
 * run of other characters one space ("Cassette, 4-Way" → "cassette 4 way").
 */
export function normaliseKindText(text: string): string {
  return text
    .toLowerCase()
    .replace(/\bfour\b/g, '4')
    .replace(/\btwo\b/g, '2')
    .replace(/\bone\b/g, '1')
    .replace(/([a-z])(\d)/g, '$1 $2')
    .replace(/(\d)([a-z])/g, '$1 $2')
    .replace(/[^a-z0-9]+/g, ' ')
    .trim();
}

const KEY_AND_LABEL = new Map<string, UnitKindKey>();
for (const k of UNIT_KINDS) {
  KEY_AND_LABEL.set(normaliseKindText(k.key), k.key);
  KEY_AND_LABEL.set(normaliseKindText(k.label), k.key);
}

/**
 * The unit kind a schedule's kind cell names, or null when it cannot be told for sure (say
 * "Cassette" with no way count, or "Ducted" with no static class): those the user maps once.
 * Words as schedules commonly write them (common practice, not from one manufacturer's list).
 */
export function parseUnitKind(text: string): UnitKindKey | null {
  const t = normaliseKindText(text);
  if (t === '') return null;
  const exact = KEY_AND_LABEL.get(t);
  if (exact) return exact;
  const words = new Set(t.split(' '));
  const has = (...w: string[]) => w.some((x) => words.has(x));
  const phrase = (p: string) => ` ${t} `.includes(` ${p} `);

  if (has('ahu', 'coil') || phrase('air handler') || phrase('air handling')) return 'ahu_coil_kit';
  if (has('cassette', 'cass', 'cst')) {
    if (has('compact', 'mini') || phrase('600 x 600') || phrase('600 600')) return 'cassette_compact';
    if (phrase('1 way')) return null;
    if (phrase('2 way') || phrase('2 w')) return 'cassette_2way';
    if (phrase('4 way') || phrase('4 w') || has('4way', 'round', '360')) return 'cassette_4way';
    return null;
  }
  if (phrase('floor ceiling') || phrase('ceiling floor') || has('convertible', 'suspended') || phrase('under ceiling')) return 'floor_ceiling';
  if (has('ducted', 'duct', 'concealed', 'dct')) {
    if (has('vhsp', 'vhesp') || phrase('very high')) return 'ducted_very_high';
    if (has('hsp', 'hesp') || phrase('high static') || phrase('high esp') || phrase('high pressure')) return 'ducted_high';
    if (has('lsp', 'lesp', 'slim') || phrase('low static') || phrase('low esp') || phrase('low profile') || phrase('low pressure')) return 'ducted_low';
    return null;
  }
  if (has('wall', 'hiwall', 'highwall')) return 'wall_mounted';
  if (has('console') || phrase('floor standing') || phrase('floor mounted') || phrase('floor mount') || t === 'floor') return 'floor_console';
  return null;
}

/** Fields a schedule's column can hold (the same list as UNIT_IMPORT_FIELDS in shared/schemas/setup/units.ts). */
export type ScheduleField = 'tag' | 'kind' | 'model' | 'capacity' | 'level' | 'space' | 'system' | 'crew' | 'crewCompany' | 'mount';

/** Header spellings (lower case, letters and digits only, the part in brackets left out) → field. */
const HEADER_ALIASES: Record<string, ScheduleField> = {
  tag: 'tag',
  unittag: 'tag',
  equipmenttag: 'tag',
  mark: 'tag',
  unit: 'tag',
  unitid: 'tag',
  kind: 'kind',
  unitkind: 'kind',
  type: 'kind',
  unittype: 'kind',
  style: 'kind',
  model: 'model',
  modelname: 'model',
  modelnumber: 'model',
  unitmodel: 'model',
  level: 'level',
  floor: 'level',
  storey: 'level',
  story: 'level',
  space: 'space',
  room: 'space',
  roomname: 'space',
  roomnumber: 'space',
  area: 'space',
  location: 'space',
  system: 'system',
  circuit: 'system',
  refrigerantsystem: 'system',
  outdoorunit: 'system',
  odu: 'system',
  crew: 'crew',
  installcrew: 'crew',
  installingcrew: 'crew',
  installedbycrew: 'crew',
  crewcompany: 'crewCompany',
  installer: 'crewCompany',
  installingcompany: 'crewCompany',
  installercompany: 'crewCompany',
  mount: 'mount',
  mounting: 'mount',
  mountposition: 'mount',
  mountingposition: 'mount',
  installationposition: 'mount',
};

/** "Capacity (Btu/h)" → "capacity": the bracketed part and anything but letters and digits left out. */
export function normaliseHeader(header: string): string {
  return header
    .replace(/\(.*?\)|\[.*?\]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]/g, '');
}

/**
 * A header split into its name and the unit it gives: a unit in brackets ("Capacity (Btu/h)",
 * "Clg ht [mm]"; the name keeps the brackets, normaliseHeader drops them) or its last one or two
 * words ("Area m2" → Area, m2; "Area sq ft" → Area, sq ft). No unit when neither names one.
 */
export function splitHeader(header: string): { name: string; unit?: string } {
  const inside = /[([]\s*([^)\]]+?)\s*[)\]]/.exec(header)?.[1];
  if (inside && unitKind(inside)) return { name: header, unit: inside };
  const words = header.replace(/\(.*?\)|\[.*?\]/g, ' ').trim().split(/[\s_-]+/);
  for (const n of [2, 1]) {
    if (words.length <= n) continue;
    const tail = words.slice(-n).join(' ');
    if (unitKind(tail)) return { name: words.slice(0, -n).join(' '), unit: tail };
  }
  return { name: header };
}

/**
 * The unit of a quantity a header gives the bare numbers of its column ("Capacity (Btu/h)" →
 * "Btu/h" for capacity, "Floor area (ft²)" → "ft²" for area), or undefined when it names none or
 * one of another quantity. The equipment schedule and the room schedule both read headers with it.
 */
export function headerUnit(header: string, kind: DimensionedKind): string | undefined {
  const { unit } = splitHeader(header);
  return unit && unitKind(unit) === kind ? unit : undefined;
}

/**
 * The field a header names, or null. Any header naming a capacity is capacity: the word itself
 * ("Cooling capacity", "Nominal capacity"), a capacity unit in brackets ("Nominal cooling [MBH]"),
 * or cooling / heating / size with no other meaning.
 */
export function scheduleFieldOfHeader(header: string): ScheduleField | null {
  const key = normaliseHeader(header);
  const alias = HEADER_ALIASES[key];
  if (alias) return alias;
  if (key.includes('capacity') || headerUnit(header, 'capacity')) return 'capacity';
  if (/^(nominal)?(cooling|heating|size|tons|btuh|kw|mbh)(nominal)?$/.test(key)) return 'capacity';
  return null;
}

/** A first guess for each header; a field goes to the first header that names it. */
export function guessScheduleMapping(headers: readonly string[]): Record<string, ScheduleField> {
  const out: Record<string, ScheduleField> = {};
  const used = new Set<ScheduleField>();
  for (const h of headers) {
    const field = scheduleFieldOfHeader(h);
    if (field && !used.has(field) && !(h in out)) {
      out[h] = field;
      used.add(field);
    }
  }
  return out;
}
