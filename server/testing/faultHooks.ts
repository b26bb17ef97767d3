/**
 * Fault injection for the kill-mid-request tests (tests/server/faults/kill-mid-request.test.ts).
 *
 * With TRIMOUT_FAULT_PAUSE_MS=<ms> set, an idempotent write whose request carries the header
 * `X-Trimout-Fault-Pause` pauses for that long INSIDE its database transaction, after the
 * write's rows (and a finding's stored photos) exist and before the commit, and prints
 * "fault-pause <method> <path>" on stderr so the test can kill the process right there.
 * server/env.ts refuses to start in production with the variable set; unset, this costs nothing
 * and the header is ignored.
 */
import type { Request } from 'express';

const raw = process.env.TRIMOUT_FAULT_PAUSE_MS;
const pauseMs = raw && process.env.NODE_ENV !== 'production' ? Number(raw) : 0;

export async function faultPause(req: Request): Promise<void> {
  if (!pauseMs || !req.get('x-trimout-fault-pause')) return;
  process.stderr.write(`fault-pause ${req.method} ${req.baseUrl}${req.path}\n`);
  await new Promise((resolve) => setTimeout(resolve, pauseMs));
}
