/**
 * List positions (cursors) are opaque and bound to the list, its sort, its filters and its path
 * (the job, the level, the unit). For EVERY list route that takes a `cursor` (read from the
 * router: a GET whose query schema accepts `cursor`), as the job's GC manager:
 *  - following nextCursor with limit=1 visits every row once, in the order of one big page;
 *  - a cursor the route issued, reused with another sort, other filters, another job, level or
 *    unit, or on another list → 400 `invalid_cursor`;
 *  - crafted cursors (fast-check: random text, base64url of random JSON, the cursor's own shape
 *    with wrong types, huge numbers, impossible dates, NUL, SQL fragments, a real cursor
 *    with one character changed or another payload under its signature) → 400 `invalid_cursor`,
 *    never a 5xx.
 * A new list route that takes `cursor` fails the coverage test until it is added to LISTS
 * (or to IGNORES_CURSOR, with the reason it takes a cursor it does not use).
 *
 * Replay a failure with CURSOR_FUZZ_SEED=<printed seed>; CURSOR_FUZZ_RUNS sets the crafted
 * cursors per list (default 30).
 */
import fc from 'fast-check';
import type { Response } from 'supertest';
import type { z } from 'zod';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { TestRecord } from '../../../server/models';
import { buildTestApp, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildSpace, buildSystem, buildUnitModel } from '../../support/factories';
import { buildWalkJob, insertFinding, type WalkJob } from '../../support/findings';
import { listRoutes } from '../../support/routes';

jest.setTimeout(240_000);

const SEED = process.env.CURSOR_FUZZ_SEED ? Number(process.env.CURSOR_FUZZ_SEED) : Math.floor(Math.random() * 2 ** 31);
const RUNS = Number(process.env.CURSOR_FUZZ_RUNS ?? 30);
// eslint-disable-next-line no-console
console.log(`cursor-fuzz.test.ts: CURSOR_FUZZ_SEED=${SEED} CURSOR_FUZZ_RUNS=${RUNS}`);

const NUL = '\u0000';

let db: Database;
let trimout: TrimoutApp;
let w: WalkJob;
/** Another job with the same crew: the same lists, another job. */
let again: WalkJob;
let gc: SignedIn;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  w = await buildWalkJob();
  again = await buildWalkJob({ gcCompany: w.gcCompany, gcManager: w.gcManager, inspector: w.inspector, subA: w.subA, subB: w.subB });
  gc = await signIn(trimout.app, w.gcManager.email);
  // At least two rows in every list, so limit=1 gives a cursor.
  await buildSpace(w.job.id, w.otherLevel.id, { name: 'Corridor 4A' });
  const vrf1 = await buildSystem(w.job.id, { name: 'VRF-1' });
  // Two test records, written straight to the table (a GC manager witnesses records; others make them).
  for (const [i, result] of (['passed', 'failed'] as const).entries()) {
    await TestRecord.create({
      id: crypto.randomUUID(),
      jobId: w.job.id,
      kind: 'evacuation',
      systemId: vrf1.id,
      unitId: null,
      companyId: null,
      levelIds: null,
      recordedBy: w.inspector.id,
      recordedAt: new Date(Date.UTC(2026, 11, 1, 8, i)),
      supersedesId: null,
      result,
      reasons: [],
      data: {},
      figures: {},
      note: null,
    });
  }
  await buildSystem(w.job.id, { name: 'VRF-2' });
  await buildUnitModel(w.job.id, { name: 'WM-09', unitKind: 'wall_mounted' });
  await buildSystem(again.job.id, { name: 'VRF-9' });
  const post = async (path: string, body: unknown) => {
    const res = await gc.agent.post(path).set('X-CSRF-Token', gc.csrf).send(body as object);
    if (res.status !== 201) throw new Error(`setup ${path}: ${res.status} ${JSON.stringify(res.body)}`);
  };
  for (const levelId of [w.level.id, w.otherLevel.id]) await post(J('/walks'), { levelId });
  for (let i = 0; i < 2; i++) {
    await post(J(`/units/${w.cassette.id}/checks`), { items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'ok' }], complete: false });
    await post(J('/invitations'), { email: `cursor-${i}-${Date.now()}@test.trimout.example`, role: 'inspector' });
  }
  await insertFinding(w, { severity: 'critical', dueOn: '2026-12-01', companyId: w.subB.companyId });
  await insertFinding(w, { severity: 'minor', dueOn: '2026-12-20', loggedAt: new Date('2026-11-30T08:00:00.123456Z') });
  await insertFinding(w, { severity: 'major', dueOn: '2026-12-01', status: 'fix_submitted' });
});

