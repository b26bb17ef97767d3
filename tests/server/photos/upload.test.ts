/**
 * The upload middleware (server/middleware/upload.ts) with processing, storage and serving,
 * in a small test-only Express app: status codes and messages for every refusal, nothing
 * stored on refusal, the server still serving afterwards, and the headers of a served photo.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import express from 'express';
import request from 'supertest';
import sharp from 'sharp';
import { errorHandler, notFound } from '../../../server/errors';
import { MAX_UPLOAD_BODY_BYTES, PHOTO_LIMITS, sweepUploadFolders, uploadPhotos, uploadedFiles } from '../../../server/middleware/upload';
import { PHOTO_MAX_AGE_SECONDS, processPhotos, sendPhoto, storePhotos, type StoredPhoto } from '../../../server/services/photos';
import { listenOnLoopback } from '../../support/app';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { waitFor } from '../../support/wait';
import { SAMPLE_HEIC, SVG, TEXT_AS_JPEG, halvesImage, phoneJpeg, pixelFloodPng } from './fixtures';

let fake: FakeS3;
const saved = new Map<string, StoredPhoto>();
let app: express.Express;
let jpeg: Buffer;

beforeAll(async () => {
  fake = await startFakeS3();
  jpeg = await halvesImage(120, 80).jpeg().toBuffer();
  app = express();
  app.get('/health', (_req, res) => {
    res.json({ ok: true });
  });
  app.post('/upload', uploadPhotos(), async (req, res) => {
    const processed = await processPhotos(uploadedFiles(req));
    const stored = await storePhotos(fake.store, processed);
    for (const s of stored) saved.set(s.id, s);
    res.status(201).json({ photos: stored, fields: { ...req.body } });
  });
  app.get('/photos/:id{/:variant}', async (req, res) => {
    const photo = saved.get(req.params.id);
    if (!photo) throw notFound('Photo not found.');
    await sendPhoto(fake.store, res, { id: photo.id, storageKey: photo.key, thumbKey: photo.thumbKey, contentType: photo.contentType }, req.params.variant === 'thumb' ? 'thumb' : 'full');
  });
  app.use(errorHandler(() => undefined));
});

afterAll(async () => {
  await fake.close();
});

async function expectNothingStoredAndStillServing(before: string[]) {
  expect(await fake.keys()).toEqual(before);
  await request(app).get('/health').expect(200);
}

/** A multipart body built by hand, for bodies supertest would not send. */
function multipart(boundary: string, parts: string[], close = true): string {
  return parts.map((p) => `--${boundary}\r\n${p}\r\n`).join('') + (close ? `--${boundary}--\r\n` : '');
}

