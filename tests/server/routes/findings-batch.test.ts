/**
 * One defect on many units (POST /api/jobs/:jobId/findings/batch): each unit gets its own finding
 * with the shared type, severity, company and note, its own measured value and photo; all or
 * nothing (a refusal of any unit, or a database failure after the photos were stored, leaves no
 * row and no stored object); an idempotent replay answers the same findings; scoped to the job
 * (another job's unit is refused by name) and to the roles that log findings; 400s name the field.
 */
import request from 'supertest';
import sharp from 'sharp';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Photo } from '../../../server/models';
import { buildTestApp, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser } from '../../support/factories';
import { buildWalkJob, countRows, type People, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';

jest.setTimeout(180_000);

let db: Database;
let trimout: TrimoutApp;
let s3: FakeS3;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let outsider: SignedIn;
let red: Buffer;
let blue: Buffer;

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  red = await sharp({ create: { width: 160, height: 120, channels: 3, background: { r: 200, g: 40, b: 40 } } }).jpeg().toBuffer();
  blue = await sharp({ create: { width: 160, height: 120, channels: 3, background: { r: 40, g: 40, b: 200 } } }).jpeg().toBuffer();
  const first = await buildWalkJob();
  people = first;
  gc = await signIn(trimout.app, first.gcManager.email);
  inspector = await signIn(trimout.app, first.inspector.email);
  subA = await signIn(trimout.app, first.subA.email);
  outsider = await signIn(trimout.app, (await buildUser()).email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await s3.close();
});

const path = (w: WalkJob) => `/api/jobs/${w.job.id}/findings/batch`;

function postJson(who: SignedIn, w: WalkJob, body: unknown, key?: string) {
  const req = who.agent.post(path(w)).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body as object);
}

function postMultipart(who: SignedIn, w: WalkJob, data: unknown, files: Buffer[], key?: string) {
  const req = who.agent.post(path(w)).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  req.field('data', JSON.stringify(data));
  files.forEach((f, i) => req.attach('photos', f, { filename: `p${i}.jpg`, contentType: 'image/jpeg' }));
  return req;
}

/** DR-03 (condensate pump lift, measured against the unit's limit) on both cassettes of Level 3. */
const twoCassettes = (w: WalkJob) => ({
  catalogueItemId: w.byCode('DR-03').id,
  levelId: w.level.id,
  severity: 'critical' as const,
  companyId: w.subA.companyId,
  note: 'Same lift pipe as on the first unit.',
  units: [{ unitId: w.cassette.id }, { unitId: w.cassette2.id }],
});

async function snapshot(w: WalkJob) {
  return { rows: await countRows(w.job.id), keys: (await s3.keys()).length };
}

