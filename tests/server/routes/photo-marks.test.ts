/**
 * Marked-up photos: marks saved, read back and edited with If-Match (428 missing, 412 stale);
 * refused marks answer 400 naming the field; the flattened copy the photo's addresses serve
 * differs from the original only where the marks are (decoded pixels compared), `?original=1`
 * serves the photo as taken, clearing the marks serves the original again; who may read and
 * write marks, and that the photo's own access rules hold for the original and the copy alike.
 */
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import sharp from 'sharp';
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import type { Mark } from '../../../shared/schemas/photoMarks';
import { FULL_JPEG_QUALITY } from '../../../server/services/photos';
import { buildTestApp, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser } from '../../support/factories';
import { buildWalkJob, type People, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { halvesImage } from '../photos/fixtures';

jest.setTimeout(180_000);

let db: Database;
let trimout: TrimoutApp;
let s3: FakeS3;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let subB: SignedIn;
let outsider: SignedIn;
let jpeg: Buffer;

interface MarkKeys {
  storage_key: string;
  thumb_key: string;
  print_key: string | null;
  marked_key: string;
  marked_thumb_key: string;
  marked_print_key: string | null;
}

/** The photo's keys and its marked copy's. */
async function markKeys(photoId: string): Promise<MarkKeys> {
  const [row] = await db.sequelize.query<MarkKeys>(
    `SELECT p.storage_key, p.thumb_key, p.print_key, pm.marked_key, pm.marked_thumb_key, pm.marked_print_key
       FROM photos p JOIN photo_marks pm ON pm.photo_id = p.id WHERE p.id = $1`,
    { bind: [photoId], type: QueryTypes.SELECT },
  );
  return row!;
}

async function stored(key: string): Promise<Buffer> {
  const object = await s3.store.get(key);
  if (!object) throw new Error(`${key} is not in the store`);
  const chunks: Buffer[] = [];
  for await (const chunk of object.body) chunks.push(Buffer.from(chunk as Buffer));
  return Buffer.concat(chunks);
}

const W = 400;
const H = 300;

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  jpeg = await halvesImage(W, H).jpeg({ quality: 90 }).toBuffer();
  const first = await buildWalkJob();
  people = first;
  gc = await signIn(trimout.app, first.gcManager.email);
  inspector = await signIn(trimout.app, first.inspector.email);
  subA = await signIn(trimout.app, first.subA.email);
  subB = await signIn(trimout.app, first.subB.email);
  outsider = await signIn(trimout.app, (await buildUser()).email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await s3.close();
});

interface PhotoRef {
  id: string;
  url: string;
  thumbUrl: string;
}

/** A DR-03 finding (company A's) logged by the inspector with one photo. */
async function findingWithPhoto(w: WalkJob): Promise<{ id: string; photo: PhotoRef }> {
  const res = await inspector.agent
    .post(`/api/jobs/${w.job.id}/findings`)
    .set('X-CSRF-Token', inspector.csrf)
    .set('Idempotency-Key', randomUUID())
    .field('data', JSON.stringify({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, note: 'Sags.' }))
    .attach('photos', jpeg, { filename: 'a.jpg', contentType: 'image/jpeg' })
    .expect(201);
  return { id: res.body.id, photo: res.body.photos[0] };
}

const marksPath = (photoId: string) => `/api/photos/${photoId}/marks`;
const put = (who: SignedIn, photoId: string, body: unknown, ifMatch?: string) => {
  const req = who.agent.put(marksPath(photoId)).set('X-CSRF-Token', who.csrf);
  if (ifMatch) req.set('If-Match', ifMatch);
  return req.send(body as object);
};
const bytes = async (who: SignedIn, url: string) => (await who.agent.get(url).buffer(true).expect(200)).body as Buffer;

