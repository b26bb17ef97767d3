/**
 * The database's own capacity for the benchmark's request mix, and the server's CPU time.
 *
 * Capacity: the SQL that a sample of the mix's requests sent (captured by scripts/lib/benchServer.ts,
 * session / user / membership reads included, since the database pays for them too) is replayed
 * directly on PostgreSQL by many connections with no think time. Each replayed request counts as
 * one request-equivalent, so requests-equivalents/s is the most the database could serve of this
 * mix on this machine, with no API in front of it.
 *
 * Writes are replayed inside a transaction that is rolled back, so the job stays as it was and the
 * same write can be replayed again: the server's own transaction statements are left out, and ids
 * that a write created (the `id` column of its INSERTs) and its Idempotency-Key are replaced by
 * fresh ones on each replay, so concurrent replays do not wait on each other's unique keys.
 */
import { randomUUID } from 'node:crypto';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import pg from 'pg';
import type { CapturedQuery } from './benchServer';

export interface CapturedRequest {
  endpoint: string;
  write: boolean;
  queries: CapturedQuery[];
}

const UUID = /[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/gi;
const TX_CONTROL = /^\s*(START TRANSACTION|BEGIN|COMMIT|ROLLBACK|END)\b/i;

/** The server's own transaction boundaries; the replay wraps a write in its own transaction. */
export function isTransactionControl(text: string): boolean {
  return TX_CONTROL.test(text) && !/^\s*ROLLBACK\s+TO\b/i.test(text);
}

/** Buffers sent over IPC arrive as { type: 'Buffer', data: [...] }. */
function revive(v: unknown): unknown {
  if (v && typeof v === 'object' && (v as { type?: unknown }).type === 'Buffer' && Array.isArray((v as { data?: unknown }).data)) {
    return Buffer.from((v as { data: number[] }).data);
  }
  return v;
}

function mapStrings(v: unknown, f: (s: string) => string): unknown {
  if (typeof v === 'string') return f(v);
  if (Array.isArray(v)) return v.map((x) => mapStrings(x, f));
  return v;
}

function forEachString(v: unknown, f: (s: string) => void): void {
  if (typeof v === 'string') f(v);
  else if (Array.isArray(v)) for (const x of v) forEachString(x, f);
}

/** Splits `a, 'b,c', (d, e)` at its top-level commas, keeping quoted strings whole. */
function splitTopLevel(s: string): string[] {
  const out: string[] = [];
  let depth = 0;
  let quoted = false;
  let start = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s[i];
    if (c === "'") quoted = !quoted;
    else if (!quoted && c === '(') depth += 1;
    else if (!quoted && c === ')') depth -= 1;
    else if (!quoted && depth === 0 && c === ',') {
      out.push(s.slice(start, i).trim());
      start = i + 1;
    }
  }
  out.push(s.slice(start).trim());
  return out;
}

/**
 * The ids an INSERT gives its new rows: the values of its `id` column, bound ($n) or written
 * in the text (one or more rows). Other uuids in it (the finding, the job) name existing rows.
 */
