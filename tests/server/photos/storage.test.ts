/**
 * Object storage (server/storage) against the local S3 fake (s3rver through the real
 * @aws-sdk/client-s3), the disk fallback, and the store/remove contract of
 * server/services/photos.ts.
 */
import fs from 'node:fs/promises';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { loadEnv } from '../../../server/env';
import {
  PHOTO_CONTENT_TYPE,
  keysOf,
  processPhoto,
  removeStoredPhotos,
  storePhotos,
  withStoredPhotos,
} from '../../../server/services/photos';
import { createObjectStore, DiskObjectStore, InvalidObjectKeyError, S3ObjectStore, startLocalObjectStore } from '../../../server/storage';
import type { ObjectStore } from '../../../server/storage';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { halvesImage, memoryPending } from './fixtures';

async function readAll(body: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of body) chunks.push(Buffer.from(chunk as Uint8Array));
  return Buffer.concat(chunks);
}

let fake: FakeS3;
let diskDir: string;
beforeAll(async () => {
  fake = await startFakeS3();
  diskDir = await fs.mkdtemp(path.join(os.tmpdir(), 'trimout-disk-'));
});
afterAll(async () => {
  await fake.close();
  await fs.rm(diskDir, { recursive: true, force: true });
});

describe.each([
  ['S3 (s3rver)', () => fake.store],
  ['disk fallback', () => new DiskObjectStore(diskDir) as ObjectStore],
])('ObjectStore on %s', (_name, storeOf) => {
  it('puts, gets, checks and deletes an object', async () => {
    const store = storeOf();
    const body = Buffer.from('not really a jpeg, but bytes are bytes');
    await store.put('photos/round-trip.jpg', body, 'image/jpeg');
    expect(await store.exists('photos/round-trip.jpg')).toBe(true);
    const got = await store.get('photos/round-trip.jpg');
    expect(got).not.toBeNull();
    expect(got!.length).toBe(body.length);
    expect(got!.contentType).toBe('image/jpeg');
    expect((await readAll(got!.body)).equals(body)).toBe(true);

    await store.delete(['photos/round-trip.jpg', 'photos/never-there.jpg']);
    expect(await store.exists('photos/round-trip.jpg')).toBe(false);
    expect(await store.get('photos/round-trip.jpg')).toBeNull();
    await expect(store.delete([])).resolves.toBeUndefined();
  });

  it('keeps binary bodies byte for byte', async () => {
    const store = storeOf();
    const body = await halvesImage(64, 64).jpeg().toBuffer();
    await store.put('photos/binary.jpg', body, 'image/jpeg');
    const got = await store.get('photos/binary.jpg');
    expect((await readAll(got!.body)).equals(body)).toBe(true);
    await store.delete(['photos/binary.jpg']);
  });

  it.each(['../etc/passwd', '/photos/a.jpg', 'photos/../a.jpg', 'photos/./a.jpg', 'Photos/A.JPG', 'photos/a b.jpg', '', 'photos//a.jpg', 'photos/a.jpg\0'])(
    'refuses the key %j',
    async (key) => {
      const store = storeOf();
      await expect(store.put(key, Buffer.from('x'), 'text/plain')).rejects.toBeInstanceOf(InvalidObjectKeyError);
      await expect(store.get(key)).rejects.toBeInstanceOf(InvalidObjectKeyError);
      await expect(store.exists(key)).rejects.toBeInstanceOf(InvalidObjectKeyError);
      await expect(store.delete([key])).rejects.toBeInstanceOf(InvalidObjectKeyError);
    },
  );
});

