/**
 * Helpers for the set-up API's lists ({ items, nextCursor }) and record versions.
 */
import { etagOf } from '../../shared/rules/etag';
import { listLimit } from '../../shared/rules/limits';
import { LIST_LIMIT_MAX, type ListResponse } from '../../shared/schemas/setup';
import { apiGet } from './client';

/** The If-Match value for a record the screen holds: the server's ETag, built by the same rule. */
export function versionTag(version: number): string {
  return etagOf(version);
}

/** /api/jobs/<jobId>/<rest>, each piece encoded. */
export function jobPath(jobId: string, ...rest: string[]): string {
  return ['/api/jobs', encodeURIComponent(jobId), ...rest.map((r) => encodeURIComponent(r))].join('/');
}

/** A query string from defined, non-empty values. */
export function queryString(params: Record<string, string | number | boolean | undefined | null>): string {
  const parts = Object.entries(params)
    .filter(([, v]) => v !== undefined && v !== null && v !== '')
    .map(([k, v]) => `${encodeURIComponent(k)}=${encodeURIComponent(String(v))}`);
  return parts.length ? `?${parts.join('&')}` : '';
}

/**
 * Every item of a short list (levels, spaces, systems ...), following cursors. Stops after
 * `maxPages` pages of the largest page the server sends so a runaway list cannot hang a screen.
 */
export async function fetchAll<T>(path: string, params: Record<string, string | undefined> = {}, maxPages = 10): Promise<T[]> {
  const items: T[] = [];
  let cursor: string | null = null;
  for (let page = 0; page < maxPages; page++) {
    const res: ListResponse<T> = await apiGet<ListResponse<T>>(`${path}${queryString({ ...params, limit: listLimit({ requested: LIST_LIMIT_MAX }), cursor })}`);
    items.push(...res.items);
    cursor = res.nextCursor;
    if (!cursor) break;
  }
  return items;
}