afterAll(async () => {
  await trimout?.close();
  await db?.close();
});

const J = (rest: string) => `/api/jobs/${w.job.id}${rest}`;
const J2 = (rest: string) => `/api/jobs/${again.job.id}${rest}`;

/**
 * Each list route as ways of asking for it: the first is the plain list, the others the same
 * list with another sort, other filters, or another job / level / unit. All are valid first
 * pages; a cursor issued for one of them is refused by every other.
 */
const LISTS: Record<string, () => string[]> = {
  'GET /api/jobs/:jobId/levels': () => [J('/levels'), J2('/levels')],
  'GET /api/jobs/:jobId/spaces': () => [J('/spaces'), J(`/spaces?levelId=${w.level.id}`), J2('/spaces')],
  'GET /api/jobs/:jobId/systems': () => [J('/systems'), J2('/systems')],
  'GET /api/jobs/:jobId/models': () => [J('/models'), J('/models?unitKind=cassette_4way'), J2('/models')],
  'GET /api/jobs/:jobId/units': () => [
    J('/units'),
    J(`/units?levelId=${w.level.id}`),
    J(`/units?spaceId=${w.space.id}`),
    J('/units?kind=cassette_4way'),
    J('/units?q=IU'),
    J2('/units'),
  ],
  'GET /api/jobs/:jobId/companies': () => [J('/companies'), J('/companies?trade=mechanical'), J2('/companies')],
  'GET /api/jobs/:jobId/members': () => [J('/members'), J('/members?role=subcontractor'), J(`/members?companyId=${w.subA.companyId}`), J2('/members')],
  'GET /api/jobs/:jobId/catalogue': () => [
    J('/catalogue'),
    J('/catalogue?unitKind=cassette_4way'),
    J('/catalogue?group=drainage'),
    J('/catalogue?includeRetired=true'),
    J2('/catalogue'),
  ],
  'GET /api/jobs/:jobId/walks': () => [J('/walks'), J('/walks?open=true'), J(`/walks?levelId=${w.level.id}`), J(`/walks?inspectorId=${w.gcManager.id}`), J2('/walks')],
  'GET /api/jobs/:jobId/levels/:levelId/walk-units': () => [
    J(`/levels/${w.level.id}/walk-units`),
    J(`/levels/${w.level.id}/walk-units?kind=cassette_4way`),
    J(`/levels/${w.level.id}/walk-units?q=IU-3`),
    J(`/levels/${w.level.id}/walk-units?state=not_checked`),
    J(`/levels/${w.otherLevel.id}/walk-units`),
    J2(`/levels/${again.level.id}/walk-units`),
  ],
  'GET /api/jobs/:jobId/units/:unitId/checks': () => [J(`/units/${w.cassette.id}/checks`), J(`/units/${w.cassette2.id}/checks`)],
  'GET /api/jobs/:jobId/findings': () => [
    J('/findings'),
    ...['number', 'dueOn', '-dueOn', 'loggedAt', '-loggedAt', 'severity', '-severity'].map((sort) => J(`/findings?sort=${sort}`)),
    J('/findings?status=open,fix_submitted'),
    J('/findings?severity=major,minor,critical'),
    J(`/findings?companyId=${w.subA.companyId}`),
    J('/findings?overdue=false'),
    J('/findings?q=DR'),
    J2('/findings'),
  ],
  'GET /api/jobs/:jobId/invitations': () => [J('/invitations'), J2('/invitations')],
  'GET /api/jobs/:jobId/test-records': () => [J('/test-records'), J('/test-records?kind=evacuation'), J('/test-records?witnessed=false'), J2('/test-records')],
};