describe('the local S3 fake', () => {
  it('runs s3rver on 127.0.0.1 with the bucket made', async () => {
    expect(fake.endpoint).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
    expect(fake.store).toBeInstanceOf(S3ObjectStore);
    expect(fake.store.location).toBe(`s3://trimout-photos at ${fake.endpoint}`);
  });

  it('falls back to plain disk, and says so, only when s3rver cannot run', async () => {
    const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'trimout-fallback-'));
    const logged: string[] = [];
    const local = await startLocalObjectStore({
      directory: dir,
      port: 0,
      bucket: 'trimout-photos',
      log: (m) => logged.push(m),
      loadS3rver: () => {
        throw new Error('Cannot find module s3rver');
      },
    });
    try {
      expect(local.kind).toBe('disk');
      expect(local.store).toBeInstanceOf(DiskObjectStore);
      expect(logged.join('\n')).toMatch(/could not run \(Cannot find module s3rver\); photos are stored on plain disk in .*disk-fallback/);
      await local.store.put('photos/x.jpg', Buffer.from('x'), 'image/jpeg');
      expect(await local.store.exists('photos/x.jpg')).toBe(true);
    } finally {
      await local.close();
      await fs.rm(dir, { recursive: true, force: true });
    }
  });

  it('stops with a clear message when its port is taken (no silent fallback)', async () => {
    const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'trimout-busy-'));
    const port = Number(new URL(fake.endpoint!).port);
    await expect(startLocalObjectStore({ directory: dir, port, bucket: 'trimout-photos', log: () => undefined })).rejects.toThrow(
      /port is in use\. Set S3_PORT/,
    );
    await fs.rm(dir, { recursive: true, force: true });
  });
});

describe('createObjectStore (from the environment)', () => {
  it('a store that cannot be reached answers 503 (an outage), not a 500', async () => {
    // A port nothing listens on: bind one, then close it.
    const port = await new Promise<number>((resolve) => {
      const srv = net.createServer().listen(0, '127.0.0.1', () => {
        const p = (srv.address() as { port: number }).port;
        srv.close(() => resolve(p));
      });
    });
    const store = createObjectStore(loadEnv({ NODE_ENV: 'development', S3_PORT: String(port) })) as S3ObjectStore;
    await expect(store.get('2f9c0a5e-7b1d-4c3e-9a8f-1d2e3f4a5b6c.jpg')).rejects.toMatchObject({ status: 503, id: 'unavailable' });
    store.close();
  });

  it('defaults to the local fake on S3_PORT outside production', () => {
    const store = createObjectStore(loadEnv({ NODE_ENV: 'development', S3_PORT: '4599' }));
    expect(store.location).toBe('s3://trimout-photos at http://127.0.0.1:4599');
    (store as S3ObjectStore).close();
  });

  it('uses S3_ENDPOINT and S3_BUCKET', () => {
    const store = createObjectStore(
      loadEnv({ NODE_ENV: 'production', SESSION_SECRET: 'x'.repeat(40), PUBLIC_URL: 'https://punch.example.org', S3_ENDPOINT: 'https://objects.example.org', S3_BUCKET: 'site-photos' }),
    );
    expect(store.location).toBe('s3://site-photos at https://objects.example.org');
    (store as S3ObjectStore).close();
  });

  it('uses the disk only when STORAGE_DISK_DIR is set, and never in production', () => {
    expect(createObjectStore(loadEnv({ NODE_ENV: 'development', STORAGE_DISK_DIR: diskDir }))).toBeInstanceOf(DiskObjectStore);
    expect(() => createObjectStore(loadEnv({ NODE_ENV: 'production', SESSION_SECRET: 'x'.repeat(40), PUBLIC_URL: 'https://punch.example.org', STORAGE_DISK_DIR: diskDir }))).toThrow(
      /development only/,
    );
  });

  it('refuses half a key pair and a bad bucket name', () => {
    expect(() => createObjectStore(loadEnv({ NODE_ENV: 'development', S3_ACCESS_KEY_ID: 'only-the-id' }))).toThrow(/both S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY/);
    expect(() => loadEnv({ NODE_ENV: 'development', S3_BUCKET: 'Bad_Bucket' })).toThrow(/S3_BUCKET: must be a valid S3 bucket name/);
  });
});

