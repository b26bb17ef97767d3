/**
 * Killing the server in the middle of a write: the real server runs as a
 * child process (server/index.ts, photos on a disk store in a temporary folder) and is killed
 * with SIGKILL
 *  1. while a multipart finding upload is still arriving (headers and half a photo sent);
 *  2. inside the write's transaction, after the finding, its photo rows and the stored photo
 *     objects exist but before the commit (the server runs with TRIMOUT_FAULT_PAUSE_MS and the
 *     request carries X-Trimout-Fault-Pause: a test-only hook, server/testing/faultHooks.ts,
 *     that server/env.ts refuses in production);
 *  3. the same inside a fix submission (status open → fix submitted, with a photo);
 *  4. the same inside a re-inspection (fix submitted → closed).
 * After each restart: no half-saved finding or fix, every photo row's objects exist, no
 * finding points to a missing photo, every object no row references is named by a pending
 * upload (so the reaper removes it: shown once, for the finding killed in its transaction), every finding's status is the one its last status event
 * says (no event without its status change, no change without its event), and a retry with the
 * same Idempotency-Key succeeds exactly once (a second retry is a replay).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { PENDING_UPLOAD_MAX_AGE_MINUTES, reapOrphanUploads } from '../../../server/services/pendingUploads';
import { DiskObjectStore } from '../../../server/storage/disk';
import { connectTestDb, testDatabaseUrl } from '../../support/db';
import { buildWalkJob, insertFinding, type WalkJob } from '../../support/findings';
import { TEST_PASSWORD } from '../../support/factories';
import { waitFor } from '../../support/wait';
import { phoneJpeg } from '../photos/fixtures';

jest.setTimeout(300_000);

const ROOT = path.resolve(__dirname, '../../..');
const storeDir = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-kill-'));
let db: Database;
let w: WalkJob;
let jpeg: Buffer;
let server: { child: ChildProcess; url: string; stderr: string[] } | undefined;
/** Every child started, so afterAll can end any left running (a test that timed out, say). */
const children = new Set<ChildProcess>();
let closing = false;

const PAUSE = { 'X-Trimout-Fault-Pause': '1' };

/** Starts the server; writes sent with PAUSE stop inside their transaction for a minute. */
async function startChild(): Promise<NonNullable<typeof server>> {
  // node itself with tsx's loader (one process: killing it kills the server, no wrapper in between).
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: ROOT,
    env: {
      PATH: process.env.PATH,
      TZ: 'UTC',
      NODE_ENV: 'test',
      HOST: '127.0.0.1',
      PORT: '0',
      MAIL_PORT: '0',
      DATABASE_URL: testDatabaseUrl(),
      SESSION_SECRET: 'kill-test-session-secret-0123456789abcdef0123',
      STORAGE_DISK_DIR: storeDir,
      WEB_DIST: 'dist-not-built',
      DIGEST_SCHEDULER: 'false',
      TRIMOUT_FAULT_PAUSE_MS: '60000',
      // Uploads' temporary folders: a killed server leaves its request's folder behind (the next
      // start sweeps those older than an hour); here they go with the test's folder.
      TMPDIR: path.join(storeDir, 'tmp'),
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  children.add(child);
  child.once('exit', () => children.delete(child));
  if (closing) child.kill('SIGKILL');
  const stderr: string[] = [];
  child.stderr!.on('data', (d: Buffer) => stderr.push(d.toString()));
  const url = await new Promise<string>((resolve, reject) => {
    let out = '';
    const onEarlyExit = (code: number | null) => reject(new Error(`server exited (${code}): ${out} ${stderr.join('')}`));
    const timer = setTimeout(() => reject(new Error(`server did not start: ${out} ${stderr.join('')}`)), 120_000);
    child.once('exit', onEarlyExit);
    child.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      const m = /listening on (http:\/\/[\d.]+:\d+)/.exec(out);
      if (m) {
        clearTimeout(timer);
        child.off('exit', onEarlyExit);
        resolve(m[1]!);
      }
    });
  });
  server = { child, url, stderr };
  return server;
}

/** The server left running by the test before (each test restarts it after its kill), or a new one. */
async function ensureServer(): Promise<void> {
  if (!server) await startChild();
}