/** Routes whose query takes `cursor` but that do not page: the reason, and one valid request. */
const IGNORES_CURSOR: Record<string, { why: string; path: () => string }> = {
  'GET /api/jobs/:jobId/findings.csv': { why: "the export holds every row of the list's filters", path: () => J('/findings.csv') },
  'GET /api/jobs/:jobId/units.csv': { why: "the export holds every unit of the register's filters", path: () => J('/units.csv') },
};

/** True when the query schema keeps a `cursor` (strict schemas refuse keys they do not know). */
function takesCursor(schema: z.ZodType): boolean {
  const result = schema.safeParse({ cursor: 'x' });
  if (result.success) return (result.data as Record<string, unknown> | null)?.cursor === 'x';
  return !result.error.issues.some((i) => i.code === 'unrecognized_keys' && i.keys.includes('cursor'));
}

function withQuery(path: string, extra: Record<string, string>): string {
  const parts = Object.entries(extra).map(([k, v]) => `${k}=${encodeText(v)}`);
  return `${path}${path.includes('?') ? '&' : '?'}${parts.join('&')}`;
}

/** Percent-encodes any JS string (lone surrogates too, as UTF-8 of U+FFFD: encodeURIComponent would throw). */
function encodeText(text: string): string {
  return [...Buffer.from(text, 'utf8')].map((b) => (/[A-Za-z0-9_.~-]/.test(String.fromCharCode(b)) ? String.fromCharCode(b) : `%${b.toString(16).toUpperCase().padStart(2, '0')}`)).join('');
}

async function get(path: string): Promise<Response> {
  return gc.agent.get(path);
}

/** The first page with limit=1, which must carry a cursor. */
async function issuedCursor(path: string): Promise<string | null> {
  const res = await get(withQuery(path, { limit: '1' }));
  if (res.status !== 200) throw new Error(`${path} → ${res.status} ${res.text.slice(0, 200)}`);
  return res.body.nextCursor as string | null;
}

/** "" when the answer is the refusal expected for a cursor the list did not issue, else what was wrong. */
function refusal(res: Response, cursor: string): string {
  const err = res.body?.error;
  if (res.status === 400 && err?.id === 'invalid_cursor' && typeof err.fields?.cursor === 'string' && /first page/.test(err.message)) return '';
  // NUL anywhere in a query may be refused first, naming the field, by the middleware that refuses NUL in every input.
  if (cursor.includes(NUL) && res.status === 400 && Object.keys(err?.fields ?? {}).some((k) => /cursor$/.test(k))) return '';
  return `${res.status} ${res.text.slice(0, 160)}`;
}

