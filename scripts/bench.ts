/**
 * `npm run bench` (not part of `npm test`): speed figures on this machine.
 *
 * 1. A private cluster `.pgbench` on 127.0.0.1:54349 holds a large job (scripts/lib/benchSeed.ts:
 *    100,000 findings on 2,000 units, 20 companies, with fixes and history). It is seeded once
 *    and reused while BENCH_SEED_VERSION matches; BENCH_RESEED=1 starts from an empty cluster.
 * 2. The server runs in its own process (scripts/lib/benchServer.ts) on 127.0.0.1.
 * 3. Load: BENCH_CLIENTS (50) signed-in clients, each with its own session (GC managers,
 *    inspectors, subcontractors of several companies), one keep-alive connection each, no think
 *    time, for BENCH_SECONDS (60) after a short warm-up, on a mix of reads (findings list with
 *    filters and cursors, finding detail, units, board family when present) and writes (fix
 *    submissions with a photo, re-inspections, comments; CSRF token and an Idempotency-Key
 *    each). Per endpoint: requests/s, p50/p95/p99 from every request's own time, non-2xx.
 * 4. Per read endpoint, the SQL the route itself sends (captured from one request, without the
 *    session / user / membership queries every request pays) is replayed directly on PostgreSQL;
 *    printed next to the API's latency with one client and under load, as ratios.
 * 5. Exports (scripts/lib/benchExport.ts when present), the web bundle size (raw, gzip, brotli as sent), the time
 *    until the sign-in page is usable in headless chromium, and the local save of a finding with
 *    2 photos with the CPU slowed 4x (scripts/lib/benchLocalSave.ts), and the sync rate of
 *    BENCH_SYNC_COUNT (50) findings with 1-2 photos queued offline in the outbox, next to the same
 *    findings posted online one by one (scripts/lib/benchSync.ts); BENCH_SKIP_WEB=1 skips these.
 * 6. The close-out report of the busiest level with 500 photos: time and memory growth, next to the
 *    time to read the same rows and photos (scripts/lib/benchReport.ts); BENCH_SKIP_REPORT=1 skips it.
 * 7. The database's own capacity for the mix (scripts/lib/benchCapacity.ts): the SQL of
 *    BENCH_CAPACITY_SAMPLE (400) requests drawn from the mix, session / user / membership reads
 *    included, replayed directly on BENCH_CAPACITY_CONNECTIONS (50) connections with no think time
 *    for BENCH_SECONDS; writes inside a transaction that is rolled back. The API's requests/s of
 *    step 3 is printed as a share of the database's request-equivalents/s (target >= 0.6).
 * 8. Open loop (scripts/lib/benchOpenLoop.ts): the same mix and sessions at BENCH_RATE (60)
 *    arrivals/s on a fixed schedule for BENCH_OPEN_SECONDS (60); latency from each request's
 *    scheduled time, so queueing counts. Targets: every read p95 < 150 ms, the board < 100 ms,
 *    fixes with a photo < 600 ms, no errors. BENCH_OPEN_SECONDS=0 skips it.
 * 9. Server CPU per request: user + system time of the server process (/proc/<pid>/stat) over
 *    the closed-loop and open-loop runs, divided by their requests, and each endpoint alone for
 *    BENCH_CPU_SECONDS (3; 0 skips it) for a median across endpoints (target < 3 ms).
 *
 * Knobs: BENCH_SECONDS (60), BENCH_CLIENTS (50), BENCH_WARMUP_SECONDS (5), BENCH_SERIAL_RUNS (40),
 * BENCH_SQL_RUNS (100), BENCH_COMPARE_BUDGET_MS (6000), BENCH_CAPACITY_CONNECTIONS (50),
 * BENCH_CAPACITY_SAMPLE (400), BENCH_RATE (60), BENCH_OPEN_SECONDS (60), BENCH_CPU_SECONDS (3),
 * BENCH_SYNC_COUNT (50), BENCH_SKIP_WEB=1, BENCH_SKIP_REPORT=1, BENCH_RESEED=1, BENCH_SHOW_SQL=1,
 * BENCH_CPU_PROF=1, BENCH_SERVER_LOG=1, BENCH_VERBOSE=1, TRIMOUT_BENCH_PG_PORT (54349).
 * Results also go to .artifacts/bench.json.
 */
import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import pg from 'pg';
import { chromium } from 'playwright-core';
import sharp from 'sharp';
import { connect, migrate } from '../server/db';
import { CPU_SLOWDOWN, localSaveBench, type LocalSaveResult } from './lib/benchLocalSave';
import { formatPhone, measurePhone, type PhoneFigures } from './lib/benchPhone';
import { syncRateBench, type SyncRateResult } from './lib/benchSync';
import { BENCH_PASSWORD, seedBenchJob, type BenchJob, type BenchUser } from './lib/benchSeed';
import { benchReport, describeReportBench, type BenchReportResult } from './lib/benchReport';
import { median, processCpuMs, replayCapacity, type CapturedRequest } from './lib/benchCapacity';
import { cookieFrom, multipart, newAgent, send, stats, type BenchClient, type Reply, type Stats } from './lib/benchHttp';
import { latencyVerdicts, openLoop, type OpenLoopResult, type Verdict } from './lib/benchOpenLoop';
import type { CaptureMessage, CapturedQuery } from './lib/benchServer';
import { ensureDatabase, removeCluster, startCluster } from './lib/postgres';
import { say } from './lib/run';
import { buildWebIfStale } from './lib/web';

const root = path.resolve(__dirname, '..');
const SECONDS = Number(process.env.BENCH_SECONDS ?? 60);
const WARMUP = Number(process.env.BENCH_WARMUP_SECONDS ?? 5);
const CLIENTS = Number(process.env.BENCH_CLIENTS ?? 50);
const SERIAL_RUNS = Number(process.env.BENCH_SERIAL_RUNS ?? 40);
const SQL_RUNS = Number(process.env.BENCH_SQL_RUNS ?? 100);
/** Each endpoint's one-client and SQL runs stop early after this long (slow endpoints). */
const COMPARE_BUDGET_MS = Number(process.env.BENCH_COMPARE_BUDGET_MS ?? 6000);
const SKIP_WEB = process.env.BENCH_SKIP_WEB === '1';
const SYNC_COUNT = Number(process.env.BENCH_SYNC_COUNT ?? 50);
const TARGET = { readP95: 150, boardP95: 100, ratio: 3, photoWriteP95: 600, capacityShare: 0.6, cpuMsPerRequest: 3 };
const CAPACITY_CONNECTIONS = Number(process.env.BENCH_CAPACITY_CONNECTIONS ?? 50);
const CAPACITY_SAMPLE = Number(process.env.BENCH_CAPACITY_SAMPLE ?? 400);
const OPEN_RATE = Number(process.env.BENCH_RATE ?? 60);
const OPEN_SECONDS = Number(process.env.BENCH_OPEN_SECONDS ?? 60);
/** Each endpoint alone for this long, to measure the server's CPU per request of each; 0 skips it. */
const CPU_SECONDS = Number(process.env.BENCH_CPU_SECONDS ?? 3);

// ---------------------------------------------------------------------------------------------
// Server process
// ---------------------------------------------------------------------------------------------

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
    s.on('error', reject);
  });
}

