/**
 * The API's JSON answers go compressed to a client that accepts it (a phone on a slow link), and
 * come back byte for byte; answers carrying the CSRF token never do (BREACH), nor do exports
 * (streamed as they are). Decoded with node's own zlib, not the server's code.
 */
import http from 'node:http';
import zlib from 'node:zlib';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp, listenOnLoopback, signIn, type Listening, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { addMember, buildJob, buildUser } from '../../support/factories';
import { buildWalkJob, type WalkJob } from '../../support/findings';

let db: Database;
let trimout: TrimoutApp;
let listening: Listening;
let base = '';
let w: WalkJob;
let inspector: SignedIn;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  listening = await listenOnLoopback(trimout.app);
  base = listening.url;
  w = await buildWalkJob();
  inspector = await signIn(trimout.app, w.inspector.email);
});
afterAll(async () => {
  await listening.close();
  await trimout.close();
  await db.close();
});

/** The answer as it crossed the wire (no decoding by the client), with the session's cookie. */
function wire(pathname: string, acceptEncoding: string, cookie = ''): Promise<{ status: number; headers: http.IncomingHttpHeaders; body: Buffer }> {
  return new Promise((resolve, reject) => {
    http
      .get(`${base}${pathname}`, { headers: { 'Accept-Encoding': acceptEncoding, Cookie: cookie } }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
        res.on('error', reject);
      })
      .on('error', reject);
  });
}

async function cookieOf(who: SignedIn): Promise<string> {
  // the agent's cookie jar holds the session cookie set at sign-in
  const jar = (who.agent as unknown as { jar: { getCookies: (a: { domain: string; path: string; secure: boolean; script: boolean }) => { name: string; value: string }[] } }).jar;
  return jar
    .getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false })
    .map((c) => `${c.name}=${c.value}`)
    .join('; ');
}

it('a JSON list goes gzip- or brotli-compressed to a client that accepts it, and decodes to the same JSON as the plain answer', async () => {
  const cookie = await cookieOf(inspector);
  const path = `/api/jobs/${w.job.id}/catalogue?limit=200`;
  const plain = await wire(path, 'identity', cookie);
  expect(plain.status).toBe(200);
  expect(plain.headers['content-encoding']).toBeUndefined();
  expect(plain.body.length).toBeGreaterThan(10_000);

  const gz = await wire(path, 'gzip', cookie);
  expect(gz.headers['content-encoding']).toBe('gzip');
  expect(gz.headers.vary).toMatch(/Accept-Encoding/i);
  expect(JSON.parse(zlib.gunzipSync(gz.body).toString('utf8'))).toEqual(JSON.parse(plain.body.toString('utf8')));
  expect(gz.body.length).toBeLessThan(plain.body.length * 0.3);

  const br = await wire(path, 'br, gzip', cookie);
  expect(br.headers['content-encoding']).toBe('br');
  expect(JSON.parse(zlib.brotliDecompressSync(br.body).toString('utf8'))).toEqual(JSON.parse(plain.body.toString('utf8')));
});

it('the session answer, which carries the CSRF token, is never compressed; nor is a CSV export', async () => {
  const person = await buildUser();
  for (let i = 1; i <= 12; i++) {
    const job = await buildJob({ name: `Compression check building number ${i} with a long name` });
    await addMember(job.id, person.id, 'gc_manager', person.companyId);
  }
  const cookie = await cookieOf(await signIn(trimout.app, person.email));
  const session = await wire('/api/session', 'br, gzip', cookie);
  expect(session.status).toBe(200);
  expect(JSON.parse(session.body.toString('utf8'))).toMatchObject({ user: { email: person.email }, csrfToken: expect.any(String) });
  // Long enough to be compressed if it were allowed (the threshold is 1 kB): 12 jobs.
  expect(session.body.length).toBeGreaterThan(2048);
  expect(session.headers['content-encoding']).toBeUndefined();
  const anonymous = await wire('/api/session', 'gzip');
  expect(anonymous.headers['content-encoding']).toBeUndefined();

  const csv = await wire(`/api/jobs/${w.job.id}/findings.csv`, 'gzip', await cookieOf(inspector));
  expect(csv.status).toBe(200);
  expect(String(csv.headers['content-type'])).toMatch(/^text\/csv/);
  expect(csv.headers['content-encoding']).toBeUndefined();
});
