/**
 * The demo's sentences fit their defect type: each code is in the built-in catalogue, a note
 * names no unit kind the type does not apply to (the seed logs a type on any unit of its kinds),
 * and the drain-trap practice item never calls a trap holding water a defect: holding water is
 * what a trap is for.
 */
import { findItem } from '../../../shared/catalogue';
import { DEMO_CODES_BY_COMPANY, DEMO_DEFECT_TEXT } from '../../../server/seed/demoText';

const codes = Object.keys(DEMO_DEFECT_TEXT);
const sentences = (code: string) => {
  const t = DEMO_DEFECT_TEXT[code]!;
  return [...t.notes, ...t.fixes, ...t.returns];
};

/** Words that name one family of unit kinds, and the kinds of that family. */
const KIND_WORDS: [RegExp, string][] = [
  [/cassette/i, 'cassette_'],
  [/ducted/i, 'ducted_'],
  [/wall unit/i, 'wall_mounted'],
  [/console/i, 'floor_console'],
  [/coil kit/i, 'ahu_coil_kit'],
];

it.each(codes)('%s is a built-in defect type the demo companies log', (code) => {
  expect(findItem(code)).toBeDefined();
  expect(Object.values(DEMO_CODES_BY_COMPANY).flat()).toContain(code);
});

it.each(codes)('%s: no sentence names a unit kind the defect type does not apply to', (code) => {
  const kinds = findItem(code)!.unitKinds;
  for (const sentence of sentences(code)) {
    for (const [word, kind] of KIND_WORDS) {
      if (word.test(sentence) && !kinds.every((k) => k.startsWith(kind))) throw new Error(`${code}: "${sentence}" names ${String(word)} but the type applies to ${kinds.join(', ')}`);
    }
  }
});

it('the trap practice item defers to the manual and never calls holding water the defect', () => {
  const text = sentences('DR-07');
  expect(text.filter((s) => /holds? water|holding water/i.test(s))).toEqual([]);
  expect(DEMO_DEFECT_TEXT['DR-07']!.notes.every((n) => /manual/.test(n))).toBe(true);
});
