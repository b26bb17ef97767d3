/**
 * Level plans and pins: upload PNG / JPEG / PDF (first page drawn by poppler's
 * pdftoppm), refusals (wrong type 415, too large 413, not multipart 415, no file 400), roles
 * (403, other job 404), the served image's headers, replacement and deletion (objects removed),
 * and pins set and cleared on units and findings with If-Match.
 */
import fs from 'node:fs/promises';
import os from 'node:os';
import request from 'supertest';
import sharp from 'sharp';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Level } from '../../../server/models';
import { PLAN_MAX_BYTES, PLAN_MAX_EDGE, parsePageSize, pdfDpiFor } from '../../../server/services/plans';
import { buildTestApp, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildWalkJob, insertFinding, type People, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { pixelFloodPng, SVG } from '../photos/fixtures';

jest.setTimeout(120_000);

let db: Database;
let trimout: TrimoutApp;
let s3: FakeS3;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let w: WalkJob;

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  people = await buildWalkJob();
  w = people as WalkJob;
  gc = await signIn(trimout.app, people.gcManager.email);
  inspector = await signIn(trimout.app, people.inspector.email);
  subA = await signIn(trimout.app, people.subA.email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await s3.close();
});

const planPath = (job: { id: string }, level: { id: string }) => `/api/jobs/${job.id}/levels/${level.id}/plan`;
const v = (n: number) => ({ 'If-Match': `"v${n}"` });

function binary(res: request.Response, done: (err: Error | null, body: Buffer) => void) {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

function upload(who: SignedIn, path: string, file: Buffer, filename = 'plan.png', headers: Record<string, string> = {}) {
  return who.agent
    .post(path)
    .set('X-CSRF-Token', who.csrf)
    .set(headers)
    .attach('file', file, { filename, contentType: 'application/octet-stream' });
}

/** Left half red, right half blue: orientation and colours can be checked after processing. */
function twoTone(width: number, height: number) {
  const raw = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = (y * width + x) * 3;
      const red = x < width / 2;
      raw[i] = red ? 220 : 30;
      raw[i + 1] = 30;
      raw[i + 2] = red ? 30 : 220;
    }
  }
  return sharp(raw, { raw: { width, height, channels: 3 } });
}

async function colourAt(image: Buffer, left: number, top: number) {
  const { data } = await sharp(image).extract({ left, top, width: 2, height: 2 }).raw().toBuffer({ resolveWithObject: true });
  return { r: data[0]!, g: data[1]!, b: data[2]! };
}

/**
 * A one-page PDF written by hand (PDF 1.4, ISO 32000-1 §7.5: header, objects, xref with byte
 * offsets, trailer): a page of `widthPt` × `heightPt` points whose left half is filled red.
 */
function tinyPdf(widthPt: number, heightPt: number): Buffer {
  const content = `1 0 0 rg 0 0 ${widthPt / 2} ${heightPt} re f\n`;
  const objects = [
    '<< /Type /Catalog /Pages 2 0 R >>',
    '<< /Type /Pages /Kids [3 0 R] /Count 1 >>',
    `<< /Type /Page /Parent 2 0 R /MediaBox [0 0 ${widthPt} ${heightPt}] /Contents 4 0 R /Resources << >> >>`,
    `<< /Length ${Buffer.byteLength(content)} >>\nstream\n${content}endstream`,
  ];
  let out = '%PDF-1.4\n';
  const offsets: number[] = [];
  objects.forEach((body, i) => {
    offsets.push(Buffer.byteLength(out));
    out += `${i + 1} 0 obj\n${body}\nendobj\n`;
  });
  const xref = Buffer.byteLength(out);
  out += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n`;
  for (const o of offsets) out += `${String(o).padStart(10, '0')} 00000 n \n`;
  out += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`;
  return Buffer.from(out, 'latin1');
}