async function kill(): Promise<void> {
  if (!server) return;
  const { child } = server;
  server = undefined;
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((resolve) => child.once('exit', resolve));
  child.kill('SIGKILL');
  await exited;
}

/** Bytes of every file under the child's temporary folder (where uploads are written as they arrive). */
function uploadedBytes(): number {
  const dir = path.join(storeDir, 'tmp');
  if (!fs.existsSync(dir)) return 0;
  let total = 0;
  for (const entry of fs.readdirSync(dir, { recursive: true, withFileTypes: true })) {
    if (!entry.isFile()) continue;
    try {
      total += fs.statSync(path.join(entry.parentPath, entry.name)).size;
    } catch {
      // removed between the listing and the stat: nothing to count
    }
  }
  return total;
}

/** The signed-in session (cookie + CSRF token), kept in PostgreSQL across restarts. */
let cookie = '';
let csrf = '';
async function signInOver(url: string, email: string): Promise<void> {
  const first = await fetch(`${url}/api/session`);
  const anonToken = ((await first.json()) as { csrfToken: string }).csrfToken;
  const res = await fetch(`${url}/api/session`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': anonToken },
    body: JSON.stringify({ email, password: TEST_PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in: ${res.status} ${await res.text()}`);
  cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  csrf = ((await res.json()) as { csrfToken: string }).csrfToken;
}

const BOUNDARY = '----trimout-kill-test-boundary';
function multipart(data: unknown, photos: Buffer[]): Buffer {
  const parts: Buffer[] = [
    Buffer.from(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="data"\r\n\r\n${JSON.stringify(data)}\r\n`),
  ];
  photos.forEach((p, i) => {
    parts.push(Buffer.from(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="photos"; filename="p${i}.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`), p, Buffer.from('\r\n'));
  });
  parts.push(Buffer.from(`--${BOUNDARY}--\r\n`));
  return Buffer.concat(parts);
}

/** A raw HTTP request; `cut` sends only that many bytes of the body and leaves the request open. */
function rawRequest(
  method: string,
  pathname: string,
  body: Buffer,
  headers: Record<string, string>,
  cut?: number,
): { done: Promise<{ status: number; body: string; headers: http.IncomingHttpHeaders }>; sent: Promise<void> } {
  const { url } = server!;
  const u = new URL(pathname, url);
  let markSent!: () => void;
  const sent = new Promise<void>((r) => (markSent = r));
  const done = new Promise<{ status: number; body: string; headers: http.IncomingHttpHeaders }>((resolve, reject) => {
    const req = http.request(
      { method, host: u.hostname, port: u.port, path: u.pathname, headers: { ...headers, Cookie: cookie, 'X-CSRF-Token': csrf, 'Content-Length': String(body.length) } },
      (res) => {
        let text = '';
        res.on('data', (d: Buffer) => (text += d.toString()));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body: text, headers: res.headers }));
        res.on('error', reject);
      },
    );
    req.on('error', reject);
    if (cut !== undefined) {
      req.write(body.subarray(0, cut), () => markSent());
    } else {
      req.end(body, () => markSent());
    }
  });
  return { done, sent };
}

const findingUpload = (key: string, photos: Buffer[]) =>
  [
    'POST',
    `/api/jobs/${w.job.id}/findings`,
    multipart({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, companyId: w.subA.companyId, note: `kill ${key}` }, photos),
    { 'Content-Type': `multipart/form-data; boundary=${BOUNDARY}`, 'Idempotency-Key': key },
  ] as const;

async function q<T extends object>(sql: string, bind: unknown[] = []): Promise<T[]> {
  return db.sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT });
}

async function counts() {
  const [row] = await q<{ findings: string; photos: string; fixes: string; events: string }>(
    `SELECT (SELECT count(*) FROM findings WHERE job_id = $1) AS findings, (SELECT count(*) FROM photos WHERE job_id = $1) AS photos,
            (SELECT count(*) FROM fixes WHERE job_id = $1) AS fixes, (SELECT count(*) FROM finding_events WHERE job_id = $1) AS events`,
    [w.job.id],
  );
  return { findings: Number(row!.findings), photos: Number(row!.photos), fixes: Number(row!.fixes), events: Number(row!.events) };
}

