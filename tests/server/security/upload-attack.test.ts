/**
 * Trust test: hostile uploads against the real app on a real socket, with this process's memory
 * sampled (process.memoryUsage().rss every few milliseconds) during each attack.
 *
 * 1. Decompression: a 6300 × 6300 PNG of one colour is a few kB on the wire and 39.7 MP once
 *    decoded (just under the 40 MP per-photo limit). Ten of them in one request, ten such
 *    requests at once → every one 413 `pixel_budget_exceeded` from the headers alone: nothing
 *    decoded (the decode slots stay empty), nothing stored, memory growth under the ceiling.
 * 2. Bodies to targets the caller may not write to: 80 MB bodies to a fix of a finding that does
 *    not exist, to a fix of another company's finding, to the findings of a job the caller is not
 *    a member of, and to the plan of a level that does not exist → 404, answered after the first
 *    few megabytes were sent (the body is not read first), no temporary file, nothing stored,
 *    memory growth under the ceiling.
 * 3. Per-user limits (an app with small ones): the upload rate → 429 with Retry-After, answered
 *    before the body is read; the pixel window → 429; a finding sent as JSON is not an upload.
 * 4. Decodes at once never exceed DECODE_CONCURRENCY, and temporary files are removed after a
 *    successful upload.
 * "Nothing stored" = findings, photos, events, fixes and pending_uploads rows and the store's keys
 * are the same before and after.
 */
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { decodeSlots, DECODE_CONCURRENCY, PHOTO_REQUEST_PIXEL_BUDGET } from '../../../server/services/photos';
import { DEFAULT_UPLOAD_LIMITS } from '../../../server/middleware/upload';
import { buildTestApp, listenOnLoopback, type Listening } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser, TEST_PASSWORD } from '../../support/factories';
import { buildWalkJob, insertFinding, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { waitFor } from '../../support/wait';

jest.setTimeout(300_000);

/** Memory the attacks may add to this process (app and client together), in bytes. */
const MEMORY_CEILING = 150 * 1024 * 1024;
const MB = 1024 * 1024;
const MISSING = '00000000-0000-4000-8000-000000000000';

let db: Database;
let s3: FakeS3;
let w: WalkJob;
let floodPng: Buffer;
let smallJpeg: Buffer;
const tempRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-upload-attack-'));

interface Served {
  trimout: TrimoutApp;
  listening: Listening;
  url: string;
}
const served: Served[] = [];

async function serve(options: Parameters<typeof buildTestApp>[1]): Promise<Served> {
  const trimout = buildTestApp(db, { objectStore: s3.store, uploadTempRoot: tempRoot, ...options });
  const listening = await listenOnLoopback(trimout.app);
  const s = { trimout, listening, url: listening.url };
  served.push(s);
  return s;
}

interface Session {
  cookie: string;
  csrf: string;
}
async function signInOver(url: string, email: string): Promise<Session> {
  const first = await fetch(`${url}/api/session`);
  const anon = ((await first.json()) as { csrfToken: string }).csrfToken;
  const res = await fetch(`${url}/api/session`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': anon },
    body: JSON.stringify({ email, password: TEST_PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in of ${email}: ${res.status}`);
  return { cookie: res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; '), csrf: ((await res.json()) as { csrfToken: string }).csrfToken };
}

const BOUNDARY = '----trimout-attack-boundary';
function part(name: string, file?: { filename: string; type: string }): Buffer {
  const disposition = file ? `form-data; name="${name}"; filename="${file.filename}"\r\nContent-Type: ${file.type}` : `form-data; name="${name}"`;
  return Buffer.from(`--${BOUNDARY}\r\nContent-Disposition: ${disposition}\r\n\r\n`);
}
/** A whole multipart body: `data` (JSON) and the photos in `field`. */
function multipart(data: unknown, photos: Buffer[], field = 'photos'): Buffer {
  const parts: Buffer[] = [];
  if (data !== undefined) parts.push(part('data'), Buffer.from(JSON.stringify(data)), Buffer.from('\r\n'));
  photos.forEach((p, i) => parts.push(part(field, { filename: `p${i}.png`, type: 'image/png' }), p, Buffer.from('\r\n')));
  parts.push(Buffer.from(`--${BOUNDARY}--\r\n`));
  return Buffer.concat(parts);
}

interface Answer {
  status: number;
  headers: http.IncomingHttpHeaders;
  body: { error?: { id: string; message: string } } & Record<string, unknown>;
  /** Body bytes written when the answer's headers arrived. */
  sentAtAnswer: number;
  declared: number;
}

/**
 * POSTs `head`, then `fill` bytes of zeros (one 1 MB buffer written again and again, so the client
 * itself adds no memory), then `tail`; stops sending as soon as the answer arrives.
 */
function post(url: string, pathname: string, who: Session, body: { head: Buffer; fill?: number; tail?: Buffer }, headers: Record<string, string> = {}): Promise<Answer> {
  const tail = body.tail ?? Buffer.alloc(0);
  const declared = body.head.length + (body.fill ?? 0) + tail.length;
  const u = new URL(pathname, url);
  return new Promise((resolve, reject) => {
    let sent = 0;
    let answered = false;
    const req = http.request(
      {
        method: 'POST',
        host: u.hostname,
        port: u.port,
        path: u.pathname,
        headers: {
          'Content-Type': `multipart/form-data; boundary=${BOUNDARY}`,
          'Content-Length': String(declared),
          Cookie: who.cookie,
          'X-CSRF-Token': who.csrf,
          ...headers,
        },
      },
      (res) => {
        answered = true;
        const sentAtAnswer = sent;
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (c: string) => (text += c));
        res.on('end', () => {
          req.destroy();
          resolve({ status: res.statusCode ?? 0, headers: res.headers, body: text ? JSON.parse(text) : {}, sentAtAnswer, declared });
        });
      },
    );
    req.on('error', (err) => {
      if (!answered) reject(err);
    });
    const chunk = Buffer.alloc(MB);
    const write = (buf: Buffer) =>
      new Promise<void>((done) => {
        if (answered || req.destroyed) return done();
        sent += buf.length;
        if (req.write(buf)) done();
        else req.once('drain', done);
      });
    void (async () => {
      await write(body.head);
      for (let left = body.fill ?? 0; left > 0 && !answered; left -= chunk.length) await write(left >= chunk.length ? chunk : chunk.subarray(0, left));
      await write(tail);
      if (!answered && !req.destroyed) req.end();
    })();
  });
}

/** Samples this process's RSS (and the busiest the decode slots got) until stopped. */
function sampleMemory() {
  const baseline = process.memoryUsage().rss;
  let peak = baseline;
  let decoding = 0;
  const timer = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
    decoding = Math.max(decoding, decodeSlots.running);
  }, 5);
  return {
    stop() {
      clearInterval(timer);
      peak = Math.max(peak, process.memoryUsage().rss);
      return { growth: peak - baseline, decoding };
    },
  };
}

async function stored(jobId: string) {
  const [row] = await db.sequelize.query<Record<string, string>>(
    `SELECT (SELECT count(*) FROM findings WHERE job_id = $1) AS findings, (SELECT count(*) FROM photos WHERE job_id = $1) AS photos,
            (SELECT count(*) FROM finding_events WHERE job_id = $1) AS events, (SELECT count(*) FROM fixes WHERE job_id = $1) AS fixes,
            (SELECT count(*) FROM pending_uploads) AS pending`,
    { bind: [jobId], type: QueryTypes.SELECT },
  );
  return { rows: row, keys: await s3.keys() };
}

function tempEntries(): string[] {
  return fs.existsSync(tempRoot) ? fs.readdirSync(tempRoot) : [];
}

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  w = await buildWalkJob();
  // One colour, one palette entry: a few kB that declare 39.7 MP.
  floodPng = await sharp({ create: { width: 6300, height: 6300, channels: 3, background: { r: 90, g: 120, b: 160 } } })
    .png({ compressionLevel: 9, palette: true, colours: 2 })
    .toBuffer();
  smallJpeg = await sharp({ create: { width: 1000, height: 1000, channels: 3, background: { r: 200, g: 60, b: 40 } } }).jpeg().toBuffer();
});
afterAll(async () => {
  for (const s of served) {
    await s.listening.close();
    await s.trimout.close();
  }
  await db.close();
  await s3.close();
  fs.rmSync(tempRoot, { recursive: true, force: true });
});

const finding = () => ({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, companyId: w.subA.companyId });

describe('under a measured memory ceiling', () => {
  let app: Served;
  let inspector: Session;
  beforeAll(async () => {
    app = await serve({});
    inspector = await signInOver(app.url, w.inspector.email);
    // Warm up (sharp, multer, the routes) with one ordinary upload, so the baseline includes them.
    const warm = await post(app.url, `/api/jobs/${w.job.id}/findings`, inspector, { head: multipart(finding(), [smallJpeg]) });
    expect(warm.status).toBe(201);
  });

  it('the decompression attack: ten requests of ten 39.7 MP PNGs at once → 413 each from the headers, nothing decoded or stored', async () => {
    expect(floodPng.length).toBeLessThan(200 * 1024);
    const before = await stored(w.job.id);
    const body = multipart(finding(), Array.from({ length: 10 }, () => floodPng));
    const memory = sampleMemory();
    const answers = await Promise.all(Array.from({ length: 10 }, () => post(app.url, `/api/jobs/${w.job.id}/findings`, inspector, { head: body })));
    const { growth, decoding } = memory.stop();

    for (const a of answers) {
      expect(a.status).toBe(413);
      expect(a.body.error).toEqual({
        id: 'pixel_budget_exceeded',
        message: `These 10 photos have 397 megapixels together; at most ${PHOTO_REQUEST_PIXEL_BUDGET / 1_000_000} megapixels are accepted in one request. Send fewer photos at a time.`,
      });
    }
    expect(decoding).toBe(0);
    expect(growth).toBeLessThan(MEMORY_CEILING);
    expect(await stored(w.job.id)).toEqual(before);
    await waitFor(() => tempEntries().length === 0, { what: 'the temporary files to be removed' });
  });

  it('80 MB bodies to targets the caller may not write to → 404 after the first megabytes, no temporary file, nothing stored', async () => {
    const f = await insertFinding(w, { companyId: w.subA.companyId });
    const gc = await signInOver(app.url, w.gcManager.email);
    const subB = await signInOver(app.url, w.subB.email);
    const outsider = await signInOver(app.url, (await buildUser()).email);
    const before = await stored(w.job.id);
    const fill = 80 * MB;
    const photoHead = (data: unknown, field = 'photos') =>
      Buffer.concat([...(data === undefined ? [] : [part('data'), Buffer.from(JSON.stringify(data)), Buffer.from('\r\n')]), part(field, { filename: 'big.png', type: 'image/png' }), floodPng]);
    const tail = Buffer.from(`\r\n--${BOUNDARY}--\r\n`);
    const memory = sampleMemory();
    const answers = await Promise.all([
      // A finding that does not exist.
      post(app.url, `/api/jobs/${w.job.id}/findings/${MISSING}/fixes`, gc, { head: photoHead({ note: 'x' }), fill, tail }),
      // Another company's finding.
      post(app.url, `/api/jobs/${w.job.id}/findings/${f.id}/fixes`, subB, { head: photoHead({ note: 'x' }), fill, tail }),
      // A job the caller is not a member of.
      post(app.url, `/api/jobs/${w.job.id}/findings`, outsider, { head: photoHead(finding()), fill, tail }),
      // A level that does not exist.
      post(app.url, `/api/jobs/${w.job.id}/levels/${MISSING}/plan`, gc, { head: photoHead(undefined, 'file'), fill, tail }),
    ]);
    const { growth } = memory.stop();

    expect(answers.map((a) => [a.status, a.body.error?.id])).toEqual([
      [404, 'not_found'],
      [404, 'not_found'],
      [404, 'not_found'],
      [404, 'not_found'],
    ]);
    for (const a of answers) {
      expect(a.declared).toBeGreaterThan(fill);
      // Answered while the client was still sending: the body was not read first.
      expect(a.sentAtAnswer).toBeLessThan(8 * MB);
    }
    expect(tempEntries()).toEqual([]);
    expect(growth).toBeLessThan(MEMORY_CEILING);
    expect(await stored(w.job.id)).toEqual(before);
    // The server still serves.
    expect((await fetch(`${app.url}/api/health`)).status).toBe(200);
  });
});

describe('decoding and temporary files', () => {
  it('at most DECODE_CONCURRENCY photos are decoded at once; each request folder is removed afterwards', async () => {
    const app = await serve({});
    const inspector = await signInOver(app.url, w.inspector.email);
    const big = await sharp({ create: { width: 3000, height: 2000, channels: 3, background: { r: 20, g: 160, b: 60 } } }).jpeg().toBuffer();
    const memory = sampleMemory();
    const answers = await Promise.all(
      Array.from({ length: 4 }, () => post(app.url, `/api/jobs/${w.job.id}/findings`, inspector, { head: multipart(finding(), [big, big]) })),
    );
    const { decoding } = memory.stop();
    expect(answers.map((a) => a.status)).toEqual([201, 201, 201, 201]);
    expect(decoding).toBeGreaterThan(0);
    expect(decoding).toBeLessThanOrEqual(DECODE_CONCURRENCY);
    await waitFor(() => tempEntries().length === 0, { what: 'the request folders to be removed' });
  });
});

describe('per-user limits', () => {
  it('the upload rate: the fourth upload in the window → 429 with Retry-After, before its body is read; JSON findings are not counted', async () => {
    const app = await serve({ uploadLimits: { requestsPerWindow: 3, pixelsPerWindow: 1e12, windowMs: 60_000 } });
    const gc = await signInOver(app.url, w.gcManager.email);
    const path1 = `/api/jobs/${w.job.id}/findings`;
    for (let i = 0; i < 3; i++) expect((await post(app.url, path1, gc, { head: multipart(finding(), [smallJpeg]) })).status).toBe(201);
    const before = await stored(w.job.id);
    const limited = await post(app.url, path1, gc, { head: multipart(finding(), [smallJpeg]), fill: 80 * MB, tail: Buffer.from('\r\n') });
    expect(limited.status).toBe(429);
    expect(limited.body.error).toEqual({
      id: 'too_many_requests',
      message: 'Too many uploads: at most 3 in 1 minute per person. Wait a few minutes and send them again.',
    });
    expect(Number(limited.headers['retry-after'])).toBeGreaterThan(0);
    expect(limited.sentAtAnswer).toBeLessThan(8 * MB);
    expect(await stored(w.job.id)).toEqual(before);
    // Another person is not limited by it, and a finding without photos (JSON) is not an upload.
    const inspector = await signInOver(app.url, w.inspector.email);
    expect((await post(app.url, path1, inspector, { head: multipart(finding(), [smallJpeg]) })).status).toBe(201);
    const json = await fetch(`${app.url}${path1}`, {
      method: 'POST',
      headers: { 'Content-Type': 'application/json', Cookie: gc.cookie, 'X-CSRF-Token': gc.csrf },
      body: JSON.stringify(finding()),
    });
    expect(json.status).toBe(201);
  });

  it("the default limits let a floor walked without signal through in one sync: 150 findings with a photo, one after another, are all stored", async () => {
    // The outbox sends its queue one write at a time; under the old default (60 per 10 minutes)
    // the 61st was refused with 429 and the rest waited out the window.
    const app = await serve({ uploadLimits: DEFAULT_UPLOAD_LIMITS });
    const inspector = await signInOver(app.url, w.inspector.email);
    const before = await stored(w.job.id);
    const statuses: number[] = [];
    for (let i = 0; i < 150; i++) statuses.push((await post(app.url, `/api/jobs/${w.job.id}/findings`, inspector, { head: multipart(finding(), [smallJpeg]) })).status);
    expect(statuses.filter((s) => s !== 201)).toEqual([]);
    const after = await stored(w.job.id);
    expect(Number(after.rows.findings) - Number(before.rows.findings)).toBe(150);
    expect(Number(after.rows.photos) - Number(before.rows.photos)).toBe(150);
  });

  it('the pixel window: photos beyond the megapixels allowed in the window → 429, nothing stored', async () => {
    const app = await serve({ uploadLimits: { requestsPerWindow: 100, pixelsPerWindow: 2_000_000, windowMs: 60_000 } });
    const inspector = await signInOver(app.url, w.inspector.email);
    const url = `/api/jobs/${w.job.id}/findings`;
    expect((await post(app.url, url, inspector, { head: multipart(finding(), [smallJpeg]) })).status).toBe(201);
    expect((await post(app.url, url, inspector, { head: multipart(finding(), [smallJpeg]) })).status).toBe(201);
    const before = await stored(w.job.id);
    const third = await post(app.url, url, inspector, { head: multipart(finding(), [smallJpeg]) });
    expect(third.status).toBe(429);
    expect(third.body.error).toEqual({
      id: 'too_many_requests',
      message: 'Too many photo pixels: at most 2 megapixels in 1 minute per person. Send these again later.',
    });
    expect(Number(third.headers['retry-after'])).toBeGreaterThan(0);
    expect(await stored(w.job.id)).toEqual(before);
  });
});
