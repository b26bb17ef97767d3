/**
 * Pending uploads: no stored object is ever left without something that names it.
 *
 * An upload is stored BEFORE the database write that references it (a photo row, a level's
 * plan), so a crash, a kill or a lost database between the two would leave an object nobody
 * knows about. So, for every key:
 *   1. `record(keys)` inserts a `pending_uploads` row in its own committed statement, before the
 *      object is stored;
 *   2. the write that references the object calls `claim(keys, transaction)` inside its
 *      transaction: the rows are deleted there, committed together with the reference, or
 *      rolled back with it;
 *   3. if the write fails, the caller deletes the objects and then `release(keys)`;
 *   4. `reapOrphanUploads` deletes, for every row older than PENDING_UPLOAD_MAX_AGE_MINUTES,
 *      the object (unless a photo row, a photo's marks or a level's plan references its key:
 *      keyReferencedSql) and then the row.
 *      It runs at server start and every REAP_INTERVAL_MINUTES (server/index.ts).
 * A write that reaches its transaction after the reaper took its keys finds its rows gone:
 * `claim` refuses it (the objects are deleted), so no row ever points to a reaped object. The
 * reaper locks the rows it works on (FOR UPDATE SKIP LOCKED), and a claim holds the rows it
 * deleted until it commits, so the two never both succeed on one key.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { HttpError } from '../errors';
import type { ObjectStore } from '../storage/types';

/**
 * SQL true when a committed row names the object `key` (an SQL expression): a photo (full,
 * thumbnail or print copy), a photo's marked copy (full, thumbnail or print copy), or a level's plan.
 */
export function keyReferencedSql(key: string): string {
  return `(EXISTS (SELECT 1 FROM photos WHERE storage_key = ${key} OR thumb_key = ${key} OR print_key = ${key})
        OR EXISTS (SELECT 1 FROM photo_marks WHERE marked_key = ${key} OR marked_thumb_key = ${key} OR marked_print_key = ${key})
        OR EXISTS (SELECT 1 FROM levels WHERE plan_key = ${key}))`;
}

/** A pending row this old belongs to a write that never committed (a real one takes seconds). */
export const PENDING_UPLOAD_MAX_AGE_MINUTES = 30;
/** How often the server looks for orphans. */
export const REAP_INTERVAL_MINUTES = 10;
/** Keys handled per reaper round (each round is one transaction and one store call). */
const REAP_BATCH = 500;

export interface PendingUploads {
  /** Inserts a row per key, committed at once (not inside any transaction). */
  record(keys: readonly string[]): Promise<void>;
  /**
   * Deletes the rows inside the write's transaction. Throws 503 `upload_expired` when a row is
   * missing: the reaper took it, so the object is gone and must not be referenced.
   */
  claim(keys: readonly string[], transaction: Transaction): Promise<void>;
  /** Deletes the rows after the objects were deleted (the write failed or was a replay). */
  release(keys: readonly string[]): Promise<void>;
}

export function pendingUploads(sequelize: Sequelize): PendingUploads {
  return {
    async record(keys) {
      if (keys.length === 0) return;
      await sequelize.query(`INSERT INTO pending_uploads (key) SELECT unnest($1::text[]) ON CONFLICT (key) DO NOTHING`, { bind: [keys] });
    },
    async claim(keys, transaction) {
      if (keys.length === 0) return;
      const claimed = await sequelize.query<{ key: string }>(`DELETE FROM pending_uploads WHERE key = ANY($1::text[]) RETURNING key`, {
        bind: [keys],
        type: QueryTypes.SELECT,
        transaction,
      });
      if (claimed.length !== new Set(keys).size) {
        throw new HttpError(503, 'upload_expired', 'The upload took too long and its files were discarded. Send it again.');
      }
    },
    async release(keys) {
      if (keys.length === 0) return;
      await sequelize.query(`DELETE FROM pending_uploads WHERE key = ANY($1::text[])`, { bind: [keys] });
    },
  };
}

export interface ReapResult {
  /** Objects deleted: pending, old, and referenced by nothing. */
  deleted: number;
  /** Pending rows dropped whose key a committed row references (nothing deleted for them). */
  referenced: number;
}

/**
 * Deletes orphaned uploads: objects whose pending row is older than `olderThanMinutes` and
 * whose key no photo row and no level's plan references; then their rows. A store failure
 * rolls the round back (rows kept, tried again next time) and is thrown.
 */
export async function reapOrphanUploads(
  sequelize: Sequelize,
  store: ObjectStore,
  options: { olderThanMinutes?: number } = {},
): Promise<ReapResult> {
  const minutes = options.olderThanMinutes ?? PENDING_UPLOAD_MAX_AGE_MINUTES;
  const total: ReapResult = { deleted: 0, referenced: 0 };
  for (;;) {
    const round = await sequelize.transaction(async (transaction) => {
      const rows = await sequelize.query<{ key: string; referenced: boolean }>(
        `SELECT p.key, ${keyReferencedSql('p.key')} AS referenced
           FROM pending_uploads p
          WHERE p.created_at < now() - make_interval(mins => $1)
          ORDER BY p.created_at
          LIMIT $2
          FOR UPDATE OF p SKIP LOCKED`,
        { bind: [minutes, REAP_BATCH], type: QueryTypes.SELECT, transaction },
      );
      const orphans = rows.filter((r) => !r.referenced).map((r) => r.key);
      if (orphans.length > 0) await store.delete(orphans);
      if (rows.length > 0) {
        await sequelize.query(`DELETE FROM pending_uploads WHERE key = ANY($1::text[])`, { bind: [rows.map((r) => r.key)], transaction });
      }
      return { rows: rows.length, deleted: orphans.length, referenced: rows.length - orphans.length };
    });
    total.deleted += round.deleted;
    total.referenced += round.referenced;
    if (round.rows < REAP_BATCH) return total;
  }
}