const MARKS: Mark[] = [
  { kind: 'rect', colour: 'yellow', x: 0.1, y: 0.1, w: 0.2, h: 0.2 },
  { kind: 'arrow', colour: 'white', from: { x: 0.6, y: 0.7 }, to: { x: 0.85, y: 0.85 } },
  { kind: 'ellipse', colour: 'green', center: { x: 0.3, y: 0.55 }, rx: 0.06, ry: 0.08 },
  { kind: 'freehand', colour: 'yellow', points: [{ x: 0.6, y: 0.1 }, { x: 0.7, y: 0.2 }, { x: 0.8, y: 0.1 }] },
  { kind: 'text', colour: 'black', at: { x: 0.1, y: 0.75 }, text: 'Sag' },
];

/** Each mark's box in pixels, grown by `margin` (the stroke, its outline, the arrow head and JPEG blocks). */
function markBoxes(marks: readonly Mark[], width: number, height: number, margin: number) {
  return marks.map((m) => {
    let xs: number[];
    let ys: number[];
    switch (m.kind) {
      case 'rect': xs = [m.x, m.x + m.w]; ys = [m.y, m.y + m.h]; break;
      case 'arrow': xs = [m.from.x, m.to.x]; ys = [m.from.y, m.to.y]; break;
      case 'ellipse': xs = [m.center.x - m.rx, m.center.x + m.rx]; ys = [m.center.y - m.ry, m.center.y + m.ry]; break;
      case 'freehand': xs = m.points.map((p) => p.x); ys = m.points.map((p) => p.y); break;
      case 'text': xs = [m.at.x, m.at.x + 0.15]; ys = [m.at.y, m.at.y + 0.08]; break;
    }
    return {
      x0: Math.min(...xs) * width - margin,
      x1: Math.max(...xs) * width + margin,
      y0: Math.min(...ys) * height - margin,
      y1: Math.max(...ys) * height + margin,
    };
  });
}

async function raw(image: Buffer) {
  const { data, info } = await sharp(image).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height };
}

/** The largest channel difference at pixels outside every mark's box, and the pixels compared. */
async function farDifference(original: Buffer, flattened: Buffer, marks: readonly Mark[], margin: number) {
  const a = await raw(original);
  const b = await raw(flattened);
  expect([b.width, b.height]).toEqual([a.width, a.height]);
  const boxes = markBoxes(marks, a.width, a.height, margin);
  let max = 0;
  let compared = 0;
  for (let y = 0; y < a.height; y++) {
    for (let x = 0; x < a.width; x++) {
      if (boxes.some((r) => x >= r.x0 && x <= r.x1 && y >= r.y0 && y <= r.y1)) continue;
      compared++;
      const i = (y * a.width + x) * 3;
      for (let c = 0; c < 3; c++) max = Math.max(max, Math.abs(a.data[i + c]! - b.data[i + c]!));
    }
  }
  return { max, compared };
}

/** The difference at one pixel (the largest channel). */
async function differenceAt(original: Buffer, flattened: Buffer, x: number, y: number) {
  const a = await raw(original);
  const b = await raw(flattened);
  const i = (Math.round(y) * a.width + Math.round(x)) * 3;
  return Math.max(...[0, 1, 2].map((c) => Math.abs(a.data[i + c]! - b.data[i + c]!)));
}

/** The largest difference inside a box of pixels (a label, whose glyphs fall where the font puts them). */
async function largestDifferenceIn(original: Buffer, flattened: Buffer, box: { x0: number; x1: number; y0: number; y1: number }) {
  const a = await raw(original);
  const b = await raw(flattened);
  let max = 0;
  for (let y = Math.round(box.y0); y <= box.y1; y++) {
    for (let x = Math.round(box.x0); x <= box.x1; x++) {
      const i = (y * a.width + x) * 3;
      for (let c = 0; c < 3; c++) max = Math.max(max, Math.abs(a.data[i + c]! - b.data[i + c]!));
    }
  }
  return max;
}

