/**
 * Bad input: generated bodies, queries and path ids sent to EVERY route (read from
 * the router) as every caller. For each answer: no 5xx, no stack trace or server path in the
 * body, and every 4xx is the JSON error envelope { error: { id, message } }. A snapshot of the
 * database (row count + a sum of 64-bit hashes of every row of each app table, sessions and idempotency keys left
 * out) and of the photo store is taken around each write: a write answered 4xx, and any GET,
 * leaves it unchanged. Prototype-pollution keys (__proto__, constructor.prototype) must not
 * reach Object.prototype.
 *
 * Bounded: FUZZ_RUNS (default 5) generated requests per route, the callers taking turns (so
 * each caller once by default); the seed is printed and can be replayed with FUZZ_SEED=<seed>.
 */
import fc from 'fast-check';
import { QueryTypes } from 'sequelize';
import type { Response } from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { routeKeysFromRouter } from '../../support/routes';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { buildCtx, CASES, freshAgent, ROLE_NAMES, type Ctx, type RoleName, type Spec } from './matrix-fixtures';

jest.setTimeout(120_000);

const SEED = process.env.FUZZ_SEED ? Number(process.env.FUZZ_SEED) : Math.floor(Math.random() * 2 ** 31);
const RUNS = Number(process.env.FUZZ_RUNS ?? 5);
// eslint-disable-next-line no-console
console.log(`fuzz.test.ts: FUZZ_SEED=${SEED} FUZZ_RUNS=${RUNS}`);

/** Tables whose rows change on every request by design (sessions roll, keys are claimed). */
const VOLATILE = new Set(['sessions', 'idempotency_keys', 'schema_migrations']);

let db: Database;
let s3: FakeS3;
let trimout: TrimoutApp;
let ctx: Ctx;
let tables: string[];

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  ctx = await buildCtx(trimout.app);
  const rows = await db.sequelize.query<{ name: string }>(
    `SELECT table_name AS name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY 1`,
    { type: QueryTypes.SELECT },
  );
  tables = rows.map((r) => r.name).filter((n) => !VOLATILE.has(n) && !/rate/i.test(n));
});
/** Status → count over the whole file, printed at the end (how deep the generated requests got). */
const statuses = new Map<number, number>();

afterAll(async () => {
  // eslint-disable-next-line no-console
  console.log(`fuzz.test.ts answers: ${[...statuses.entries()].sort((a, b) => a[0] - b[0]).map(([k, v]) => `${k}×${v}`).join(' ')}`);
  await trimout?.close();
  await s3?.close();
  await db?.close();
});

/** Row count and checksum of every app table, plus the stored photo keys. */
async function snapshot(): Promise<Record<string, string>> {
  const parts = tables.map(
    // Order-free checksum: the sum of a 64-bit hash of each row's text (no sort, no big string).
    (t) => `SELECT '${t}' AS name, count(*)::text || ':' || coalesce(sum(hashtextextended(x::text, 7)::numeric), 0)::text AS sum FROM "${t}" x`,
  );
  const rows = await db.sequelize.query<{ name: string; sum: string }>(parts.join(' UNION ALL '), { type: QueryTypes.SELECT });
  const out: Record<string, string> = Object.fromEntries(rows.map((r) => [r.name, r.sum]));
  out['photo store'] = (await s3.keys()).join(',');
  return out;
}

function changed(a: Record<string, string>, b: Record<string, string>): string[] {
  return Object.keys({ ...a, ...b }).filter((k) => a[k] !== b[k]);
}

// ------------------------------------------------------------------------------------------
// Generators
// ------------------------------------------------------------------------------------------

