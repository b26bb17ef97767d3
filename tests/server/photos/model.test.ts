/**
 * The photos table (migration 20261201030000-create-photos) and the all-or-nothing contract of
 * server/services/photos.ts against the real PostgreSQL and the local S3 fake: rows and stored
 * objects appear together or not at all.
 */
import { randomUUID } from 'node:crypto';
import type { Database } from '../../../server/db';
import { Photo } from '../../../server/models';
import { pendingUploads } from '../../../server/services/pendingUploads';
import { keysOf, photoRowValues, processPhoto, withStoredPhotos, type ProcessedPhoto } from '../../../server/services/photos';
import { connectTestDb } from '../../support/db';
import { buildPhotoOwner } from '../../support/factories';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { halvesImage } from './fixtures';

let db: Database;
let fake: FakeS3;
let photo: ProcessedPhoto;

beforeAll(async () => {
  db = await connectTestDb();
  fake = await startFakeS3();
  photo = await processPhoto(await halvesImage(90, 60).png().toBuffer());
});
afterAll(async () => {
  await fake.close();
  await db.close();
});

describe('photos rows with their stored objects', () => {
  it('writes the rows in the transaction after the objects are stored', async () => {
    const who = await buildPhotoOwner();
    // No owner yet: finding_id / fix_id reference tables made by later migrations.
    const rows = await withStoredPhotos(
      fake.store,
      [photo, photo],
      (stored, claim) =>
        db.sequelize.transaction(async (transaction) => {
          await claim(transaction);
          return Photo.bulkCreate(photoRowValues(stored, who), { transaction });
        }),
      { pending: pendingUploads(db.sequelize) },
    );
    const saved = await Photo.findAll({ where: { jobId: who.jobId }, order: [['createdAt', 'ASC']] });
    expect(saved).toHaveLength(2);
    for (const row of saved) {
      expect(row.toJSON()).toMatchObject({
        jobId: who.jobId,
        uploadedBy: who.uploadedBy,
        findingId: null,
        fixId: null,
        storageKey: `photos/${row.id}.jpg`,
        thumbKey: `photos/${row.id}-thumb.jpg`,
        printKey: `photos/${row.id}-print.jpg`,
        contentType: 'image/jpeg',
        sourceType: 'image/png',
        byteSize: photo.full.length,
        width: 90,
        height: 60,
        sha256: photo.sha256,
      });
      expect(row.createdAt).toBeInstanceOf(Date);
      expect(await fake.store.exists(row.storageKey)).toBe(true);
      expect(await fake.store.exists(row.thumbKey)).toBe(true);
      expect(await fake.store.exists(row.printKey!)).toBe(true);
    }
    expect(rows.map((r) => r.id).sort()).toEqual(saved.map((r) => r.id).sort());
  });

  it('a failed transaction leaves neither rows nor stored objects', async () => {
    const who = await buildPhotoOwner();
    const before = await fake.keys();
    let tried: string[] = [];
    await expect(
      withStoredPhotos(
        fake.store,
        [photo, photo],
        (stored, claim) => {
          tried = keysOf(stored);
          return db.sequelize.transaction(async (transaction) => {
            await claim(transaction);
            await Photo.bulkCreate(photoRowValues(stored, who), { transaction });
            // The finding's own insert fails after the photo rows were written.
            await db.sequelize.query('SELECT 1/0', { transaction });
          });
        },
        { pending: pendingUploads(db.sequelize) },
      ),
    ).rejects.toThrow(/division by zero/);
    // Full, thumbnail and print copy of each: all deleted again.
    expect(tried).toHaveLength(6);
    expect(await Photo.count({ where: { jobId: who.jobId } })).toBe(0);
    expect(await fake.keys()).toEqual(before);
  });

  it('refuses a row whose keys do not match its id, or with two owners', async () => {
    const who = await buildPhotoOwner();
    const [row] = photoRowValues(
      [{ id: randomUUID(), key: 'photos/x.jpg', thumbKey: 'photos/x-thumb.jpg', printKey: 'photos/x-print.jpg', contentType: 'image/jpeg', byteSize: 10, width: 1, height: 1, sha256: 'a'.repeat(64), sourceType: 'image/jpeg' }],
      who,
    );
    await expect(Photo.create(row!)).rejects.toThrow(/photos_keys_check/);
    const id = randomUUID();
    await expect(
      Photo.create({ ...row!, id, storageKey: `photos/${id}.jpg`, thumbKey: `photos/${id}-thumb.jpg`, findingId: randomUUID(), fixId: randomUUID() }),
    ).rejects.toThrow(/photos_one_owner_check/);
    await expect(
      Photo.create({ ...row!, id, storageKey: `photos/${id}.jpg`, thumbKey: `photos/${id}-thumb.jpg`, contentType: 'image/svg+xml' }),
    ).rejects.toThrow(/photos_content_type_check/);
    // A print copy is named after its own photo's id, like the full photo and the thumbnail.
    await expect(
      Photo.create({ ...row!, id, storageKey: `photos/${id}.jpg`, thumbKey: `photos/${id}-thumb.jpg`, printKey: `photos/${randomUUID()}-print.jpg` }),
    ).rejects.toThrow(/photos_print_key_check/);
  });
});
