/**
 * Print copies made late: a photo stored before print copies were made at upload (or a marked
 * copy flattened before then) has none. The first report that prints it makes one from the stored
 * photo (server/reports/photos.ts) and hands it here to keep, so the next report reads the small
 * copy instead of decoding the full photo again.
 *
 * Kept the way every upload is (server/services/pendingUploads.ts): the key is recorded as pending,
 * the object stored, then the row that names it is written in a transaction that claims it. The
 * key is fresh each time (`photos/<id>-print-<uuid>.jpg`), so two reports printing the same photo
 * at once each store their own copy; the first to write the row wins and the other deletes its
 * copy. A failure here never fails the report: the copy made is printed anyway and the failure
 * logged (a copy left behind is the reaper's).
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes, type Sequelize } from 'sequelize';
import type { ObjectStore } from '../storage/types';
import { pendingUploads } from './pendingUploads';
import { discardStoredPhotos, PHOTO_CONTENT_TYPE, photoKeys } from './photos';

/** What a report knows of the photo it printed without a print copy. */
export interface PrintCopySource {
  photoId: string;
  /** The key the copy was made from: the photo's own (`photos/<id>.jpg`) or its marked copy. */
  sourceKey: string;
}

export type KeepPrintCopy = (source: PrintCopySource, jpeg: Buffer) => Promise<void>;

export interface PrintCopyDeps {
  sequelize: Sequelize;
  store: ObjectStore;
  log?: (message: string, err?: unknown) => void;
}

/**
 * Keeps a print copy made for `source`: stored, and recorded on the photo (photos.print_key) or on
 * its marks (photo_marks.marked_print_key, only while `sourceKey` is still the marked copy: marks
 * changed meanwhile made a new one with its own print copy). Resolves true when recorded.
 */
export async function keepPrintCopy(deps: PrintCopyDeps, source: PrintCopySource, jpeg: Buffer): Promise<boolean> {
  const { sequelize, store } = deps;
  const log = deps.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const pending = pendingUploads(sequelize);
  // The photo's own key is fixed by a database check (photos_keys_check); anything else is its marked copy.
  const marked = source.sourceKey !== photoKeys(source.photoId).key;
  const key = `photos/${source.photoId}-print-${randomUUID()}.jpg`;
  try {
    await pending.record([key]);
    await store.put(key, jpeg, PHOTO_CONTENT_TYPE);
    const kept = await sequelize.transaction(async (transaction) => {
      const rows = marked
        ? await sequelize.query(
            `UPDATE photo_marks SET marked_print_key = $1 WHERE photo_id = $2 AND marked_key = $3 AND marked_print_key IS NULL RETURNING photo_id`,
            { bind: [key, source.photoId, source.sourceKey], type: QueryTypes.SELECT, transaction },
          )
        : await sequelize.query(`UPDATE photos SET print_key = $1 WHERE id = $2 AND print_key IS NULL RETURNING id`, {
            bind: [key, source.photoId],
            type: QueryTypes.SELECT,
            transaction,
          });
      if (rows.length === 0) return false;
      await pending.claim([key], transaction);
      return true;
    });
    if (!kept) await discardStoredPhotos(store, [key], { pending, log }, 'not needed (another report kept its copy first)');
    return kept;
  } catch (err) {
    log(`could not keep the print copy of photo ${source.photoId}`, err);
    await discardStoredPhotos(store, [key], { pending, log }, 'after a failed print copy');
    return false;
  }
}

/** keepPrintCopy bound to its dependencies, for a report's PhotoPrefetch. */
export function printCopyKeeper(deps: PrintCopyDeps): KeepPrintCopy {
  return async (source, jpeg) => {
    await keepPrintCopy(deps, source, jpeg);
  };
}