describe('list cursors', () => {
  it('covers every GET route whose query takes a cursor', () => {
    const cursorRoutes = listRoutes(trimout.api)
      .filter((r) => r.method === 'GET')
      .filter((r) => r.handlers.some((h) => {
        const query = (h as { schemas?: { query?: z.ZodType } }).schemas?.query;
        return query !== undefined && takesCursor(query);
      }))
      .map((r) => `${r.method} ${r.path}`)
      .sort();
    expect(cursorRoutes).toEqual([...Object.keys(LISTS), ...Object.keys(IGNORES_CURSOR)].sort());
  });

  describe.each(Object.keys(LISTS))('%s', (key) => {
    it('pages through every row once with limit=1', async () => {
      const [path] = LISTS[key]!();
      const all = await get(withQuery(path!, { limit: '200' })).then((r) => r.body.items.map((i: { id: string }) => i.id));
      expect(all.length).toBeGreaterThanOrEqual(2);
      const seen: string[] = [];
      let cursor: string | null = null;
      do {
        const res: Response = await get(withQuery(path!, cursor ? { limit: '1', cursor } : { limit: '1' }));
        expect(res.status).toBe(200);
        seen.push(...res.body.items.map((i: { id: string }) => i.id));
        cursor = res.body.nextCursor;
      } while (cursor && seen.length <= all.length);
      expect(seen).toEqual(all);
    });

    it('refuses its cursor with another sort, other filters, another job, level or unit', async () => {
      const ways = LISTS[key]!();
      const wrong: string[] = [];
      let issued = 0;
      for (const from of ways) {
        const cursor = await issuedCursor(from);
        if (!cursor) continue; // fewer than two rows asked this way: nothing to reuse
        issued++;
        for (const to of ways) {
          if (to === from) continue;
          const res = await get(withQuery(to, { cursor }));
          const problem = refusal(res, cursor);
          if (problem) wrong.push(`cursor of ${from} on ${to} → ${problem}`);
        }
      }
      expect(issued).toBeGreaterThanOrEqual(1);
      expect(wrong).toEqual([]);
    });

    it('refuses the cursors of every other list', async () => {
      const [path] = LISTS[key]!();
      const wrong: string[] = [];
      for (const other of Object.keys(LISTS)) {
        if (other === key) continue;
        const cursor = await issuedCursor(LISTS[other]!()[0]!);
        if (!cursor) throw new Error(`${other} gave no cursor`);
        const problem = refusal(await get(withQuery(path!, { cursor })), cursor);
        if (problem) wrong.push(`cursor of ${other} → ${problem}`);
      }
      expect(wrong).toEqual([]);
    });

    it('refuses crafted cursors with 400 invalid_cursor, never a 5xx', async () => {
      const [path] = LISTS[key]!();
      const issued = (await issuedCursor(path!))!;
      const others = await Promise.all(Object.keys(LISTS).filter((k) => k !== key).map((k) => issuedCursor(LISTS[k]!()[0]!)));
      const failures: string[] = [];
      await fc.assert(
        fc.asyncProperty(craftedCursor(issued, others.filter((c): c is string => Boolean(c))), async (cursor) => {
          if (cursor === '' || cursor === issued) return; // no cursor is the first page; the issued one is valid
          const res = await get(withQuery(path!, { cursor }));
          const problem = refusal(res, cursor);
          if (problem) failures.push(`${JSON.stringify(cursor.slice(0, 120))} → ${problem}`);
        }),
        { seed: SEED + Object.keys(LISTS).indexOf(key), numRuns: RUNS },
      );
      expect(failures.slice(0, 10)).toEqual([]);
      // And the issued one still works.
      expect((await get(withQuery(path!, { cursor: issued }))).status).toBe(200);
    });
  });

  describe.each(Object.keys(IGNORES_CURSOR))('%s (takes no pages)', (key) => {
    it('never answers 5xx to a crafted cursor', async () => {
      const path = IGNORES_CURSOR[key]!.path();
      const plain = (await get(path)).status;
      for (const cursor of ["' OR 1=1 --", b64(JSON.stringify(['x', 'y'])), b64(JSON.stringify([1e308, NUL])), 'A'.repeat(3000)]) {
        const res = await get(withQuery(path, { cursor }));
        expect(res.status).toBeLessThan(500);
        expect(res.status).toBe(plain);
      }
    });
  });
});

// ------------------------------------------------------------------------------------------
// Crafted cursors
// ------------------------------------------------------------------------------------------

function b64(text: string): string {
  return Buffer.from(text, 'utf8').toString('base64url');
}
const asCursor = (value: unknown) => b64(JSON.stringify(value));