interface ServerProcess {
  url: URL;
  child: ChildProcess;
  capture(id: string): Promise<CaptureMessage>;
  stop(): Promise<void>;
}

async function startBenchServer(databaseUrl: string): Promise<ServerProcess> {
  const port = await freePort();
  const storage = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-bench-photos-'));
  const nodeArgs = process.env.BENCH_CPU_PROF === '1' ? ['--cpu-prof', `--cpu-prof-dir=${path.join(root, '.artifacts', 'cpu-prof')}`] : [];
  const child = spawn(process.execPath, [...nodeArgs, '--import', 'tsx', path.join(__dirname, 'lib', 'benchServer.ts')], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'development',
      DATABASE_URL: databaseUrl,
      HOST: '127.0.0.1',
      PORT: String(port),
      MAIL_PORT: '0',
      DIGEST_SCHEDULER: 'false',
      STORAGE_DISK_DIR: storage,
      WEB_DIST: path.join(root, 'dist'),
    },
    stdio: ['ignore', 'pipe', 'pipe', 'ipc'],
  });
  const waiting = new Map<string, (m: CaptureMessage) => void>();
  child.on('message', (m: CaptureMessage) => waiting.get(m.captureId)?.(m));
  let log = '';
  child.stderr!.on('data', (d: Buffer) => {
    log += d.toString();
    if (process.env.BENCH_SERVER_LOG === '1') process.stderr.write(d);
  });
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`the bench server did not start in 60 s:\n${log}`)), 60_000);
    child.stdout!.on('data', (d: Buffer) => {
      if (d.toString().includes('listening on')) {
        clearTimeout(timer);
        resolve();
      }
    });
    child.on('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`the bench server exited with ${code}:\n${log}`));
    });
  });
  child.removeAllListeners('exit');
  return {
    url: new URL(`http://127.0.0.1:${port}`),
    child,
    capture: (id) => new Promise((resolve) => waiting.set(id, resolve)),
    stop: async () => {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGTERM');
        await Promise.race([exited, new Promise((r) => setTimeout(r, 10_000))]);
      }
      fs.rmSync(storage, { recursive: true, force: true });
    },
  };
}

// ---------------------------------------------------------------------------------------------
// Clients
// ---------------------------------------------------------------------------------------------

async function signIn(base: URL, user: BenchUser, label: string): Promise<BenchClient> {
  const agent = newAgent();
  const anon = await send(base, agent, 'GET', '/api/session');
  const anonToken = (JSON.parse(anon.body) as { csrfToken: string }).csrfToken;
  const res = await send(base, agent, 'POST', '/api/session', { 'content-type': 'application/json', 'x-csrf-token': anonToken }, JSON.stringify({ email: user.email, password: BENCH_PASSWORD }));
  if (res.status !== 200) throw new Error(`sign-in of ${user.email} answered ${res.status}: ${res.body}`);
  const body = JSON.parse(res.body) as { csrfToken: string };
  return { label, role: user.role, userId: user.id, companyId: user.companyId, cookie: cookieFrom(res.headers), csrf: body.csrfToken, agent };
}