describe('POST /api/jobs/:jobId/findings/batch', () => {
  it('logs one finding per unit with the shared fields, in the order sent', async () => {
    const w = await buildWalkJob(people);
    const res = await postJson(inspector, w, { ...twoCassettes(w), units: [{ unitId: w.cassette.id, measuredText: '34 in' }, { unitId: w.cassette2.id }] }).expect(201);
    expect(res.body.items).toHaveLength(2);
    const [a, b] = res.body.items;
    for (const f of [a, b]) {
      expect(f).toMatchObject({ code: 'DR-03', severity: 'critical', companyId: w.subA.companyId, note: 'Same lift pipe as on the first unit.', status: 'open', levelId: w.level.id });
      expect(f.events).toEqual([expect.objectContaining({ kind: 'logged' })]);
    }
    expect([a.unitId, b.unitId]).toEqual([w.cassette.id, w.cassette2.id]);
    expect(b.number).toBe(a.number + 1);
    // The measured value is judged against that unit's own limit (30 in from its model's manual).
    expect(a.measuredText).toBe('34 in');
    expect(a.ruleResult).toMatchObject({ pass: false });
    expect(b.measuredText).toBeNull();
    expect(await countRows(w.job.id)).toEqual({ findings: 2, photos: 0, events: 2 });
  });

  it('gives each unit its own photo (multipart), stored once each', async () => {
    const w = await buildWalkJob(people);
    const before = await snapshot(w);
    const data = { ...twoCassettes(w), units: [{ unitId: w.cassette.id, photo: 1 }, { unitId: w.cassette2.id, photo: 0 }] };
    const res = await postMultipart(gc, w, data, [red, blue]).expect(201);
    const [a, b] = res.body.items;
    expect(a.photos).toHaveLength(1);
    expect(b.photos).toHaveLength(1);
    const rows = await Photo.findAll({ where: { findingId: [a.id, b.id] } });
    expect(rows).toHaveLength(2);
    expect(new Set(rows.map((r) => r.storageKey)).size).toBe(2);
    // The photo sent second belongs to the first unit: it is the blue one.
    const first = await gc.agent.get(`/api/jobs/${w.job.id}/photos/${a.photos[0].id}`).buffer(true).expect(200);
    const { dominant } = await sharp(first.body as Buffer).stats();
    expect(dominant.b).toBeGreaterThan(dominant.r);
    const after = await snapshot(w);
    expect(after.rows).toEqual({ findings: before.rows.findings + 2, photos: 2, events: before.rows.events + 2 });
    expect(after.keys).toBe(before.keys + 6); // each photo, its thumbnail and its print copy
  });

  describe('all or nothing', () => {
    it('a refusal of one unit writes nothing for any, and names that unit', async () => {
      const w = await buildWalkJob(people);
      const before = await snapshot(w);
      const bad = await postMultipart(inspector, w, { ...twoCassettes(w), units: [{ unitId: w.cassette.id, photo: 0 }, { unitId: w.cassette2.id, measuredText: 'a lot' }] }, [red]).expect(400);
      expect(Object.keys(bad.body.error.fields)).toEqual(['units.1.measuredText']);
      expect(bad.body.error.message).toMatch(/^units\.1\.measuredText: /);
      // A unit on another level of the job.
      const upstairs = await postJson(inspector, w, { ...twoCassettes(w), units: [{ unitId: w.cassette.id }, { unitId: w.upstairs.id }] }).expect(400);
      expect(upstairs.body.error.fields).toEqual({ 'units.1.levelId': 'The unit is not on that level.' });
      // A defect type that does not apply to one unit's kind.
      const kinds = await postJson(inspector, w, {
        ...twoCassettes(w),
        catalogueItemId: w.notForCassettes.id,
        units: [{ unitId: w.wall.id }, { unitId: w.cassette.id }],
      }).expect(400);
      expect(Object.keys(kinds.body.error.fields)).toEqual(['units.1.catalogueItemId']);
      expect(await snapshot(w)).toEqual(before);
    });

    it('a database failure on the second finding, after the photos were stored, leaves no finding and no stored object', async () => {
      const w = await buildWalkJob(people);
      const before = await snapshot(w);
      await db.sequelize.query(`
        CREATE OR REPLACE FUNCTION test_fail_batch_finding() RETURNS trigger LANGUAGE plpgsql AS $$
        BEGIN RAISE EXCEPTION 'test: refuse this finding'; END $$`);
      await db.sequelize.query(
        `CREATE TRIGGER test_fail_batch_finding BEFORE INSERT ON findings FOR EACH ROW WHEN (NEW.unit_id = '${w.cassette2.id}') EXECUTE FUNCTION test_fail_batch_finding()`,
      );
      try {
        const res = await postMultipart(inspector, w, { ...twoCassettes(w), units: [{ unitId: w.cassette.id, photo: 0 }, { unitId: w.cassette2.id, photo: 1 }] }, [red, blue]).expect(500);
        expect(res.body.error.id).toBe('internal');
      } finally {
        await db.sequelize.query(`DROP TRIGGER test_fail_batch_finding ON findings`);
        await db.sequelize.query(`DROP FUNCTION test_fail_batch_finding()`);
      }
      expect(await snapshot(w)).toEqual(before);
    });
  });

  it('a replay with the same Idempotency-Key answers the same findings and writes nothing more; another body under it → 422', async () => {
    const w = await buildWalkJob(people);
    const data = { ...twoCassettes(w), units: [{ unitId: w.cassette.id, photo: 0 }, { unitId: w.cassette2.id }] };
    const first = await postMultipart(inspector, w, data, [red], 'batch-retry-0001').expect(201);
    const after = await snapshot(w);
    const again = await postMultipart(inspector, w, data, [red], 'batch-retry-0001').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.items.map((f: { id: string }) => f.id)).toEqual(first.body.items.map((f: { id: string }) => f.id));
    expect(await snapshot(w)).toEqual(after); // the replay's own photo was deleted again
    const other = await postMultipart(inspector, w, { ...data, note: 'Another note' }, [red], 'batch-retry-0001').expect(422);
    expect(other.body.error.id).toBe('unprocessable');
    expect(await snapshot(w)).toEqual(after);
  });

  describe('scope', () => {
    it("refuses another job's unit by name and writes nothing", async () => {
      const w = await buildWalkJob(people);
      const other = await buildWalkJob(people);
      const before = await snapshot(w);
      const res = await postJson(inspector, w, { ...twoCassettes(w), units: [{ unitId: w.cassette.id }, { unitId: other.cassette.id }] }).expect(400);
      expect(res.body.error.fields).toEqual({ 'units.1.unitId': 'That unit is not on this job.' });
      // Another job's level as the batch's level.
      const level = await postJson(inspector, w, { ...twoCassettes(w), levelId: other.level.id }).expect(400);
      expect(Object.keys(level.body.error.fields)).toEqual(['units.0.levelId', 'units.1.levelId']);
      expect(await snapshot(w)).toEqual(before);
      expect((await countRows(other.job.id)).findings).toBe(0);
    });

    it('a subcontractor 403, a non-member 404, signed out 401; nothing written', async () => {
      const w = await buildWalkJob(people);
      const before = await snapshot(w);
      expect((await postJson(subA, w, twoCassettes(w)).expect(403)).body.error.id).toBe('forbidden');
      await postJson(outsider, w, twoCassettes(w)).expect(404);
      const anon = request.agent(trimout.app);
      const csrf = (await anon.get('/api/session')).body.csrfToken as string;
      await anon.post(path(w)).set('X-CSRF-Token', csrf).send(twoCassettes(w)).expect(401);
      expect(await snapshot(w)).toEqual(before);
    });
  });

  it.each([
    ['no units', (w: WalkJob) => ({ ...twoCassettes(w), units: [] }), 'units'],
    ['a unit twice', (w: WalkJob) => ({ ...twoCassettes(w), units: [{ unitId: w.cassette.id }, { unitId: w.cassette.id }] }), 'units.1.unitId'],
    ['no level', (w: WalkJob) => ({ ...twoCassettes(w), levelId: undefined }), 'levelId'],
    ['no defect type', (w: WalkJob) => ({ ...twoCassettes(w), catalogueItemId: undefined }), 'catalogueItemId'],
    ['a photo no request carries', (w: WalkJob) => ({ ...twoCassettes(w), units: [{ unitId: w.cassette.id, photo: 0 }] }), 'units.0.photo'],
    ['one photo for two units', (w: WalkJob) => ({ ...twoCassettes(w), units: [{ unitId: w.cassette.id, photo: 0 }, { unitId: w.cassette2.id, photo: 0 }] }), 'units.1.photo'],
    ['an unknown field', (w: WalkJob) => ({ ...twoCassettes(w), spaceId: w.space.id }), 'body'],
    ['a company not on the job', (w: WalkJob) => ({ ...twoCassettes(w), companyId: '00000000-0000-4000-8000-000000000000' }), 'companyId'],
  ])('400 naming the field: %s', async (_name, body, field) => {
    const w = await buildWalkJob(people);
    const res = await postJson(inspector, w, body(w)).expect(400);
    expect(Object.keys(res.body.error.fields ?? {})).toContain(field);
    // An unknown key is named in the sentence (the schema is strict); every other refusal starts with its field.
    if (field === 'body') expect(res.body.error.message).toContain('spaceId');
    else expect(res.body.error.message.startsWith(`${field}: `)).toBe(true);
    expect((await countRows(w.job.id)).findings).toBe(0);
  });

  it('refuses a photo sent but given to no unit (it would belong to nothing)', async () => {
    const w = await buildWalkJob(people);
    const before = await snapshot(w);
    const res = await postMultipart(inspector, w, { ...twoCassettes(w), units: [{ unitId: w.cassette.id, photo: 0 }, { unitId: w.cassette2.id }] }, [red, blue]).expect(400);
    expect(res.body.error.fields).toEqual({ photos: 'Photo 2 is not given to any unit.' });
    expect(await snapshot(w)).toEqual(before);
  });
});
