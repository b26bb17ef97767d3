/**
 * Keyset pagination for list routes: `limit` (≤ 200) and an opaque cursor that carries the sort
 * value and id of the last row sent. Sort columns come from the route, never from the request.
 *
 * A cursor is bound to what it was issued for: the route, its path parameters (the job, the
 * level, the unit), its sort and its filters (the validated query without limit and cursor).
 * It is `<payload>.<mac>`: the payload is base64url JSON `[value, id]`, the mac an HMAC-SHA256
 * (truncated to 128 bits) over that binding and the payload text, keyed from the session secret
 * (every secret of the rotation list verifies, the first signs). A cursor from another list,
 * sort, filter or job, or one written by hand, never matches, so it never reaches SQL; even a
 * matching one has its value and id checked against the type the sort needs before use, so a
 * typed cast in SQL can only ever see a well-formed value. Every refusal is one answer:
 * 400 `invalid_cursor` ("start again from the first page").
 */
import { createHmac, timingSafeEqual } from 'node:crypto';
import type { Request } from 'express';
import { Op, type WhereOptions } from 'sequelize';
import { listLimit } from '../../shared/rules/limits';
import { LIST_LIMIT_DEFAULT } from '../../shared/schemas/setup';
import { invalidCursor } from '../errors';

export type SortValue = string | number;

/**
 * What the sort value of a list is, so a cursor's value is checked before any SQL sees it:
 * `int` a 32-bit integer (positions, numbers, ranks), `text` a string (names, tags), `date`
 * YYYY-MM-DD, `timestamp` an ISO instant in UTC (…T…Z, up to microseconds).
 */
export type CursorValueKind = 'int' | 'text' | 'date' | 'timestamp';

export interface ListOrder {
  /** The sort the route applies (its name in the query, or the list's fixed order, e.g. 'name'). */
  sort: string;
  value: CursorValueKind;
}

export interface PageRequest {
  limit: number;
  after: { value: SortValue; id: string } | null;
  /** The cursor for the page after the row with this sort value and id, bound like this request. */
  cursorAfter(value: SortValue, id: string): string;
}

/** Where createApp puts the secrets cursors are signed with (app.set). */
export const CURSOR_SECRETS_SETTING = 'cursorSecrets';

/** Longer than any cursor issued (a 160-character name of 3-byte characters is ~750). */
const CURSOR_MAX = 2000;
/** Longest sort value a cursor may carry (names and tags are far shorter). */
const TEXT_MAX = 500;
const INT_MAX = 2 ** 31 - 1;
const MAC_BYTES = 16;
const BASE64URL = /^[A-Za-z0-9_-]+$/;
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const TIMESTAMP = /^(\d{4}-\d{2}-\d{2})T(\d{2}):(\d{2}):(\d{2})(\.\d{1,6})?Z$/;

function keysOf(req: Request): Buffer[] {
  const secrets = req.app.get(CURSOR_SECRETS_SETTING) as string[] | undefined;
  if (!secrets?.length) throw new Error(`paging: app setting "${CURSOR_SECRETS_SETTING}" is not set (createApp sets it)`);
  // A key of its own, derived from each secret, so a cursor's mac is never a session or CSRF value.
  return secrets.map((s) => createHmac('sha256', s).update('trimout-list-cursor-v1').digest());
}

/** A value in one canonical form: object keys sorted; empty, null and undefined dropped; lists of scalars sorted (filters are sets). */
function canonical(value: unknown): unknown {
  if (Array.isArray(value)) {
    const items = value.map(canonical);
    return items.every((v) => typeof v !== 'object' || v === null) ? [...items].sort((a, b) => (String(a) < String(b) ? -1 : String(a) > String(b) ? 1 : 0)) : items;
  }
  if (value && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(value).sort()) {
      const v = (value as Record<string, unknown>)[key];
      if (v === undefined || v === null || v === '') continue;
      out[key] = canonical(v);
    }
    return out;
  }
  return value;
}

/** The text a cursor's mac covers besides its payload: route, path parameters, sort, value kind, filters. */
function bindingOf(req: Request, order: ListOrder): string {
  const { limit: _limit, cursor: _cursor, ...filters } = (req.valid?.query ?? {}) as Record<string, unknown>;
  // The sort the route applies is bound on its own; a `sort` in the query equal to it is the same list.
  if (filters.sort === order.sort) delete filters.sort;
  const route = `${req.method} ${req.baseUrl}${(req.route as { path?: string } | undefined)?.path ?? req.path}`;
  return JSON.stringify([route, canonical({ ...req.params }), order.sort, order.value, canonical(filters)]);
}

