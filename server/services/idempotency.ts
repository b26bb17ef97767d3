/**
 * Idempotent writes (IETF draft "The Idempotency-Key HTTP Header Field").
 *
 * A handler wraps its write in `idempotentWrite(req, res, work)`. In ONE transaction it claims
 * the key (user, key) with INSERT ... ON CONFLICT DO NOTHING, runs the write, and stores the
 * response; so either the record and its stored response both exist, or neither does.
 * - the same key again with the same request → the stored response is replayed (same status);
 * - the same key with another request body, path or file (uploads: each file's SHA-256) → 422;
 * - a replay while the first is still running waits on the unique index, then replays.
 * Keys are kept 7 days (see security.md), longer than a phone's outbox keeps a request.
 * Without the header the write simply runs once (scripts, tests that do not care).
 */
import { createHash } from 'node:crypto';
import type { Request, Response } from 'express';
import { QueryTypes, type Transaction } from 'sequelize';
import { badRequest, conflict, unprocessable } from '../errors';
import { uploadDigests } from '../middleware/upload';
import { faultPause } from '../testing/faultHooks';
import { pendingUploads } from './pendingUploads';
import { discardStoredPhotos, keysOf, withStoredPhotos, type ProcessedPhoto, type StoredPhoto } from './photos';

export const IDEMPOTENCY_RETENTION_DAYS = 7;
const KEY_PATTERN = /^[A-Za-z0-9._:-]{8,100}$/;

export interface WriteResult {
  status: number;
  body: unknown;
}

/** Method, path, body and, for an upload, every file's field, size and SHA-256 (in order). */
function fingerprint(req: Request): string {
  const hash = createHash('sha256')
    .update(`${req.method} ${req.baseUrl}${req.path}\n`)
    .update(JSON.stringify(req.body ?? null));
  const files = uploadDigests(req);
  if (files.length > 0) hash.update(`\nfiles ${JSON.stringify(files)}`);
  return hash.digest('hex');
}

export async function idempotentWrite(
  req: Request,
  res: Response,
  work: (transaction: Transaction) => Promise<WriteResult>,
): Promise<void> {
  const sequelize = req.app.get('sequelize') as import('sequelize').Sequelize;
  const key = req.get('idempotency-key');
  if (key !== undefined && !KEY_PATTERN.test(key)) {
    throw badRequest('Idempotency-Key: use 8 to 100 letters, digits, dots, dashes, colons or underscores.', {
      'Idempotency-Key': 'Not a valid key.',
    });
  }
  const userId = req.user?.id;
  const result = await sequelize.transaction(async (transaction) => {
    if (!key || !userId) return { replay: false, ...(await work(transaction)) };
    const print = fingerprint(req);
    // The first request with a key holds this lock until its transaction ends; a replay that
    // arrives meanwhile is told to retry (409) instead of waiting on the unique index.
    const [lock] = await sequelize.query<{ locked: boolean }>(
      `SELECT pg_try_advisory_xact_lock(hashtextextended($1, 0)) AS locked`,
      { bind: [`idempotency:${userId}:${key}`], type: QueryTypes.SELECT, transaction },
    );
    if (!lock?.locked) {
      throw conflict('A request with this Idempotency-Key is still being processed. Retry in a moment.', 'idempotency_in_flight');
    }
    const claimed = await sequelize.query<{ id: string }>(
      `INSERT INTO idempotency_keys (user_id, key, fingerprint, response_status, created_at)
       VALUES ($1, $2, $3, 0, now())
       ON CONFLICT (user_id, key) DO NOTHING
       RETURNING id`,
      { bind: [userId, key, print], type: QueryTypes.SELECT, transaction },
    );
    if (claimed.length === 0) {
      const [stored] = await sequelize.query<{ fingerprint: string; response_status: number; response_body: unknown }>(
        `SELECT fingerprint, response_status, response_body FROM idempotency_keys WHERE user_id = $1 AND key = $2`,
        { bind: [userId, key], type: QueryTypes.SELECT, transaction },
      );
      if (!stored || stored.fingerprint !== print) {
        throw unprocessable('This Idempotency-Key was already used for a different request.');
      }
      return { replay: true, status: stored.response_status, body: stored.response_body };
    }
    const outcome = await work(transaction);
    await faultPause(req); // tests only: server/testing/faultHooks.ts (refused in production)
    await sequelize.query(`UPDATE idempotency_keys SET response_status = $1, response_body = $2 WHERE id = $3`, {
      bind: [outcome.status, JSON.stringify(outcome.body ?? null), claimed[0]!.id],
      transaction,
    });
    return { replay: false, ...outcome };
  });
  if (result.replay) res.set('Idempotent-Replayed', 'true');
  if (result.body === undefined || result.body === null) res.status(result.status).end();
  else res.status(result.status).json(result.body);
}

