/**
 * Lines of ../shared/security.md that no other test covered (docs/security-tests.md maps every
 * line to its test). Where a rule holds for every route, the routes are read from the router
 * and the valid requests come from the permission matrix's fixtures (matrix-fixtures.ts).
 */
import fs from 'node:fs';
import path from 'node:path';
import express from 'express';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { loadEnv } from '../../../server/env';
import { errorHandler } from '../../../server/errors';
import { IDEMPOTENCY_RETENTION_DAYS, pruneIdempotencyKeys } from '../../../server/services/idempotency';
import { EXPORTS_PER_MINUTE } from '../../../server/services/csvSafe';
import { QueryTypes } from 'sequelize';
import { newPasswordSchema, signInSchema } from '../../../shared/schemas/session';
import { buildTestApp, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { listRoutes } from '../../support/routes';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { buildCtx, CASES, send, type Ctx, type RoleName } from './matrix-fixtures';

jest.setTimeout(120_000);

const ROOT = path.resolve(__dirname, '../../..');
let db: Database;
let s3: FakeS3;
let trimout: TrimoutApp;
let ctx: Ctx;
let routeKeys: string[];

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  ctx = await buildCtx(trimout.app);
  routeKeys = listRoutes(trimout.api).map((r) => `${r.method} ${r.path}`);
});
afterAll(async () => {
  await trimout?.close();
  await s3?.close();
  await db?.close();
});

/** Write routes a GC manager may not make, and the caller who does (the policy answers 403 before the body is read). */
const WRITER: Record<string, RoleName> = {
  'POST /api/jobs/:jobId/test-records': 'insp', // an inspector or the responsible company records; a GC manager witnesses
};