const objectPath = (key: string) => path.join(storeDir, 'objects', ...key.split('/'));

/** The invariants that must hold after any crash. */
async function expectConsistent(): Promise<{ unreferencedObjects: number; unreferenced: string[] }> {
  const photos = await q<{ id: string; storage_key: string; thumb_key: string; print_key: string | null; finding_id: string | null; fix_id: string | null }>(
    `SELECT id, storage_key, thumb_key, print_key, finding_id, fix_id FROM photos WHERE job_id = $1`,
    [w.job.id],
  );
  const variants = (p: (typeof photos)[number]) => [p.storage_key, p.thumb_key, ...(p.print_key ? [p.print_key] : [])];
  const missing = photos.flatMap(variants).filter((k) => !fs.existsSync(objectPath(k)));
  expect(missing).toEqual([]);
  // Every photo an event names exists as a row (no finding or fix pointing to a missing photo).
  const dangling = await q<{ id: string }>(
    `SELECT DISTINCT u.id FROM finding_events e CROSS JOIN LATERAL unnest(e.photo_ids) AS u(id)
      WHERE e.job_id = $1 AND NOT EXISTS (SELECT 1 FROM photos p WHERE p.id = u.id)`,
    [w.job.id],
  );
  expect(dangling).toEqual([]);
  // Every finding's status is the one its latest status event says.
  const mismatched = await q<{ id: string; status: string; last: string | null }>(
    `SELECT f.id, f.status,
            (SELECT e."to"->>'status' FROM finding_events e WHERE e.finding_id = f.id AND e."to" ? 'status' ORDER BY e.at DESC, e.id DESC LIMIT 1) AS last
       FROM findings f WHERE f.job_id = $1`,
    [w.job.id],
  );
  expect(mismatched.filter((m) => m.last !== m.status)).toEqual([]);
  // Every fix has its photos and its event.
  const fixesWithout = await q<{ id: string }>(
    `SELECT x.id FROM fixes x WHERE x.job_id = $1 AND (NOT EXISTS (SELECT 1 FROM photos p WHERE p.fix_id = x.id)
        OR NOT EXISTS (SELECT 1 FROM finding_events e WHERE e.finding_id = x.finding_id AND e.kind = 'fix_submitted' AND e."to"->>'fixId' = x.id::text))`,
    [w.job.id],
  );
  expect(fixesWithout).toEqual([]);
  // Objects other rows name: report files (report_runs, built by this server's report worker for
  // whatever report another test queued in the shared database) and marked copies of photos.
  const named = await q<{ key: string }>(
    `SELECT storage_key AS key FROM report_runs WHERE storage_key IS NOT NULL
     UNION ALL SELECT marked_key FROM photo_marks WHERE marked_key IS NOT NULL
     UNION ALL SELECT marked_thumb_key FROM photo_marks WHERE marked_thumb_key IS NOT NULL
     UNION ALL SELECT marked_print_key FROM photo_marks WHERE marked_print_key IS NOT NULL`,
    [],
  );
  const referenced = new Set([...photos.flatMap(variants), ...named.map((n) => n.key)]);
  const walk = (dir: string, prefix = ''): string[] =>
    fs.existsSync(dir)
      ? fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? walk(path.join(dir, e.name), `${prefix}${e.name}/`) : [`${prefix}${e.name}`]))
      : [];
  const stored = walk(path.join(storeDir, 'objects')).filter((k) => !k.endsWith('.tmp'));
  const unreferenced = stored.filter((k) => !referenced.has(k)).sort();
  // Nothing is left that nothing names: every unreferenced object has its pending upload row.
  const pending = await q<{ key: string }>(`SELECT key FROM pending_uploads WHERE key = ANY($1::text[]) ORDER BY key`, [unreferenced]);
  expect(pending.map((p) => p.key)).toEqual(unreferenced);
  return { unreferencedObjects: unreferenced.length, unreferenced };
}

beforeAll(async () => {
  db = await connectTestDb();
  w = await buildWalkJob();
  jpeg = await phoneJpeg();
});
afterAll(async () => {
  closing = true;
  await kill();
  for (const child of children) child.kill('SIGKILL');
  await db?.close();
  fs.rmSync(storeDir, { recursive: true, force: true });
});

