/**
 * Streams the rows of one SQL statement to an HTTP response as CSV, without holding them:
 * a database cursor (pg-query-stream over a connection taken from Sequelize's own pool) →
 * a row-to-record transform → csv-stringify (csvSafe.ts rules) → the response, joined by
 * stream.pipeline so a slow client slows the cursor down (backpressure) instead of filling memory.
 *
 * The connection is always given back: released to the pool when the download finished, and
 * destroyed (the pool opens a fresh one) when anything failed or the client went away mid-way,
 * so a half-read cursor never reaches the next caller.
 */
import { Readable, Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type { Response } from 'express';
import type pg from 'pg';
import QueryStream from 'pg-query-stream';
import type { Sequelize } from 'sequelize';
import { tooManyRequests } from '../errors';
import { csvStringifier, setCsvHeaders, type CsvCell } from './csvSafe';

/**
 * Streamed exports running at once in this process. Each holds a pooled connection for as long
 * as its download lasts; a cap keeps a burst of big exports from starving the API's other
 * requests of connections (the pool has 10). A request beyond it waits for a slot (first come,
 * first served) up to EXPORT_SLOT_WAIT_MS, then gets 429 with Retry-After.
 */
export const MAX_CONCURRENT_EXPORTS = 3;
export const EXPORT_SLOT_WAIT_MS = 5_000;
let running = 0;
const waiting: (() => void)[] = [];

function takeSlot(): Promise<boolean> {
  if (running < MAX_CONCURRENT_EXPORTS) {
    running += 1;
    return Promise.resolve(true);
  }
  return new Promise((resolve) => {
    const grant = () => {
      clearTimeout(timer);
      resolve(true);
    };
    const timer = setTimeout(() => {
      waiting.splice(waiting.indexOf(grant), 1);
      resolve(false);
    }, EXPORT_SLOT_WAIT_MS);
    waiting.push(grant);
  });
}

/** Exports waiting for a slot now (tests wait on it instead of sleeping). */
export function exportsWaiting(): number {
  return waiting.length;
}

function giveSlot(): void {
  const next = waiting.shift();
  if (next) next(); // handed straight to the next export: `running` stays the same
  else running -= 1;
}

/** Rows fetched from the cursor per round trip. */
export const CURSOR_BATCH_ROWS = 1000;

/** Bytes gathered before a write to the socket (one write per record would mean 100,000 tiny writes). */
export const WRITE_BATCH_BYTES = 64 * 1024;

/** Joins csv-stringify's per-record chunks into writes of about WRITE_BATCH_BYTES. */
export function batchWrites(size = WRITE_BATCH_BYTES): Transform {
  let parts: Buffer[] = [];
  let length = 0;
  return new Transform({
    transform(chunk: Buffer | string, _enc, done) {
      const buf = typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : chunk;
      parts.push(buf);
      length += buf.length;
      if (length < size) return done();
      const out = Buffer.concat(parts, length);
      parts = [];
      length = 0;
      done(null, out);
    },
    flush(done) {
      done(null, length > 0 ? Buffer.concat(parts, length) : undefined);
    },
  });
}

export interface CsvQuery<Row> {
  sql: string;
  bind: unknown[];
  header: readonly string[];
  toRecord(row: Row): CsvCell[];
  fileName: string;
}

export interface StreamOutcome {
  /** Data rows written (the header not counted). */
  rows: number;
  /** false when the client went away or the database failed mid-way. */
  completed: boolean;
  /** A failure after the first bytes were sent (not set when the client simply went away). */
  error?: unknown;
}

function clientWentAway(err: unknown): boolean {
  return (err as { code?: string } | null)?.code === 'ERR_STREAM_PREMATURE_CLOSE';
}

export async function streamQueryAsCsv<Row>(sequelize: Sequelize, res: Response, query: CsvQuery<Row>): Promise<StreamOutcome> {
  if (!(await takeSlot())) throw tooManyRequests('Several exports are running. Try again in a few seconds.', 5);
  try {
    return await streamOnConnection(sequelize, res, query);
  } finally {
    giveSlot();
  }
}

async function streamOnConnection<Row>(sequelize: Sequelize, res: Response, query: CsvQuery<Row>): Promise<StreamOutcome> {
  const manager = sequelize.connectionManager;
  // Sequelize's postgres dialect hands out pg.Client connections.
  const client = (await manager.getConnection({ type: 'read' })) as pg.Client;
  let rows = 0;
  try {
    // JIT compilation of a big export's plan costs seconds on a small server and saves little
    // on a query that mostly moves rows: off for this connection, reset before it goes back.
    await client.query('SET jit = off');
    const cursor = client.query(new QueryStream(query.sql, query.bind, { batchSize: CURSOR_BATCH_ROWS }));
    const toRecords = new Transform({
      objectMode: true,
      // Records waiting for csv-stringify: one cursor batch is plenty.
      highWaterMark: CURSOR_BATCH_ROWS,
      transform(row: Row, _enc, done) {
        try {
          rows += 1;
          done(null, query.toRecord(row));
        } catch (err) {
          done(err as Error);
        }
      },
    });
    const csv = csvStringifier();
    csv.write(query.header);
    setCsvHeaders(res, query.fileName);
    await pipeline(cursor, toRecords, csv, batchWrites(), res);
    await client.query('RESET jit');
    manager.releaseConnection(client);
    return { rows, completed: true };
  } catch (err) {
    await manager.destroyConnection(client).catch(() => undefined);
    // The client went away: nobody to answer. A database failure after the first bytes were
    // sent cannot become a JSON error any more: the response is cut short (pipeline destroyed it),
    // so the download fails visibly instead of looking complete.
    if (res.headersSent || res.destroyed) return { rows, completed: false, error: clientWentAway(err) ? undefined : err };
    // Nothing sent yet: the JSON error handler answers, not as a file download.
    res.removeHeader('Content-Disposition');
    throw err;
  }
}

/**
 * Records already in memory (a unit register, scorecards: thousands of rows at most) written
 * through the same stringifier with backpressure. Resolves when sent or when the client left.
 */
export async function sendRecordsAsCsv(res: Response, fileName: string, records: Iterable<CsvCell[]>): Promise<void> {
  setCsvHeaders(res, fileName);
  try {
    await pipeline(Readable.from(records), csvStringifier(), batchWrites(), res);
  } catch (err) {
    if (clientWentAway(err) || res.destroyed) return;
    throw err;
  }
}
