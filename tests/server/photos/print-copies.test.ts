/**
 * Print copies of photos (server/services/photos.ts PRINT_SIZE, server/services/printCopies.ts,
 * server/reports/photos.ts): made at upload beside the thumbnail, the size of the largest box a
 * report prints a photo in at 150 dpi; read by a report as they are (the full photo is not read);
 * made once, by the first report, for a photo stored before; deleted with the photo; and reaped
 * like any other upload. Against the real PostgreSQL and the local S3 fake.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import sharp from 'sharp';
import type { Database } from '../../../server/db';
import { Photo } from '../../../server/models';
import { PHOTO_BOX, THIRD_BOX } from '../../../server/reports/closeOut';
import { jpegSize, PhotoPrefetch } from '../../../server/reports/photos';
import { pendingUploads, PENDING_UPLOAD_MAX_AGE_MINUTES, reapOrphanUploads } from '../../../server/services/pendingUploads';
import {
  keysOf,
  photoRowValues,
  pixelsFor,
  PRINT_BOX_POINTS,
  PRINT_SIZE,
  processPhoto,
  withStoredPhotos,
  type StoredPhoto,
} from '../../../server/services/photos';
import { keepPrintCopy, printCopyKeeper } from '../../../server/services/printCopies';
import type { ObjectStore } from '../../../server/storage/types';
import { connectTestDb } from '../../support/db';
import { buildPhotoOwner } from '../../support/factories';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { recordingStore } from '../reports/support';
import { halvesImage } from './fixtures';

let db: Database;
let fake: FakeS3;

beforeAll(async () => {
  db = await connectTestDb();
  fake = await startFakeS3();
});
afterAll(async () => {
  await fake.close();
  await db.close();
});

async function bytesOf(store: ObjectStore, key: string): Promise<Buffer> {
  const object = await store.get(key);
  if (!object) throw new Error(`${key} is not in the store`);
  const chunks: Buffer[] = [];
  for await (const chunk of object.body) chunks.push(Buffer.from(chunk as Buffer));
  return Buffer.concat(chunks);
}

/** Stores and writes photos of `width` × `height` as an upload does. */
async function upload(width: number, height: number, n = 1): Promise<StoredPhoto[]> {
  const who = await buildPhotoOwner();
  const processed = await processPhoto(await halvesImage(width, height).jpeg().toBuffer());
  return withStoredPhotos(
    fake.store,
    Array.from({ length: n }, () => processed),
    async (stored, claim) =>
      db.sequelize.transaction(async (transaction) => {
        await claim(transaction);
        await Photo.bulkCreate(photoRowValues(stored, who), { transaction });
        return stored;
      }),
    { pending: pendingUploads(db.sequelize) },
  );
}

/** A photo as stored before print copies were made: its row without a print key, its print copy gone. */
async function storedBefore(width = 2016, height = 1512): Promise<StoredPhoto> {
  const [p] = await upload(width, height);
  await db.sequelize.query(`UPDATE photos SET print_key = NULL WHERE id = $1`, { bind: [p!.id] });
  await fake.store.delete([p!.printKey]);
  return p!;
}

async function printKeyOf(photoId: string): Promise<string | null> {
  const [row] = await db.sequelize.query<{ print_key: string | null }>(`SELECT print_key FROM photos WHERE id = $1`, {
    bind: [photoId],
    type: QueryTypes.SELECT,
  });
  return row!.print_key;
}

const box = PHOTO_BOX;

describe('the print size', () => {
  it('is the close-out report pair box at 150 dpi: points / 72 × 150', () => {
    // 1 pt = 1/72 in (PDF's default user-space unit, ISO 32000-1 §8.3.2.3). The box is half of the
    // 524 pt text width (612 pt US Letter less two 44 pt margins) less the 14 pt gap: 255 pt, 4:3.
    expect(PRINT_BOX_POINTS).toEqual(PHOTO_BOX);
    expect(PRINT_BOX_POINTS).toEqual({ width: 255, height: 191.25 });
    // 255 / 72 × 150 = 531.25 px; 191.25 / 72 × 150 = 398.4375 px.
    expect(pixelsFor(255)).toBe(531);
    expect(pixelsFor(191.25)).toBe(398);
    expect(PRINT_SIZE).toEqual({ width: 531, height: 398 });
    // Every other box a report prints a stored photo in is smaller, so one copy serves them all.
    expect(THIRD_BOX.width).toBeLessThan(PHOTO_BOX.width);
    expect(THIRD_BOX.height).toBeLessThan(PHOTO_BOX.height);
  });
});