describe('PDF page size and resolution', () => {
  it('reads the page size pdfinfo prints and lowers the resolution for large sheets', () => {
    expect(parsePageSize('Pages:          1\nPage    1 size: 612 x 792 pts (letter)\n')).toEqual({ width: 612, height: 792 });
    expect(parsePageSize('Page size:      2592 x 1728 pts\n')).toEqual({ width: 2592, height: 1728 });
    expect(parsePageSize('Pages: 0\n')).toBeNull();
    // US letter (8.5 × 11 in) at the default 150 dpi: its long edge is 1650 px, under the cap.
    expect(pdfDpiFor({ width: 612, height: 792 })).toBe(150);
    // ARCH D (36 × 24 in): 150 dpi would be 5400 px wide; 4096 / 36 = 113.7 → 113 dpi, 4068 px.
    expect(pdfDpiFor({ width: 2592, height: 1728 })).toBe(113);
    expect(PLAN_MAX_EDGE).toBe(4096);
  });
});

describe('uploading a plan', () => {
  it('takes a PNG from the GC manager, keeps it PNG without metadata, and serves it with its version', async () => {
    const level = await Level.create({ jobId: w.job.id, name: 'Level 9 PNG', position: 90 });
    const png = await twoTone(300, 200).withMetadata({ exif: { IFD0: { Copyright: 'someone' } } }).png().toBuffer();
    const res = await upload(gc, planPath(w.job, level), png, '../../etc/passwd.pdf').expect(201);
    expect(res.body.plan).toMatchObject({ contentType: 'image/png', width: 300, height: 200, version: 1 });
    expect(res.headers.etag).toBe(`"v${level.version + 1}"`);
    const row = await Level.findByPk(level.id);
    expect(row!.planKey).toMatch(new RegExp(`^plans/${level.id}/[0-9a-f-]{36}\\.png$`));
    expect(row!.planKey).not.toMatch(/passwd|etc|\.\./);
    expect(row!.planSourceType).toBe('image/png');

    // Any member of the job may see it, a subcontractor too.
    const img = await subA.agent.get(`${planPath(w.job, level)}?v=1`).buffer(true).parse(binary);
    expect(img.status).toBe(200);
    expect(img.headers['content-type']).toBe('image/png');
    expect(img.headers['x-content-type-options']).toBe('nosniff');
    expect(img.headers['cache-control']).toBe('private, max-age=31536000, immutable');
    expect(img.headers['content-disposition']).toBe(`inline; filename="plan-${level.id}-v1.png"`);
    expect(img.headers.etag).toBe('"plan-v1"');
    const meta = await sharp(img.body as Buffer).metadata();
    expect(meta).toMatchObject({ format: 'png', width: 300, height: 200 });
    expect(meta.exif).toBeUndefined();
    expect(await colourAt(img.body as Buffer, 10, 100)).toMatchObject({ r: 220, b: 30 });

    // Without the current version in the URL the browser must revalidate; the ETag answers 304.
    const stale = await gc.agent.get(planPath(w.job, level)).buffer(true).parse(binary).expect(200);
    expect(stale.headers['cache-control']).toBe('private, no-cache');
    await gc.agent.get(planPath(w.job, level)).set('If-None-Match', '"plan-v1"').expect(304);

    // The level list shows the plan.
    const list = await gc.agent.get(`/api/jobs/${w.job.id}/levels?limit=200`).expect(200);
    expect(list.body.items.find((l: { id: string }) => l.id === level.id).plan).toMatchObject({ width: 300, height: 200, version: 1 });
    expect(list.body.items.find((l: { id: string }) => l.id === w.otherLevel.id).plan).toBeNull();
  });

  it('takes a JPEG from an inspector, applies its orientation and caps its long edge', async () => {
    const level = await Level.create({ jobId: w.job.id, name: 'Level 9 JPEG', position: 91 });
    // 5000 × 1000 stored sideways (EXIF orientation 6: rotate 90° clockwise to view).
    const jpeg = await twoTone(1000, 5000).jpeg().withMetadata({ orientation: 6 }).toBuffer();
    const res = await upload(inspector, planPath(w.job, level), jpeg, 'scan.png').expect(201);
    // Upright it is 5000 × 1000; capped to a 4096 px long edge: 4096 × 819 (1000 × 4096 / 5000 = 819.2).
    expect(res.body.plan).toMatchObject({ contentType: 'image/jpeg', width: 4096, height: 819 });
    const img = await gc.agent.get(planPath(w.job, level)).buffer(true).parse(binary).expect(200);
    expect(img.headers['content-type']).toBe('image/jpeg');
    const meta = await sharp(img.body as Buffer).metadata();
    expect([meta.width, meta.height, meta.orientation, meta.exif]).toEqual([4096, 819, undefined, undefined]);
  });

  it("draws a PDF's first page with pdftoppm at 150 dpi (US letter → 1275 × 1650 px)", async () => {
    const level = await Level.create({ jobId: w.job.id, name: 'Level 9 PDF', position: 92 });
    const res = await upload(gc, planPath(w.job, level), tinyPdf(612, 792), 'plan.png').expect(201);
    // 8.5 in × 150 = 1275, 11 in × 150 = 1650.
    expect(res.body.plan).toMatchObject({ contentType: 'image/png', width: 1275, height: 1650, version: 1 });
    expect((await Level.findByPk(level.id))!.planSourceType).toBe('application/pdf');
    const img = await gc.agent.get(planPath(w.job, level)).buffer(true).parse(binary).expect(200);
    expect(img.headers['content-type']).toBe('image/png');
    const left = await colourAt(img.body as Buffer, 100, 800);
    const right = await colourAt(img.body as Buffer, 1175, 800);
    expect(left.r).toBeGreaterThan(200);
    expect(left.g).toBeLessThan(40);
    expect(right).toEqual({ r: 255, g: 255, b: 255 });
  });

  it('draws a huge PDF sheet at a lower resolution so it fits 4096 px', async () => {
    const level = await Level.create({ jobId: w.job.id, name: 'Level 9 big PDF', position: 93 });
    // 200 in × 100 in (14400 × 7200 pt, the largest page PDF 1.4 allows): 4096 / 200 = 20.48 → 20 dpi → 4000 × 2000.
    const res = await upload(gc, planPath(w.job, level), tinyPdf(14400, 7200)).expect(201);
    expect(res.body.plan).toMatchObject({ width: 4000, height: 2000 });
  });

  it('replaces a plan: the version rises and the old object is removed', async () => {
    const level = await Level.create({ jobId: w.job.id, name: 'Level 9 replaced', position: 94 });
    await upload(gc, planPath(w.job, level), await twoTone(40, 30).png().toBuffer()).expect(201);
    const firstKey = (await Level.findByPk(level.id))!.planKey!;
    const res = await upload(gc, planPath(w.job, level), await twoTone(80, 60).jpeg().toBuffer()).expect(201);
    expect(res.body.plan).toMatchObject({ version: 2, contentType: 'image/jpeg', width: 80, height: 60 });
    const secondKey = (await Level.findByPk(level.id))!.planKey!;
    const keys = await s3.keys();
    expect(keys).toContain(secondKey);
    expect(keys).not.toContain(firstKey);
    // A stale If-Match on the upload refuses it (someone replaced it meanwhile).
    const stale = await upload(gc, planPath(w.job, level), await twoTone(80, 60).png().toBuffer(), 'x.png', v(1)).expect(412);
    expect(stale.body.error.id).toBe('stale');
    expect(await s3.keys()).toEqual(keys);
  });

  it('replays a retried upload (same Idempotency-Key) without storing a second image', async () => {
    const level = await Level.create({ jobId: w.job.id, name: 'Level 9 retried', position: 95 });
    const png = await twoTone(50, 50).png().toBuffer();
    const key = { 'Idempotency-Key': `plan-retry-${level.id}` };
    const first = await upload(gc, planPath(w.job, level), png, 'a.png', key).expect(201);
    const before = await s3.keys();
    const again = await upload(gc, planPath(w.job, level), png, 'a.png', key).expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body).toEqual(first.body);
    expect(await s3.keys()).toEqual(before);
    // The same key with another file is another request: 422.
    await upload(gc, planPath(w.job, level), await twoTone(60, 50).png().toBuffer(), 'a.png', key).expect(422);
  });
});

