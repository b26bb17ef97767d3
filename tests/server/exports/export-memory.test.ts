/**
 * findings.csv streams: 100,000 findings go out through a real HTTP server while the server
 * process's memory is sampled (a process of its own: tests/support/serverProcess.ts); RSS and heap growth stay under 50 MB (the file is never held whole) and
 * every row arrives. A client that goes away mid-download leaves no query running and the pool
 * still answers; a burst of exports beyond the cap is refused with 429 instead of taking every
 * connection.
 *
 * The rows are made in one INSERT ... SELECT over generate_series (no per-row round trips): the
 * findings table has no insert trigger (the only triggers guard finding_events, which this test
 * does not touch), and its checks are met (number > 0 and unique per job, severity / status from
 * their lists, the company on the job).
 */
import http from 'node:http';
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { EXPORT_SLOT_WAIT_MS, exportsWaiting, MAX_CONCURRENT_EXPORTS } from '../../../server/services/csvStream';
import { buildTestApp, listenOnLoopback, type Listening } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { TEST_PASSWORD } from '../../support/factories';
import { buildWalkJob, type WalkJob } from '../../support/findings';
import { startServerProcess, type MemorySample, type ServerProcess } from '../../support/serverProcess';
import { waitFor } from '../../support/wait';

jest.setTimeout(180_000);

const ROWS = 100_000;
const MB = 1024 * 1024;
/** A note of about 330 characters: the file (~65 MB) is larger than the allowance, so holding it would fail the test. */
const NOTE = 'Drain line sags between hangers; re-hang at 4 ft spacing and re-test with water. '.repeat(4);

let db: Database;
let trimout: TrimoutApp;
let listening: Listening;
let base: string;
let w: WalkJob;
let cookie: string;
let serverProcess: ServerProcess | undefined;

