/**
 * Pending uploads and the orphan reaper (server/services/pendingUploads.ts) against the real
 * PostgreSQL and the local S3 fake:
 * - a crash between storing and committing (the keys recorded, the objects stored, the write
 *   never committed) leaves rows that name the objects, and the reaper deletes both once the
 *   rows are old enough, and not before;
 * - a committed photo (and a level's plan) is never reaped, even with a stale pending row;
 * - a write that reaches its transaction after the reaper took its keys is refused (503) and
 *   writes nothing, so no row ever points to a reaped object;
 * - a write in flight (its claim not yet committed) is skipped by the reaper.
 * Rows are aged by hand (created_at moved back) instead of waiting half an hour.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { Photo } from '../../../server/models';
import { pendingUploads, PENDING_UPLOAD_MAX_AGE_MINUTES, reapOrphanUploads } from '../../../server/services/pendingUploads';
import { keysOf, photoKeys, photoRowValues, processPhoto, storePhotos, withStoredPhotos, type ProcessedPhoto } from '../../../server/services/photos';
import type { ObjectStore } from '../../../server/storage/types';
import { connectTestDb } from '../../support/db';
import { buildLevel, buildPhotoOwner } from '../../support/factories';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { halvesImage } from './fixtures';

let db: Database;
let fake: FakeS3;
let photo: ProcessedPhoto;

beforeAll(async () => {
  db = await connectTestDb();
  fake = await startFakeS3();
  photo = await processPhoto(await halvesImage(64, 48).jpeg().toBuffer());
});
afterAll(async () => {
  await fake.close();
  await db.close();
});

async function pendingRows(keys: readonly string[]): Promise<string[]> {
  const rows = await db.sequelize.query<{ key: string }>(`SELECT key FROM pending_uploads WHERE key = ANY($1::text[]) ORDER BY key`, {
    bind: [keys],
    type: QueryTypes.SELECT,
  });
  return rows.map((r) => r.key);
}

/** Moves the rows' created_at back past the reaper's age (the crash happened long ago). */
async function age(keys: readonly string[], minutes = PENDING_UPLOAD_MAX_AGE_MINUTES + 5): Promise<void> {
  await db.sequelize.query(`UPDATE pending_uploads SET created_at = now() - make_interval(mins => $2) WHERE key = ANY($1::text[])`, {
    bind: [keys, minutes],
  });
}

async function existing(keys: readonly string[]): Promise<string[]> {
  const out: string[] = [];
  for (const key of keys) if (await fake.store.exists(key)) out.push(key);
  return out.sort();
}

/** Stores photos exactly as withStoredPhotos does up to its transaction, then "crashes": nothing commits. */
async function crashAfterStoring(count: number): Promise<string[]> {
  const ids = Array.from({ length: count }, () => randomUUID());
  const keys = keysOf(ids.map(photoKeys));
  await pendingUploads(db.sequelize).record(keys);
  await storePhotos(fake.store, Array.from({ length: count }, () => photo), ids);
  return keys.sort();
}

describe('a crash between storing and committing', () => {
  it('leaves pending rows naming the objects; the reaper deletes objects and rows once they are old, not before', async () => {
    const keys = await crashAfterStoring(2);
    expect(await pendingRows(keys)).toEqual(keys);
    expect(await existing(keys)).toEqual(keys);

    // Young rows: a write may still be on its way to its transaction.
    await reapOrphanUploads(db.sequelize, fake.store);
    expect(await existing(keys)).toEqual(keys);
    expect(await pendingRows(keys)).toEqual(keys);

    await age(keys);
    const result = await reapOrphanUploads(db.sequelize, fake.store);
    expect(result.deleted).toBeGreaterThanOrEqual(4);
    expect(await existing(keys)).toEqual([]);
    expect(await pendingRows(keys)).toEqual([]);
  });

  it('a store that refuses the delete keeps the rows, so the next round tries again', async () => {
    const keys = await crashAfterStoring(1);
    await age(keys);
    const refusing: ObjectStore = {
      location: 'refusing',
      put: (key, body, type) => fake.store.put(key, body, type),
      get: (key) => fake.store.get(key),
      exists: (key) => fake.store.exists(key),
      delete: () => Promise.reject(new Error('store down')),
    };
    await expect(reapOrphanUploads(db.sequelize, refusing)).rejects.toThrow('store down');
    expect(await pendingRows(keys)).toEqual(keys);
    expect(await existing(keys)).toEqual(keys);
    await reapOrphanUploads(db.sequelize, fake.store);
    expect(await existing(keys)).toEqual([]);
    expect(await pendingRows(keys)).toEqual([]);
  });
});