describe('refused uploads', () => {
  let level: Level;
  beforeAll(async () => {
    level = await Level.create({ jobId: w.job.id, name: 'Level 9 refusals', position: 99 });
  });
  afterEach(async () => {
    expect((await Level.findByPk(level.id))!.planKey).toBeNull();
  });

  it.each([
    ['an SVG', SVG, 'unsupported_plan_type'],
    ['a text file named .png', Buffer.from('not a plan at all\n'), 'unsupported_plan_type'],
    ['a GIF', Buffer.from('GIF89a\x01\x00\x01\x00\x00\x00\x00;', 'latin1'), 'unsupported_plan_type'],
  ])('refuses %s with 415', async (_what, bytes, id) => {
    const before = await s3.keys();
    const res = await upload(gc, planPath(w.job, level), bytes, 'plan.png').expect(415);
    expect(res.body.error.id).toBe(id);
    expect(res.body.error.message).toMatch(/PNG, JPEG or PDF/);
    expect(await s3.keys()).toEqual(before);
  });

  it('refuses a WebP photo (415): plans are PNG, JPEG or PDF', async () => {
    const webp = await twoTone(20, 20).webp().toBuffer();
    const res = await upload(gc, planPath(w.job, level), webp, 'plan.png').expect(415);
    expect(res.body.error.message).toMatch(/WebP/);
  });

  it('refuses a damaged PDF with 400 and leaves no temporary files behind', async () => {
    const temps = async () => (await fs.readdir(os.tmpdir())).filter((n) => n.startsWith('trimout-plan-'));
    const before = await temps();
    const res = await upload(gc, planPath(w.job, level), Buffer.from('%PDF-1.4\nthis is not really a PDF\n%%EOF\n'), 'plan.pdf').expect(400);
    expect(res.body.error.id).toBe('unreadable_plan');
    expect(await temps()).toEqual(before);
  });

  it('refuses a truncated PNG with 400', async () => {
    const png = await twoTone(200, 200).png().toBuffer();
    const res = await upload(gc, planPath(w.job, level), png.subarray(0, 200), 'plan.png').expect(400);
    expect(res.body.error.id).toBe('unreadable_plan');
  });

  it('refuses a pixel flood with 413 before decoding it', async () => {
    const res = await upload(gc, planPath(w.job, level), pixelFloodPng(), 'plan.png').expect(413);
    expect(res.body.error.id).toBe('too_many_pixels');
  });

  it('refuses a file over 15 MB with 413', async () => {
    expect(PLAN_MAX_BYTES).toBe(15 * 1024 * 1024);
    const big = Buffer.alloc(PLAN_MAX_BYTES + 1, 0);
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]).copy(big);
    const res = await upload(gc, planPath(w.job, level), big, 'plan.png');
    expect(res.status).toBe(413);
    expect(res.body.error.id).toBe('file_too_large');
  });

  it('refuses JSON (415), a form without a file (400) and a second file (400)', async () => {
    const json = await gc.agent.post(planPath(w.job, level)).set('X-CSRF-Token', gc.csrf).send({ file: 'x' }).expect(415);
    expect(json.body.error.id).toBe('unsupported_media_type');
    const noFile = await gc.agent.post(planPath(w.job, level)).set('X-CSRF-Token', gc.csrf).field('note', 'x').expect(400);
    expect(noFile.body.error.fields).toHaveProperty('file');
    const png = await twoTone(10, 10).png().toBuffer();
    const two = await gc.agent
      .post(planPath(w.job, level))
      .set('X-CSRF-Token', gc.csrf)
      .attach('file', png, 'a.png')
      .attach('file', png, 'b.png')
      .expect(400);
    expect(two.body.error.fields).toHaveProperty('file');
  });

  it('refuses a subcontractor (403) and answers 404 for a level of another job or a job they are not on', async () => {
    const png = await twoTone(10, 10).png().toBuffer();
    const sub = await upload(subA, planPath(w.job, level), png).expect(403);
    expect(sub.body.error.id).toBe('forbidden');
    const other = await buildWalkJob();
    await upload(gc, planPath(w.job, other.level), png).expect(404);
    await upload(gc, planPath(other.job, other.level), png).expect(404);
    await gc.agent.get(planPath(w.job, other.level)).expect(404);
  });

  it('answers 401 without a session', async () => {
    await request(trimout.app).get(planPath(w.job, level)).expect(401);
  });
});