describe('at upload', () => {
  it.each([
    // Landscape 4:3 like the box: fills it (2016 × 531/2016 = 531; 1512 × 531/2016 = 398.25 → 398).
    [2016, 1512, 531, 398],
    // Portrait 3:4: held by the height (398; 1512 × 398/2016 = 298.5, rounded by libvips to 299).
    [1512, 2016, 299, 398],
    // Smaller than the box: kept as it is, never enlarged.
    [300, 200, 300, 200],
  ])('a %i × %i photo is stored with a %i × %i print copy beside the thumbnail', async (w, h, pw, ph) => {
    const [p] = await upload(w, h);
    expect(p!.printKey).toBe(`photos/${p!.id}-print.jpg`);
    expect(await printKeyOf(p!.id)).toBe(p!.printKey);
    const copy = await bytesOf(fake.store, p!.printKey);
    expect(await sharp(copy).metadata()).toMatchObject({ format: 'jpeg', width: pw, height: ph });
    // The header reader the report uses agrees with libvips.
    expect(jpegSize(copy)).toEqual({ width: pw, height: ph });
  });
});

describe('in a report', () => {
  it('reads the print copy as it is and never the full photo', async () => {
    const [p] = await upload(2016, 1512);
    const store = recordingStore(fake.store);
    const prefetch = new PhotoPrefetch(store, [{ key: p!.key, box, photoId: p!.id, printKey: p!.printKey }]);
    const photo = await prefetch.take(0);
    expect(store.reads).toEqual([p!.printKey]);
    // Embedded byte for byte: nothing was decoded or re-encoded.
    expect(photo!.jpeg.equals(await bytesOf(fake.store, p!.printKey))).toBe(true);
    expect({ width: photo!.width, height: photo!.height }).toEqual({ width: 531, height: 398 });
  });

  it('makes the copy of a photo stored before print copies, once, and the next report reads it', async () => {
    const p = await storedBefore();
    const keep = printCopyKeeper({ sequelize: db.sequelize, store: fake.store });
    const first = recordingStore(fake.store);
    const photo = await new PhotoPrefetch(first, [{ key: p.key, box, photoId: p.id, printKey: null }], 8, keep).take(0);
    expect(first.reads).toEqual([p.key]);
    expect({ width: photo!.width, height: photo!.height }).toEqual({ width: 531, height: 398 });
    const kept = await printKeyOf(p.id);
    expect(kept).toMatch(new RegExp(`^photos/${p.id}-print-[0-9a-f-]{36}\\.jpg$`));
    expect((await bytesOf(fake.store, kept!)).equals(photo!.jpeg)).toBe(true);
    // Claimed in the transaction that named it: nothing pending is left for the reaper.
    const pending = await db.sequelize.query(`SELECT 1 FROM pending_uploads WHERE key = $1`, { bind: [kept], type: QueryTypes.SELECT });
    expect(pending).toHaveLength(0);

    const second = recordingStore(fake.store);
    await new PhotoPrefetch(second, [{ key: p.key, box, photoId: p.id, printKey: kept }], 8, keep).take(0);
    expect(second.reads).toEqual([kept]);
  });

  it('two reports making the same copy at once keep one, and the other copy is deleted', async () => {
    const p = await storedBefore();
    const copy = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#808080' } }).jpeg().toBuffer();
    const deps = { sequelize: db.sequelize, store: fake.store, log: () => undefined };
    const before = new Set(await fake.keys());
    const results = await Promise.all([keepPrintCopy(deps, { photoId: p.id, sourceKey: p.key }, copy), keepPrintCopy(deps, { photoId: p.id, sourceKey: p.key }, copy)]);
    expect(results.sort()).toEqual([false, true]);
    const added = (await fake.keys()).filter((k) => !before.has(k));
    expect(added).toEqual([await printKeyOf(p.id)]);
  });

  it('a print copy named but missing from the store prints from the photo, and the report goes on', async () => {
    const [p] = await upload(2016, 1512);
    await fake.store.delete([p!.printKey]);
    const store = recordingStore(fake.store);
    const photo = await new PhotoPrefetch(store, [{ key: p!.key, box, photoId: p!.id, printKey: p!.printKey }], 8, printCopyKeeper({ sequelize: db.sequelize, store: fake.store })).take(0);
    expect(store.reads).toEqual([p!.printKey, p!.key]);
    expect(jpegSize(photo!.jpeg)).toEqual({ width: 531, height: 398 });
    // The row keeps its key (a report does not overwrite a named copy).
    expect(await printKeyOf(p!.id)).toBe(p!.printKey);
  });
});

