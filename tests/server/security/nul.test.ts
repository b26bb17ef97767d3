/**
 * NUL (U+0000) in any text input is refused with a 400 naming the field, in one place
 * (server/middleware/nul.ts), for EVERY route read from the router: in the query, in a JSON body
 * (the route's own valid body with NUL put into its first text field), in the JSON `data` of a
 * multipart write, and in the path. Nothing is stored, and a streamed export never starts.
 */
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { routeKeysFromRouter } from '../../support/routes';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { buildCtx, CASES, freshAgent, send, type Ctx, type RoleName, type Spec } from './matrix-fixtures';

jest.setTimeout(180_000);

let db: Database;
let s3: FakeS3;
let trimout: TrimoutApp;
let ctx: Ctx;

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  ctx = await buildCtx(trimout.app);
});
afterAll(async () => {
  await trimout?.close();
  await s3?.close();
  await db?.close();
});

const ROUTES = routeKeysFromRouter();

/** The dotted path of the first string in a JSON value, or null. */
function firstText(value: unknown, path = ''): string | null {
  if (typeof value === 'string') return path;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const found = firstText(value[i], path ? `${path}.${i}` : String(i));
      if (found !== null) return found;
    }
  } else if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const found = firstText(v, path ? `${path}.${k}` : k);
      if (found !== null) return found;
    }
  }
  return null;
}

/** A copy of `value` with "\u0000" put into the string at `path`. */
function withNul(value: unknown, path: string): unknown {
  const copy = JSON.parse(JSON.stringify(value)) as Record<string, unknown>;
  const keys = path.split('.');
  let at: Record<string, unknown> = copy;
  for (const k of keys.slice(0, -1)) at = at[k] as Record<string, unknown>;
  const last = keys.at(-1)!;
  at[last] = `${String(at[last]).slice(0, 3)}\u0000${String(at[last]).slice(3)}`;
  return copy;
}

async function spec(key: string): Promise<Spec> {
  const c = CASES[key];
  if (!c) throw new Error(`no matrix case for ${key}`);
  return c.setup(ctx.own, ctx, 'A');
}

function expectNulRefusal(res: { status: number; body: { error?: { id?: string; fields?: Record<string, string> } } }, field: string, key: string) {
  expect({ key, status: res.status, id: res.body.error?.id, field: res.body.error?.fields?.[field] }).toEqual({
    key,
    status: 400,
    id: 'bad_request',
    field: expect.stringMatching(/NUL/),
  });
}

async function tableCounts(): Promise<string> {
  const rows = await db.sequelize.query<{ n: string }>(
    `SELECT (SELECT count(*) FROM findings) + (SELECT count(*) FROM levels) + (SELECT count(*) FROM fixes) + (SELECT count(*) FROM finding_events)
            + (SELECT count(*) FROM units) + (SELECT count(*) FROM catalogue_items) + (SELECT count(*) FROM users) AS n`,
    { type: QueryTypes.SELECT },
  );
  return rows[0]!.n;
}

it('every route refuses a NUL in the query with 400 naming the parameter, whoever asks', async () => {
  for (const key of ROUTES) {
    const [method] = key.split(' ');
    const s = await spec(key);
    const sep = s.path.includes('?') ? '&' : '?';
    const who = CASES[key]!.fresh ? await freshAgent(ctx, 'gc') : ctx.agents.gc;
    const res = await send(who, method!, { ...s, path: `${s.path}${sep}note=a%00b`, multipart: undefined, body: undefined });
    expectNulRefusal(res, 'note', key);
    const anon = await send(ctx.agents.anon, method!, { ...s, path: `${s.path}${sep}note=a%00b`, multipart: undefined, body: undefined });
    expectNulRefusal(anon, 'note', key);
  }
});

it('every route with a JSON body refuses a NUL in its text with 400 naming the field, and stores nothing', async () => {
  let covered = 0;
  for (const key of ROUTES) {
    const [method] = key.split(' ');
    const s = await spec(key);
    if (s.body === undefined) continue;
    const field = firstText(s.body);
    if (field === null) continue;
    const before = await tableCounts();
    const who = CASES[key]!.fresh ? await freshAgent(ctx, 'gc') : ctx.agents.gc;
    const res = await send(who, method!, { ...s, body: withNul(s.body, field) });
    expectNulRefusal(res, field, key);
    expect(await tableCounts()).toBe(before);
    covered += 1;
  }
  expect(covered).toBeGreaterThan(20);
});

it('every multipart write refuses a NUL in its JSON data with 400 naming the field, and stores no photo', async () => {
  let covered = 0;
  for (const key of ROUTES) {
    const [method] = key.split(' ');
    let s = await spec(key);
    // findings take JSON or, with photos, multipart: send this one with a photo
    if (key === 'POST /api/jobs/:jobId/findings' && s.body !== undefined) s = { path: s.path, multipart: { data: s.body, photos: 1 } };
    if (!s.multipart?.data) continue;
    const field = firstText(s.multipart.data);
    if (field === null) continue;
    const objects = (await s3.keys()).length;
    const before = await tableCounts();
    // the caller the route serves: the GC manager logs findings, subcontractor A fixes A's
    let res;
    for (const role of ['gc', 'subA'] as RoleName[]) {
      res = await send(ctx.agents[role], method!, { ...s, multipart: { ...s.multipart, data: withNul(s.multipart.data, field) } });
      if (res.status !== 403 && res.status !== 404) break;
    }
    expectNulRefusal(res!, field, key);
    expect(await tableCounts()).toBe(before);
    expect((await s3.keys()).length).toBe(objects);
    covered += 1;
  }
  expect(covered).toBeGreaterThanOrEqual(2);
});

it('a NUL in the path is refused, and the findings list and export answer 400 instead of everything or a cut-off file', async () => {
  const jobId = ctx.own.job.id;
  const path = await send(ctx.agents.gc, 'GET', { path: `/api/jobs/${jobId}/levels%00` });
  expectNulRefusal(path, 'path', 'path');
  const list = await send(ctx.agents.gc, 'GET', { path: `/api/jobs/${jobId}/findings?q=%00` });
  expectNulRefusal(list, 'q', 'list');
  const csv = await send(ctx.agents.gc, 'GET', { path: `/api/jobs/${jobId}/findings.csv?q=%00` });
  expectNulRefusal(csv, 'q', 'export');
  expect(csv.headers['content-type']).toMatch(/application\/json/);
});