describe('GET and PUT /api/photos/:photoId/marks', () => {
  it('saves marks, reads them back and edits them with If-Match (428 without, 412 when stale)', async () => {
    const w = await buildWalkJob(people);
    const { photo } = await findingWithPhoto(w);

    const empty = await inspector.agent.get(marksPath(photo.id)).expect(200);
    expect(empty.headers.etag).toBe('"v0"');
    expect(empty.body).toEqual({ photoId: photo.id, marks: [], version: 0, updatedAt: null });

    const missing = await put(inspector, photo.id, { marks: MARKS }).expect(428);
    expect(missing.body.error.id).toBe('precondition_required');

    const saved = await put(inspector, photo.id, { marks: MARKS }, '"v0"').expect(200);
    expect(saved.headers.etag).toBe('"v1"');
    expect(saved.body).toMatchObject({ photoId: photo.id, marks: MARKS, version: 1 });

    // Re-opened: the same marks, for everyone who sees the photo.
    for (const who of [gc, inspector, subA]) {
      const back = await who.agent.get(marksPath(photo.id)).expect(200);
      expect(back.body.marks).toEqual(MARKS);
      expect(back.headers.etag).toBe('"v1"');
    }

    const edited = [...MARKS.slice(1), { kind: 'text', colour: 'red', at: { x: 0.5, y: 0.5 }, text: '  Re-pitch here  ' }];
    const second = await put(gc, photo.id, { marks: edited }, '"v1"').expect(200);
    expect(second.body.version).toBe(2);
    expect(second.body.marks.at(-1)).toEqual({ kind: 'text', colour: 'red', at: { x: 0.5, y: 0.5 }, text: 'Re-pitch here' });

    // Someone still holding version 1: refused with the current marks, nothing changed.
    const stale = await put(inspector, photo.id, { marks: MARKS }, '"v1"').expect(412);
    expect(stale.body.error.id).toBe('stale');
    expect((await inspector.agent.get(marksPath(photo.id)).expect(200)).body.marks).toHaveLength(MARKS.length);
    expect((await inspector.agent.get(marksPath(photo.id)).expect(200)).body.version).toBe(2);
  });

  it('refuses marks that are not marks with 400 naming the field, and saves nothing', async () => {
    const w = await buildWalkJob(people);
    const { photo } = await findingWithPhoto(w);
    const cases: Array<[unknown, string]> = [
      [{ marks: [{ kind: 'rect', colour: 'pink', x: 0, y: 0, w: 0.1, h: 0.1 }] }, 'marks.0.colour'],
      [{ marks: [{ kind: 'arrow', colour: 'red', from: { x: 1.5, y: 0 }, to: { x: 0, y: 0 } }] }, 'marks.0.from.x'],
      [{ marks: [{ kind: 'text', colour: 'red', at: { x: 0, y: 0 }, text: 'x'.repeat(41) }] }, 'marks.0.text'],
      [{ marks: [{ kind: 'text', colour: 'red', at: { x: 0, y: 0 }, text: '   ' }] }, 'marks.0.text'],
      [{ marks: [{ kind: 'rect', colour: 'red', x: 0.8, y: 0, w: 0.5, h: 0.1 }] }, 'marks.0.w'],
      [{ marks: [{ kind: 'freehand', colour: 'red', points: [{ x: 0, y: 0 }] }] }, 'marks.0.points'],
      [{ marks: [{ kind: 'arrow', colour: 'red', from: { x: 0, y: 0 }, to: { x: 1, y: 1 }, href: 'x' }] }, 'marks.0'],
      [{ marks: Array.from({ length: 51 }, () => MARKS[0]) }, 'marks'],
      [{ marks: 'arrow' }, 'marks'],
      [{ marks: [], extra: 1 }, ''],
    ];
    for (const [body, field] of cases) {
      const res = await put(inspector, photo.id, body, '"v0"').expect(400);
      expect(res.body.error.id).toBe('bad_request');
      if (field) expect(Object.keys(res.body.error.fields)).toContain(field);
    }
    expect((await inspector.agent.get(marksPath(photo.id)).expect(200)).body.version).toBe(0);
  });

  it('serves a flattened copy that differs from the original only where the marks are; ?original=1 and clearing give the original', async () => {
    const w = await buildWalkJob(people);
    const { photo } = await findingWithPhoto(w);
    const original = await bytes(inspector, photo.url);
    const originalThumb = await bytes(inspector, photo.thumbUrl);
    const keysBefore = (await s3.keys()).length;

    await put(inspector, photo.id, { marks: MARKS }, '"v0"').expect(200);
    // The flattened copy at full size, as a thumbnail and as a print copy.
    expect((await s3.keys()).length).toBe(keysBefore + 3);

    const flattened = await bytes(inspector, photo.url);
    expect(flattened.equals(original)).toBe(false);
    // Away from every mark the picture is the original's: one JPEG generation more moves the hard
    // red/blue edge by a few levels at most, and against the original encoded once more at the
    // stored quality (the same blocks, encoded alike) nothing moves at all.
    const far = await farDifference(original, flattened, MARKS, 24);
    expect(far.compared).toBeGreaterThan(W * H * 0.25);
    expect(far.max).toBeLessThanOrEqual(20);
    const sameGeneration = await sharp(original).jpeg({ quality: FULL_JPEG_QUALITY }).toBuffer();
    expect((await farDifference(sameGeneration, flattened, MARKS, 24)).max).toBeLessThanOrEqual(2);
    // On each mark it is not: the rectangle's top edge, the arrow's shaft, the ellipse's left edge,
    // the freehand line's corner, the label's outline.
    expect(await differenceAt(original, flattened, 0.2 * W, 0.1 * H)).toBeGreaterThan(80);
    expect(await differenceAt(original, flattened, 0.7 * W, 0.76 * H)).toBeGreaterThan(80);
    expect(await differenceAt(original, flattened, 0.24 * W, 0.55 * H)).toBeGreaterThan(80);
    expect(await differenceAt(original, flattened, 0.7 * W, 0.2 * H)).toBeGreaterThan(80);
    expect(await largestDifferenceIn(original, flattened, { x0: 0.1 * W, x1: 0.25 * W, y0: 0.75 * H, y1: 0.83 * H })).toBeGreaterThan(80);

    // The thumbnail too, at its own size.
    const thumb = await bytes(inspector, photo.thumbUrl);
    const thumbFar = await farDifference(originalThumb, thumb, MARKS, 16);
    expect(thumbFar.max).toBeLessThanOrEqual(24);
    expect(await differenceAt(originalThumb, thumb, 0.2 * 320, 0.1 * 240)).toBeGreaterThan(60);

    // The print copy too (the photo is smaller than the print size, so it keeps its 400 × 300), with the marks on it.
    const firstPrint = await markKeys(photo.id);
    const print = await stored(firstPrint.marked_print_key!);
    expect(await sharp(print).metadata()).toMatchObject({ format: 'jpeg', width: W, height: H });
    const originalPrint = await stored(firstPrint.print_key!);
    expect(await differenceAt(originalPrint, print, 0.2 * W, 0.1 * H)).toBeGreaterThan(80);

    // The photo as taken stays available to the same people.
    for (const who of [gc, inspector, subA]) {
      expect((await bytes(who, `${photo.url}?original=1`)).equals(original)).toBe(true);
      expect((await bytes(who, `${photo.thumbUrl}?original=1`)).equals(originalThumb)).toBe(true);
      expect((await bytes(who, photo.url)).equals(flattened)).toBe(true);
    }
    await inspector.agent.get(`${photo.url}?original=yes`).expect(400);
    // The app's fresh address after a change (?m=) names the same picture.
    expect((await bytes(inspector, `${photo.url}?m=1733250000000`)).equals(flattened)).toBe(true);

    // The address stays the same while its picture changes: browsers check again (ETag, 304 while unchanged).
    const first = await inspector.agent.get(photo.url).expect(200);
    expect(first.headers['cache-control']).toBe('private, no-cache');
    await inspector.agent.get(photo.url).set('If-None-Match', first.headers.etag!).expect(304);

    // Edited: a new copy, the previous one removed from the store.
    await put(inspector, photo.id, { marks: MARKS.slice(0, 1) }, '"v1"').expect(200);
    expect((await s3.keys()).length).toBe(keysBefore + 3);
    // Its print copy made again with the marks as they are now; the previous one gone.
    const edited = await markKeys(photo.id);
    expect(edited.marked_print_key).not.toBe(firstPrint.marked_print_key);
    expect(await s3.store.exists(firstPrint.marked_print_key!)).toBe(false);
    expect(await differenceAt(originalPrint, await stored(edited.marked_print_key!), 0.7 * W, 0.2 * H)).toBeLessThanOrEqual(12);
    await inspector.agent.get(photo.url).set('If-None-Match', first.headers.etag!).expect(200);
    const onlyRect = await bytes(inspector, photo.url);
    expect(await differenceAt(original, onlyRect, 0.7 * W, 0.2 * H)).toBeLessThanOrEqual(12);

    // Cleared: the original again, and no copy left behind.
    await put(inspector, photo.id, { marks: [] }, '"v2"').expect(200);
    expect((await bytes(inspector, photo.url)).equals(original)).toBe(true);
    expect((await bytes(inspector, photo.thumbUrl)).equals(originalThumb)).toBe(true);
    expect((await s3.keys()).length).toBe(keysBefore);
  });
});

