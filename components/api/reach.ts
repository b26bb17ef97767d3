/**
 * Whether Trimout's server could be reached on the last try. The browser's `navigator.onLine`
 * says true on a Wi-Fi with no way out (a site hut's router with its line down, a captive portal)
 * and, in some browsers, after a reload with no network: a request that fails for want of a
 * network marks the server unreachable until a request gets an answer again.
 *
 * Unreachable, react-query is told the app is offline (components/queries/queryClient.ts: its
 * reads pause and keep what they show, the kept levels' included, instead of failing), the
 * no-signal banner shows
 * (components/outbox/HeaderParts.tsx useOnline), and GET /api/health is asked every 15 s until it
 * answers: nothing else would notice the way out coming back while every read is paused.
 */
let unreachable = false;
let probe: ReturnType<typeof setInterval> | null = null;
const listeners = new Set<() => void>();
export const REACH_PROBE_MS = 15_000;

/**
 * After each request: `true` when the server answered (whatever the status), `false` when nothing
 * came back, with the request that asks again while it stays so (components/api/client.ts).
 */
export function noteReached(answered: boolean, ping?: () => Promise<unknown>): void {
  if (unreachable === !answered) return;
  unreachable = !answered;
  if (unreachable && ping) startProbe(ping);
  else stopProbe();
  for (const l of listeners) l();
}

export function serverUnreachable(): boolean {
  return unreachable;
}

export function subscribeReach(fn: () => void): () => void {
  listeners.add(fn);
  return () => {
    listeners.delete(fn);
  };
}

function startProbe(ping: () => Promise<unknown>) {
  if (probe !== null) return;
  probe = setInterval(() => {
    ping().then(
      () => noteReached(true),
      () => undefined,
    );
  }, REACH_PROBE_MS);
  // Never what keeps a test process (node) alive.
  (probe as { unref?: () => void }).unref?.();
}

function stopProbe() {
  if (probe !== null) clearInterval(probe);
  probe = null;
}