describe('temporary files', () => {
  it('writes each request into its own private folder and removes it once the response is done', async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-upload-root-'));
    const seen: string[] = [];
    const probe = express();
    probe.post('/upload', uploadPhotos({ tempRoot: root }), (req, res) => {
      for (const f of uploadedFiles(req)) {
        seen.push(f.path);
        expect(fs.statSync(f.path).mode & 0o777).toBe(0o600);
        expect(path.dirname(f.path).startsWith(path.join(root, 'req-'))).toBe(true);
        expect(f.sha256).toBe(createHash('sha256').update(jpeg).digest('hex'));
      }
      res.status(201).json({ n: seen.length });
    });
    probe.use(errorHandler(() => undefined));
    await request(probe).post('/upload').attach('photos', jpeg, 'a.jpg').attach('photos', jpeg, 'b.jpg').expect(201);
    expect(seen).toHaveLength(2);
    await waitFor(() => fs.readdirSync(root).length === 0, { what: 'the temporary folder to be emptied' });
    // Refused mid-body (an 11th file): nothing left either.
    let req = request(probe).post('/upload');
    for (let i = 0; i < 11; i++) req = req.attach('photos', jpeg, `p${i}.jpg`);
    await req.expect(413);
    await waitFor(() => fs.readdirSync(root).length === 0, { what: 'the temporary folder to be emptied' });
    fs.rmSync(root, { recursive: true, force: true });
  });

  it('refuses a root folder that other accounts can write to (500, nothing written there)', async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-upload-open-'));
    fs.chmodSync(root, 0o777);
    const probe = express();
    probe.post('/upload', uploadPhotos({ tempRoot: root }), (_req, res) => {
      res.status(201).end();
    });
    probe.use(errorHandler(() => undefined));
    const res = await request(probe).post('/upload').attach('photos', jpeg, 'a.jpg').expect(500);
    expect(res.body.error.id).toBe('internal');
    expect(fs.readdirSync(root)).toEqual([]);
    fs.rmSync(root, { recursive: true, force: true });
  });

  it('sweeps request folders a dead process left behind, and only old ones', async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-upload-sweep-'));
    const old = fs.mkdtempSync(path.join(root, 'req-'));
    fs.writeFileSync(path.join(old, 'x'), 'left by a crash');
    const past = new Date(Date.now() - 2 * 60 * 60 * 1000);
    fs.utimesSync(old, past, past);
    const fresh = fs.mkdtempSync(path.join(root, 'req-'));
    expect(await sweepUploadFolders(root)).toBe(1);
    expect(fs.readdirSync(root)).toEqual([path.basename(fresh)]);
    fs.rmSync(root, { recursive: true, force: true });
  });
});

describe('uploads that are accepted', () => {
  it('stores each photo under a new UUID key (never the file name) and serves it back', async () => {
    const res = await request(app)
      .post('/upload')
      .field('note', 'Condensate line sags near the unit')
      .attach('photos', await phoneJpeg(), { filename: '../../etc/IMG_0001.JPG', contentType: 'image/jpeg' })
      .attach('photos', SAMPLE_HEIC, { filename: 'IMG_0002.HEIC', contentType: 'image/heic' })
      .expect(201);
    expect(res.body.fields).toEqual({ note: 'Condensate line sags near the unit' });
    const photos = res.body.photos as StoredPhoto[];
    expect(photos.map((p) => p.sourceType)).toEqual(['image/jpeg', 'image/heic']);
    expect(photos.map((p) => [p.width, p.height])).toEqual([[100, 200], [64, 48]]);
    for (const p of photos) {
      expect(p.key).toBe(`photos/${p.id}.jpg`);
      expect(p.key).not.toMatch(/IMG|etc|\.\./i);
    }
    expect(await fake.keys()).toEqual(expect.arrayContaining(photos.flatMap((p) => [p.key, p.thumbKey])));

    const first = photos[0]!;
    const full = await request(app).get(`/photos/${first.id}`).buffer(true).parse(binary).expect(200);
    expect(full.headers['content-type']).toBe('image/jpeg');
    expect(full.headers['x-content-type-options']).toBe('nosniff');
    expect(full.headers['content-disposition']).toBe(`inline; filename="${first.id}.jpg"`);
    expect(full.headers['cache-control']).toBe(`private, max-age=${PHOTO_MAX_AGE_SECONDS}`);
    expect(Number(full.headers['content-length'])).toBe(first.byteSize);
    const meta = await sharp(full.body as Buffer).metadata();
    expect([meta.width, meta.height, meta.exif]).toEqual([100, 200, undefined]);

    const thumb = await request(app).get(`/photos/${first.id}/thumb`).buffer(true).parse(binary).expect(200);
    expect(thumb.headers['content-disposition']).toBe(`inline; filename="${first.id}-thumb.jpg"`);
    expect((await sharp(thumb.body as Buffer).metadata()).format).toBe('jpeg');
  });

  it('answers 404 when the stored object is missing', async () => {
    const res = await request(app).post('/upload').attach('photos', jpeg, 'a.jpg').expect(201);
    const photo = res.body.photos[0] as StoredPhoto;
    await fake.store.delete([photo.key]);
    const missing = await request(app).get(`/photos/${photo.id}`).expect(404);
    expect(missing.body).toEqual({ error: { id: 'not_found', message: 'Photo not found.' } });
  });
});

