/**
 * The export figure of `npm run bench` (called by scripts/bench.ts): rows per second of
 * GET /api/jobs/:jobId/findings.csv (whole job, as a GC manager) next to PostgreSQL's own
 * `COPY (the same SELECT) TO STDOUT`, and their ratio (1.0 = as fast as the database alone).
 *
 * "The same SELECT" is the statement the route streams (server/services/csvFindings.ts
 * `findingsCsvSql`, no filters, GC scope), run by `psql` with the bound values passed as psql
 * variables (`:'p1'` ...: psql quotes them), with JIT off as the route does, its output counted
 * and dropped. Both counts are newline-terminated records minus the header (bench notes contain
 * no line breaks). Each side is timed from the request / process start to its last byte; psql's
 * own start-up (a few ms) is included on its side. Nothing here needs pg-copy-streams.
 */
import { spawn } from 'node:child_process';
import pg from 'pg';
import { findingsCsvSql } from '../../server/services/csvFindings';

export interface BenchExportOptions {
  /** http://127.0.0.1:port of a running server. */
  baseUrl: string;
  /** Session cookie header value of a signed-in GC manager (or inspector) of the job. */
  cookie: string;
  jobId: string;
  databaseUrl: string;
}

export interface Throughput {
  rows: number;
  seconds: number;
  rowsPerSecond: number;
  megabytes: number;
}

export interface BenchExportResult {
  api: Throughput;
  copy: Throughput;
  /** api.rowsPerSecond / copy.rowsPerSecond. */
  ratio: number;
}

function newlines(chunk: Buffer): number {
  let n = 0;
  for (let at = chunk.indexOf(10); at >= 0; at = chunk.indexOf(10, at + 1)) n += 1;
  return n;
}

function throughput(lines: number, bytes: number, started: bigint): Throughput {
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  const rows = Math.max(0, lines - 1);
  return { rows, seconds, rowsPerSecond: rows / seconds, megabytes: bytes / (1024 * 1024) };
}

async function timeApi(o: BenchExportOptions): Promise<Throughput> {
  const started = process.hrtime.bigint();
  const res = await fetch(`${o.baseUrl}/api/jobs/${o.jobId}/findings.csv`, { headers: { Cookie: o.cookie } });
  if (res.status !== 200 || !res.body) throw new Error(`findings.csv answered ${res.status}`);
  let lines = 0;
  let bytes = 0;
  for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
    const buf = Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    lines += newlines(buf);
    bytes += buf.length;
  }
  return throughput(lines, bytes, started);
}

async function timeCopy(o: BenchExportOptions): Promise<Throughput> {
  const client = new pg.Client({ connectionString: o.databaseUrl });
  await client.connect();
  let timeZone = 'UTC';
  try {
    const { rows } = await client.query<{ time_zone: string }>('SELECT time_zone FROM jobs WHERE id = $1', [o.jobId]);
    if (!rows[0]) throw new Error(`job ${o.jobId} not found`);
    timeZone = rows[0].time_zone || 'UTC';
  } finally {
    await client.end();
  }
  const { sql, bind } = findingsCsvSql({ jobId: o.jobId, timeZone, companyId: null }, {}, '-number');
  const script = `SET jit = off;\nCOPY (${sql.replace(/\$(\d+)/g, (_m, n: string) => `:'p${n}'`)}) TO STDOUT WITH (FORMAT csv, HEADER);\n`;
  const args = ['-X', '-q', '-v', 'ON_ERROR_STOP=1', ...bind.flatMap((v, i) => ['-v', `p${i + 1}=${String(v)}`]), o.databaseUrl];
  const started = process.hrtime.bigint();
  return new Promise<Throughput>((resolve, reject) => {
    const psql = spawn('psql', args, { stdio: ['pipe', 'pipe', 'pipe'] });
    let lines = 0;
    let bytes = 0;
    let stderr = '';
    psql.stdout.on('data', (chunk: Buffer) => {
      lines += newlines(chunk);
      bytes += chunk.length;
    });
    psql.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    psql.on('error', reject);
    psql.on('close', (code) => {
      if (code !== 0) return reject(new Error(`psql COPY failed (${code}): ${stderr.trim()}`));
      resolve(throughput(lines, bytes, started));
    });
    psql.stdin.end(script);
  });
}

/** Times the API export, then the database's COPY of the same rows (one after the other, not at once). */
export async function benchExport(o: BenchExportOptions): Promise<BenchExportResult> {
  const api = await timeApi(o);
  const copy = await timeCopy(o);
  return { api, copy, ratio: copy.rowsPerSecond > 0 ? api.rowsPerSecond / copy.rowsPerSecond : 0 };
}