describe('deleting and reaping', () => {
  it('a failed write deletes the print copy with the photo and its thumbnail', async () => {
    const who = await buildPhotoOwner();
    const processed = await processPhoto(await halvesImage(640, 480).jpeg().toBuffer());
    const before = await fake.keys();
    let tried: string[] = [];
    await expect(
      withStoredPhotos(
        fake.store,
        [processed],
        async (stored) => {
          tried = keysOf(stored);
          throw new Error('the finding could not be written');
        },
        { pending: pendingUploads(db.sequelize), log: () => undefined },
      ),
    ).rejects.toThrow(/could not be written/);
    expect(tried.filter((k) => k.endsWith('-print.jpg'))).toHaveLength(1);
    expect(await fake.keys()).toEqual(before);
    expect(await Photo.count({ where: { jobId: who.jobId } })).toBe(0);
  });

  it('keysOf names every variant of a photo: full, thumbnail and print copy (when it has one)', () => {
    const id = randomUUID();
    expect(keysOf([{ key: `photos/${id}.jpg`, thumbKey: `photos/${id}-thumb.jpg`, printKey: `photos/${id}-print.jpg` }])).toEqual([
      `photos/${id}.jpg`,
      `photos/${id}-thumb.jpg`,
      `photos/${id}-print.jpg`,
    ]);
    expect(keysOf([{ key: `photos/${id}.jpg`, thumbKey: `photos/${id}-thumb.jpg`, printKey: null }])).toHaveLength(2);
  });

  it('the reaper deletes an orphaned print copy and keeps one a photo or its marks name', async () => {
    const p = await storedBefore();
    const pending = pendingUploads(db.sequelize);
    const orphan = `photos/${p.id}-print-${randomUUID()}.jpg`;
    const named = `photos/${p.id}-print-${randomUUID()}.jpg`;
    const markedPrint = `photos/${p.id}-marked-${randomUUID()}-print.jpg`;
    await pending.record([orphan, named, markedPrint]);
    for (const k of [orphan, named, markedPrint]) await fake.store.put(k, Buffer.from([0xff, 0xd8, 0xff]), 'image/jpeg');
    await db.sequelize.query(`UPDATE photos SET print_key = $1 WHERE id = $2`, { bind: [named, p.id] });
    await db.sequelize.query(
      `INSERT INTO photo_marks (photo_id, job_id, marks, version, marked_key, marked_thumb_key, marked_print_key, updated_at)
       SELECT id, job_id, '[]'::jsonb, 1, $2, $3, $4, now() FROM photos WHERE id = $1`,
      { bind: [p.id, `photos/${p.id}-marked-x.jpg`, `photos/${p.id}-marked-x-thumb.jpg`, markedPrint] },
    );
    await db.sequelize.query(`UPDATE pending_uploads SET created_at = now() - make_interval(mins => $2) WHERE key = ANY($1::text[])`, {
      bind: [[orphan, named, markedPrint], PENDING_UPLOAD_MAX_AGE_MINUTES + 5],
    });
    await reapOrphanUploads(db.sequelize, fake.store);
    expect(await fake.store.exists(orphan)).toBe(false);
    expect(await fake.store.exists(named)).toBe(true);
    expect(await fake.store.exists(markedPrint)).toBe(true);
  });
});