const SQL = [
  "' OR 1=1 --",
  "'; DROP TABLE findings; --",
  '1) OR (1=1',
  "x'::uuid",
  "2026-01-01'::date; SELECT pg_sleep(1); --",
  "') UNION SELECT password_hash FROM users --",
  '$1',
  'NULL',
  '\\',
];

/** Values of every type a cursor field might be mistaken for, and values a typed cast chokes on. */
const oddScalar = fc.oneof(
  fc.string({ maxLength: 40 }),
  fc.string({ unit: 'binary', maxLength: 20 }),
  fc.integer(),
  fc.double(),
  fc.boolean(),
  fc.constant(null),
  fc.constantFrom(2 ** 31, -(2 ** 31) - 1, 2 ** 53, Number.MAX_VALUE, -Number.MAX_VALUE, 1e21, 0.5, -0, 99999999999999999999),
  fc.constantFrom(...SQL),
  fc.constantFrom('2026-02-31', '2026-13-01', '2026-12-08T25:00:00Z', '2026-12-08T10:00:00.1234567Z', '0000-00-00', 'infinity', '-infinity', 'epoch', 'now', 'NaN', '1e309'),
  fc.constantFrom('9'.repeat(400), `IU${NUL}3`, NUL, '\uD800', 'x'.repeat(600)),
  fc.uuid(),
  fc.date({ noInvalidDate: true }).map((d) => d.toISOString()),
  fc.jsonValue({ maxDepth: 2 }),
);

function craftedCursor(issued: string, otherLists: string[]): fc.Arbitrary<string> {
  const signature = issued.includes('.') ? issued.slice(issued.lastIndexOf('.') + 1) : issued;
  const payload = issued.includes('.') ? issued.slice(0, issued.lastIndexOf('.')) : issued;
  return fc.oneof(
    fc.string({ maxLength: 200 }),
    fc.string({ unit: 'binary', maxLength: 100 }),
    fc.constantFrom(...SQL),
    fc.jsonValue().map(asCursor),
    // The shape of a position (sort value, id) with any types, unsigned or under a borrowed or random signature.
    fc.tuple(oddScalar, oddScalar).map(asCursor),
    fc.tuple(fc.integer(), fc.uuid()).map(asCursor),
    fc.tuple(fc.string({ maxLength: 30 }), fc.uuid()).map(asCursor),
    fc.tuple(oddScalar, fc.uuid()).map((t) => `${asCursor(t)}.${signature}`),
    fc.tuple(oddScalar, oddScalar, fc.string({ maxLength: 40 })).map(([v, id, s]) => `${asCursor([v, id])}.${b64(s)}`),
    fc.array(oddScalar, { maxLength: 4 }).map((a) => `${asCursor(a)}.${signature}`),
    // The issued cursor, changed: one character, cut short, lengthened, its payload under another's signature.
    fc.tuple(fc.nat(), fc.constantFrom(...'AQgw_-.0aZ=%'.split(''))).map(([i, c]) => {
      const at = i % issued.length;
      return issued.slice(0, at) + (issued[at] === c ? (c === 'A' ? 'B' : 'A') : c) + issued.slice(at + 1);
    }),
    fc.nat().map((n) => issued.slice(0, n % issued.length)),
    fc.string({ minLength: 1, maxLength: 10 }).map((s) => issued + s),
    fc.constant(`${payload}.${payload}`),
    otherLists.length ? fc.constantFrom(...otherLists).map((o) => `${payload}.${o.slice(o.lastIndexOf('.') + 1)}`) : fc.constant(`${payload}.`),
    otherLists.length ? fc.constantFrom(...otherLists) : fc.constant(payload),
    // NUL, very long text.
    fc.string({ maxLength: 40 }).map((s) => `${s}${NUL}${s}`),
    fc.constant(`${issued}${NUL}`),
    fc.integer({ min: 500, max: 6000 }).map((n) => 'A'.repeat(n)),
  );
}
