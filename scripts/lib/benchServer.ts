/**
 * The server the benchmark drives: the real startServer() in its own process (so the load
 * generator does not share its event loop), plus one bench-only probe. A request that carries
 * `X-Bench-Capture: <id>` has every SQL statement it sends to PostgreSQL (through pg, which both
 * Sequelize and the session store use) recorded with its bound values and time, and reported to
 * the parent over IPC when the response finishes. The bench uses this to count queries per
 * request and to replay a read endpoint's own SQL directly on PostgreSQL. Requests without the
 * header are not touched. Never part of the product server.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import http from 'node:http';
import pg from 'pg';
import { startServer } from '../../server/index';

export interface CapturedQuery {
  text: string;
  values: unknown[] | undefined;
  ms: number;
}

export interface CaptureMessage {
  captureId: string;
  status: number;
  queries: CapturedQuery[];
}

const als = new AsyncLocalStorage<CapturedQuery[]>();

type QueryFn = (this: pg.Client, ...args: unknown[]) => unknown;
const originalQuery = pg.Client.prototype.query as unknown as QueryFn;
(pg.Client.prototype as unknown as { query: QueryFn }).query = function query(this: pg.Client, ...args: unknown[]) {
  const store = als.getStore();
  if (!store) return originalQuery.apply(this, args);
  const [config, values] = args as [string | { text: string; values?: unknown[] }, unknown];
  const entry: CapturedQuery = {
    text: typeof config === 'string' ? config : config.text,
    values: Array.isArray(values) ? values : typeof config === 'object' ? config.values : undefined,
    ms: 0,
  };
  store.push(entry);
  const started = process.hrtime.bigint();
  const done = () => {
    entry.ms = Number(process.hrtime.bigint() - started) / 1e6;
  };
  const cbIndex = args.findIndex((a) => typeof a === 'function');
  if (cbIndex >= 0) {
    const cb = args[cbIndex] as (...r: unknown[]) => void;
    args[cbIndex] = (...r: unknown[]) => {
      done();
      cb(...r);
    };
    return originalQuery.apply(this, args);
  }
  const result = originalQuery.apply(this, args) as { then?: unknown; on?: (e: string, f: () => void) => void };
  if (result && typeof (result as Promise<unknown>).then === 'function') {
    (result as Promise<unknown>).then(done, done);
  } else if (result && typeof result.on === 'function') {
    result.on('end', done);
    result.on('error', done);
  }
  return result;
};

const originalEmit = http.Server.prototype.emit;
http.Server.prototype.emit = function emit(this: http.Server, event: string, ...args: unknown[]) {
  if (event === 'request') {
    const [req, res] = args as [http.IncomingMessage, http.ServerResponse];
    const captureId = req.headers['x-bench-capture'];
    if (typeof captureId === 'string' && process.send) {
      const store: CapturedQuery[] = [];
      res.on('finish', () => {
        // Let the last query callbacks settle.
        setImmediate(() => process.send!({ captureId, status: res.statusCode, queries: store } satisfies CaptureMessage));
      });
      return als.run(store, () => originalEmit.apply(this, [event, ...args] as unknown as Parameters<typeof originalEmit>));
    }
  }
  return originalEmit.apply(this, [event, ...args] as unknown as Parameters<typeof originalEmit>);
} as typeof http.Server.prototype.emit;

startServer()
  .then(({ url, stop }) => {
    console.log(`bench server listening on ${url}`);
    const shutdown = () => {
      stop().then(
        () => process.exit(0),
        () => process.exit(1),
      );
    };
    process.once('SIGINT', shutdown);
    process.once('SIGTERM', shutdown);
    process.on('disconnect', shutdown);
  })
  .catch((err: unknown) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
