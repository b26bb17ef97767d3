/**
 * A screen's view (its filters and sort) kept in the address, so a reload shows the same view and
 * the address can be sent to someone. Each view has a zod schema for reading the address back, in
 * which every field falls back to its default on a missing, unknown or bad value (an address typed
 * by hand or cut short in a message must never break the screen), and a writer in
 * components/links.ts, which leaves the defaults out. Views: the findings list
 * (components/findings/filterParams.ts), a level walk (components/walk/walkParams.ts), the company
 * scorecards (components/board/scorecardParams.ts). useAddressView binds one to a route.
 */
import { z } from 'zod';

/** What useLocalSearchParams gives: a key repeated in the address comes as a list. */
export type AddressParams = Record<string, string | string[] | undefined>;

export interface AddressView<T> {
  /** Every address key the view owns (a change writes all of them, so a cleared filter leaves the address). */
  keys: readonly string[];
  /** The view from the address; never throws. */
  parse: (params: AddressParams) => T;
  /** The view as address values, defaults and empty values left out (the same function links use). */
  toParams: (view: T) => Record<string, string>;
}

/** The first value of a repeated key; an empty value is no value. */
function firstValue(v: unknown): unknown {
  const s = Array.isArray(v) ? v[0] : v;
  return s === '' ? undefined : s;
}

/** One address value read through `schema`; missing or not valid → undefined (the view's default). */
export function addressField<T extends z.ZodType>(schema: T) {
  return z.preprocess(firstValue, schema.optional()).catch(undefined);
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** A record id. */
export const addressId = () => addressField(z.string().regex(UUID));

/** Words typed in a search: trimmed and cut to what the API takes; blank is no search. */
export const addressText = (max: number) => addressField(z.string().transform((s) => s.trim().slice(0, max) || undefined));

/** A comma list of allowed values: unknown members are dropped, repeats kept once; none left is no filter. */
export const addressList = (allowed: readonly string[]) =>
  addressField(
    z.string().transform((s) => {
      const parts = [...new Set(s.split(',').filter((p) => allowed.includes(p)))];
      return parts.length ? parts.join(',') : undefined;
    }),
  );

/** Reads a whole view; a field that did not parse is simply left out. */
export function readView<S extends z.ZodObject>(schema: S, params: AddressParams): Partial<z.output<S>> {
  const read = schema.safeParse(params ?? {});
  const out = read.success ? (read.data as Record<string, unknown>) : {};
  return Object.fromEntries(Object.entries(out).filter(([, v]) => v !== undefined)) as Partial<z.output<S>>;
}
