/**
 * Quantities typed by people ("10' 6\"", "38 lb", "3 tons") → base numbers (shared/calc), with
 * a 400 naming the field when the text cannot be read.
 */
import type { QuantityKind } from '../../shared/catalogue/types';
import { fromBase, parseQuantity, unitKind } from '../../shared/calc/quantity';
import type { StatedLimitDto, StatedLimitInput } from '../../shared/schemas/setup';
import { badRequest } from '../errors';

/** Text → base number; 400 with `field: reason` when it cannot be read. */
export function toBaseOrThrow(text: string, kind: QuantityKind, field: string, options: { defaultUnit?: string } = {}): number {
  const parsed = parseQuantity(text, kind, options);
  if (!parsed.ok) throw badRequest(`${field}: ${parsed.error}`, { [field]: parsed.error });
  if (!(parsed.value > 0)) throw badRequest(`${field}: Type a value more than zero.`, { [field]: 'Type a value more than zero.' });
  return parsed.value;
}

/** undefined stays undefined (not sent), null clears, text is parsed. */
export function optionalQuantity(text: string | null | undefined, kind: QuantityKind, field: string): number | null | undefined {
  if (text === undefined) return undefined;
  if (text === null) return null;
  return toBaseOrThrow(text, kind, field);
}

const FALLBACK_UNIT: Record<QuantityKind, string> = {
  length: 'mm',
  slope: '%',
  area: 'm²',
  volume: 'm³',
  mass: 'kg',
  capacity: 'W',
  angle: '°',
  pressure: 'Pa',
  boolean: '',
};

const SYMBOLS: Record<string, string> = { '"': 'in', "'": 'ft', '"wc': 'in. w.c.', '" wc': 'in. w.c.', '" w.c.': 'in. w.c.' };

/** The unit a value was stated in: the one given, else the last unit typed ("27-1/2 in" → in). */
function statedUnit(text: string, kind: QuantityKind, given?: string): string {
  if (given && unitKind(given) === kind) return given;
  const trailing = /\d\s*([^\d\s][^\d]*)$/.exec(text.trim())?.[1]?.trim();
  if (trailing) {
    const unit = SYMBOLS[trailing] ?? trailing;
    if (unitKind(unit) === kind) return unit;
  }
  return FALLBACK_UNIT[kind];
}

/** A limit as entered ({ value: "27-1/2 in", source }) → stored form with its base value. */
export function statedLimit(input: StatedLimitInput, kind: QuantityKind, field: string): StatedLimitDto {
  const value = toBaseOrThrow(input.value, kind, field);
  const unit = statedUnit(input.value, kind, input.unit);
  const stated = unit === '' ? value : fromBase(value, unit);
  return { value, stated: Math.round(stated * 1e9) / 1e9, unit, text: input.value.trim(), source: input.source.trim() };
}