/** Signs in through the real API over HTTP and returns the session cookie. */
async function signInCookie(email: string, origin = base): Promise<string> {
  const first = await fetch(`${origin}/api/session`);
  const anon = ((await first.json()) as { csrfToken: string }).csrfToken;
  const anonCookie = first.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const res = await fetch(`${origin}/api/session`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': anon, Cookie: anonCookie },
    body: JSON.stringify({ email, password: TEST_PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status}`);
  return res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
}

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  listening = await listenOnLoopback(trimout.app);
  base = listening.url;
  w = await buildWalkJob();
  cookie = await signInCookie(w.gcManager.email);
  const item = w.byCode('DR-03');
  const started = Date.now();
  // The rows are valid by construction (every reference is a row of this job); on a superuser
  // connection (the test clusters) the foreign-key triggers are skipped for this one insert,
  // which halves its time. Checks and unique indexes still apply.
  const [role] = await db.sequelize.query<{ super: boolean }>(`SELECT rolsuper AS super FROM pg_roles WHERE rolname = current_user`, {
    type: QueryTypes.SELECT,
  });
  await db.sequelize.transaction(async (transaction) => {
    if (role?.super) await db.sequelize.query(`SET LOCAL session_replication_role = replica`, { transaction });
    await db.sequelize.query(
      `INSERT INTO findings (id, job_id, number, unit_id, space_id, level_id, catalogue_item_id, severity, status, company_id,
                             due_on, note, return_count, logged_by, logged_at, version, created_at, updated_at)
       SELECT gen_random_uuid(), $1, g, CASE WHEN g % 2 = 0 THEN $2::uuid END, NULL, $3, $4,
              (ARRAY['critical', 'major', 'minor'])[1 + g % 3], (ARRAY['open', 'fix_submitted', 'closed'])[1 + g % 3],
              CASE WHEN g % 2 = 0 THEN $5::uuid ELSE $6::uuid END,
              current_date + (g % 30 - 15), 'Bulk finding ' || g || ': =1+1, "quoted", ünïcode. ' || $8, g % 3, $7,
              now() - make_interval(mins => g), 1, now(), now()
         FROM generate_series(1, ${ROWS}) AS g`,
      { bind: [w.job.id, w.cassette.id, w.level.id, item.id, w.subA.companyId, w.subB.companyId, w.inspector.id, NOTE], transaction },
    );
  });
  await db.sequelize.query(`ANALYZE findings`); // planner statistics as a real database would have them
  console.log(`inserted ${ROWS} findings in ${((Date.now() - started) / 1000).toFixed(1)} s`);
});

afterAll(async () => {
  await serverProcess?.close();
  await listening.close();
  // The bulk findings first (nothing refers to them: no photos, fixes or events), without the
  // foreign-key triggers when allowed, as they were made; then the job with the rest of its rows.
  const started = Date.now();
  if (w) {
    const [role] = await db.sequelize.query<{ super: boolean }>(`SELECT rolsuper AS super FROM pg_roles WHERE rolname = current_user`, {
      type: QueryTypes.SELECT,
    });
    await db.sequelize.transaction(async (transaction) => {
      if (role?.super) await db.sequelize.query(`SET LOCAL session_replication_role = replica`, { transaction });
      await db.sequelize.query(`DELETE FROM findings WHERE job_id = $1 AND note LIKE 'Bulk finding %'`, { bind: [w.job.id], transaction });
    });
    await db.sequelize.query(`DELETE FROM jobs WHERE id = $1`, { bind: [w.job.id] });
  }
  console.log(`deleted the job in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  await trimout.close();
  await db.close();
});

function get(path: string, origin = base, withCookie = cookie): Promise<http.IncomingMessage> {
  return new Promise((resolve, reject) => {
    const req = http.get(`${origin}${path}`, { headers: { Cookie: withCookie } }, resolve);
    req.on('error', reject);
  });
}

describe('findings.csv streaming', () => {
  it(`streams ${ROWS.toLocaleString('en-US')} findings with memory growth under 50 MB`, async () => {
    serverProcess = await startServerProcess();
    const origin = serverProcess.url;
    const signedIn = await signInCookie(w.gcManager.email, origin);
    // Warm up with one whole export first (modules, JIT, the pool's connection, the socket and
    // allocator buffers of a long stream): the samples then measure what a download holds. A
    // server that held the file would still grow by the file's size (its first copy is collected
    // before the baseline).
    const warm = await get(`/api/jobs/${w.job.id}/findings.csv`, origin, signedIn);
    expect(warm.statusCode).toBe(200);
    for await (const chunk of warm) void chunk;

    await serverProcess.startSampling();
    const started = Date.now();
    let lines = 0;
    let bytes = 0;
    let lastByte = -1;
    let firstChunk: Buffer | null = null;
    let samples: MemorySample[] = [];
    try {
      const res = await get(`/api/jobs/${w.job.id}/findings.csv`, origin, signedIn);
      expect(res.statusCode).toBe(200);
      expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
      // Raw bytes, not decoded strings: the reading side should churn as little memory as it can.
      for await (const chunk of res as AsyncIterable<Buffer>) {
        firstChunk ??= Buffer.from(chunk.subarray(0, 3));
        bytes += chunk.length;
        // Records end in CRLF; count them without keeping the bytes (a CRLF may straddle chunks).
        if (lastByte === 0x0d && chunk[0] === 0x0a) lines += 1;
        for (let at = chunk.indexOf('\r\n'); at >= 0; at = chunk.indexOf('\r\n', at + 2)) lines += 1;
        lastByte = chunk[chunk.length - 1] ?? -1;
      }
    } finally {
      samples = await serverProcess.stopSampling();
    }
    const baseline = samples[0]!;
    const seconds = (Date.now() - started) / 1000;
    const peakRss = Math.max(...samples.map((s) => s.rss)) - baseline.rss;
    const peakHeap = Math.max(...samples.map((s) => s.heap)) - baseline.heap;
    // For the log of a run: how big and how fast.
    console.log(
      `findings.csv: ${ROWS} rows, ${(bytes / MB).toFixed(1)} MB in ${seconds.toFixed(1)} s; ` +
        `peak growth RSS ${(peakRss / MB).toFixed(1)} MB, heap ${(peakHeap / MB).toFixed(1)} MB over ${samples.length} samples`,
    );
    expect(firstChunk).toEqual(Buffer.from([0xef, 0xbb, 0xbf])); // the UTF-8 byte-order mark
    expect(lines).toBe(ROWS + 1); // the header and every finding
    // The whole file is far larger than the allowance, so a flat line means it was streamed.
    expect(bytes).toBeGreaterThan(50 * MB);
    expect(peakRss).toBeLessThan(50 * MB);
    expect(peakHeap).toBeLessThan(50 * MB);
  });

  it('lets go of the database when the client goes away mid-download', async () => {
    const res = await get(`/api/jobs/${w.job.id}/findings.csv`);
    expect(res.statusCode).toBe(200);
    await new Promise<void>((resolve) => res.once('data', () => resolve()));
    res.destroy(); // the browser's download is cancelled
    // The export's query stops: no backend is still running it.
    const running = async () => {
      const [row] = await db.sequelize.query<{ n: string }>(
        `SELECT count(*) AS n FROM pg_stat_activity
          WHERE datname = current_database() AND state <> 'idle' AND pid <> pg_backend_pid() AND query LIKE '%array_to_string(ARRAY(%'`,
        { type: QueryTypes.SELECT },
      );
      return Number(row!.n);
    };
    await waitFor(async () => (await running()) === 0, { what: "the export's query to stop", timeout: 10_000, interval: 100 });
    expect(await running()).toBe(0);
    // And the server still answers exports (the pool was not left short).
    const again = await get(`/api/jobs/${w.job.id}/findings.csv?q=%2312`);
    expect(again.statusCode).toBe(200);
    let text = '';
    for await (const c of again) text += String(c);
    expect(text.split('\r\n').filter(Boolean)).toHaveLength(2);
  });

  it(`runs at most ${MAX_CONCURRENT_EXPORTS} streamed exports at once (one more waits, then 429), and frees them when the downloads stop`, async () => {
    // Downloads that are not read: backpressure holds each export (and its connection) open.
    const held = await Promise.all(Array.from({ length: MAX_CONCURRENT_EXPORTS }, () => get(`/api/jobs/${w.job.id}/findings.csv`)));
    for (const r of held) expect(r.statusCode).toBe(200);
    // One more waits for a slot, and is refused when none frees up in time.
    const asked = Date.now();
    const refused = await get(`/api/jobs/${w.job.id}/findings.csv`);
    expect(refused.statusCode).toBe(429);
    expect(Date.now() - asked).toBeGreaterThanOrEqual(EXPORT_SLOT_WAIT_MS - 50);
    expect(refused.headers['retry-after']).toBe('5');
    let body = '';
    for await (const c of refused) body += String(c);
    expect(JSON.parse(body).error.message).toBe('Several exports are running. Try again in a few seconds.');
    // A waiting export gets the slot a finished (here: cancelled) download gives back.
    const waiter = get(`/api/jobs/${w.job.id}/findings.csv?q=%237`);
    await waitFor(() => exportsWaiting() === 1, { what: 'the fourth export to wait for a slot' });
    held[0]!.destroy();
    const served = await waiter;
    expect(served.statusCode).toBe(200);
    let text = '';
    for await (const c of served) text += String(c);
    expect(text.split('\r\n').filter(Boolean)).toHaveLength(2);
    for (const r of held.slice(1)) r.destroy();
  });
});