describe('fetching and deleting', () => {
  it('answers 404 for a level without a plan, JSON', async () => {
    const res = await gc.agent.get(planPath(w.job, w.otherLevel)).expect(404);
    expect(res.body.error.id).toBe('not_found');
  });

  it('deletes a plan: GC manager only, with If-Match; the object goes', async () => {
    const level = await Level.create({ jobId: w.job.id, name: 'Level 9 deleted', position: 96 });
    const up = await upload(gc, planPath(w.job, level), await twoTone(40, 30).png().toBuffer()).expect(201);
    const key = (await Level.findByPk(level.id))!.planKey!;
    const version = Number(/"v(\d+)"/.exec(up.headers.etag as string)![1]);
    await inspector.agent.delete(planPath(w.job, level)).set('X-CSRF-Token', inspector.csrf).set(v(version)).expect(403);
    await gc.agent.delete(planPath(w.job, level)).set('X-CSRF-Token', gc.csrf).expect(428);
    const stale = await gc.agent.delete(planPath(w.job, level)).set('X-CSRF-Token', gc.csrf).set(v(version - 1)).expect(412);
    expect(stale.body.current.plan).toMatchObject({ version: 1 });
    await gc.agent.delete(planPath(w.job, level)).set('X-CSRF-Token', gc.csrf).set(v(version)).expect(204);
    expect(await s3.keys()).not.toContain(key);
    await gc.agent.get(planPath(w.job, level)).expect(404);
    await gc.agent.delete(planPath(w.job, level)).set('X-CSRF-Token', gc.csrf).set(v(version + 1)).expect(404);
    // A new upload counts on from the last version, so an old cached URL never shows the new image.
    const again = await upload(gc, planPath(w.job, level), await twoTone(40, 30).png().toBuffer()).expect(201);
    expect(again.body.plan.version).toBe(2);
  });
});

