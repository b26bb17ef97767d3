/**
 * Opaque list cursors (server/services/paging.ts) without a database: a cursor is bound to the
 * route, its path, sort and filters; even a correctly signed cursor whose value or id has the
 * wrong type for the sort is refused (so a typed SQL cast never sees it); secrets rotate.
 */
import type { Request } from 'express';
import { HttpError } from '../../../server/errors';
import { CURSOR_SECRETS_SETTING, pageRequest, type CursorValueKind } from '../../../server/services/paging';

const ID = '0b6f1a4e-6f57-4c7a-9a8e-2d2f6f0f4a11';

function fakeReq(query: Record<string, unknown> = {}, options: { secrets?: string[]; params?: Record<string, string>; path?: string } = {}): Request {
  const secrets = options.secrets ?? ['first-secret-0123456789abcdef0123456789'];
  return {
    method: 'GET',
    baseUrl: '/api',
    route: { path: options.path ?? '/jobs/:jobId/things' },
    params: options.params ?? { jobId: 'job-1' },
    valid: { query },
    app: { get: (name: string) => (name === CURSOR_SECRETS_SETTING ? secrets : undefined) },
  } as unknown as Request;
}

/** A cursor signed by the server itself for the value (as a route would issue it). */
function issued(value: string | number, kind: CursorValueKind, query: Record<string, unknown> = {}, options = {}, id = ID): string {
  return pageRequest(fakeReq(query, options), { sort: 'name', value: kind }).cursorAfter(value, id);
}

function refused(run: () => unknown): string {
  try {
    run();
  } catch (err) {
    if (err instanceof HttpError) return `${err.status} ${err.id} ${Object.keys(err.fields ?? {}).join(',')}`;
    throw err;
  }
  return 'accepted';
}
const INVALID = '400 invalid_cursor cursor';

describe('pageRequest', () => {
  it('reads back the position it issued', () => {
    const cursor = issued('Level 3', 'text', { levelId: 'x' });
    expect(pageRequest(fakeReq({ levelId: 'x', cursor, limit: 7 }), { sort: 'name', value: 'text' })).toMatchObject({
      limit: 7,
      after: { value: 'Level 3', id: ID },
    });
  });

  it('treats filters as sets and drops empty ones, and a sort in the query equal to the route order is the same list', () => {
    const cursor = issued('a', 'text', { status: ['open', 'closed'], q: '' });
    const again = pageRequest(fakeReq({ status: ['closed', 'open'], sort: 'name', cursor }), { sort: 'name', value: 'text' });
    expect(again.after).toEqual({ value: 'a', id: ID });
  });

  it.each<[string, Record<string, unknown>, Partial<{ params: Record<string, string>; path: string }>, string]>([
    ['another filter value', { levelId: 'y' }, {}, 'name'],
    ['a filter more', { levelId: 'x', kind: 'wall' }, {}, 'name'],
    ['a filter less', {}, {}, 'name'],
    ['another sort', { levelId: 'x' }, {}, '-name'],
    ['another job', { levelId: 'x' }, { params: { jobId: 'job-2' } }, 'name'],
    ['another list', { levelId: 'x' }, { path: '/jobs/:jobId/others' }, 'name'],
  ])('refuses the cursor with %s', (_label, query, options, sort) => {
    const cursor = issued('Level 3', 'text', { levelId: 'x' });
    expect(refused(() => pageRequest(fakeReq({ ...query, cursor }, options), { sort, value: 'text' }))).toBe(INVALID);
  });

  it.each<[CursorValueKind, unknown]>([
    ['int', 2 ** 31],
    ['int', 1.5],
    ['int', '1'],
    ['int', Number.MAX_SAFE_INTEGER],
    ['text', 'a\u0000b'],
    ['text', 7],
    ['date', '2026-02-31'],
    ['date', '2026-2-3'],
    ['date', '0000-01-01'],
    ['date', "2026-01-01'::date"],
    ['timestamp', '2026-12-08T25:00:00Z'],
    ['timestamp', '2026-12-08T10:00:00.1234567Z'],
    ['timestamp', '2026-12-08 10:00:00'],
    ['timestamp', 'infinity'],
  ])('refuses a signed %s cursor holding %j (the type check behind the signature)', (kind, value) => {
    const cursor = issued(value as string, kind);
    expect(refused(() => pageRequest(fakeReq({ cursor }), { sort: 'name', value: kind }))).toBe(INVALID);
  });

  it.each<[CursorValueKind, string | number]>([
    ['int', -(2 ** 31) + 1],
    ['text', ''],
    ['date', '2028-02-29'],
    ['timestamp', '2026-12-08T10:00:00.123456Z'],
    ['timestamp', '2026-12-08T10:00:00Z'],
  ])('accepts a signed %s cursor holding %j', (kind, value) => {
    const cursor = issued(value, kind);
    expect(pageRequest(fakeReq({ cursor }), { sort: 'name', value: kind }).after).toEqual({ value, id: ID });
  });

  it('refuses a signed text cursor longer than any name or tag', () => {
    const cursor = issued('x'.repeat(501), 'text');
    expect(refused(() => pageRequest(fakeReq({ cursor }), { sort: 'name', value: 'text' }))).toBe(INVALID);
  });

  it('refuses a signed cursor whose id is not a uuid', () => {
    const cursor = issued('a', 'text', {}, {}, "1' OR '1'='1");
    expect(refused(() => pageRequest(fakeReq({ cursor }), { sort: 'name', value: 'text' }))).toBe(INVALID);
  });

  it('verifies with every secret of the rotation list and signs with the first', () => {
    const old = issued('a', 'text', {}, { secrets: ['old-secret-0123456789abcdef0123456789'] });
    const rotated = { secrets: ['new-secret-0123456789abcdef0123456789', 'old-secret-0123456789abcdef0123456789'] };
    expect(pageRequest(fakeReq({ cursor: old }, rotated), { sort: 'name', value: 'text' }).after).toEqual({ value: 'a', id: ID });
    const fresh = pageRequest(fakeReq({}, rotated), { sort: 'name', value: 'text' }).cursorAfter('a', ID);
    expect(refused(() => pageRequest(fakeReq({ cursor: fresh }, { secrets: ['old-secret-0123456789abcdef0123456789'] }), { sort: 'name', value: 'text' }))).toBe(
      INVALID,
    );
  });

  it('refuses what it did not sign: the bare position, a changed character, a non-string, an over-long cursor', () => {
    const cursor = issued(3, 'int');
    const order = { sort: 'name', value: 'int' as const };
    const bare = Buffer.from(JSON.stringify([3, ID])).toString('base64url');
    expect(refused(() => pageRequest(fakeReq({ cursor: bare }), order))).toBe(INVALID);
    for (let i = 0; i < cursor.length; i++) {
      const changed = cursor.slice(0, i) + (cursor[i] === 'A' ? 'B' : 'A') + cursor.slice(i + 1);
      expect(refused(() => pageRequest(fakeReq({ cursor: changed }), order))).toBe(INVALID);
    }
    expect(refused(() => pageRequest(fakeReq({ cursor: ['a', 'b'] }), order))).toBe(INVALID);
    expect(refused(() => pageRequest(fakeReq({ cursor: `${cursor}${'A'.repeat(2000)}` }), order))).toBe(INVALID);
  });

  it('an empty cursor is the first page', () => {
    expect(pageRequest(fakeReq({ cursor: '' }), { sort: 'name', value: 'int' }).after).toBeNull();
  });
});