/** Write routes whose valid request is a JSON object, signed in as the GC manager (allowed on all of them but WRITER's). */
function jsonWriteRoutes(): string[] {
  return routeKeys.filter((k) => {
    const kase = CASES[k];
    if (!kase || kase.fresh || k.startsWith('GET ')) return false;
    if (/\/unsubscribe\//.test(k)) return false; // RFC 8058 one-click: a form post by design, token-authorised
    return true;
  });
}

describe('input: strict schemas, JSON only, size limits [2.2.1, 4.1.1, 15.3.5–15.3.7]', () => {
  it('every JSON write route refuses an unknown key with 400', async () => {
    const offenders: string[] = [];
    let tried = 0;
    for (const key of jsonWriteRoutes()) {
      const [method] = key.split(' ') as [string, string];
      const spec = await CASES[key]!.setup(ctx.own, ctx, 'A');
      if (spec.multipart || !spec.body || typeof spec.body !== 'object' || Array.isArray(spec.body)) continue;
      tried++;
      const res = await send(ctx.agents[WRITER[key] ?? 'gc'], method, { ...spec, body: { ...(spec.body as object), unexpectedKey: 1 } });
      if (res.status !== 400) offenders.push(`${key} → ${res.status}`);
    }
    expect(offenders).toEqual([]);
    expect(tried).toBeGreaterThanOrEqual(30); // the routes really were tried
  });

  it('every write route refuses a text/plain body and an HTML form post with 415', async () => {
    const offenders: string[] = [];
    expect(jsonWriteRoutes().length).toBeGreaterThanOrEqual(40);
    for (const key of jsonWriteRoutes()) {
      const [method] = key.split(' ') as [string, string];
      const spec = await CASES[key]!.setup(ctx.own, ctx, 'A');
      const m = method.toLowerCase() as 'post' | 'patch' | 'delete';
      for (const [type, body] of [
        ['text/plain', '{"name":"x"}'],
        ['application/x-www-form-urlencoded', 'name=x'],
      ] as const) {
        const res = await ctx.agents.gc.agent[m](spec.path)
          .set('X-CSRF-Token', ctx.agents.gc.csrf)
          .set(spec.headers ?? {})
          .set('Content-Type', type)
          .send(body);
        if (res.status !== 415) offenders.push(`${key} ${type} → ${res.status}`);
      }
    }
    expect(offenders).toEqual([]);
  });

  it('multipart is read only on the upload routes (multer is never global): elsewhere it is a 415', async () => {
    const res = await ctx.agents.gc.agent
      .post(`/api/jobs/${ctx.own.job.id}/levels`)
      .set('X-CSRF-Token', ctx.agents.gc.csrf)
      .field('name', 'Level by form')
      .attach('file', Buffer.from('x'), 'x.txt');
    expect(res.status).toBe(415);
  });

  it('a JSON body over 100 kB is refused with 413 and the JSON error envelope', async () => {
    const res = await ctx.agents.gc.agent
      .post(`/api/jobs/${ctx.own.job.id}/levels`)
      .set('X-CSRF-Token', ctx.agents.gc.csrf)
      .send({ name: 'x'.repeat(150_000) });
    expect(res.status).toBe(413);
    expect(res.body.error).toEqual(expect.objectContaining({ id: expect.any(String), message: expect.any(String) }));
  });

  it('a query key sent twice (an array where one value is expected) is a 400, not an array in a WHERE', async () => {
    const base = `/api/jobs/${ctx.own.job.id}`;
    for (const url of [`${base}/findings?limit=1&limit=2`, `${base}/units?q=a&q=b`, `${base}/findings?sort=number&sort=-number`]) {
      const res = await ctx.agents.gc.agent.get(url);
      expect([url, res.status]).toEqual([url, 400]);
    }
  });
});

describe('ids in bodies are scoped too [8.2.2]', () => {
  it("every write whose body names a row of the job refuses the same row of another job (4xx, nothing written)", async () => {
    const own = ctx.own;
    const other = ctx.other;
    // The same row in the other job, for every id the valid bodies use.
    const twin = new Map<string, string>([
      [own.level.id, other.level.id],
      [own.otherLevel.id, other.otherLevel.id],
      [own.space.id, other.space.id],
      [own.model.id, other.model.id],
      [own.cassette.id, other.cassette.id],
      [own.cassette2.id, other.cassette2.id],
      [own.wall.id, other.wall.id],
      [own.upstairs.id, other.upstairs.id],
      [own.system.id, other.system.id],
      [own.byCode('DR-03').id, other.byCode('DR-03').id],
      [own.finding.A.id, other.finding.A.id],
      [own.finding.B.id, other.finding.B.id],
    ]);
    const swapped = (value: unknown): { value: unknown; swaps: number } => {
      if (typeof value === 'string' && twin.has(value)) return { value: twin.get(value), swaps: 1 };
      if (Array.isArray(value)) {
        const parts = value.map(swapped);
        return { value: parts.map((p) => p.value), swaps: parts.reduce((n, p) => n + p.swaps, 0) };
      }
      if (value && typeof value === 'object') {
        const entries = Object.entries(value).map(([k, v]) => [k, swapped(v)] as const);
        return { value: Object.fromEntries(entries.map(([k, p]) => [k, p.value])), swaps: entries.reduce((n, [, p]) => n + p.swaps, 0) };
      }
      return { value, swaps: 0 };
    };
    const rows = async () =>
      JSON.stringify(
        await db.sequelize.query(
          `SELECT (SELECT count(*) FROM findings WHERE job_id = $1) f, (SELECT count(*) FROM units WHERE job_id = $1) u,
                  (SELECT count(*) FROM spaces WHERE job_id = $1) s, (SELECT count(*) FROM walks WHERE job_id = $1) w,
                  (SELECT count(*) FROM unit_checks WHERE job_id = $1) c, (SELECT max(updated_at) FROM findings WHERE job_id = $1) fu,
                  (SELECT string_agg(id::text, ',' ORDER BY position) FROM levels WHERE job_id = $1) l`,
          { bind: [own.job.id], plain: true },
        ),
      );
    const tried: string[] = [];
    const offenders: string[] = [];
    // Levels and findings made by these setups' fresh rows are fine; compare around each request only.
    for (const key of jsonWriteRoutes()) {
      const [method] = key.split(' ') as [string, string];
      if (!key.includes(':jobId')) continue;
      const spec = await CASES[key]!.setup(own, ctx, 'A');
      const body = spec.multipart ? spec.multipart.data : spec.body;
      const { value, swaps } = swapped(body);
      if (swaps === 0) continue;
      tried.push(key);
      const before = await rows();
      const res = await send(ctx.agents.gc, method, spec.multipart ? { ...spec, multipart: { ...spec.multipart, data: value } } : { ...spec, body: value });
      const after = await rows();
      if (res.status < 400 || res.status >= 500) offenders.push(`${key} → ${res.status}`);
      if (after !== before) offenders.push(`${key}: wrote to the job`);
    }
    expect(offenders).toEqual([]);
    expect(tried.length).toBeGreaterThanOrEqual(5); // spaces, units, levels/order, checks, findings (today)
  });
});

describe('errors [16.5.1]', () => {
  it('the last-resort handler answers an unexpected error with a generic 500: no message, no stack, no path', async () => {
    const logged: unknown[] = [];
    const app = express();
    app.get('/boom', () => {
      throw new Error('secret detail in /work/main/server/x.ts:12:3 password=hunter2');
    });
    app.use(errorHandler((_m, e) => logged.push(e)));
    const res = await request(app).get('/boom');
    expect(res.status).toBe(500);
    expect(res.body.error.id).toEqual(expect.any(String));
    expect(res.text).not.toMatch(/secret|hunter2|\.ts:|\bat\b/);
    expect(logged).toHaveLength(1); // kept in the server log instead
  });
});

describe('sessions [7.2.1, 3.3.x]', () => {
  it('keeps sessions in PostgreSQL (a sign-in writes a row to sessions); no MemoryStore anywhere in the server', async () => {
    const count = async () => Number(((await db.sequelize.query('SELECT count(*) AS n FROM sessions', { plain: true })) as { n: string }).n);
    const before = await count();
    await signIn(trimout.app, ctx.own.inspector.email);
    expect(await count()).toBe(before + 1);
    const offenders: string[] = [];
    const walk = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (/\.ts$/.test(e.name) && /MemoryStore/.test(fs.readFileSync(p, 'utf8'))) offenders.push(path.relative(ROOT, p));
      }
    };
    walk(path.join(ROOT, 'server'));
    expect(offenders).toEqual([]);
  });

  it('takes `trust proxy` only as a hop count, never "true"', () => {
    expect(() => loadEnv({ NODE_ENV: 'test', TRUST_PROXY: 'true' })).toThrow(/TRUST_PROXY/);
    expect(loadEnv({ NODE_ENV: 'test', TRUST_PROXY: '1' }).TRUST_PROXY).toBe(1);
  });

  it('refuses the test-only fault hook in production', () => {
    const production = { NODE_ENV: 'production', SESSION_SECRET: 'x'.repeat(40), SMTP_URL: 'smtp://127.0.0.1:25', PUBLIC_URL: 'https://punch.example.org' };
    expect(() => loadEnv({ ...production, TRIMOUT_FAULT_PAUSE_MS: '1000' })).toThrow(/TRIMOUT_FAULT_PAUSE_MS/);
    expect(() => loadEnv(production)).not.toThrow();
  });
});