function macOf(key: Buffer, binding: string, payload: string): string {
  return createHmac('sha256', key).update(binding).update('\n').update(payload).digest().subarray(0, MAC_BYTES).toString('base64url');
}

/** True when `value` has the type and range the sort needs (what the SQL cast will accept). */
function valueFits(value: unknown, kind: CursorValueKind): value is SortValue {
  switch (kind) {
    case 'int':
      return typeof value === 'number' && Number.isInteger(value) && Math.abs(value) <= INT_MAX;
    case 'text':
      return typeof value === 'string' && value.length <= TEXT_MAX && !value.includes('\u0000');
    case 'date': {
      const m = typeof value === 'string' ? DATE.exec(value) : null;
      return m !== null && realDate(value as string);
    }
    case 'timestamp': {
      const m = typeof value === 'string' ? TIMESTAMP.exec(value) : null;
      return m !== null && realDate(m[1]!) && Number(m[2]) < 24 && Number(m[3]) < 60 && Number(m[4]) < 60;
    }
  }
}

/** YYYY-MM-DD that names a day of the calendar (not 2026-02-31, not year 0). */
function realDate(text: string): boolean {
  const at = new Date(`${text}T00:00:00Z`);
  return !Number.isNaN(at.getTime()) && at.toISOString().slice(0, 10) === text && at.getUTCFullYear() >= 1;
}

function decode(cursor: string, keys: Buffer[], binding: string, order: ListOrder): { value: SortValue; id: string } | null {
  if (cursor.length > CURSOR_MAX) return null;
  const dot = cursor.indexOf('.');
  const payload = cursor.slice(0, dot);
  const mac = cursor.slice(dot + 1);
  if (dot < 1 || !BASE64URL.test(payload) || !BASE64URL.test(mac)) return null;
  const given = Buffer.from(mac, 'utf8');
  const matches = keys.some((key) => {
    const expected = Buffer.from(macOf(key, binding, payload), 'utf8');
    return expected.length === given.length && timingSafeEqual(expected, given);
  });
  if (!matches) return null;
  let decoded: unknown;
  try {
    decoded = JSON.parse(Buffer.from(payload, 'base64url').toString('utf8'));
  } catch {
    return null;
  }
  if (!Array.isArray(decoded) || decoded.length !== 2) return null;
  const [value, id] = decoded as [unknown, unknown];
  if (!valueFits(value, order.value) || typeof id !== 'string' || !UUID.test(id)) return null;
  return { value, id };
}

/**
 * The page a list request asks for: `limit` (route default, at most 200) and, for a cursor, the
 * position after which to continue. Any cursor this list did not issue for this very request
 * (same route, path, sort and filters) → 400 invalid_cursor.
 */
export function pageRequest(req: Request, order: ListOrder, limitDefault = LIST_LIMIT_DEFAULT): PageRequest {
  const query = (req.valid?.query ?? {}) as { limit?: number; cursor?: unknown };
  const limit = listLimit({ requested: query.limit, fallback: limitDefault });
  const keys = keysOf(req);
  const binding = bindingOf(req, order);
  const cursorAfter = (value: SortValue, id: string) => {
    const payload = Buffer.from(JSON.stringify([value, id]), 'utf8').toString('base64url');
    return `${payload}.${macOf(keys[0]!, binding, payload)}`;
  };
  if (query.cursor === undefined || query.cursor === '') return { limit, after: null, cursorAfter };
  const after = typeof query.cursor === 'string' ? decode(query.cursor, keys, binding, order) : null;
  if (!after) throw invalidCursor();
  return { limit, after, cursorAfter };
}

/** WHERE fragment for rows after the cursor, ordered by (column, id) ascending. */
export function afterCursor(column: string, page: PageRequest): WhereOptions {
  if (!page.after) return {};
  const { value, id } = page.after;
  return { [Op.or]: [{ [column]: { [Op.gt]: value } }, { [column]: value, id: { [Op.gt]: id } }] };
}

/** Rows were fetched with limit + 1: trims the extra one and makes the next cursor. */
export function finishPage<T extends { id: string }>(
  rows: T[],
  page: PageRequest,
  sortValue: (row: T) => SortValue,
): { rows: T[]; nextCursor: string | null } {
  if (rows.length <= page.limit) return { rows, nextCursor: null };
  const kept = rows.slice(0, page.limit);
  const last = kept[kept.length - 1]!;
  return { rows: kept, nextCursor: page.cursorAfter(sortValue(last), last.id) };
}