export function insertedIds(text: string, values: unknown[] | undefined): string[] {
  const m = /^\s*INSERT\s+INTO\s+[^(]+\(([^)]*)\)\s*VALUES\s*/i.exec(text);
  if (!m) return [];
  const column = splitTopLevel(m[1]!).findIndex((c) => c.replace(/"/g, '').toLowerCase() === 'id');
  if (column < 0) return [];
  const out: string[] = [];
  let rest = text.slice(m[0].length);
  while (rest.startsWith('(')) {
    // One row: up to its closing parenthesis at depth 0, outside quotes.
    let depth = 0;
    let quoted = false;
    let end = -1;
    for (let i = 0; i < rest.length && end < 0; i++) {
      const c = rest[i];
      if (c === "'") quoted = !quoted;
      else if (!quoted && c === '(') depth += 1;
      else if (!quoted && c === ')' && --depth === 0) end = i;
    }
    if (end < 0) break;
    const cell = splitTopLevel(rest.slice(1, end))[column] ?? '';
    const bound = /^\$(\d+)/.exec(cell);
    const value = bound ? values?.[Number(bound[1]) - 1] : cell.replace(/^'|'(::\w+)?$/g, '');
    if (typeof value === 'string' && new RegExp(`^${UUID.source}$`, 'i').test(value)) out.push(value);
    rest = rest.slice(end + 1).replace(/^\s*,\s*/, '');
  }
  return out;
}

export interface ReplayPlan {
  write: boolean;
  /** The statements to send on one replay (fresh ids on every call for a write). */
  statements(): { text: string; values: unknown[] | undefined }[];
}

/**
 * How one captured request is replayed. Reads: the statements as they were. Writes: without the
 * server's transaction control; the ids of the rows the write inserted and Idempotency-Keys
 * (`keyPattern`) get fresh values on each replay, the same value everywhere in that replay.
 */
export function replayPlan(req: CapturedRequest, keyPattern = /^bench-[\w-]+$/): ReplayPlan {
  const queries = req.queries.map((q) => ({ text: q.text, values: q.values?.map(revive) }));
  if (!req.write) return { write: false, statements: () => queries };
  const kept = queries.filter((q) => !isTransactionControl(q.text));
  const created = new Set<string>();
  const keys = new Set<string>();
  for (const q of kept) {
    for (const id of insertedIds(q.text, q.values)) created.add(id.toLowerCase());
    forEachString(q.values, (s) => {
      if (keyPattern.test(s)) keys.add(s);
    });
  }
  return {
    write: true,
    statements: () => {
      const fresh = new Map<string, string>();
      const suffix = `-r${randomUUID().slice(0, 8)}`;
      const swap = (s: string) => {
        if (keys.has(s)) return `${s}${suffix}`;
        return s.replace(UUID, (m) => {
          const k = m.toLowerCase();
          if (!created.has(k)) return m;
          let n = fresh.get(k);
          if (!n) fresh.set(k, (n = randomUUID()));
          return n;
        });
      };
      return kept.map((q) => ({ text: swap(q.text), values: q.values?.map((v) => mapStrings(v, swap)) }));
    },
  };
}

export interface CapacityResult {
  connections: number;
  seconds: number;
  /** Captured requests the replay cycles through. */
  samples: number;
  writesInSample: number;
  replayed: number;
  replayedWrites: number;
  requestEquivalentsPerSecond: number;
  statementsPerSecond: number;
  /** Replays that failed (the error of the first is kept). */
  failed: number;
  firstError?: string;
}

/** Replays the samples on `connections` connections, each cycling from its own offset, for `seconds`. */
export async function replayCapacity(databaseUrl: string, samples: CapturedRequest[], connections: number, seconds: number): Promise<CapacityResult> {
  const plans = samples.map((s) => replayPlan(s));
  const clients = await Promise.all(
    Array.from({ length: connections }, async () => {
      const c = new pg.Client({ connectionString: databaseUrl });
      await c.connect();
      return c;
    }),
  );
  let replayed = 0;
  let replayedWrites = 0;
  let statements = 0;
  let failed = 0;
  let firstError: string | undefined;
  const started = performance.now();
  const until = started + seconds * 1000;
  try {
    await Promise.all(
      clients.map(async (c, k) => {
        let i = Math.floor((k * plans.length) / connections);
        while (performance.now() < until) {
          const plan = plans[i++ % plans.length]!;
          const list = plan.statements();
          try {
            if (plan.write) await c.query('BEGIN');
            for (const q of list) await c.query(q.text, q.values);
            if (plan.write) await c.query('ROLLBACK');
            replayed += 1;
            if (plan.write) replayedWrites += 1;
            statements += list.length;
          } catch (err) {
            failed += 1;
            firstError ??= err instanceof Error ? err.message : String(err);
            if (plan.write) await c.query('ROLLBACK').catch(() => undefined);
          }
        }
      }),
    );
  } finally {
    await Promise.all(clients.map((c) => c.end().catch(() => undefined)));
  }
  const elapsed = (performance.now() - started) / 1000;
  return {
    connections,
    seconds: elapsed,
    samples: samples.length,
    writesInSample: samples.filter((s) => s.write).length,
    replayed,
    replayedWrites,
    requestEquivalentsPerSecond: replayed / elapsed,
    statementsPerSecond: statements / elapsed,
    failed,
    firstError,
  };
}

// ---------------------------------------------------------------------------------------------
// Server CPU time
// ---------------------------------------------------------------------------------------------

/** utime + stime (clock ticks) from the text of /proc/<pid>/stat; the name field may hold spaces and parentheses. */
export function cpuTicksFromStat(stat: string): number {
  const fields = stat.slice(stat.lastIndexOf(')') + 2).trim().split(/\s+/);
  // After the name: state is field 3 of the file, utime field 14, stime field 15.
  const utime = Number(fields[11]);
  const stime = Number(fields[12]);
  if (!Number.isFinite(utime) || !Number.isFinite(stime)) throw new Error(`not a /proc/<pid>/stat line: ${stat.slice(0, 80)}`);
  return utime + stime;
}

let ticksPerSecond: number | undefined;
function clockTicks(): number {
  if (ticksPerSecond === undefined) {
    try {
      ticksPerSecond = Number(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim()) || 100;
    } catch {
      ticksPerSecond = 100;
    }
  }
  return ticksPerSecond;
}

/** CPU time (user + system, all threads) the process has used so far, in ms. */
export function processCpuMs(pid: number): number {
  return (cpuTicksFromStat(fs.readFileSync(`/proc/${pid}/stat`, 'utf8')) * 1000) / clockTicks();
}

export function median(values: number[]): number {
  const v = values.filter((x) => Number.isFinite(x)).sort((a, b) => a - b);
  if (v.length === 0) return NaN;
  const m = Math.floor(v.length / 2);
  return v.length % 2 ? v[m]! : (v[m - 1]! + v[m]!) / 2;
}