describe('uploads that are refused, with nothing stored and the server still serving', () => {
  let before: string[];
  beforeEach(async () => {
    before = await fake.keys();
  });

  it('a 0-byte file → 400', async () => {
    const res = await request(app).post('/upload').attach('photos', Buffer.alloc(0), 'empty.jpg').expect(400);
    expect(res.body.error).toEqual({ id: 'empty_photo', message: 'The photo is empty (0 bytes). Take or pick it again.' });
    await expectNothingStoredAndStillServing(before);
  });

  it('a text file renamed .jpg (declared image/jpeg) → 415', async () => {
    const res = await request(app)
      .post('/upload')
      .attach('photos', TEXT_AS_JPEG, { filename: 'photo.jpg', contentType: 'image/jpeg' })
      .expect(415);
    expect(res.body.error.message).toBe('This file is not an image. Photos must be JPEG, PNG, WebP or HEIC images.');
    await expectNothingStoredAndStillServing(before);
  });

  it('an SVG → 415', async () => {
    const res = await request(app).post('/upload').attach('photos', SVG, { filename: 'x.png', contentType: 'image/png' }).expect(415);
    expect(res.body.error.id).toBe('unsupported_photo_type');
    await expectNothingStoredAndStillServing(before);
  });

  it('a truncated JPEG → 400', async () => {
    const cut = jpeg.subarray(0, Math.floor(jpeg.length / 2));
    const res = await request(app).post('/upload').attach('photos', cut, 'cut.jpg').expect(400);
    expect(res.body.error.id).toBe('unreadable_photo');
    await expectNothingStoredAndStillServing(before);
  });

  it('a pixel flood → 413', async () => {
    const res = await request(app).post('/upload').attach('photos', pixelFloodPng(), 'flood.png').expect(413);
    expect(res.body.error.id).toBe('too_many_pixels');
    await expectNothingStoredAndStillServing(before);
  });

  it('one bad photo among good ones refuses the whole request', async () => {
    const res = await request(app)
      .post('/upload')
      .attach('photos', jpeg, 'a.jpg')
      .attach('photos', jpeg, 'b.jpg')
      .attach('photos', TEXT_AS_JPEG, 'c.jpg')
      .expect(415);
    expect(res.body.error.message).toMatch(/^Photo 3 of 3: /);
    await expectNothingStoredAndStillServing(before);
  });

  it('a 30 MB upload → 413', async () => {
    const big = Buffer.alloc(30 * 1024 * 1024);
    jpeg.copy(big);
    const res = await request(app).post('/upload').attach('photos', big, 'big.jpg').expect(413);
    expect(res.body.error).toEqual({ id: 'file_too_large', message: 'Each photo must be at most 15 MB.' });
    await expectNothingStoredAndStillServing(before);
  });

  it('eleven files → 413 "At most 10 photos per request."', async () => {
    let req = request(app).post('/upload');
    for (let i = 0; i < 11; i++) req = req.attach('photos', jpeg, `p${i}.jpg`);
    const res = await req.expect(413);
    expect(res.body.error).toEqual({ id: 'too_many_files', message: 'At most 10 photos per request.' });
    await expectNothingStoredAndStillServing(before);
  });

  it('ten files are still fine', async () => {
    let req = request(app).post('/upload');
    for (let i = 0; i < PHOTO_LIMITS.files; i++) req = req.attach('photos', jpeg, `p${i}.jpg`);
    const res = await req.expect(201);
    expect(res.body.photos).toHaveLength(10);
  });

  it('10,000 fields → 400', async () => {
    const boundary = 'trimoutfields';
    const parts = Array.from({ length: 10_000 }, (_, i) => `Content-Disposition: form-data; name="f${i}"\r\n\r\nx`);
    const res = await request(app)
      .post('/upload')
      .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
      .send(multipart(boundary, parts))
      .expect(400);
    expect(res.body.error).toEqual({ id: 'too_many_fields', message: 'The form has too many fields (at most 20 besides the photos).' });
    await expectNothingStoredAndStillServing(before);
  });

  it('a truncated multipart body (no closing boundary) → 400', async () => {
    const boundary = 'trimouttruncated';
    const body = multipart(
      boundary,
      [`Content-Disposition: form-data; name="photos"; filename="a.jpg"\r\nContent-Type: image/jpeg\r\n\r\n${jpeg.subarray(0, 40).toString('latin1')}`],
      false,
    ).slice(0, -2);
    const res = await request(app).post('/upload').set('Content-Type', `multipart/form-data; boundary=${boundary}`).send(body).expect(400);
    expect(res.body.error).toEqual({ id: 'malformed_upload', message: 'The upload could not be read: the form data is malformed or incomplete.' });
    await expectNothingStoredAndStillServing(before);
  });

  it('a malformed part header → 400', async () => {
    const boundary = 'trimoutmalformed';
    const body = `--${boundary}\r\nthis is not a header\r\n\r\nbody\r\n--${boundary}--\r\n`;
    const res = await request(app).post('/upload').set('Content-Type', `multipart/form-data; boundary=${boundary}`).send(body);
    expect(res.status).toBe(400);
    await expectNothingStoredAndStillServing(before);
  });

  it('multipart without a boundary → 400', async () => {
    const res = await request(app).post('/upload').set('Content-Type', 'multipart/form-data').send('--x\r\n').expect(400);
    expect(res.body.error.id).toBe('malformed_upload');
    await expectNothingStoredAndStillServing(before);
  });

  it('a body that is not multipart → 415', async () => {
    const res = await request(app).post('/upload').set('Content-Type', 'image/jpeg').send(jpeg).expect(415);
    expect(res.body.error.message).toBe('Send the photos as multipart/form-data.');
  });

  it('a file in another field → 400', async () => {
    const res = await request(app).post('/upload').attach('picture', jpeg, 'a.jpg').expect(400);
    expect(res.body.error.message).toBe('Photos must be sent in the "photos" field.');
    await expectNothingStoredAndStillServing(before);
  });

  it('a field value over the limit → 400', async () => {
    const res = await request(app).post('/upload').field('note', 'x'.repeat(PHOTO_LIMITS.fieldSize + 1)).expect(400);
    expect(res.body.error.message).toBe('A form field is longer than 64 KB.');
  });

  it('a declared body larger than every limit together → 413 without reading it', async () => {
    const { status, body } = await rawPost(app, {
      'Content-Type': 'multipart/form-data; boundary=x',
      'Content-Length': String(MAX_UPLOAD_BODY_BYTES + 1),
    });
    expect(status).toBe(413);
    expect(JSON.parse(body).error.id).toBe('too_large');
    await expectNothingStoredAndStillServing(before);
  });
});

/** supertest parser that keeps a binary body as a Buffer. */
function binary(res: request.Response, done: (err: Error | null, body: Buffer) => void) {
  // In Node, superagent hands the parser the http.IncomingMessage itself.
  const stream = res as unknown as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(c));
  stream.on('end', () => done(null, Buffer.concat(chunks)));
}

/** Sends only the headers and a few bytes of a request that declares a huge body. */
async function rawPost(target: express.Express, headers: Record<string, string>): Promise<{ status: number; body: string }> {
  const listening = await listenOnLoopback(target);
  const { port } = listening;
  try {
    return await new Promise((resolve, reject) => {
      const req = http.request({ host: '127.0.0.1', port, method: 'POST', path: '/upload', headers }, (res) => {
        let body = '';
        res.setEncoding('utf8');
        res.on('data', (c: string) => (body += c));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
      });
      req.on('error', reject);
      req.write('--x\r\n');
    });
  } finally {
    await listening.close();
  }
}