describe('committed uploads are never reaped', () => {
  it('a photo written through withStoredPhotos: its pending rows go with the commit; a stale row for its keys deletes nothing', async () => {
    const who = await buildPhotoOwner();
    const pending = pendingUploads(db.sequelize);
    const rows = await withStoredPhotos(
      fake.store,
      [photo],
      (stored, claim) =>
        db.sequelize.transaction(async (transaction) => {
          await claim(transaction);
          return Photo.bulkCreate(photoRowValues(stored, who), { transaction });
        }),
      { pending },
    );
    const keys = [rows[0]!.storageKey, rows[0]!.thumbKey].sort();
    expect(await pendingRows(keys)).toEqual([]);

    // Even a leftover row for a committed key (written by hand here) never deletes the object.
    await pending.record(keys);
    await age(keys);
    await reapOrphanUploads(db.sequelize, fake.store);
    expect(await existing(keys)).toEqual(keys);
    expect(await pendingRows(keys)).toEqual([]);
    expect(await Photo.count({ where: { id: rows[0]!.id } })).toBe(1);
  });

  it("a level's plan is referenced too", async () => {
    const who = await buildPhotoOwner();
    const level = await buildLevel(who.jobId);
    const key = `plans/${level.id}/${randomUUID()}.png`;
    await fake.store.put(key, Buffer.from('plan bytes'), 'image/png');
    await db.sequelize.query(
      `UPDATE levels SET plan_key = $2, plan_content_type = 'image/png', plan_source_type = 'image/png', plan_width = 10, plan_height = 10,
              plan_byte_size = 10, plan_uploaded_at = now(), plan_version = 1 WHERE id = $1`,
      { bind: [level.id, key] },
    );
    await pendingUploads(db.sequelize).record([key]);
    await age([key]);
    await reapOrphanUploads(db.sequelize, fake.store);
    expect(await fake.store.exists(key)).toBe(true);
    expect(await pendingRows([key])).toEqual([]);
  });
});

describe('the reaper and a write racing it', () => {
  it('a write whose keys were reaped is refused (503 upload_expired) and writes no row', async () => {
    const who = await buildPhotoOwner();
    const pending = pendingUploads(db.sequelize);
    let keys: string[] = [];
    const attempt = withStoredPhotos(
      fake.store,
      [photo],
      async (stored, claim) => {
        keys = keysOf(stored);
        // The request stalls here long enough for the reaper to take its keys.
        await age(keys);
        await reapOrphanUploads(db.sequelize, fake.store);
        return db.sequelize.transaction(async (transaction) => {
          await claim(transaction);
          return Photo.bulkCreate(photoRowValues(stored, who), { transaction });
        });
      },
      { pending },
    );
    await expect(attempt).rejects.toMatchObject({ status: 503, id: 'upload_expired' });
    expect(await Photo.count({ where: { jobId: who.jobId } })).toBe(0);
    expect(await existing(keys)).toEqual([]);
    expect(await pendingRows(keys)).toEqual([]);
  });

  it('skips the rows of a write whose transaction has claimed them but not committed yet', async () => {
    const who = await buildPhotoOwner();
    const pending = pendingUploads(db.sequelize);
    let keys: string[] = [];
    await withStoredPhotos(
      fake.store,
      [photo],
      async (stored, claim) => {
        keys = keysOf(stored);
        await age(keys);
        return db.sequelize.transaction(async (transaction) => {
          await claim(transaction);
          // Claimed, not committed: the reaper must neither wait for nor take these rows.
          await reapOrphanUploads(db.sequelize, fake.store);
          expect(await existing(keys)).toEqual([...keys].sort());
          return Photo.bulkCreate(photoRowValues(stored, who), { transaction });
        });
      },
      { pending },
    );
    expect(await Photo.count({ where: { jobId: who.jobId } })).toBe(1);
    expect(await existing(keys)).toEqual([...keys].sort());
    expect(await pendingRows(keys)).toEqual([]);
  });
});
