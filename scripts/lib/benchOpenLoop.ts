/**
 * Open-loop load: requests arrive on a fixed schedule (a fixed rate), each one sent at its time
 * whether or not the earlier ones have answered, and its latency counted from the time it was
 * scheduled, so time spent queued (in the client's connection, the server or PostgreSQL) counts.
 * A closed loop (clients sending back to back) measures throughput; this measures the latency
 * people would see at a given load.
 */
import { stats, type Stats } from './benchHttp';

/** Arrival times in ms from the start: `rate` per second, evenly spaced, for `seconds`. */
export function arrivalSchedule(rate: number, seconds: number): number[] {
  if (!(rate > 0) || !(seconds > 0)) return [];
  const count = Math.floor(rate * seconds);
  const gap = 1000 / rate;
  return Array.from({ length: count }, (_, i) => i * gap);
}

export interface Outcome {
  endpoint: string;
  /** HTTP status, or 0 when no answer came at all. */
  status: number;
  sample?: string;
}

export interface OpenLoopEndpoint {
  times: number[];
  errors: number;
  sample?: string;
}

export interface OpenLoopResult {
  rate: number;
  seconds: number;
  sent: number;
  elapsed: number;
  byEndpoint: Map<string, OpenLoopEndpoint>;
  /** How late the load generator itself sent requests (ms behind their schedule): if large, the figures say more about it than about the server. */
  sendLag: Stats;
}

/**
 * Runs `fire(i)` at each arrival of the schedule. `fire` resolves with the endpoint it hit; a
 * rejection counts as an error of endpoint `unknown` unless it carries one.
 */
export async function openLoop(rate: number, seconds: number, fire: (i: number) => Promise<Outcome>): Promise<OpenLoopResult> {
  const schedule = arrivalSchedule(rate, seconds);
  const byEndpoint = new Map<string, OpenLoopEndpoint>();
  const entry = (e: string) => {
    let x = byEndpoint.get(e);
    if (!x) byEndpoint.set(e, (x = { times: [], errors: 0 }));
    return x;
  };
  const lags: number[] = [];
  const pending: Promise<void>[] = [];
  const t0 = performance.now();
  let next = 0;
  while (next < schedule.length) {
    const now = performance.now() - t0;
    // Send every arrival that is due (more than one when the timer fired late).
    while (next < schedule.length && schedule[next]! <= now) {
      const i = next++;
      const due = t0 + schedule[i]!;
      lags.push(performance.now() - due);
      pending.push(
        fire(i).then(
          (o) => {
            const x = entry(o.endpoint);
            x.times.push(performance.now() - due);
            if (o.status < 200 || o.status >= 300) {
              x.errors += 1;
              x.sample ??= `${o.status} ${o.sample ?? ''}`.trim();
            }
          },
          (err: unknown) => {
            const x = entry((err as { endpoint?: string })?.endpoint ?? 'unknown');
            x.times.push(performance.now() - due);
            x.errors += 1;
            x.sample ??= `no answer: ${err instanceof Error ? err.message : String(err)}`;
          },
        ),
      );
    }
    if (next < schedule.length) {
      const wait = schedule[next]! - (performance.now() - t0);
      if (wait > 0) await new Promise((r) => setTimeout(r, wait));
    }
  }
  await Promise.all(pending);
  return { rate, seconds, sent: schedule.length, elapsed: (performance.now() - t0) / 1000, byEndpoint, sendLag: stats(lags) };
}

export interface LatencyTargets {
  readP95: number;
  boardP95: number;
  photoWriteP95: number;
}

export interface Verdict {
  what: string;
  value: string;
  met: boolean;
}

/**
 * Met / not met per target: every read endpoint's p95 (GET ...) under `readP95`, the levels
 * board's under `boardP95`, writes with a photo under `photoWriteP95`, and no errors at all.
 */
export function latencyVerdicts(
  rows: { endpoint: string; p95: number; errors: number }[],
  targets: LatencyTargets,
  isBoard: (endpoint: string) => boolean,
  hasPhoto: (endpoint: string) => boolean,
): Verdict[] {
  const out: Verdict[] = [];
  for (const r of rows) {
    if (r.endpoint.startsWith('GET ')) out.push({ what: `${r.endpoint} p95 < ${targets.readP95} ms`, value: `${r.p95.toFixed(1)} ms`, met: r.p95 < targets.readP95 });
    if (isBoard(r.endpoint)) out.push({ what: `${r.endpoint} p95 < ${targets.boardP95} ms`, value: `${r.p95.toFixed(1)} ms`, met: r.p95 < targets.boardP95 });
    if (hasPhoto(r.endpoint)) out.push({ what: `${r.endpoint} p95 < ${targets.photoWriteP95} ms`, value: `${r.p95.toFixed(1)} ms`, met: r.p95 < targets.photoWriteP95 });
  }
  const errors = rows.reduce((s, r) => s + r.errors, 0);
  out.push({ what: 'no errors', value: String(errors), met: errors === 0 });
  return out;
}