/** 20 % GC managers, 20 % inspectors, 60 % subcontractors spread over the companies. */
function pickUsers(users: BenchUser[], n: number): BenchUser[] {
  const by = (role: BenchUser['role']) => users.filter((u) => u.role === role);
  const gcs = by('gc_manager');
  const inspectors = by('inspector');
  const subs = by('subcontractor');
  const out: BenchUser[] = [];
  for (let i = 0; i < n; i++) {
    const slot = i % 5;
    if (slot === 0) out.push(gcs[Math.floor(i / 5) % gcs.length]!);
    else if (slot === 1) out.push(inspectors[Math.floor(i / 5) % inspectors.length]!);
    else out.push(subs[(Math.floor(i / 5) * 3 + slot - 2) % subs.length]!);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// The mix
// ---------------------------------------------------------------------------------------------

interface Fixture {
  jobId: string;
  levelIds: string[];
  companyIds: string[];
  /** Finding ids to read, all and per company. */
  anyFindings: string[];
  companyFindings: Map<string, string[]>;
  /** Per client: open findings it may submit a fix for; fix-submitted ones (with version) it may re-inspect. */
  fixPool: Map<BenchClient, string[]>;
  reinspectPool: Map<BenchClient, { id: string; version: number }[]>;
  photo: Buffer;
  optional: Set<string>;
}

type Endpoint =
  | 'GET /api/jobs'
  | 'GET findings list'
  | 'GET findings list (next page)'
  | 'GET finding detail'
  | 'GET units'
  | 'GET board'
  | 'GET readiness'
  | 'GET recurring'
  | 'GET scorecards'
  | 'GET trend'
  | 'POST comment'
  | 'POST fix (photo)'
  | 'POST re-inspection';

const READS: Endpoint[] = [
  'GET /api/jobs',
  'GET findings list',
  'GET findings list (next page)',
  'GET finding detail',
  'GET units',
  'GET board',
  'GET readiness',
  'GET recurring',
  'GET scorecards',
  'GET trend',
];

/** Board-family endpoints are used only when the server has them (probed at start). */
const OPTIONAL: Partial<Record<Endpoint, string>> = {
  'GET board': '/board',
  'GET readiness': '/readiness',
  'GET recurring': '/recurring',
  'GET scorecards': '/scorecards',
  'GET trend': '/trend',
};

const WEIGHTS: Record<BenchClient['role'], [Endpoint, number][]> = {
  gc_manager: [
    ['GET findings list', 26],
    ['GET findings list (next page)', 8],
    ['GET finding detail', 18],
    ['GET units', 8],
    ['GET board', 12],
    ['GET readiness', 3],
    ['GET recurring', 2],
    ['GET scorecards', 2],
    ['GET trend', 2],
    ['GET /api/jobs', 3],
    ['POST comment', 3],
    ['POST re-inspection', 4],
  ],
  inspector: [
    ['GET findings list', 28],
    ['GET findings list (next page)', 8],
    ['GET finding detail', 22],
    ['GET units', 10],
    ['GET board', 8],
    ['GET readiness', 2],
    ['GET recurring', 2],
    ['GET scorecards', 1],
    ['GET trend', 1],
    ['GET /api/jobs', 3],
    ['POST comment', 3],
    ['POST re-inspection', 8],
  ],
  subcontractor: [
    ['GET findings list', 32],
    ['GET findings list (next page)', 10],
    ['GET finding detail', 26],
    ['GET units', 6],
    ['GET board', 6],
    ['GET recurring', 2],
    ['GET trend', 1],
    ['GET /api/jobs', 5],
    ['POST comment', 4],
    ['POST fix (photo)', 3],
  ],
};

function listVariants(client: BenchClient, fx: Fixture, i: number): string {
  const level = fx.levelIds[i % fx.levelIds.length]!;
  const company = fx.companyIds[i % fx.companyIds.length]!;
  const all = [
    '',
    'status=open,fix_submitted',
    `levelId=${level}`,
    'severity=critical,major&status=open',
    'overdue=true',
    'sort=dueOn&status=open',
    `levelId=${level}&status=open`,
  ];
  if (client.role !== 'subcontractor') all.push(`companyId=${company}`, `companyId=${company}&overdue=true`);
  return all[i % all.length]!;
}

function pick<T>(items: T[], i: number): T {
  return items[i % items.length]!;
}

let keySeq = 0;
function idempotencyKey(): string {
  return `bench-${process.pid}-${Date.now().toString(36)}-${(keySeq++).toString(36)}`;
}

interface ClientState {
  n: number;
  lastList: { query: string; cursor: string | null } | null;
}

/** One request of the mix; returns the endpoint it hit and the reply. */
async function step(base: URL, client: BenchClient, fx: Fixture, st: ClientState, capture?: string): Promise<{ endpoint: Endpoint; reply: Reply } | null> {
  st.n += 1;
  const weights = WEIGHTS[client.role].filter(([e]) => !(e in OPTIONAL) || fx.optional.has(e));
  const total = weights.reduce((s, [, w]) => s + w, 0);
  let r = Math.random() * total;
  let endpoint = weights[0]![0];
  for (const [e, w] of weights) {
    if ((r -= w) < 0) {
      endpoint = e;
      break;
    }
  }
  return request(base, client, fx, st, endpoint, capture);
}

async function request(base: URL, client: BenchClient, fx: Fixture, st: ClientState, endpoint: Endpoint, capture?: string): Promise<{ endpoint: Endpoint; reply: Reply } | null> {
  const jobBase = `/api/jobs/${fx.jobId}`;
  const h: Record<string, string> = { cookie: client.cookie, ...(capture ? { 'x-bench-capture': capture } : {}) };
  const get = async (p: string) => ({ endpoint, reply: await send(base, client.agent, 'GET', p, h) });
  const visible = client.role === 'subcontractor' ? (fx.companyFindings.get(client.companyId) ?? []) : fx.anyFindings;
  const n = st.n + Math.floor(Math.random() * 1000);
  switch (endpoint) {
    case 'GET /api/jobs':
      return get('/api/jobs');
    case 'GET findings list':
    case 'GET findings list (next page)': {
      // The list this page continues, read before the await: in the open loop one client has
      // several requests in flight, and another may replace st.lastList meanwhile (a cursor
      // belongs to its own query).
      const last = st.lastList;
      if (endpoint === 'GET findings list (next page)' && last?.cursor) {
        const q = `${last.query}${last.query ? '&' : ''}cursor=${encodeURIComponent(last.cursor)}`;
        const res = await get(`${jobBase}/findings?${q}`);
        st.lastList = res.reply.status === 200 ? { query: last.query, cursor: (JSON.parse(res.reply.body) as { nextCursor: string | null }).nextCursor } : null;
        return res;
      }
      const query = listVariants(client, fx, n);
      const res = await get(`${jobBase}/findings${query ? `?${query}` : ''}`);
      if (res.reply.status === 200) st.lastList = { query, cursor: (JSON.parse(res.reply.body) as { nextCursor: string | null }).nextCursor };
      return { endpoint: 'GET findings list', reply: res.reply };
    }
    case 'GET finding detail':
      return get(`${jobBase}/findings/${pick(visible, n)}`);
    case 'GET units':
      return get(`${jobBase}/units${n % 2 ? `?levelId=${pick(fx.levelIds, n)}` : ''}`);
    case 'GET board':
    case 'GET recurring':
    case 'GET scorecards':
      return get(`${jobBase}${OPTIONAL[endpoint]}`);
    case 'GET readiness':
      return get(`${jobBase}/readiness${n % 2 ? `?levelId=${pick(fx.levelIds, n)}` : ''}`);
    case 'GET trend':
      return get(`${jobBase}/trend`);
    case 'POST comment': {
      const body = JSON.stringify({ text: `Bench comment ${st.n}: checked on site, see the photo.` });
      const reply = await send(base, client.agent, 'POST', `${jobBase}/findings/${pick(visible, n)}/comments`, {
        ...h,
        'content-type': 'application/json',
        'x-csrf-token': client.csrf,
        'idempotency-key': idempotencyKey(),
      }, body);
      return { endpoint, reply };
    }
    case 'POST fix (photo)': {
      const id = fx.fixPool.get(client)?.pop();
      if (!id) return request(base, client, fx, st, 'POST comment', capture);
      const form = multipart({ note: 'Re-hung and levelled; photo attached.' }, [{ field: 'photos', name: 'fix.jpg', type: 'image/jpeg', bytes: fx.photo }]);
      const reply = await send(base, client.agent, 'POST', `${jobBase}/findings/${id}/fixes`, {
        ...h,
        'content-type': form.contentType,
        'x-csrf-token': client.csrf,
        'idempotency-key': idempotencyKey(),
      }, form.body);
      return { endpoint, reply };
    }
    case 'POST re-inspection': {
      const f = fx.reinspectPool.get(client)?.pop();
      if (!f) return request(base, client, fx, st, 'POST comment', capture);
      const verdict = n % 10 < 7 ? { verdict: 'accept' } : { verdict: 'return', reason: 'Still rubbing on the ceiling grid; re-hang it.' };
      const reply = await send(base, client.agent, 'POST', `${jobBase}/findings/${f.id}/reinspections`, {
        ...h,
        'content-type': 'application/json',
        'x-csrf-token': client.csrf,
        'idempotency-key': idempotencyKey(),
        'if-match': `"v${f.version}"`,
      }, JSON.stringify(verdict));
      return { endpoint, reply };
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Load phase
// ---------------------------------------------------------------------------------------------

interface EndpointLoad {
  times: number[];
  non2xx: number;
  statuses: Record<string, number>;
  sample?: string;
}

async function drive(base: URL, clients: BenchClient[], fx: Fixture, seconds: number): Promise<{ byEndpoint: Map<Endpoint, EndpointLoad>; elapsed: number; networkErrors: number }> {
  const byEndpoint = new Map<Endpoint, EndpointLoad>();
  let networkErrors = 0;
  const entry = (e: Endpoint) => {
    let x = byEndpoint.get(e);
    if (!x) byEndpoint.set(e, (x = { times: [], non2xx: 0, statuses: {} }));
    return x;
  };
  const started = Date.now();
  const until = started + seconds * 1000;
  await Promise.all(
    clients.map(async (client) => {
      const st: ClientState = { n: Math.floor(Math.random() * 1000), lastList: null };
      while (Date.now() < until) {
        try {
          const res = await step(base, client, fx, st);
          if (!res) continue;
          const e = entry(res.endpoint);
          e.times.push(res.reply.ms);
          e.statuses[res.reply.status] = (e.statuses[res.reply.status] ?? 0) + 1;
          if (res.reply.status < 200 || res.reply.status >= 300) {
            e.non2xx += 1;
            e.sample ??= `${res.reply.status} ${res.reply.body.slice(0, 200)}`;
          }
        } catch (err) {
          // No answer at all (connection refused or reset, 30 s timeout): counted apart, then go on.
          networkErrors += 1;
          if (networkErrors <= 3 || process.env.BENCH_VERBOSE === '1') console.error(`request failed: ${err instanceof Error ? err.message : String(err)}`);
        }
      }
    }),
  );
  return { byEndpoint, elapsed: (Date.now() - started) / 1000, networkErrors };
}

// ---------------------------------------------------------------------------------------------
// The same SQL, directly
// ---------------------------------------------------------------------------------------------

/** Queries every API request pays before the route runs: session read / touch, the user, the membership. */
function isPipelineQuery(q: CapturedQuery): boolean {
  return (
    /\bsessions\b/i.test(q.text) ||
    /\/\* trimout:auth \*\//.test(q.text) ||
    /FROM "users" AS "User"/.test(q.text) ||
    (/FROM "job_members" AS "JobMember"/.test(q.text) && /LIMIT 1/.test(q.text))
  );
}

async function replay(client: pg.Client, queries: CapturedQuery[], runs: number): Promise<Stats> {
  const times: number[] = [];
  const until = Date.now() + COMPARE_BUDGET_MS;
  for (let i = 0; i < runs && (i < 3 || Date.now() < until); i++) {
    const t = process.hrtime.bigint();
    for (const q of queries) await client.query(q.text, q.values as unknown[] | undefined);
    times.push(Number(process.hrtime.bigint() - t) / 1e6);
  }
  return stats(times);
}

interface ReadComparison {
  endpoint: Endpoint;
  path: string;
  queries: number;
  pipelineQueries: number;
  serverDbMs: number;
  api1: Stats;
  sql: Stats;
}

async function compareReads(server: ServerProcess, clients: BenchClient[], fx: Fixture, db: pg.Client): Promise<ReadComparison[]> {
  const gc = clients.find((c) => c.role === 'gc_manager')!;
  const sub = clients.find((c) => c.role === 'subcontractor')!;
  const out: ReadComparison[] = [];
  const cases: { endpoint: Endpoint; client: BenchClient; path: string }[] = [];
  const j = `/api/jobs/${fx.jobId}`;
  cases.push({ endpoint: 'GET /api/jobs', client: gc, path: '/api/jobs' });
  cases.push({ endpoint: 'GET findings list', client: gc, path: `${j}/findings` });
  cases.push({ endpoint: 'GET findings list', client: gc, path: `${j}/findings?status=open,fix_submitted&levelId=${fx.levelIds[3]}` });
  cases.push({ endpoint: 'GET findings list', client: sub, path: `${j}/findings?overdue=true` });
  cases.push({ endpoint: 'GET finding detail', client: gc, path: `${j}/findings/${fx.anyFindings[7]}` });
  cases.push({ endpoint: 'GET units', client: gc, path: `${j}/units` });
  for (const e of ['GET board', 'GET readiness', 'GET recurring', 'GET scorecards', 'GET trend'] as Endpoint[]) {
    if (fx.optional.has(e)) cases.push({ endpoint: e, client: gc, path: `${j}${OPTIONAL[e]}` });
  }
  if (fx.optional.has('GET board')) cases.push({ endpoint: 'GET board', client: sub, path: `${j}/board` });
  for (const c of cases) {
    const id = `cap-${Math.random().toString(36).slice(2)}`;
    const captured = server.capture(id);
    const res = await send(server.url, c.client.agent, 'GET', c.path, { cookie: c.client.cookie, 'x-bench-capture': id });
    const cap = await captured;
    if (res.status !== 200) {
      say(`${c.path} answered ${res.status}; left out of the SQL comparison`);
      continue;
    }
    const own = cap.queries.filter((q) => !isPipelineQuery(q));
    const times: number[] = [];
    const until = Date.now() + COMPARE_BUDGET_MS;
    for (let i = 0; i < SERIAL_RUNS && (i < 3 || Date.now() < until); i++) times.push((await send(server.url, c.client.agent, 'GET', c.path, { cookie: c.client.cookie })).ms);
    out.push({
      endpoint: c.endpoint,
      path: c.path.replace(fx.jobId, ':jobId').replace(/[0-9a-f-]{36}/g, ':id') + (c.client.role === 'subcontractor' ? ' (subcontractor)' : ''),
      queries: cap.queries.length,
      pipelineQueries: cap.queries.length - own.length,
      serverDbMs: cap.queries.reduce((s, q) => s + q.ms, 0),
      api1: stats(times),
      sql: await replay(db, own, SQL_RUNS),
    });
    if (process.env.BENCH_SHOW_SQL === '1') {
      console.log(`\n--- ${c.path}: ${cap.queries.length} queries`);
      for (const q of cap.queries) console.log(`${isPipelineQuery(q) ? '[pipeline] ' : ''}${q.ms.toFixed(2)} ms  ${q.text.replace(/\s+/g, ' ').slice(0, 220)}`);
    }
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// The database's own capacity for the mix, open-loop latency, server CPU per request
// ---------------------------------------------------------------------------------------------

const isWrite = (e: string) => e.startsWith('POST ');

/** `count` requests drawn from the mix (every client in turn, a few at a time), each with the SQL it sent. */
async function captureMix(server: ServerProcess, clients: BenchClient[], fx: Fixture, count: number): Promise<CapturedRequest[]> {
  const out: CapturedRequest[] = [];
  const states = new Map(clients.map((c) => [c, { n: Math.floor(Math.random() * 1000), lastList: null } as ClientState]));
  let next = 0;
  await Promise.all(
    Array.from({ length: 5 }, async () => {
      while (next < count) {
        const k = next++;
        const client = clients[k % clients.length]!;
        const id = `mix-${k}-${Math.random().toString(36).slice(2)}`;
        const captured = server.capture(id);
        try {
          const res = await step(server.url, client, fx, states.get(client)!, id);
          if (!res || res.reply.status < 200 || res.reply.status >= 300) continue;
          const cap = await Promise.race([captured, new Promise<null>((r) => setTimeout(() => r(null), 10_000))]);
          if (cap) out.push({ endpoint: res.endpoint, write: isWrite(res.endpoint), queries: cap.queries });
        } catch {
          // No answer: not part of the sample.
        }
      }
    }),
  );
  return out;
}

function serverCpu(server: ServerProcess): number {
  return processCpuMs(server.child.pid!);
}

/** The mix at a fixed arrival rate; each arrival goes to the next client in turn (its own session and connection). */
async function openLoopRun(base: URL, clients: BenchClient[], fx: Fixture, rate: number, seconds: number): Promise<OpenLoopResult> {
  const states = clients.map(() => ({ n: Math.floor(Math.random() * 1000), lastList: null }) as ClientState);
  return openLoop(rate, seconds, async (i) => {
    const k = i % clients.length;
    const res = await step(base, clients[k]!, fx, states[k]!);
    if (!res) return { endpoint: 'none', status: 0 };
    return { endpoint: res.endpoint, status: res.reply.status, sample: res.reply.body.slice(0, 200) };
  });
}

interface EndpointCpu {
  endpoint: Endpoint;
  requests: number;
  cpuMs: number;
  cpuMsPerRequest: number;
}

/** Each endpoint of the mix alone (up to 10 clients whose role uses it, back to back), with the server's CPU time per request. */
async function cpuPerEndpoint(server: ServerProcess, clients: BenchClient[], fx: Fixture, seconds: number): Promise<EndpointCpu[]> {
  const endpoints = new Set<Endpoint>();
  for (const ws of Object.values(WEIGHTS)) for (const [e] of ws) if (!(e in OPTIONAL) || fx.optional.has(e)) endpoints.add(e);
  const out: EndpointCpu[] = [];
  for (const endpoint of endpoints) {
    const users = clients.filter((c) => WEIGHTS[c.role].some(([e]) => e === endpoint)).slice(0, 10);
    let requests = 0;
    const cpu0 = serverCpu(server);
    const until = Date.now() + seconds * 1000;
    await Promise.all(
      users.map(async (client) => {
        const st: ClientState = { n: Math.floor(Math.random() * 1000), lastList: null };
        while (Date.now() < until) {
          st.n += 1;
          try {
            await request(server.url, client, fx, st, endpoint);
            requests += 1;
          } catch {
            // counted by the load runs; here only the CPU matters
          }
        }
      }),
    );
    const cpuMs = serverCpu(server) - cpu0;
    out.push({ endpoint, requests, cpuMs, cpuMsPerRequest: cpuMs / requests });
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Web
// ---------------------------------------------------------------------------------------------

/**
 * The web app's scripts: raw, gzip 9, and the brotli copies the build keeps beside them
 * (scripts/lib/precompress.ts), which is what a browser is sent. Only the .js files count: the
 * .br and .gz copies are the same scripts again.
 */
function bundleSize() {
  const dir = path.join(root, 'dist', '_expo', 'static', 'js', 'web');
  let raw = 0;
  let gzip = 0;
  let brotli = 0;
  const files: string[] = [];
  for (const file of fs.readdirSync(dir)) {
    if (!file.endsWith('.js')) continue;
    const body = fs.readFileSync(path.join(dir, file));
    raw += body.length;
    gzip += zlib.gzipSync(body, { level: 9 }).length;
    const br = path.join(dir, `${file}.br`);
    const sent = fs.existsSync(br) ? fs.statSync(br).size : zlib.brotliCompressSync(body).length;
    brotli += sent;
    files.push(`${file.replace(/-[0-9a-f]{32}\.js$/, '')} ${(sent / 1024).toFixed(0)} KiB`);
  }
  return { raw, gzip, brotli, files };
}

async function signInPageUsable(baseUrl: string): Promise<number> {
  const userDataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-bench-chromium-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  try {
    const page = await context.newPage();
    const runs: number[] = [];
    for (let i = 0; i < 5; i++) {
      const started = Date.now();
      await page.goto(`${baseUrl}/sign-in`);
      await page.getByTestId('sign-in-submit').waitFor();
      runs.push(Date.now() - started);
    }
    return stats(runs).p50;
  } finally {
    await context.close();
    fs.rmSync(userDataDir, { recursive: true, force: true });
  }
}

// ---------------------------------------------------------------------------------------------
// Main
// ---------------------------------------------------------------------------------------------

async function fixture(db: pg.Client, job: BenchJob, clients: BenchClient[], server: ServerProcess): Promise<Fixture> {
  const jobId = job.jobId;
  const levels = await db.query<{ id: string }>(`SELECT id FROM levels WHERE job_id = $1 ORDER BY position`, [jobId]);
  const companies = await db.query<{ company_id: string }>(`SELECT DISTINCT company_id FROM findings WHERE job_id = $1`, [jobId]);
  const any = await db.query<{ id: string }>(`SELECT id FROM findings WHERE job_id = $1 ORDER BY md5(id::text) LIMIT 3000`, [jobId]);
  const companyFindings = new Map<string, string[]>();
  for (const c of new Set(clients.filter((c) => c.role === 'subcontractor').map((c) => c.companyId))) {
    const rows = await db.query<{ id: string }>(`SELECT id FROM findings WHERE job_id = $1 AND company_id = $2 ORDER BY md5(id::text) LIMIT 1000`, [jobId, c]);
    companyFindings.set(c, rows.rows.map((r) => r.id));
  }
  // Write pools: disjoint per client, so two clients never race for the same finding.
  const fixPool = new Map<BenchClient, string[]>();
  const subsByCompany = new Map<string, BenchClient[]>();
  for (const c of clients.filter((x) => x.role === 'subcontractor')) subsByCompany.set(c.companyId, [...(subsByCompany.get(c.companyId) ?? []), c]);
  for (const [companyId, subs] of subsByCompany) {
    const rows = await db.query<{ id: string }>(
      `SELECT id FROM findings WHERE job_id = $1 AND company_id = $2 AND status = 'open' ORDER BY md5(id::text) LIMIT $3`,
      [jobId, companyId, 200 * subs.length],
    );
    subs.forEach((s, i) => fixPool.set(s, rows.rows.filter((_, k) => k % subs.length === i).map((r) => r.id)));
  }
  const reinspectors = clients.filter((c) => c.role !== 'subcontractor');
  const fs2 = await db.query<{ id: string; version: number }>(
    `SELECT id, version FROM findings WHERE job_id = $1 AND status = 'fix_submitted' ORDER BY md5(id::text) LIMIT $2`,
    [jobId, 300 * reinspectors.length],
  );
  const reinspectPool = new Map<BenchClient, { id: string; version: number }[]>();
  reinspectors.forEach((c, i) => reinspectPool.set(c, fs2.rows.filter((_, k) => k % reinspectors.length === i)));
  const photo = await sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 120, g: 128, b: 136 } } })
    .jpeg({ quality: 80 })
    .toBuffer();
  // Which board-family routes does this server have?
  const optional = new Set<string>();
  const gc = clients.find((c) => c.role === 'gc_manager')!;
  for (const [endpoint, suffix] of Object.entries(OPTIONAL)) {
    const res = await send(server.url, gc.agent, 'GET', `/api/jobs/${jobId}${suffix}`, { cookie: gc.cookie });
    if (res.status === 200) optional.add(endpoint);
    else say(`${endpoint} (${suffix}) answered ${res.status}: not in the mix`);
  }
  return {
    jobId,
    levelIds: levels.rows.map((r) => r.id),
    companyIds: companies.rows.map((r) => r.company_id),
    anyFindings: any.rows.map((r) => r.id),
    companyFindings,
    fixPool,
    reinspectPool,
    photo,
    optional,
  };
}

const pickPercentiles = (s: Stats) => ({ p50: s.p50, p95: s.p95, p99: s.p99 });
const f1 = (n: number) => (Number.isFinite(n) ? n.toFixed(1) : '-');
const f2 = (n: number) => (Number.isFinite(n) ? n.toFixed(2) : '-');
const ratio = (a: number, b: number) => (Number.isFinite(a / b) ? `${(a / b).toFixed(1)}x` : '-');

async function main() {
  const dataDir = path.join(root, '.pgbench');
  if (process.env.BENCH_RESEED === '1') removeCluster(dataDir);
  const cluster = await startCluster({ dataDir, port: Number(process.env.TRIMOUT_BENCH_PG_PORT ?? 54349), throwaway: true });
  let server: ServerProcess | undefined;
  try {
    await ensureDatabase(cluster, 'trimout_bench');
    const url = cluster.url('trimout_bench');
    const seedDb = connect(url);
    await migrate(seedDb.sequelize);
    const job = await seedBenchJob(seedDb, undefined, say);
    say(job.seeded ? 'bench job seeded.' : 'bench job already seeded: reused.');
    await seedDb.close();
    if (!SKIP_WEB) await buildWebIfStale(path.join(root, 'dist'));

    {
      // Each run signs the same 50 people in: earlier runs' sign-ins must not count against this one.
      const limits = new pg.Client({ connectionString: url });
      await limits.connect();
      await limits.query('DELETE FROM rate_limit_hits');
      await limits.end();
    }
    server = await startBenchServer(url);
    say(`server on ${server.url.origin}; signing in ${CLIENTS} clients ...`);
    const users = pickUsers(job.users, CLIENTS);
    const clients: BenchClient[] = [];
    for (let i = 0; i < users.length; i += 4) {
      clients.push(...(await Promise.all(users.slice(i, i + 4).map((u, k) => signIn(server!.url, u, `client ${i + k + 1}`)))));
    }
    const db = new pg.Client({ connectionString: url });
    await db.connect();
    const fx = await fixture(db, job, clients, server);

    const counts = (role: string) => clients.filter((c) => c.role === role).length;
    const companiesInMix = new Set(clients.filter((c) => c.role === 'subcontractor').map((c) => c.companyId)).size;
    say(`clients: ${counts('gc_manager')} GC managers, ${counts('inspector')} inspectors, ${counts('subcontractor')} subcontractors of ${companiesInMix} companies`);
    if (WARMUP > 0) {
      say(`warming up for ${WARMUP} s ...`);
      await drive(server.url, clients, fx, WARMUP);
    }
    say(`load: ${CLIENTS} clients for ${SECONDS} s ...`);
    const loadCpu0 = serverCpu(server);
    const load = await drive(server.url, clients, fx, SECONDS);
    const loadCpuMs = serverCpu(server) - loadCpu0;
    say('one client at a time, and the same SQL directly ...');
    const reads = await compareReads(server, clients, fx, db);
    await db.end();
    say(`the database's own capacity: the SQL of ${CAPACITY_SAMPLE} requests of the mix, replayed on ${CAPACITY_CONNECTIONS} connections for ${SECONDS} s ...`);
    const mixSample = await captureMix(server, clients, fx, CAPACITY_SAMPLE);
    const capacity = mixSample.length ? await replayCapacity(url, mixSample, CAPACITY_CONNECTIONS, SECONDS) : null;
    let open: OpenLoopResult | null = null;
    let openCpuMs = NaN;
    if (OPEN_SECONDS > 0 && OPEN_RATE > 0) {
      say(`open loop: ${OPEN_RATE} requests/s on a fixed schedule for ${OPEN_SECONDS} s ...`);
      const openCpu0 = serverCpu(server);
      open = await openLoopRun(server.url, clients, fx, OPEN_RATE, OPEN_SECONDS);
      openCpuMs = serverCpu(server) - openCpu0;
    }
    let endpointCpu: EndpointCpu[] = [];
    if (CPU_SECONDS > 0) {
      say(`server CPU per request: each endpoint alone for ${CPU_SECONDS} s ...`);
      endpointCpu = await cpuPerEndpoint(server, clients, fx, CPU_SECONDS);
    }

    let exportResult: unknown = null;
    const exportLib = path.join(__dirname, 'lib', 'benchExport.ts');
    if (fs.existsSync(exportLib)) {
      say('export benchmark (scripts/lib/benchExport.ts) ...');
      try {
        const mod = (await import(exportLib)) as { benchExport?: (o: Record<string, unknown>) => Promise<unknown> };
        const gc = clients.find((c) => c.role === 'gc_manager')!;
        exportResult = await mod.benchExport?.({ baseUrl: server.url.origin, cookie: gc.cookie, csrfToken: gc.csrf, jobId: job.jobId, databaseUrl: url, userId: gc.userId });
      } catch (err) {
        say(`export benchmark failed: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    // The close-out report of the busiest level with 500 photos, next to reading the same rows and photos (scripts/lib/benchReport.ts); BENCH_SKIP_REPORT=1 skips it.
    let reportResult: BenchReportResult | null = null;
    if (process.env.BENCH_SKIP_REPORT !== '1') {
      say('close-out report benchmark (scripts/lib/benchReport.ts) ...');
      try {
        reportResult = await benchReport({ databaseUrl: url, jobId: job.jobId });
      } catch (err) {
        say(`report benchmark failed: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    const bundle = SKIP_WEB ? null : bundleSize();
    const usableMs = SKIP_WEB ? null : await signInPageUsable(server.url.origin);
    let localSave: LocalSaveResult | null = null;
    if (!SKIP_WEB) {
      say(`local save of a finding with 2 photos, CPU ${CPU_SLOWDOWN}x slower (scripts/lib/benchLocalSave.ts) ...`);
      try {
        const inspector = job.users.find((u) => u.role === 'inspector')!;
        const unitDb = new pg.Client({ connectionString: url });
        await unitDb.connect();
        const unit = await unitDb.query<{ id: string }>(`SELECT id FROM units WHERE job_id = $1 ORDER BY tag LIMIT 1`, [job.jobId]);
        await unitDb.end();
        localSave = await localSaveBench({ baseUrl: server.url.origin, email: inspector.email, password: BENCH_PASSWORD, jobId: job.jobId, unitId: unit.rows[0]!.id });
      } catch (err) {
        say(`local save benchmark failed: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    let phone: PhoneFigures | null = null;
    if (!SKIP_WEB) {
      say('the app on a phone: level walk and finding form, cold and warm, CPU 4x slower, 150 ms, 1.6 Mbit/s (scripts/lib/benchPhone.ts) ...');
      try {
        const inspector = job.users.find((u) => u.role === 'inspector')!;
        // The level with the most units: the walk a phone has the most to show on.
        const levelDb = new pg.Client({ connectionString: url });
        await levelDb.connect();
        const level = await levelDb.query<{ id: string }>(
          `SELECT level_id AS id FROM units WHERE job_id = $1 GROUP BY level_id ORDER BY count(*) DESC, level_id LIMIT 1`,
          [job.jobId],
        );
        await levelDb.end();
        phone = await measurePhone({
          baseUrl: server.url.origin,
          chromiumPath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
          signIn: { email: inspector.email, password: BENCH_PASSWORD },
          jobId: job.jobId,
          levelId: level.rows[0]!.id,
          log: say,
        });
      } catch (err) {
        say(`phone benchmark failed: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    let syncRate: SyncRateResult | null = null;
    if (!SKIP_WEB) {
      say(`sync rate of ${SYNC_COUNT} findings with photos queued offline, and posted online one by one (scripts/lib/benchSync.ts) ...`);
      try {
        const inspector = job.users.find((u) => u.role === 'inspector')!;
        const unitDb = new pg.Client({ connectionString: url });
        await unitDb.connect();
        const units = await unitDb.query<{ id: string }>(`SELECT id FROM units WHERE job_id = $1 ORDER BY tag OFFSET 1 LIMIT $2`, [job.jobId, SYNC_COUNT]);
        await unitDb.end();
        syncRate = await syncRateBench({
          baseUrl: server.url.origin,
          databaseUrl: url,
          email: inspector.email,
          password: BENCH_PASSWORD,
          jobId: job.jobId,
          unitIds: units.rows.map((u) => u.id),
          count: SYNC_COUNT,
          log: say,
        });
      } catch (err) {
        say(`sync rate benchmark failed: ${err instanceof Error ? err.message : String(err)}`);
      }
    }

    // ---- Report ----
    const totalRequests = [...load.byEndpoint.values()].reduce((s, e) => s + e.times.length, 0);
    const allReads = [...load.byEndpoint.entries()].filter(([e]) => READS.includes(e)).flatMap(([, x]) => x.times);
    const allErrors = [...load.byEndpoint.values()].reduce((s, e) => s + e.non2xx, 0) + load.networkErrors;
    console.log(`\nTrimout benchmark, ${new Date().toISOString()} (127.0.0.1; load generator, server and PostgreSQL share ${os.cpus().length} cores)`);
    console.log(`data: ${job.users.length} people, 1 job with 100,000 findings on 2,000 units, 20 companies; ${clients.length} clients for ${load.elapsed.toFixed(0)} s, no think time`);
    console.log(`\nLoad: ${totalRequests} requests, ${(totalRequests / load.elapsed).toFixed(0)} req/s, non-2xx: ${allErrors - load.networkErrors}, requests without an answer: ${load.networkErrors}`);
    console.log('| endpoint | requests | req/s | p50 ms | p95 ms | p99 ms | non-2xx |');
    console.log('|---|---|---|---|---|---|---|');
    const loadRows: Record<string, unknown>[] = [];
    for (const [e, x] of [...load.byEndpoint.entries()].sort((a, b) => b[1].times.length - a[1].times.length)) {
      const s = stats(x.times);
      loadRows.push({ endpoint: e, ...s, rps: x.times.length / load.elapsed, non2xx: x.non2xx, statuses: x.statuses });
      console.log(`| ${e} | ${s.count} | ${(s.count / load.elapsed).toFixed(1)} | ${f1(s.p50)} | ${f1(s.p95)} | ${f1(s.p99)} | ${x.non2xx} |`);
    }
    const readStats = stats(allReads);
    console.log(`| all reads | ${readStats.count} | ${(readStats.count / load.elapsed).toFixed(1)} | ${f1(readStats.p50)} | ${f1(readStats.p95)} | ${f1(readStats.p99)} | |`);
    for (const [e, x] of load.byEndpoint) if (x.sample) console.log(`  first non-2xx of ${e}: ${x.sample}`);

    console.log('\nReads: API next to the same SQL run directly (the route\'s own statements, replayed in order on one connection)');
    console.log('| endpoint | queries (pipeline) | API p50 1 client | SQL p50 | SQL p95 | API/SQL p50, 1 client | API p50 / p95 under load | API/SQL p50 under load |');
    console.log('|---|---|---|---|---|---|---|---|');
    for (const r of reads) {
      const l = stats(load.byEndpoint.get(r.endpoint)?.times ?? []);
      console.log(
        `| ${r.path} | ${r.queries} (${r.pipelineQueries}) | ${f1(r.api1.p50)} | ${f2(r.sql.p50)} | ${f2(r.sql.p95)} | ${ratio(r.api1.p50, r.sql.p50)} | ${f1(l.p50)} / ${f1(l.p95)} | ${ratio(l.p50, r.sql.p50)} |`,
      );
    }
    const board = stats(load.byEndpoint.get('GET board')?.times ?? []);
    const list = stats(load.byEndpoint.get('GET findings list')?.times ?? []);
    console.log('\nTargets on this machine:');
    console.log(`  reads p95 under ${TARGET.readP95} ms with ${clients.length} clients: ${f1(readStats.p95)} ms ${readStats.p95 < TARGET.readP95 ? 'met' : 'NOT met'}`);
    console.log(`  findings list p50 / p95: ${f1(list.p50)} / ${f1(list.p95)} ms`);
    console.log(`  board p50 / p95 under ${TARGET.boardP95} ms: ${fx.optional.has('GET board') ? `${f1(board.p50)} / ${f1(board.p95)} ms ${board.p95 < TARGET.boardP95 ? 'met' : 'NOT met'}` : 'no board route yet'}`);
    console.log(`  errors: ${allErrors} ${allErrors === 0 ? 'met' : 'NOT met'}`);

    // The database's own capacity for the same mix.
    const apiRps = totalRequests / load.elapsed;
    let capacityShare = NaN;
    if (capacity) {
      capacityShare = apiRps / capacity.requestEquivalentsPerSecond;
      const composition = new Map<string, number>();
      for (const r of mixSample) composition.set(r.endpoint, (composition.get(r.endpoint) ?? 0) + 1);
      const statementsPerRequest = mixSample.reduce((sum, r) => sum + r.queries.length, 0) / mixSample.length;
      console.log(
        `\nCapacity against the database's own limit: the SQL of ${capacity.samples} requests drawn from the same mix (session, user and membership reads included; ` +
          `${f1(statementsPerRequest)} statements a request) replayed directly on ${capacity.connections} connections, no think time, for ${capacity.seconds.toFixed(0)} s`,
      );
      console.log(
        `  writes in the mix: their SQL replayed inside a transaction that is rolled back (the server's own BEGIN/COMMIT left out, the ids they created and the ` +
          `Idempotency-Keys fresh on each replay; ${capacity.writesInSample} of the ${capacity.samples} sampled requests, ${capacity.replayedWrites} write replays); ` +
          `their UPDATEs (by id) write again what the captured write wrote, with the same row locks and triggers`,
      );
      console.log(`  sample: ${[...composition.entries()].sort((a, b) => b[1] - a[1]).map(([e, n]) => `${e} ${n}`).join(', ')}`);
      console.log(
        `  database: ${capacity.replayed} request-equivalents, ${capacity.requestEquivalentsPerSecond.toFixed(0)} req-equivalents/s (${capacity.statementsPerSecond.toFixed(0)} statements/s), ` +
          `failed replays: ${capacity.failed}${capacity.firstError ? ` (first: ${capacity.firstError})` : ''}`,
      );
      console.log(
        `  API ${apiRps.toFixed(0)} req/s = ${f2(capacityShare)} of the database's ${capacity.requestEquivalentsPerSecond.toFixed(0)} req-equivalents/s ` +
          `(target >= ${TARGET.capacityShare}): ${capacityShare >= TARGET.capacityShare ? 'met' : 'NOT met'}`,
      );
    }

    // Latency at a realistic load: open loop.
    let openRows: { endpoint: string; requests: number; p50: number; p95: number; p99: number; errors: number; sample?: string }[] = [];
    let openVerdicts: Verdict[] = [];
    if (open) {
      openRows = [...open.byEndpoint.entries()]
        .sort((a, b) => b[1].times.length - a[1].times.length)
        .map(([endpoint, x]) => ({ endpoint, requests: x.times.length, ...pickPercentiles(stats(x.times)), errors: x.errors, sample: x.sample }));
      const openReads = stats([...open.byEndpoint.entries()].filter(([e]) => e.startsWith('GET ')).flatMap(([, x]) => x.times));
      console.log(
        `\nOpen loop: ${open.sent} requests arriving at ${open.rate}/s on a fixed schedule for ${open.seconds} s (the same mix and sessions; each sent at its time ` +
          `whether or not earlier ones had answered; latency from the scheduled time, so queueing counts); load generator behind schedule p50 ${f1(open.sendLag.p50)} ms, max ${f1(open.sendLag.max)} ms`,
      );
      const keptUp = open.elapsed <= open.seconds + 2;
      console.log(
        `  the last answer came ${open.elapsed.toFixed(1)} s after the first arrival (${(open.sent / open.elapsed).toFixed(1)} answers/s): ` +
          (keptUp ? 'the server kept up with the rate' : 'the server did NOT keep up with the rate, so the figures are mostly time queued'),
      );
      console.log('| endpoint | requests | p50 ms | p95 ms | p99 ms | errors |');
      console.log('|---|---|---|---|---|---|');
      for (const r of openRows) console.log(`| ${r.endpoint} | ${r.requests} | ${f1(r.p50)} | ${f1(r.p95)} | ${f1(r.p99)} | ${r.errors} |`);
      console.log(`| all reads | ${openReads.count} | ${f1(openReads.p50)} | ${f1(openReads.p95)} | ${f1(openReads.p99)} | |`);
      for (const r of openRows) if (r.sample) console.log(`  first error of ${r.endpoint}: ${r.sample}`);
      openVerdicts = latencyVerdicts(openRows, TARGET, (e) => e === 'GET board', (e) => e === 'POST fix (photo)');
      console.log(`Targets at ${open.rate} req/s: ${openVerdicts.every((v) => v.met) ? 'all met' : 'NOT all met'}`);
      for (const v of openVerdicts) console.log(`  ${v.what}: ${v.value} ${v.met ? 'met' : 'NOT met'}`);
    }

    // Server CPU per request.
    const loadCpuPerRequest = loadCpuMs / totalRequests;
    const openRequests = open ? openRows.reduce((sum, r) => sum + r.requests, 0) : 0;
    const openCpuPerRequest = openCpuMs / openRequests;
    const medianCpu = median(endpointCpu.map((e) => e.cpuMsPerRequest));
    console.log(`\nServer CPU per request (user + system time of the server process, all threads, from /proc/<pid>/stat; target < ${TARGET.cpuMsPerRequest} ms):`);
    console.log(`  closed-loop load: ${f1(loadCpuMs)} ms for ${totalRequests} requests = ${f2(loadCpuPerRequest)} ms a request (${((loadCpuMs / 1000 / load.elapsed) * 100).toFixed(0)} % of one core) ${loadCpuPerRequest < TARGET.cpuMsPerRequest ? 'met' : 'NOT met'}`);
    if (open) console.log(`  open loop: ${f1(openCpuMs)} ms for ${openRequests} requests = ${f2(openCpuPerRequest)} ms a request ${openCpuPerRequest < TARGET.cpuMsPerRequest ? 'met' : 'NOT met'}`);
    if (endpointCpu.length) {
      console.log(`  each endpoint alone for ${CPU_SECONDS} s (up to 10 clients): median across endpoints ${f2(medianCpu)} ms a request ${medianCpu < TARGET.cpuMsPerRequest ? 'met' : 'NOT met'}`);
      console.log('  | endpoint | requests | CPU ms a request |');
      console.log('  |---|---|---|');
      for (const e of [...endpointCpu].sort((a, b) => b.cpuMsPerRequest - a.cpuMsPerRequest)) console.log(`  | ${e.endpoint} | ${e.requests} | ${f2(e.cpuMsPerRequest)} |`);
    }

    const ex = exportResult as { api?: { rows: number; rowsPerSecond: number; megabytes: number }; copy?: { rowsPerSecond: number }; ratio?: number } | null;
    if (ex?.api && ex.copy) {
      console.log(
        `\nExport GET findings.csv (whole job, GC manager): ${ex.api.rows} rows, ${ex.api.megabytes.toFixed(1)} MB, ${ex.api.rowsPerSecond.toFixed(0)} rows/s; ` +
          `COPY of the same SELECT: ${ex.copy.rowsPerSecond.toFixed(0)} rows/s; API/COPY ${(ex.ratio ?? 0).toFixed(2)} (1.0 = as fast as the database alone)`,
      );
    } else if (exportResult) console.log(`\nExport: ${JSON.stringify(exportResult)}`);
    if (reportResult) console.log(`\n${describeReportBench(reportResult)}`);
    if (bundle) {
      console.log(
        `\nweb bundle: ${(bundle.raw / 1024).toFixed(0)} KiB raw, ${(bundle.gzip / 1024).toFixed(0)} KiB gzip, ` +
          `${(bundle.brotli / 1024).toFixed(0)} KiB brotli as sent (${bundle.files.join(', ')}; the scanner's piece only when a code is first read)`,
      );
    }
    if (usableMs !== null) console.log(`sign-in page usable in headless chromium (median of 5): ${usableMs} ms`);
    if (localSave) {
      console.log(
        `\nLocal save of a finding with 2 photos (phone-sized page, CPU ${localSave.cpuSlowdown}x slower through the DevTools protocol, no network, ${localSave.runs} runs):\n` +
          `  tap on "Log finding" → the queued record in IndexedDB (outbox): p50 ${f1(localSave.save.p50)} ms, p95 ${f1(localSave.save.p95)} ms (includes up to one 10 ms poll)\n` +
          `  2 photos of 4000×3000 picked → downscaled to 2560 px on the device and shown in the form: p50 ${f1(localSave.prepare.p50)} ms, p95 ${f1(localSave.prepare.p95)} ms`,
      );
    }
    if (phone) console.log(`\n${formatPhone(phone)}`);
    if (syncRate) {
      console.log(
        `\nSync of ${syncRate.findings} findings with ${syncRate.photos} photos (1-2 each, 640×480) queued offline in the outbox (phone-sized page):\n` +
          `  back online → queue empty: ${syncRate.queued.seconds.toFixed(1)} s, ${f2(syncRate.queued.itemsPerSecond)} items/s ` +
          `(in SQL: ${syncRate.queued.findingsStored} of ${syncRate.findings} findings, ${syncRate.queued.photosStored} of ${syncRate.photos} photos)\n` +
          `  the same findings posted online one by one from the page: ${syncRate.online.seconds.toFixed(1)} s, ${f2(syncRate.online.itemsPerSecond)} items/s` +
          (syncRate.online.refused ? ` (${syncRate.online.refused} refused)` : ''),
      );
    }
    fs.mkdirSync(path.join(root, '.artifacts'), { recursive: true });
    fs.writeFileSync(
      path.join(root, '.artifacts', 'bench.json'),
      JSON.stringify(
        {
          at: new Date().toISOString(),
          clients: clients.length,
          seconds: load.elapsed,
          networkErrors: load.networkErrors,
          load: loadRows,
          reads,
          capacity: capacity && {
            ...capacity,
            writes: 'replayed inside a transaction that is rolled back',
            apiRequestsPerSecond: apiRps,
            share: capacityShare,
            target: TARGET.capacityShare,
          },
          openLoop: open && {
            rate: open.rate,
            seconds: open.seconds,
            sent: open.sent,
            elapsed: open.elapsed,
            keptUp: open.elapsed <= open.seconds + 2,
            sendLag: open.sendLag,
            endpoints: openRows,
            verdicts: openVerdicts,
          },
          serverCpu: {
            target: TARGET.cpuMsPerRequest,
            load: { cpuMs: loadCpuMs, requests: totalRequests, msPerRequest: loadCpuPerRequest },
            openLoop: open ? { cpuMs: openCpuMs, requests: openRequests, msPerRequest: openCpuPerRequest } : null,
            endpoints: endpointCpu,
            medianMsPerRequest: medianCpu,
          },
          exportResult,
          reportResult,
          bundle,
          usableMs,
          localSave,
          phone,
          syncRate,
        },
        null,
        2,
      ),
    );
  } finally {
    await server?.stop();
    cluster.stop();
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
