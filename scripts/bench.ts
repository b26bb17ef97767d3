/**
 * `npm run bench` (not part of `npm test`): speed figures on this machine.
 * - API read latency through HTTP (autocannon, 1 request per connection at a time: browsers do
 *   not pipeline) next to the same SQL run directly on PostgreSQL, as a ratio;
 * - the web app's production bundle size (raw and gzip);
 * - time until the sign-in page is usable in headless chromium.
 * p95 is computed from every request's own time (autocannon's histogram has no p95).
 * Later capabilities (findings, board, exports) add their endpoints to READS below.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import autocannon from 'autocannon';
import pg from 'pg';
import { chromium } from 'playwright-core';
import { connect, migrate } from '../server/db';
import { startServer } from '../server/index';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../server/seed/demo';
import { ensureDatabase, removeCluster, startCluster } from './lib/postgres';
import { say } from './lib/run';
import { buildWebIfStale } from './lib/web';

const root = path.resolve(__dirname, '..');
const DURATION = Number(process.env.BENCH_SECONDS ?? 10);
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 10);

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[i]!;
}

async function httpLatency(url: string, cookie: string) {
  const times: number[] = [];
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      { url, connections: CONNECTIONS, pipelining: 1, duration: DURATION, headers: { cookie } },
      (err, res) => (err ? reject(err) : resolve(res)),
    );
    instance.on('response', (_client, _status, _bytes, responseTime) => times.push(responseTime));
  });
  times.sort((a, b) => a - b);
  return {
    requests: result.requests.total,
    rps: result.requests.average,
    p50: percentile(times, 50),
    p95: percentile(times, 95),
    p99: percentile(times, 99),
    errors: result.errors,
    timeouts: result.timeouts,
    non2xx: result.non2xx,
  };
}

async function sqlLatency(client: pg.Client, sql: string, params: unknown[], runs = 500) {
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t = process.hrtime.bigint();
    await client.query(sql, params);
    times.push(Number(process.hrtime.bigint() - t) / 1e6);
  }
  times.sort((a, b) => a - b);
  return { p50: percentile(times, 50), p95: percentile(times, 95) };
}

function bundleSize() {
  const dir = path.join(root, 'dist', '_expo', 'static', 'js', 'web');
  let raw = 0;
  let gzip = 0;
  for (const file of fs.readdirSync(dir)) {
    const body = fs.readFileSync(path.join(dir, file));
    raw += body.length;
    gzip += zlib.gzipSync(body, { level: 9 }).length;
  }
  return { raw, gzip };
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
    runs.sort((a, b) => a - b);
    return percentile(runs, 50);
  } finally {
    await context.close();
    fs.rmSync(userDataDir, { recursive: true, force: true });
  }
}

async function main() {
  const dataDir = path.join(root, '.pgbench');
  removeCluster(dataDir);
  const cluster = await startCluster({ dataDir, port: Number(process.env.TRIMOUT_BENCH_PG_PORT ?? 54349), throwaway: true });
  try {
    await ensureDatabase(cluster, 'trimout_bench');
    const url = cluster.url('trimout_bench');
    const db = connect(url);
    await migrate(db.sequelize);
    await seedDemo(db);
    await db.close();
    await buildWebIfStale(path.join(root, 'dist'));

    const server = await startServer({ ...process.env, NODE_ENV: 'development', DATABASE_URL: url, PORT: '0', MAIL_PORT: '0', WEB_DIST: path.join(root, 'dist') });
    try {
      const account = DEMO_ACCOUNTS[0]!;
      const anon = await fetch(`${server.url}/api/session`).then((r) => r.json() as Promise<{ csrfToken: string }>);
      const signIn = await fetch(`${server.url}/api/session`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-csrf-token': anon.csrfToken },
        body: JSON.stringify({ email: account.email, password: DEMO_PASSWORD }),
      });
      const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0]!;
      const client = new pg.Client({ connectionString: url });
      await client.connect();
      const { rows } = await client.query('SELECT id FROM users WHERE email = $1', [account.email]);
      const userId = rows[0].id as string;

      const READS = [
        {
          name: 'GET /api/jobs',
          path: '/api/jobs',
          sql: `SELECT j.* FROM job_members m JOIN jobs j ON j.id = m.job_id WHERE m.user_id = $1 ORDER BY j.name`,
          params: [userId],
        },
      ];
      say(`measuring ${READS.length} read endpoint(s), ${CONNECTIONS} connections for ${DURATION} s each ...`);
      const results = [];
      for (const read of READS) {
        const http = await httpLatency(`${server.url}${read.path}`, cookie);
        const sql = await sqlLatency(client, read.sql, read.params);
        results.push({ ...read, http, sql, ratioP50: http.p50 / sql.p50 });
      }
      await client.end();
      const bundle = bundleSize();
      const usableMs = await signInPageUsable(server.url);

      console.log('\nTrimout benchmark (127.0.0.1, client and server share this machine\'s cores)');
      console.log(`settings: ${CONNECTIONS} connections, pipelining 1, ${DURATION} s per endpoint; data: demo seed`);
      console.log('\n| endpoint | req/s | p50 ms | p95 ms | p99 ms | errors | non-2xx | SQL p50 ms | SQL p95 ms | API/SQL p50 |');
      console.log('|---|---|---|---|---|---|---|---|---|---|');
      for (const r of results) {
        console.log(
          `| ${r.name} | ${r.http.rps.toFixed(0)} | ${r.http.p50.toFixed(1)} | ${r.http.p95.toFixed(1)} | ${r.http.p99.toFixed(1)} | ${r.http.errors + r.http.timeouts} | ${r.http.non2xx} | ${r.sql.p50.toFixed(2)} | ${r.sql.p95.toFixed(2)} | ${r.ratioP50.toFixed(1)}x |`,
        );
      }
      console.log(`\nweb bundle: ${(bundle.raw / 1024).toFixed(0)} KiB raw, ${(bundle.gzip / 1024).toFixed(0)} KiB gzip`);
      console.log(`sign-in page usable in headless chromium (median of 5): ${usableMs} ms`);
      fs.mkdirSync(path.join(root, '.artifacts'), { recursive: true });
      fs.writeFileSync(path.join(root, '.artifacts', 'bench.json'), JSON.stringify({ results, bundle, usableMs }, null, 2));
    } finally {
      await server.stop();
    }
  } finally {
    cluster.stop();
    removeCluster(cluster.dataDir);
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