const PROTO_KEYS = ['__proto__', 'constructor', 'prototype'];
const weirdString = fc.oneof(
  fc.string(),
  fc.string({ unit: 'grapheme', maxLength: 50 }),
  fc.constantFrom('', ' ', '0', '-1', 'null', 'true', '../../etc/passwd', '%00', "' OR 1=1 --", '<script>alert(1)</script>', '=HYPERLINK("x")', '\u0000', '\r\nBcc: x@example.org'),
  fc.integer({ min: 1000, max: 300_000 }).map((n) => 'x'.repeat(n)),
);
const idLike = (ctx: Ctx) =>
  fc.oneof(
    fc.uuid(),
    weirdString,
    fc.constantFrom(ctx.other.job.id, ctx.other.level.id, ctx.other.cassette.id, ctx.other.finding.A.id, ctx.other.finding.B.photoId, '00000000-0000-0000-0000-000000000000'),
  );
/** Raw JSON text: arbitrary JSON, a wrong-typed or polluted copy of a valid body, or prototype keys. */
const bodyText = (valid: unknown) =>
  fc.oneof(
    fc.jsonValue().map((v) => JSON.stringify(v)),
    fc.record({ key: fc.constantFrom(...PROTO_KEYS), value: fc.jsonValue() }).map(({ key, value }) => {
      const base = valid && typeof valid === 'object' && !Array.isArray(valid) ? JSON.stringify(valid).slice(1, -1) : '';
      return `{${base}${base ? ',' : ''}${JSON.stringify(key)}:{"polluted":"yes","prototype":{"polluted":"yes"}},"x":${JSON.stringify(value)}}`;
    }),
    valid && typeof valid === 'object' && !Array.isArray(valid) && Object.keys(valid).length > 0
      ? fc
          .record({ key: fc.constantFrom(...Object.keys(valid)), value: fc.oneof(fc.jsonValue(), weirdString) })
          .map(({ key, value }) => JSON.stringify({ ...(valid as Record<string, unknown>), [key]: value }))
      : fc.constant('{}'),
    fc.array(fc.jsonValue(), { maxLength: 3 }).map((a) => JSON.stringify(a)),
    fc.constantFrom('{', '{"a":', 'null', '"text"', '[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]', `{"a":"${'y'.repeat(200_000)}"}`),
  );
const queryText = fc.dictionary(fc.oneof(fc.string({ maxLength: 12 }), fc.constantFrom('limit', 'cursor', 'sort', 'status', 'q', 'levelId', '__proto__', 'constructor[prototype][x]', 'a[]')), weirdString, { maxKeys: 3 });

interface Generated {
  role: RoleName;
  pathChoice: 'valid' | 'fuzzed';
  ids: string[];
  query: Record<string, string>;
  body: string;
  multipart: null | { data: string; file: Uint8Array };
  headers: Record<string, string>;
}

// ------------------------------------------------------------------------------------------

function fillPath(routePath: string, spec: Spec, g: Generated): string {
  if (g.pathChoice === 'valid') return spec.path;
  let i = 0;
  // Keep the own job id half the time so the handlers (not only the policy) see the fuzzed ids.
  const validParts = spec.path.split('/');
  return routePath
    .split('/')
    .map((part, index) => {
      if (!part.startsWith(':')) return part;
      const id = g.ids[i++ % g.ids.length]!;
      if (part === ':jobId' && i % 2 === 1) return validParts[index];
      return encodeURIComponent(id.slice(0, 2000)); // longer URLs are refused by Node's HTTP parser (431) before Express
    })
    .join('/');
}

async function sendGenerated(method: string, path: string, g: Generated, who: { agent: TestAgent; csrf: string }, fileField = 'photos'): Promise<Response> {
  const qs = new URLSearchParams(Object.entries(g.query).map(([k, v]): [string, string] => [k, v.slice(0, 1000)])).toString();
  const url = qs ? `${path}?${qs}` : path;
  const m = method.toLowerCase() as 'get' | 'post' | 'patch' | 'put' | 'delete';
  let req = who.agent[m](url).set(g.headers);
  if (method !== 'GET') req = req.set('X-CSRF-Token', who.csrf);
  if (g.multipart) {
    return req.field('data', g.multipart.data).attach(fileField, Buffer.from(g.multipart.file), { filename: '../../evil.svg', contentType: 'image/svg+xml' });
  }
  return req.set('Content-Type', 'application/json').send(g.body);
}