describe('storing photos: all or nothing', () => {
  let photo: Awaited<ReturnType<typeof processPhoto>>;
  beforeAll(async () => {
    photo = await processPhoto(await halvesImage(80, 40).jpeg().toBuffer());
  });

  it('stores full, thumbnail and print copy under server-made UUID keys', async () => {
    const stored = await storePhotos(fake.store, [photo, photo]);
    expect(stored).toHaveLength(2);
    for (const s of stored) {
      expect(s.key).toBe(`photos/${s.id}.jpg`);
      expect(s.thumbKey).toBe(`photos/${s.id}-thumb.jpg`);
      expect(s.printKey).toBe(`photos/${s.id}-print.jpg`);
      expect(s.id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
      expect(s).toMatchObject({ contentType: PHOTO_CONTENT_TYPE, byteSize: photo.full.length, width: 80, height: 40, sha256: photo.sha256, sourceType: 'image/jpeg' });
      const thumb = await fake.store.get(s.thumbKey);
      expect((await readAll(thumb!.body)).equals(photo.thumb)).toBe(true);
      const print = await fake.store.get(s.printKey);
      expect((await readAll(print!.body)).equals(photo.print)).toBe(true);
    }
    expect(stored[0]!.id).not.toBe(stored[1]!.id);
    await removeStoredPhotos(fake.store, keysOf(stored));
    for (const key of keysOf(stored)) expect(await fake.store.exists(key)).toBe(false);
  });

  it('removes what it wrote when a later write fails', async () => {
    const before = await fake.keys();
    let puts = 0;
    const failing: ObjectStore = {
      location: 'failing',
      put: async (key, body, type) => {
        puts += 1;
        if (puts === 3) throw new Error('the store went away');
        await fake.store.put(key, body, type);
      },
      get: (key) => fake.store.get(key),
      delete: (keys) => fake.store.delete(keys),
      exists: (key) => fake.store.exists(key),
    };
    await expect(storePhotos(failing, [photo, photo])).rejects.toThrow('the store went away');
    expect(await fake.keys()).toEqual(before);
  });

  it('withStoredPhotos records the keys as pending before storing, and deletes objects and records when the database work fails', async () => {
    const before = await fake.keys();
    const pending = memoryPending();
    let seen: string[] = [];
    await expect(
      withStoredPhotos(
        fake.store,
        [photo],
        async (stored) => {
          seen = keysOf(stored);
          expect([...pending.keys].sort()).toEqual([...seen].sort());
          for (const key of seen) expect(await fake.store.exists(key)).toBe(true);
          throw new Error('the transaction rolled back');
        },
        { pending },
      ),
    ).rejects.toThrow('the transaction rolled back');
    expect(seen).toHaveLength(3);
    expect(await fake.keys()).toEqual(before);
    expect(pending.keys.size).toBe(0);
  });

  it('withStoredPhotos keeps the pending records when the objects cannot be deleted (the reaper removes them later)', async () => {
    const pending = memoryPending();
    const logged: string[] = [];
    const undeletable: ObjectStore = {
      location: 'undeletable',
      put: (key, body, type) => fake.store.put(key, body, type),
      get: (key) => fake.store.get(key),
      exists: (key) => fake.store.exists(key),
      delete: async () => {
        throw new Error('the store refused');
      },
    };
    const failing = async (): Promise<never> => {
      throw new Error('the transaction rolled back');
    };
    await expect(withStoredPhotos(undeletable, [photo], failing, { pending, log: (m) => logged.push(m) })).rejects.toThrow('the transaction rolled back');
    expect(pending.keys.size).toBe(3);
    expect(logged.join('\n')).toMatch(/left for the reaper/);
    await removeStoredPhotos(fake.store, [...pending.keys]);
  });

  it('withStoredPhotos keeps the objects and returns the result when the work succeeds', async () => {
    const pending = memoryPending();
    const result = await withStoredPhotos(
      fake.store,
      [photo],
      async (stored, claim) => {
        await claim({} as never);
        return stored.map((s) => s.id);
      },
      { pending },
    );
    expect(await fake.store.exists(`photos/${result[0]}.jpg`)).toBe(true);
    expect(pending.keys.size).toBe(0);
    await removeStoredPhotos(fake.store, [`photos/${result[0]}.jpg`, `photos/${result[0]}-thumb.jpg`, `photos/${result[0]}-print.jpg`]);
  });
});