describe('marked photos in the PDF reports', () => {
  it('prints the marked copy of a photo (close-out report and crew punch list), never the unmarked original', async () => {
    const w = await buildWalkJob(people);
    const { photo } = await findingWithPhoto(w);
    await put(inspector, photo.id, { marks: MARKS }, '"v0"').expect(200);
    const row = await markKeys(photo.id);
    const read = jest.spyOn(s3.store, 'get');
    try {
      await gc.agent.get(`/api/jobs/${w.job.id}/reports/close-out.pdf?levelId=${w.level.id}`).buffer(true).expect(200);
      await gc.agent.get(`/api/jobs/${w.job.id}/reports/crew-list.pdf?companyId=${w.subA.companyId}&levelId=${w.level.id}`).buffer(true).expect(200);
      const keys = read.mock.calls.map((c) => c[0]);
      // The close-out report reads the marked copy's print copy, and nothing larger.
      expect(keys).toContain(row.marked_print_key);
      expect(keys).not.toContain(row.marked_key);
      expect(keys).toContain(row.marked_thumb_key);
      for (const original of [row.storage_key, row.thumb_key, row.print_key]) expect(keys).not.toContain(original);
    } finally {
      read.mockRestore();
    }
  });

  it('makes the print copy of a marked copy flattened before print copies existed, once, never printing the unmarked photo', async () => {
    const w = await buildWalkJob(people);
    const { photo } = await findingWithPhoto(w);
    await put(inspector, photo.id, { marks: MARKS }, '"v0"').expect(200);
    const made = await markKeys(photo.id);
    await db.sequelize.query(`UPDATE photo_marks SET marked_print_key = NULL WHERE photo_id = $1`, { bind: [photo.id] });
    await s3.store.delete([made.marked_print_key!]);
    const report = () => gc.agent.get(`/api/jobs/${w.job.id}/reports/close-out.pdf?levelId=${w.level.id}`).buffer(true).expect(200);
    const read = jest.spyOn(s3.store, 'get');
    try {
      await report();
      let keys = read.mock.calls.map((c) => c[0]);
      expect(keys).toContain(made.marked_key);
      expect(keys).not.toContain(made.print_key);
      const kept = await markKeys(photo.id);
      expect(kept.marked_print_key).toMatch(new RegExp(`^photos/${photo.id}-print-[0-9a-f-]{36}\\.jpg$`));
      expect(await differenceAt(await stored(made.print_key!), await stored(kept.marked_print_key!), 0.2 * W, 0.1 * H)).toBeGreaterThan(80);

      read.mockClear();
      await report();
      keys = read.mock.calls.map((c) => c[0]);
      expect(keys).toContain(kept.marked_print_key);
      expect(keys).not.toContain(made.marked_key);
      expect(keys).not.toContain(made.storage_key);
    } finally {
      read.mockRestore();
    }
  });
});