describe('passwords [6.2.x]', () => {
  it('takes 8 to at least 64 characters with no composition rules, and compares them exactly as typed', async () => {
    expect(newPasswordSchema.safeParse('a'.repeat(7)).success).toBe(false);
    expect(newPasswordSchema.safeParse('aaaaaaaa').success).toBe(true); // no "one digit, one capital" rule
    expect(newPasswordSchema.safeParse('x'.repeat(64)).success).toBe(true);
    expect(newPasswordSchema.safeParse('correct horse 🐎 battery staple').success).toBe(true);
    // Not trimmed or case-folded: a trailing space or another case is another password.
    const email = ctx.own.subA.email;
    expect(signInSchema.parse({ email, password: ' spaced ' }).password).toBe(' spaced ');
    const agent = request.agent(trimout.app);
    const anon = (await agent.get('/api/session')).body.csrfToken as string;
    const wrong = await agent.post('/api/session').set('X-CSRF-Token', anon).send({ email, password: 'Correct horse battery staple' });
    expect(wrong.status).toBe(401);
  });
});

describe('CSRF on uploads [3.5.x]', () => {
  it('refuses a multipart finding upload without the token, or sent cross-site, with 403 and nothing stored', async () => {
    const url = `/api/jobs/${ctx.own.job.id}/findings`;
    const data = JSON.stringify({ catalogueItemId: ctx.own.byCode('DR-03').id, unitId: ctx.own.cassette.id });
    const keysBefore = await s3.keys();
    const count = async () => Number(((await db.sequelize.query('SELECT count(*) AS n FROM findings WHERE job_id = $1', { bind: [ctx.own.job.id], plain: true })) as { n: string }).n);
    const findingsBefore = await count();
    const noToken = await ctx.agents.insp.agent.post(url).field('data', data).attach('photos', ctx.jpeg, 'a.jpg');
    expect(noToken.status).toBe(403);
    const crossSite = await ctx.agents.insp.agent
      .post(url)
      .set('X-CSRF-Token', ctx.agents.insp.csrf)
      .set('Sec-Fetch-Site', 'cross-site')
      .field('data', data)
      .attach('photos', ctx.jpeg, 'a.jpg');
    expect(crossSite.status).toBe(403);
    expect(await count()).toBe(findingsBefore);
    expect(await s3.keys()).toEqual(keysBefore);
  });
});