describe('pins', () => {
  it('sets, moves and clears a unit pin (GC manager, If-Match); inspectors and subcontractors cannot', async () => {
    const unitPath = `/api/jobs/${w.job.id}/units/${w.cassette2.id}`;
    const got = await gc.agent.get(unitPath).expect(200);
    expect(got.body).toMatchObject({ pinX: null, pinY: null });
    const version = got.body.version as number;
    await inspector.agent.patch(unitPath).set('X-CSRF-Token', inspector.csrf).set(v(version)).send({ pinX: 0.5, pinY: 0.5 }).expect(403);
    await subA.agent.patch(unitPath).set('X-CSRF-Token', subA.csrf).set(v(version)).send({ pinX: 0.5, pinY: 0.5 }).expect(403);
    await gc.agent.patch(unitPath).set('X-CSRF-Token', gc.csrf).send({ pinX: 0.5, pinY: 0.5 }).expect(428);
    const one = await gc.agent.patch(unitPath).set('X-CSRF-Token', gc.csrf).set(v(version)).send({ pinX: 0.25, pinY: 0.75 }).expect(200);
    expect(one.body).toMatchObject({ pinX: 0.25, pinY: 0.75, version: version + 1 });
    expect(one.headers.etag).toBe(`"v${version + 1}"`);
    await gc.agent.patch(unitPath).set('X-CSRF-Token', gc.csrf).set(v(version)).send({ pinX: 0.1, pinY: 0.1 }).expect(412);
    for (const bad of [{ pinX: 1.5, pinY: 0.2 }, { pinX: 0.2 }, { pinX: 0.2, pinY: null }, { pinX: '0.2', pinY: 0.2 }]) {
      const res = await gc.agent.patch(unitPath).set('X-CSRF-Token', gc.csrf).set(v(version + 1)).send(bad).expect(400);
      expect(res.body.error.fields).toHaveProperty('pinX');
    }
    const list = await gc.agent.get(`/api/jobs/${w.job.id}/units?levelId=${w.level.id}`).expect(200);
    expect(list.body.items.find((u: { id: string }) => u.id === w.cassette2.id)).toMatchObject({ pinX: 0.25, pinY: 0.75 });
    const cleared = await gc.agent.patch(unitPath).set('X-CSRF-Token', gc.csrf).set(v(version + 1)).send({ pinX: null, pinY: null }).expect(200);
    expect(cleared.body).toMatchObject({ pinX: null, pinY: null });
  });

  it("clears a unit's pin when it moves to another level", async () => {
    const unitPath = `/api/jobs/${w.job.id}/units/${w.wall.id}`;
    const got = await gc.agent.get(unitPath).expect(200);
    const pinned = await gc.agent.patch(unitPath).set('X-CSRF-Token', gc.csrf).set(v(got.body.version)).send({ pinX: 0.3, pinY: 0.3 }).expect(200);
    const moved = await gc.agent
      .patch(unitPath)
      .set('X-CSRF-Token', gc.csrf)
      .set(v(pinned.body.version))
      .send({ levelId: w.otherLevel.id })
      .expect(200);
    expect(moved.body).toMatchObject({ levelId: w.otherLevel.id, pinX: null, pinY: null });
  });

  it('logs a finding with a pin, then moves and removes it by PATCH {pin} (GC manager, inspector; If-Match)', async () => {
    const created = await inspector.agent
      .post(`/api/jobs/${w.job.id}/findings`)
      .set('X-CSRF-Token', inspector.csrf)
      .send({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, pinX: 0.4, pinY: 0.6 })
      .expect(201);
    expect(created.body).toMatchObject({ pinX: 0.4, pinY: 0.6 });
    const findingPath = `/api/jobs/${w.job.id}/findings/${created.body.id}`;
    const version = created.body.version as number;
    await inspector.agent.patch(findingPath).set('X-CSRF-Token', inspector.csrf).send({ pin: { x: 0.1, y: 0.2 } }).expect(428);
    const moved = await inspector.agent.patch(findingPath).set('X-CSRF-Token', inspector.csrf).set(v(version)).send({ pin: { x: 0.1, y: 0.2 } }).expect(200);
    expect(moved.body).toMatchObject({ pinX: 0.1, pinY: 0.2, version: version + 1 });
    await gc.agent.patch(findingPath).set('X-CSRF-Token', gc.csrf).set(v(version)).send({ pin: { x: 0.3, y: 0.3 } }).expect(412);
    await gc.agent.patch(findingPath).set('X-CSRF-Token', gc.csrf).set(v(version + 1)).send({ pin: { x: 2, y: 0.3 } }).expect(400);
    await gc.agent.patch(findingPath).set('X-CSRF-Token', gc.csrf).set(v(version + 1)).send({ pin: { x: 0.3 } }).expect(400);
    const list = await subA.agent.get(`/api/jobs/${w.job.id}/findings?levelId=${w.level.id}&limit=200`).expect(200);
    expect(list.body.items.find((f: { id: string }) => f.id === created.body.id)).toMatchObject({ pinX: 0.1, pinY: 0.2 });
    const cleared = await gc.agent.patch(findingPath).set('X-CSRF-Token', gc.csrf).set(v(version + 1)).send({ pin: null }).expect(200);
    expect(cleared.body).toMatchObject({ pinX: null, pinY: null, version: version + 2 });
    // No event is recorded for a pin: the timeline still holds only "logged".
    const events = await gc.agent.get(`${findingPath}/events`).expect(200);
    expect(events.body.items.map((e: { kind: string }) => e.kind)).toEqual(['logged']);
  });

  it("refuses a subcontractor's pin on their own finding (403) and answers 404 for another company's", async () => {
    const own = await insertFinding(w, { companyId: w.subA.companyId });
    const other = await insertFinding(w, { companyId: w.subB.companyId });
    const res = await subA.agent
      .patch(`/api/jobs/${w.job.id}/findings/${own.id}`)
      .set('X-CSRF-Token', subA.csrf)
      .set(v(own.version))
      .send({ pin: { x: 0.5, y: 0.5 } })
      .expect(403);
    expect(res.body.error.id).toBe('forbidden');
    await subA.agent
      .patch(`/api/jobs/${w.job.id}/findings/${other.id}`)
      .set('X-CSRF-Token', subA.csrf)
      .set(v(other.version))
      .send({ pin: { x: 0.5, y: 0.5 } })
      .expect(404);
    const row = await own.reload();
    expect([row.pinX, row.pinY, row.version]).toEqual([null, null, own.version]);
  });
});
