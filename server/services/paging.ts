/**
 * Keyset pagination for list routes: `limit` (≤ 200) and an opaque cursor that carries the sort
 * value and id of the last row sent. Sort columns come from the route, never from the request.
 */
import { Op, type WhereOptions } from 'sequelize';
import { LIST_LIMIT_DEFAULT, LIST_LIMIT_MAX } from '../../shared/schemas/setup';
import { badRequest } from '../errors';

export type SortValue = string | number;

export interface PageRequest {
  limit: number;
  after: { value: SortValue; id: string } | null;
}

export function encodeCursor(value: SortValue, id: string): string {
  return Buffer.from(JSON.stringify([value, id]), 'utf8').toString('base64url');
}

function invalidCursor() {
  return badRequest('cursor: Not a valid cursor. Start again from the first page.', { cursor: 'Not a valid cursor.' });
}

export function pageRequest(query: { limit?: number; cursor?: string }): PageRequest {
  const limit = Math.min(query.limit ?? LIST_LIMIT_DEFAULT, LIST_LIMIT_MAX);
  if (!query.cursor) return { limit, after: null };
  let decoded: unknown;
  try {
    decoded = JSON.parse(Buffer.from(query.cursor, 'base64url').toString('utf8'));
  } catch {
    throw invalidCursor();
  }
  if (
    !Array.isArray(decoded) ||
    decoded.length !== 2 ||
    !(typeof decoded[0] === 'string' || typeof decoded[0] === 'number') ||
    typeof decoded[1] !== 'string' ||
    !/^[0-9a-f-]{36}$/i.test(decoded[1])
  ) {
    throw invalidCursor();
  }
  return { limit, after: { value: decoded[0], id: decoded[1] } };
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
  return { rows: kept, nextCursor: encodeCursor(sortValue(last), last.id) };
}