/**
 * True when this user already holds a finished answer under the request's Idempotency-Key.
 * Upload routes ask before reading the body: a retry of an answered upload goes straight to its
 * replay instead of being refused by a check that the first request's own write now fails.
 */
export async function alreadyAnswered(req: Request): Promise<boolean> {
  const key = req.get('idempotency-key');
  if (!key || !req.user || !KEY_PATTERN.test(key)) return false;
  const sequelize = req.app.get('sequelize') as import('sequelize').Sequelize;
  const rows = await sequelize.query<{ n: number }>(
    `SELECT 1 AS n FROM idempotency_keys WHERE user_id = $1 AND key = $2 AND response_status <> 0`,
    { bind: [req.user.id, key], type: QueryTypes.SELECT },
  );
  return rows.length > 0;
}

/**
 * Replays the stored answer of an already answered request (same checks as idempotentWrite: a
 * different body or file under the key is a 422) and returns true; false when there is none,
 * so the caller goes on to do the work (process, store) only for a request not yet answered.
 */
export async function replayIfAnswered(req: Request, res: Response): Promise<boolean> {
  if (!(await alreadyAnswered(req))) return false;
  await idempotentWrite(req, res, async () => {
    throw badRequest('This request was already answered.');
  });
  return true;
}

export interface PhotoWriteOptions {
  store: import('../storage/types').ObjectStore;
  /** The request's photos, read and re-encoded (services/photos.ts processPhotos). */
  processed: readonly ProcessedPhoto[];
  log?: (message: string, err?: unknown) => void;
  /** For the log: whose photos a replay discarded ("of a replayed fix"). */
  what: string;
}

/**
 * idempotentWrite for a write with photos: the photos are stored first (withStoredPhotos: deleted
 * again if the write fails), then `work` runs in the write's transaction and must claim them. When
 * the write lost a race with an identical retry, the first request's answer was replayed and the
 * photos stored by this one are referenced by nothing: they are deleted.
 */
export async function idempotentPhotoWrite(
  req: Request,
  res: Response,
  options: PhotoWriteOptions,
  work: (transaction: Transaction, photos: { stored: StoredPhoto[]; claim: (transaction: Transaction) => Promise<void> }) => Promise<WriteResult>,
): Promise<void> {
  const { store, processed, log, what } = options;
  const pending = pendingUploads(req.app.get('sequelize') as import('sequelize').Sequelize);
  await withStoredPhotos(
    store,
    processed,
    async (stored, claim) => {
      await idempotentWrite(req, res, (transaction) => work(transaction, { stored, claim }));
      if (res.get('Idempotent-Replayed') === 'true' && stored.length > 0) {
        await discardStoredPhotos(store, keysOf(stored), { pending, log }, what);
      }
    },
    { pending, log },
  );
}

/** Deletes keys past their retention; run by the scheduler. */
export async function pruneIdempotencyKeys(sequelize: import('sequelize').Sequelize): Promise<number> {
  const [, meta] = await sequelize.query(
    `DELETE FROM idempotency_keys WHERE created_at < now() - ($1 || ' days')::interval`,
    { bind: [String(IDEMPOTENCY_RETENTION_DAYS)] },
  );
  return (meta as { rowCount?: number })?.rowCount ?? 0;
}