const STACK = /\n\s+at |at [\w.<>]+ \(|\.ts:\d+|node_modules|\/work\/|Sequelize[A-Z]\w*Error|ECONNREFUSED/;

const routeKeys: string[] = routeKeysFromRouter();

describe('fuzz: every route, every caller', () => {
  it.each(routeKeys)('%s', async (key) => {
    const [method, routePath] = key.split(' ') as [string, string];
    const kase = CASES[key];
    if (!kase) throw new Error(`${key}: no request in matrix-fixtures.ts CASES (add it with its permission-matrix entry)`);
    const spec = await kase.setup(ctx.own, ctx, 'A');
    const multipartRoute = /\/findings$|\/fixes$|\/plan$/.test(routePath) && method === 'POST';
    const roles = ROLE_NAMES;
    // Callers take turns (run i is roles[i % 5]), so every route is tried as every caller.
    let turn = 0;
    const generated: fc.Arbitrary<Generated> = fc.record({
      role: fc.constant<RoleName>('anon').map(() => roles[turn++ % roles.length]!),
      pathChoice: fc.constantFrom('valid' as const, 'fuzzed' as const),
      ids: fc.array(idLike(ctx), { minLength: 1, maxLength: 4 }),
      query: queryText,
      body: bodyText(spec.body),
      multipart: multipartRoute
        ? fc.option(fc.record({ data: fc.oneof(fc.string(), bodyText(spec.multipart?.data)), file: fc.uint8Array({ maxLength: 2048 }) }), { nil: null })
        : fc.constant(null),
      headers: fc.record(
        {
          'If-Match': fc.oneof(fc.constant('*'), weirdString.map((s) => s.slice(0, 200).replace(/[^\x20-\x7e]/g, '')), fc.constant('"v1"')),
          'Idempotency-Key': fc.oneof(fc.uuid(), fc.string({ maxLength: 120 }).map((s) => s.replace(/[^\x20-\x7e]/g, ''))),
        },
        { requiredKeys: [] },
      ),
    });

    let before = await snapshot();
    const failures: string[] = [];
    await fc.assert(
      fc.asyncProperty(generated, async (g) => {
        // Routes that sign in or out (a valid token in the path, or DELETE /api/session) get a fresh agent each time.
        const who = kase.fresh ? await freshAgent(ctx, g.role) : ctx.agents[g.role];
        const path = fillPath(routePath, spec, g);
        const res = await sendGenerated(method, path, g, who, /\/plan$/.test(routePath) ? 'file' : 'photos');
        statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
        const text = res.text ?? '';
        const label = `${g.role} ${method} ${path.slice(0, 120)} → ${res.status}`;
        if (res.status >= 500) failures.push(`${label}: 5xx ${text.slice(0, 200)}`);
        if (STACK.test(text)) failures.push(`${label}: stack or server detail in ${text.slice(0, 200)}`);
        if (res.status >= 400) {
          const err = res.body?.error;
          if (!/json/.test(res.get('content-type') ?? '') || typeof err?.id !== 'string' || typeof err?.message !== 'string') {
            failures.push(`${label}: not the JSON error envelope: ${text.slice(0, 200)}`);
          }
        }
        if (method !== 'GET') {
          const after = await snapshot();
          if (res.status >= 400) {
            const diff = changed(before, after);
            if (diff.length > 0) failures.push(`${label}: a refused request changed ${diff.join(', ')}`);
          }
          before = after; // a 2xx write is allowed to change things
        }
        expect(Object.prototype).not.toHaveProperty('polluted');
        expect(failures).toEqual([]);
      }),
      { seed: SEED + routeKeys.indexOf(key), numRuns: RUNS, endOnFailure: true },
    );
    // GETs never write: the state after all the GETs is the state before them.
    if (method === 'GET') expect(changed(before, await snapshot())).toEqual([]);
  });
});
