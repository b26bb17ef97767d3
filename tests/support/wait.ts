/**
 * Waiting in tests: poll a condition until it holds instead of sleeping a fixed time and hoping
 * the thing has happened by then. A fixed sleep is either too short on a busy machine (a flaky
 * test) or longer than needed everywhere else (a slow one); a condition is neither.
 */
export interface WaitOptions {
  /** Give up after this many milliseconds (default 10 s) and throw. */
  timeout?: number;
  /** Milliseconds between two checks (default 20). */
  interval?: number;
  /** Named in the error when the wait times out ("the export's query to stop"). */
  what?: string;
}

/**
 * Resolves with the condition's first truthy value. The condition may be async (a query); an error
 * it throws fails the wait at once. Times out with an error naming `what`.
 */
export async function waitFor<T>(condition: () => T | Promise<T>, options: WaitOptions = {}): Promise<NonNullable<T>> {
  const timeout = options.timeout ?? 10_000;
  const interval = options.interval ?? 20;
  const until = Date.now() + timeout;
  for (;;) {
    const value = await condition();
    if (value) return value as NonNullable<T>;
    if (Date.now() > until) throw new Error(`Timed out after ${timeout} ms waiting for ${options.what ?? 'a condition'}.`);
    await new Promise((resolve) => setTimeout(resolve, interval));
  }
}

/**
 * waitFor as the browser tests use it: `what` named in the error, a longer default timeout (a
 * queue sent over a network, a page under a slowed CPU) and a calmer poll.
 */
export async function until(check: () => boolean | Promise<boolean>, what = 'the page', timeoutMs = 60_000): Promise<void> {
  await waitFor(check, { what, timeout: timeoutMs, interval: 100 });
}