describe('headers, CORS, caching [3.4.x, 14.x]', () => {
  it('sends no CORS headers to another origin (one origin serves the app and the API)', async () => {
    const res = await ctx.agents.gc.agent.get(`/api/jobs/${ctx.own.job.id}`).set('Origin', 'https://evil.example');
    expect(res.status).toBe(200);
    expect(res.headers['access-control-allow-origin']).toBeUndefined();
    const preflight = await request(trimout.app).options('/api/jobs').set('Origin', 'https://evil.example').set('Access-Control-Request-Method', 'POST');
    expect(preflight.headers['access-control-allow-origin']).toBeUndefined();
  });

  it('marks authenticated JSON no-store', async () => {
    for (const p of [`/api/jobs/${ctx.own.job.id}`, `/api/jobs/${ctx.own.job.id}/findings`, '/api/jobs']) {
      const res = await ctx.agents.insp.agent.get(p);
      expect([p, res.headers['cache-control']]).toEqual([p, 'no-store']);
    }
  });

  it('serves photos with the detected type, nosniff and an inline name made from the id (never the uploaded name), privately cached', async () => {
    const { photoId } = ctx.own.finding.A;
    for (const suffix of ['', '/thumb']) {
      const res = await ctx.agents.insp.agent.get(`/api/jobs/${ctx.own.job.id}/photos/${photoId}${suffix}`);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('image/jpeg');
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['content-disposition']).toBe(`inline; filename="${photoId}${suffix ? '-thumb' : ''}.jpg"`);
      expect(res.headers['cache-control']).toMatch(/private/);
    }
  });
});

describe('CSV exports', () => {
  it(`are rate-limited per user: export ${EXPORTS_PER_MINUTE + 1} in a minute is a 429 with Retry-After`, async () => {
    const who = ctx.agents.subB; // no other test of this file exports as subcontractor B
    const url = `/api/jobs/${ctx.own.job.id}/findings.csv`;
    for (let i = 0; i < EXPORTS_PER_MINUTE; i++) expect((await who.agent.get(url)).status).toBe(200);
    const refused = await who.agent.get(url);
    expect(refused.status).toBe(429);
    expect(refused.headers['retry-after']).toBeDefined();
    expect(refused.body.error.id).toEqual(expect.any(String));
  });
});

describe('idempotency keys', () => {
  it(`are kept ${IDEMPOTENCY_RETENTION_DAYS} days: pruning removes older keys only`, async () => {
    expect(IDEMPOTENCY_RETENTION_DAYS).toBe(7); // security.md: "Idempotency keys kept 7 days"
    const userId = ctx.own.inspector.id;
    const insert = (key: string, days: number) =>
      db.sequelize.query(
        `INSERT INTO idempotency_keys (user_id, key, fingerprint, response_status, created_at) VALUES ($1, $2, $3, 201, now() - ($4 || ' days')::interval)`,
        { bind: [userId, key, 'f'.repeat(64), String(days)] },
      );
    const old = `prune-old-${Date.now()}`;
    const recent = `prune-recent-${Date.now()}`;
    await insert(old, 7.5);
    await insert(recent, 6.5);
    expect(await pruneIdempotencyKeys(db.sequelize)).toBeGreaterThanOrEqual(1);
    const left = (await db.sequelize.query(`SELECT key FROM idempotency_keys WHERE user_id = $1 AND key IN ($2, $3)`, {
      bind: [userId, old, recent],
      type: QueryTypes.SELECT,
    })) as Array<{ key: string }>;
    expect(left.map((r) => r.key)).toEqual([recent]);
  });
});

describe('dependencies and client code [1.2.4, 5.x]', () => {
  it('runs sequelize ≥ 6.29 (the replacements/where fixes of 6.29)', () => {
    const { version } = JSON.parse(fs.readFileSync(path.join(ROOT, 'node_modules/sequelize/package.json'), 'utf8')) as { version: string };
    const [major, minor] = version.split('.').map(Number) as [number, number];
    expect(major > 6 || (major === 6 && minor >= 29)).toBe(true);
  });

  it('never uses dangerouslySetInnerHTML in the client', () => {
    const offenders: string[] = [];
    const walk = (dir: string) => {
      if (!fs.existsSync(dir)) return;
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (/\.(tsx?|jsx?)$/.test(e.name) && fs.readFileSync(p, 'utf8').includes('dangerouslySetInnerHTML')) offenders.push(path.relative(ROOT, p));
      }
    };
    for (const dir of ['app', 'components', 'shared']) walk(path.join(ROOT, dir));
    expect(offenders).toEqual([]);
  });
});