describe('who may read and write marks', () => {
  it('follows the photo: another company, a non-member and an unknown photo get 404, signed out 401; originals and copies alike', async () => {
    const w = await buildWalkJob(people);
    const { photo } = await findingWithPhoto(w);
    await put(inspector, photo.id, { marks: MARKS }, '"v0"').expect(200);
    for (const who of [subB, outsider]) {
      await who.agent.get(marksPath(photo.id)).expect(404);
      await put(who, photo.id, { marks: [] }, '"v1"').expect(404);
      // Refused before the body is read: a bad body changes nothing about the answer.
      await put(who, photo.id, { marks: 'nonsense' }, '"v1"').expect(404);
    }
    // subB and the outsider are not members of the photo's job through any path.
    for (const url of [photo.url, photo.thumbUrl, `${photo.url}?original=1`, `${photo.thumbUrl}?original=1`]) {
      await subB.agent.get(url).expect(404);
      await outsider.agent.get(url).expect(404);
      await request(trimout.app).get(url).expect(401);
    }
    await request(trimout.app).get(marksPath(photo.id)).expect(401);
    await request(trimout.app).put(marksPath(photo.id)).set('If-Match', '"v1"').send({ marks: [] }).expect((res) => expect([401, 403]).toContain(res.status));
    await inspector.agent.get(marksPath(randomUUID())).expect(404);
    await inspector.agent.get('/api/photos/nope/marks').expect(400);
    expect((await inspector.agent.get(marksPath(photo.id)).expect(200)).body.version).toBe(1);
  });

  it("a finding's photos are marked by those who add photos to it (GC manager, inspector) while it is open; a fix's by the responsible company", async () => {
    const w = await buildWalkJob(people);
    const finding = await findingWithPhoto(w);
    // The responsible subcontractor sees the finding's photo and its marks but does not mark it.
    expect((await put(subA, finding.photo.id, { marks: MARKS }, '"v0"').expect(403)).body.error.id).toBe('forbidden');
    await subA.agent.get(marksPath(finding.photo.id)).expect(200);

    const fix = await subA.agent
      .post(`/api/jobs/${w.job.id}/findings/${finding.id}/fixes`)
      .set('X-CSRF-Token', subA.csrf)
      .set('Idempotency-Key', randomUUID())
      .field('data', JSON.stringify({ note: 'Re-pitched the drain.', measuredText: '20 in' }))
      .attach('photos', jpeg, { filename: 'fix.jpg', contentType: 'image/jpeg' })
      .expect(201);
    const fixPhoto = fix.body.fix.photos[0] as { id: string };

    // The finding is no longer open: its own photos are kept as they are.
    expect((await put(inspector, finding.photo.id, { marks: MARKS }, '"v0"').expect(409)).body.error.id).toBe('invalid_transition');
    // The fix's photo: the responsible company marks it while it waits for review; the inspector does not.
    await put(inspector, fixPhoto.id, { marks: MARKS }, '"v0"').expect(403);
    await put(subA, fixPhoto.id, { marks: MARKS }, '"v0"').expect(200);
    await subB.agent.get(marksPath(fixPhoto.id)).expect(404);
    await inspector.agent.get(marksPath(fixPhoto.id)).expect(200);
  });
});