describe('the server killed mid-request', () => {
  it('a finding upload cut off while its photos arrive leaves nothing; the retry succeeds once', async () => {
    await startChild(); // the same server (restarted after each kill) serves the whole file
    await signInOver(server!.url, w.inspector.email);
    const before = await counts();
    const key = `kill-upload-${randomUUID()}`;
    const [method, p, body, headers] = findingUpload(key, [jpeg, jpeg]);
    const bytesBefore = uploadedBytes();
    const slow = rawRequest(method, p, body, headers, Math.floor(body.length * 0.6));
    slow.done.catch(() => undefined); // the connection dies with the server
    await slow.sent;
    // Killed while the photos are being written: the first bytes have reached the temporary folder.
    await waitFor(() => uploadedBytes() > bytesBefore, { what: 'the upload to reach the server', timeout: 30_000 });
    await kill();
    expect(await counts()).toEqual(before);
    await expectConsistent();

    await startChild();
    const retry = await rawRequest(method, p, body, headers).done;
    expect(retry.status).toBe(201);
    const again = await rawRequest(method, p, body, headers).done;
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(JSON.parse(again.body).id).toBe(JSON.parse(retry.body).id);
    expect(await counts()).toEqual({ ...before, findings: before.findings + 1, photos: before.photos + 2, events: before.events + 1 });
    await expectConsistent();
  });

  it('a finding killed inside its transaction (photos stored, rows written, not committed) leaves no half-saved finding', async () => {
    await ensureServer();
    const before = await counts();
    const key = `kill-tx-${randomUUID()}`;
    const [method, p, body, headers] = findingUpload(key, [jpeg, jpeg]);
    const req = rawRequest(method, p, body, { ...headers, ...PAUSE });
    req.done.catch(() => undefined);
    const s = server!;
    await waitFor(() => s.stderr.join('').includes('fault-pause POST /api/jobs/'), { what: 'the write to reach its transaction', timeout: 90_000 });
    await kill();
    expect(await counts()).toEqual(before);
    const { unreferencedObjects, unreferenced } = await expectConsistent();
    // The photos were stored before the transaction: the crash leaves their objects (2 photos ×
    // full + thumbnail + print copy) unreferenced: invisible (random keys, no row names them, downloads go
    // through the rows) and never a row without its object. Their pending rows name them; once
    // those are older than the reaper's age (moved back here instead of waiting), the reaper the
    // server runs at start and every few minutes deletes objects and rows.
    expect(unreferencedObjects).toBe(6);
    await db.sequelize.query(`UPDATE pending_uploads SET created_at = now() - make_interval(mins => $2) WHERE key = ANY($1::text[])`, {
      bind: [unreferenced, PENDING_UPLOAD_MAX_AGE_MINUTES + 1],
    });
    await reapOrphanUploads(db.sequelize, new DiskObjectStore(storeDir));
    expect((await expectConsistent()).unreferencedObjects).toBe(0);

    await startChild();
    const retry = await rawRequest(method, p, body, headers).done;
    expect(retry.status).toBe(201);
    expect((await rawRequest(method, p, body, headers).done).headers['idempotent-replayed']).toBe('true');
    expect(await counts()).toEqual({ ...before, findings: before.findings + 1, photos: before.photos + 2, events: before.events + 1 });
    await expectConsistent();
  });

  let findingId: string;

  it('a fix submission killed inside its transaction changes nothing; its retry applies once', async () => {
    findingId = (await insertFinding(w, { companyId: w.subA.companyId })).id;
    await ensureServer();

    // Fix submission (the subcontractor of company A), killed before commit.
    await signInOver(server!.url, w.subA.email);
    const before = await counts();
    const fixKey = `kill-fix-${randomUUID()}`;
    const fixArgs = [
      'POST',
      `/api/jobs/${w.job.id}/findings/${findingId}/fixes`,
      multipart({ note: 'Re-pitched the drain line.' }, [jpeg]),
      { 'Content-Type': `multipart/form-data; boundary=${BOUNDARY}`, 'Idempotency-Key': fixKey },
    ] as const;
    const fix = rawRequest(fixArgs[0], fixArgs[1], fixArgs[2], { ...fixArgs[3], ...PAUSE });
    fix.done.catch(() => undefined);
    const s = server!;
    await waitFor(() => s.stderr.join('').includes('/fixes'), { what: 'the fix to reach its transaction', timeout: 90_000 });
    await kill();
    expect(await counts()).toEqual(before);
    const [{ status }] = await q<{ status: string }>(`SELECT status FROM findings WHERE id = $1`, [findingId]);
    expect(status).toBe('open');
    await expectConsistent();

    await startChild();
    const fixRetry = await rawRequest(...fixArgs).done;
    expect(fixRetry.status).toBe(201);
    expect((await rawRequest(...fixArgs).done).headers['idempotent-replayed']).toBe('true');
    expect(await counts()).toEqual({ ...before, fixes: before.fixes + 1, photos: before.photos + 1, events: before.events + 1 });
    await expectConsistent();
  });

  it('a re-inspection killed inside its transaction changes nothing; its retry applies once', async () => {
    // The inspector accepts the fix; killed before commit.
    await ensureServer();
    await signInOver(server!.url, w.inspector.email);
    const [{ version }] = await q<{ version: number }>(`SELECT version FROM findings WHERE id = $1`, [findingId]);
    const midway = await counts();
    const reKey = `kill-reinspect-${randomUUID()}`;
    const reArgs = [
      'POST',
      `/api/jobs/${w.job.id}/findings/${findingId}/reinspections`,
      Buffer.from(JSON.stringify({ verdict: 'accept' })),
      { 'Content-Type': 'application/json', 'Idempotency-Key': reKey, 'If-Match': `"v${version}"` },
    ] as const;
    const re = rawRequest(reArgs[0], reArgs[1], reArgs[2], { ...reArgs[3], ...PAUSE });
    re.done.catch(() => undefined);
    const s2 = server!;
    await waitFor(() => s2.stderr.join('').includes('/reinspections'), { what: 'the re-inspection to reach its transaction', timeout: 90_000 });
    await kill();
    expect(await counts()).toEqual(midway);
    const [after] = await q<{ status: string; version: number }>(`SELECT status, version FROM findings WHERE id = $1`, [findingId]);
    expect(after).toEqual({ status: 'fix_submitted', version });
    await expectConsistent();

    await startChild();
    const reRetry = await rawRequest(...reArgs).done;
    expect(reRetry.status).toBe(200);
    expect(JSON.parse(reRetry.body).status).toBe('closed');
    const replay = await rawRequest(...reArgs).done;
    expect(replay.status).toBe(200);
    expect(replay.headers['idempotent-replayed']).toBe('true');
    expect(await counts()).toEqual({ ...midway, events: midway.events + 1 });
    await expectConsistent();
  });

  it('a replay while the first request is still in its transaction gets 409 and writes nothing (security.md: idempotency)', async () => {
    const fid = (await insertFinding(w, { companyId: w.subA.companyId })).id;
    await kill(); // a fresh server, so its stderr holds only this test's pauses
    await startChild();
    await signInOver(server!.url, w.subA.email);
    const before = await counts();
    const key = `in-flight-${randomUUID()}`;
    const args = [
      'POST',
      `/api/jobs/${w.job.id}/findings/${fid}/fixes`,
      multipart({ note: 'Re-hung the unit level.' }, [jpeg]),
      { 'Content-Type': `multipart/form-data; boundary=${BOUNDARY}`, 'Idempotency-Key': key },
    ] as const;
    const first = rawRequest(args[0], args[1], args[2], { ...args[3], ...PAUSE });
    first.done.catch(() => undefined);
    const s3 = server!;
    await waitFor(() => s3.stderr.join('').includes('/fixes'), { what: 'the first fix to reach its transaction', timeout: 90_000 });
    // Same key while the first is still inside its transaction: refused at once, not queued.
    const second = await rawRequest(...args).done;
    expect(second.status).toBe(409);
    expect(JSON.parse(second.body).error.id).toBe('idempotency_in_flight');
    await kill();
    expect(await counts()).toEqual(before);
    await expectConsistent();
  });
});
