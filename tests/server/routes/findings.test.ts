/**
 * Findings and their photos: every route per role (GC manager, inspector, subcontractor of the
 * responsible company / of another company, non-member, signed out), uploads refused with a
 * clear message and NOTHING saved (rows and stored objects counted before and after), all or
 * nothing when the database write fails after the photos were stored, idempotent retries,
 * measured values, list filters / sorts / cursor / counts, and the append-only history.
 */
import request from 'supertest';
import sharp from 'sharp';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { addDays, todayIn } from '../../../shared/rules/dates';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser } from '../../support/factories';
import { buildWalkJob, countRows, everyItem, insertFinding, type People, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';

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

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  jpeg = await sharp({ create: { width: 160, height: 120, channels: 3, background: { r: 200, g: 40, b: 40 } } })
    .jpeg()
    .toBuffer();
  const first = await buildWalkJob();
  people = first;
  const outsiderUser = await buildUser();
  gc = await signIn(trimout.app, first.gcManager.email);
  inspector = await signIn(trimout.app, first.inspector.email);
  subA = await signIn(trimout.app, first.subA.email);
  subB = await signIn(trimout.app, first.subB.email);
  outsider = await signIn(trimout.app, outsiderUser.email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await s3.close();
});

const MISSING = '00000000-0000-4000-8000-000000000000';

function postJson(who: SignedIn, w: WalkJob, body: unknown, key?: string) {
  const req = who.agent.post(`/api/jobs/${w.job.id}/findings`).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body as object);
}

function postMultipart(who: SignedIn, w: WalkJob, data: unknown, files: Array<{ buffer: Buffer; name: string; type?: string }>, key?: string) {
  const req = who.agent.post(`/api/jobs/${w.job.id}/findings`).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  req.field('data', typeof data === 'string' ? data : JSON.stringify(data));
  for (const f of files) req.attach('photos', f.buffer, { filename: f.name, contentType: f.type ?? 'image/jpeg' });
  return req;
}

const dr03 = (w: WalkJob) => ({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id });

async function snapshot(w: WalkJob) {
  return { rows: await countRows(w.job.id), keys: await s3.keys() };
}

describe('POST /api/jobs/:jobId/findings', () => {
  it('logs a finding from JSON with the catalogue defaults: severity, company from the trade, due date from the policy', async () => {
    const w = await buildWalkJob(people);
    const res = await postJson(inspector, w, { ...dr03(w), note: 'Lift pipe rises above the rating.' }).expect(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body).toMatchObject({
      number: 1,
      label: '#1',
      unitId: w.cassette.id,
      unitTag: 'IU-3-01',
      spaceId: w.space.id,
      levelId: w.level.id,
      levelName: 'Level 3',
      code: 'DR-03',
      severity: 'major',
      status: 'open',
      companyId: w.subA.companyId,
      dueOn: addDays(todayIn('UTC'), 7),
      overdue: false,
      note: 'Lift pipe rises above the rating.',
      returnCount: 0,
      loggedBy: { id: w.inspector.id },
      photos: [],
      photoCount: 0,
      thumbUrl: null,
      version: 1,
    });
    expect(res.body.catalogue).toMatchObject({ quantity: 'length', fixGuidance: expect.any(String) });
    expect(res.body.events).toEqual([
      expect.objectContaining({
        kind: 'logged',
        actor: { id: w.inspector.id, name: w.inspector.name },
        from: null,
        to: expect.objectContaining({ status: 'open', severity: 'major', companyId: w.subA.companyId }),
        photoIds: [],
      }),
    ]);
    const second = await postJson(gc, w, { ...dr03(w), severity: 'critical', companyId: w.subB.companyId, dueOn: '2027-01-15' }).expect(201);
    expect(second.body).toMatchObject({ number: 2, label: '#2', severity: 'critical', companyId: w.subB.companyId, dueOn: '2027-01-15' });
    const other = await buildWalkJob(people);
    const firstOfOther = await postJson(inspector, other, dr03(other)).expect(201);
    expect(firstOfOther.body.number).toBe(1);
  });

  it('records a measured value with its limit: 34 in against the model limit of 30 in', async () => {
    const w = await buildWalkJob(people);
    const res = await postJson(inspector, w, { ...dr03(w), measuredText: '34 in' }).expect(201);
    expect(res.body.measuredText).toBe('34 in');
    expect(res.body.measuredValue).toBeCloseTo(863.6, 9);
    expect(res.body.ruleResult).toMatchObject({ status: 'fail', pass: false, limitSource: 'Model CX-24 installation manual, p. 12' });
    expect(res.body.ruleResult.limit).toBeCloseTo(762, 9);
    expect(res.body.ruleResult.margin).toBeCloseTo(-101.6, 9);
    const detail = await gc.agent.get(`/api/jobs/${w.job.id}/findings/${res.body.id}`).expect(200);
    expect(detail.body.ruleResult.limit).toBeCloseTo(762, 9);
  });

  it('logs the finding a failed measurement proposed, with the walk and the unit check', async () => {
    const w = await buildWalkJob(people);
    const walk = (await inspector.agent.post(`/api/jobs/${w.job.id}/walks`).set('X-CSRF-Token', inspector.csrf).send({ levelId: w.level.id }).expect(201))
      .body;
    const checked = await inspector.agent
      .post(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`)
      .set('X-CSRF-Token', inspector.csrf)
      .send({
        walkId: walk.id,
        // Every item that applies marked, so the check is complete: the failed pump lift and the rest OK.
        items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'defect', measuredText: '34 in' }, ...(await everyItem(w.job.id, 'cassette_4way', 'ok', ['DR-03']))],
        complete: true,
      })
      .expect(201);
    const p = checked.body.items[0].proposedFinding;
    const res = await postMultipart(
      inspector,
      w,
      {
        catalogueItemId: p.catalogueItemId,
        unitId: p.unitId,
        severity: p.severity,
        companyId: p.companyId,
        dueOn: p.dueOn,
        measuredText: p.measuredText,
        walkId: p.walkId,
        unitCheckId: p.unitCheckId,
      },
      [{ buffer: jpeg, name: 'lift.jpg' }],
    ).expect(201);
    expect(res.body).toMatchObject({ walkId: walk.id, status: 'open', companyId: w.subA.companyId, photoCount: 1 });
    expect(res.body.ruleResult.margin).toBeCloseTo(-101.6, 9);
    const units = await gc.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units`).expect(200);
    expect(units.body.items[0]).toMatchObject({ tag: 'IU-3-01', state: 'open_findings', openFindings: 1, worstSeverity: 'major' });
    expect(units.body.coverage).toEqual({ checked: 1, total: 3, inProgress: 0, withOpenFindings: 1 });
    const wrongCheck = await postJson(inspector, w, { ...dr03(w), unitId: w.cassette2.id, unitCheckId: p.unitCheckId }).expect(400);
    expect(wrongCheck.body.error.message).toBe('unitCheckId: That unit check is not of this unit.');
  });

  it('attaches to a space or a level, deriving the level; refuses places that disagree', async () => {
    const w = await buildWalkJob(people);
    const pn = w.catalogue.find((c) => c.group === 'penetrations')!;
    const onSpace = await postJson(inspector, w, { catalogueItemId: pn.id, spaceId: w.space.id }).expect(201);
    expect(onSpace.body).toMatchObject({ unitId: null, spaceId: w.space.id, levelId: w.level.id, spaceName: 'Corridor 3A' });
    const onLevel = await postJson(inspector, w, { catalogueItemId: pn.id, levelId: w.otherLevel.id, pinX: 0.25, pinY: 0.75 }).expect(201);
    expect(onLevel.body).toMatchObject({ unitId: null, spaceId: null, levelId: w.otherLevel.id, pinX: 0.25, pinY: 0.75 });
    const mismatch = await postJson(inspector, w, { ...dr03(w), levelId: w.otherLevel.id }).expect(400);
    expect(mismatch.body.error.message).toBe('levelId: The unit is not on that level.');
    const spaceMismatch = await postJson(inspector, w, { catalogueItemId: pn.id, spaceId: w.space.id, levelId: w.otherLevel.id }).expect(400);
    expect(spaceMismatch.body.error.message).toBe('levelId: The space is not on that level.');
  });

  it('answers 400 with a clear message for every malformed finding, and saves nothing', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const before = await snapshot(w);
    const send = async (body: unknown) => (await postJson(inspector, w, body).expect(400)).body.error.message as string;
    expect(await send({ catalogueItemId: w.byCode('DR-03').id })).toBe('unitId: Attach the finding to a unit, a space or a level.');
    expect(await send({ unitId: w.cassette.id })).toBe('catalogueItemId: Choose the defect from the list, or describe it under Something else.');
    expect(await send({ ...dr03(w), severity: 'urgent' })).toBe('severity: Choose the severity: critical, major or minor.');
    expect(await send({ ...dr03(w), dueOn: '2026-02-30' })).toBe('dueOn: Not a real date.');
    expect(await send({ ...dr03(w), pinX: 0.5 })).toBe('pinX: Send both pinX and pinY, or neither.');
    expect(await send({ ...dr03(w), title: 'x' })).toMatch(/title|Unrecognized/);
    expect(await send({ ...dr03(w), note: 'x'.repeat(2001) })).toBe('note: The note is at most 2,000 characters: shorten it by 1.');
    expect(await send({ ...dr03(w), unitId: other.cassette.id })).toBe('unitId: That unit is not on this job.');
    expect(await send({ catalogueItemId: other.byCode('DR-03').id, unitId: w.cassette.id })).toBe('catalogueItemId: Choose the defect from the list, or describe it under Something else.');
    expect(await send({ catalogueItemId: w.notForCassettes.id, unitId: w.cassette.id })).toBe(
      `catalogueItemId: ${w.notForCassettes.code} ${w.notForCassettes.title} does not apply to this unit's kind (Ceiling cassette, four-way). Choose the defect from the list, or describe it under Something else.`,
    );
    expect(await send({ ...dr03(w), companyId: other.gcCompany.id === w.gcCompany.id ? MISSING : MISSING })).toBe(
      'companyId: That company is not on this job.',
    );
    expect(await send({ ...dr03(w), measuredText: 'tall' })).toMatch(/^measuredText: /);
    expect(await send({ catalogueItemId: w.byCode('MT-01').id, unitId: w.cassette.id, measuredText: '3 in' })).toMatch(
      /^measuredText: MT-01 .* has no measured rule/,
    );
    expect(await send({ ...dr03(w), walkId: MISSING })).toBe('walkId: That walk is not on this job.');
    const uncovered = w.catalogue.find((c) => !['general', 'mechanical', 'plumbing', 'electrical', 'controls'].includes(c.trade) && c.unitKinds.includes('cassette_4way'));
    if (uncovered) {
      expect(await send({ catalogueItemId: uncovered.id, unitId: w.cassette.id })).toBe(
        `companyId: No company on this job covers the ${uncovered.trade} trade; choose the responsible company.`,
      );
    }
    expect(await snapshot(w)).toEqual(before);
  });

  it('refuses a subcontractor (403), a non-member (404) and a signed-out caller (401)', async () => {
    const w = await buildWalkJob(people);
    await postJson(subA, w, dr03(w)).expect(403);
    await postJson(outsider, w, dr03(w)).expect(404);
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    await agent.post(`/api/jobs/${w.job.id}/findings`).set('X-CSRF-Token', csrf).send(dr03(w)).expect(401);
    await agent.post(`/api/jobs/${w.job.id}/findings`).set('X-CSRF-Token', csrf).field('data', JSON.stringify(dr03(w))).attach('photos', jpeg, 'a.jpg').expect(401);
    expect((await countRows(w.job.id)).findings).toBe(0);
  });

  it('logs a finding with photos (multipart) and serves them to those who may see it', async () => {
    const w = await buildWalkJob(people);
    const before = await s3.keys();
    const res = await postMultipart(inspector, w, { ...dr03(w), note: 'See photos.' }, [
      { buffer: jpeg, name: 'IMG_0001.JPG' },
      { buffer: await sharp(jpeg).png().toBuffer(), name: 'screen.png', type: 'image/png' },
    ]).expect(201);
    expect(res.body.photos).toHaveLength(2);
    expect(res.body.photoCount).toBe(2);
    const [p1] = res.body.photos;
    expect(p1).toMatchObject({
      url: `/api/jobs/${w.job.id}/photos/${p1.id}`,
      thumbUrl: `/api/jobs/${w.job.id}/photos/${p1.id}/thumb`,
      contentType: 'image/jpeg',
      width: 160,
      height: 120,
      fixId: null,
      uploadedBy: { id: w.inspector.id },
    });
    expect(res.body.thumbUrl).toBe(p1.thumbUrl);
    expect(res.body.events[0].photoIds).toEqual(res.body.photos.map((p: { id: string }) => p.id));
    // Two photos, each with its thumbnail and its print copy.
    expect((await s3.keys()).length).toBe(before.length + 6);

    for (const who of [gc, inspector, subA]) {
      const full = await who.agent.get(p1.url).buffer(true).expect(200);
      expect(full.headers['content-type']).toBe('image/jpeg');
      expect(full.headers['x-content-type-options']).toBe('nosniff');
      const thumb = await who.agent.get(p1.thumbUrl).expect(200);
      expect(thumb.headers['content-type']).toBe('image/jpeg');
    }
    // Company B is not responsible: the photo does not exist for them.
    await subB.agent.get(p1.url).expect(404);
    await subB.agent.get(p1.thumbUrl).expect(404);
    await outsider.agent.get(p1.url).expect(404);
    await request(trimout.app).get(p1.url).expect(401);
    await gc.agent.get(`/api/jobs/${w.job.id}/photos/${MISSING}`).expect(404);
    const bad = await gc.agent.get(`/api/jobs/${w.job.id}/photos/nope`).expect(400);
    expect(bad.body.error.message).toBe('params.photoId: This link does not name a photo: open the photo from its list.');
    // Another job's URL with this photo's id: not found.
    const other = await buildWalkJob(people);
    await gc.agent.get(`/api/jobs/${other.job.id}/photos/${p1.id}`).expect(404);
  });

  describe('refused uploads save nothing (no finding, no photo row, no stored object)', () => {
    const cases: Array<[string, () => Array<{ buffer: Buffer; name: string; type?: string }>, number, RegExp]> = [
      ['a 0-byte file', () => [{ buffer: Buffer.alloc(0), name: 'empty.jpg' }], 400, /empty \(0 bytes\)/],
      ['a text file renamed .jpg', () => [{ buffer: Buffer.from('just some words, not a photo\n'), name: 'notes.jpg' }], 415, /not an image/],
      ['a 30 MB image', () => [{ buffer: Buffer.concat([jpeg, Buffer.alloc(30 * 1024 * 1024 - jpeg.length, 7)]), name: 'huge.jpg' }], 413, /at most 15 MB/],
      ['a truncated JPEG', () => [{ buffer: jpeg.subarray(0, Math.floor(jpeg.length / 2)), name: 'cut.jpg' }], 400, /damaged or incomplete/],
      ['eleven files at once', () => Array.from({ length: 11 }, (_, i) => ({ buffer: jpeg, name: `p${i}.jpg` })), 413, /At most 10 photos/],
      ['one good photo and one bad one', () => [{ buffer: jpeg, name: 'good.jpg' }, { buffer: Buffer.from('%PDF-1.4'), name: 'doc.jpg' }], 415, /^Photo 2 of 2: /],
    ];
    it.each(cases)('%s', async (_name, files, status, message) => {
      const w = await buildWalkJob(people);
      const before = await snapshot(w);
      const res = await postMultipart(inspector, w, dr03(w), files()).expect(status);
      expect(res.body.error.message).toMatch(message);
      expect(await snapshot(w)).toEqual(before);
      // The server still answers.
      await inspector.agent.get(`/api/jobs/${w.job.id}/findings`).expect(200);
    });

    it('a malformed multipart form: data missing, not JSON, or an unknown field', async () => {
      const w = await buildWalkJob(people);
      const before = await snapshot(w);
      const noData = await inspector.agent
        .post(`/api/jobs/${w.job.id}/findings`)
        .set('X-CSRF-Token', inspector.csrf)
        .attach('photos', jpeg, 'a.jpg')
        .expect(400);
      expect(noData.body.error.message).toBe('data: Send the finding as JSON in the "data" field.');
      const notJson = await postMultipart(inspector, w, '{not json', [{ buffer: jpeg, name: 'a.jpg' }]).expect(400);
      expect(notJson.body.error.message).toBe('data: The "data" field is not valid JSON.');
      const extra = await inspector.agent
        .post(`/api/jobs/${w.job.id}/findings`)
        .set('X-CSRF-Token', inspector.csrf)
        .field('data', JSON.stringify(dr03(w)))
        .field('severity', 'critical')
        .expect(400);
      expect(extra.body.error.message).toBe('severity: Unknown form field; send the finding as JSON in "data".');
      const invalid = await postMultipart(inspector, w, { unitId: w.cassette.id }, [{ buffer: jpeg, name: 'a.jpg' }]).expect(400);
      expect(invalid.body.error.message).toBe('catalogueItemId: Choose the defect from the list, or describe it under Something else.');
      expect(await snapshot(w)).toEqual(before);
    });

    it('a database failure after the photos were stored: the stored objects are deleted again', async () => {
      const w = await buildWalkJob(people);
      const before = await snapshot(w);
      await db.sequelize.query(`
        CREATE OR REPLACE FUNCTION test_fail_finding() RETURNS trigger LANGUAGE plpgsql AS $$
        BEGIN RAISE EXCEPTION 'test: refuse this finding'; END $$`);
      await db.sequelize.query(
        `CREATE TRIGGER test_fail_finding BEFORE INSERT ON findings FOR EACH ROW WHEN (NEW.note = 'fail in the transaction') EXECUTE FUNCTION test_fail_finding()`,
      );
      try {
        const res = await postMultipart(inspector, w, { ...dr03(w), note: 'fail in the transaction' }, [
          { buffer: jpeg, name: 'a.jpg' },
          { buffer: jpeg, name: 'b.jpg' },
        ]).expect(500);
        expect(res.body.error.id).toBe('internal');
      } finally {
        await db.sequelize.query(`DROP TRIGGER test_fail_finding ON findings`);
        await db.sequelize.query(`DROP FUNCTION test_fail_finding()`);
      }
      expect(await snapshot(w)).toEqual(before);
    });
  });

  it('a retried POST with the same Idempotency-Key never makes a second finding or stores photos twice', async () => {
    const w = await buildWalkJob(people);
    const before = await snapshot(w);
    const data = { ...dr03(w), note: 'Retried from a phone on a ladder.' };
    const first = await postMultipart(inspector, w, data, [{ buffer: jpeg, name: 'a.jpg' }], 'finding-retry-0001').expect(201);
    const again = await postMultipart(inspector, w, data, [{ buffer: jpeg, name: 'a.jpg' }], 'finding-retry-0001').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    expect(again.body.number).toBe(first.body.number);
    const after = await snapshot(w);
    expect(after.rows).toEqual({ findings: before.rows.findings + 1, photos: before.rows.photos + 1, events: before.rows.events + 1 });
    expect(after.keys.length).toBe(before.keys.length + 3); // one photo: full, thumbnail, print copy
    const json1 = await postJson(inspector, w, dr03(w), 'finding-retry-0002').expect(201);
    const json2 = await postJson(inspector, w, dr03(w), 'finding-retry-0002').expect(201);
    expect(json2.body.id).toBe(json1.body.id);
    const changed = await postJson(inspector, w, { ...dr03(w), severity: 'minor' }, 'finding-retry-0002').expect(422);
    expect(changed.body.error.message).toBe('This Idempotency-Key was already used for a different request.');
    expect((await countRows(w.job.id)).findings).toBe(before.rows.findings + 2);
  });

  it('the same Idempotency-Key with another photo (same data) → 422, never the first answer replayed; nothing stored', async () => {
    const w = await buildWalkJob(people);
    const data = { ...dr03(w), note: 'One photo, then another under the same key.' };
    const other = await sharp({ create: { width: 160, height: 120, channels: 3, background: { r: 40, g: 40, b: 200 } } }).jpeg().toBuffer();
    await postMultipart(inspector, w, data, [{ buffer: jpeg, name: 'a.jpg' }], 'finding-photo-0001').expect(201);
    const after = await snapshot(w);
    const swapped = await postMultipart(inspector, w, data, [{ buffer: other, name: 'a.jpg' }], 'finding-photo-0001').expect(422);
    expect(swapped.headers['idempotent-replayed']).toBeUndefined();
    expect(swapped.body.error).toEqual({ id: 'unprocessable', message: 'This Idempotency-Key was already used for a different request.' });
    const added = await postMultipart(inspector, w, data, [{ buffer: jpeg, name: 'a.jpg' }, { buffer: jpeg, name: 'b.jpg' }], 'finding-photo-0001').expect(422);
    expect(added.body.error.id).toBe('unprocessable');
    expect(await snapshot(w)).toEqual(after);
    // The very same request still replays.
    const again = await postMultipart(inspector, w, data, [{ buffer: jpeg, name: 'renamed.jpg' }], 'finding-photo-0001').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
  });
});

describe('POST /api/jobs/:jobId/findings with an id made on the phone', () => {
  it('creates the finding under that id; the same id again (another key) answers that finding, once', async () => {
    const w = await buildWalkJob(people);
    const before = await snapshot(w);
    const findingId = crypto.randomUUID();
    const data = { ...dr03(w), id: findingId, note: 'Logged without signal.' };
    const first = await postMultipart(inspector, w, data, [{ buffer: jpeg, name: 'a.jpg' }], 'phone-id-0001').expect(201);
    expect(first.body.id).toBe(findingId);
    // Its first answer lost and the key forgotten: the id alone still makes it once.
    const again = await postMultipart(inspector, w, data, [{ buffer: jpeg, name: 'a.jpg' }], 'phone-id-0002').expect(200);
    expect(again.body.id).toBe(findingId);
    expect(again.body.number).toBe(first.body.number);
    expect(again.headers.etag).toBe('"v1"');
    const noKey = await postJson(inspector, w, { ...dr03(w), id: findingId }).expect(200);
    expect(noKey.body.id).toBe(findingId);
    const after = await snapshot(w);
    expect(after.rows).toEqual({ findings: before.rows.findings + 1, photos: before.rows.photos + 1, events: before.rows.events + 1 });
    expect(after.keys.length).toBe(before.keys.length + 3); // one photo: full, thumbnail, print copy
  });

  it('an id already used by another person or on another job → 409 finding_id_taken, nothing saved', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const findingId = crypto.randomUUID();
    await postJson(inspector, w, { ...dr03(w), id: findingId }, 'phone-id-0003').expect(201);
    const before = await snapshot(w);
    const otherBefore = await countRows(other.job.id);
    const byGc = await postJson(gc, w, { ...dr03(w), id: findingId }, 'phone-id-0004').expect(409);
    expect(byGc.body.error.id).toBe('finding_id_taken');
    const elsewhere = await postMultipart(inspector, other, { ...dr03(other), id: findingId }, [{ buffer: jpeg, name: 'a.jpg' }], 'phone-id-0005').expect(409);
    expect(elsewhere.body.error.id).toBe('finding_id_taken');
    expect(await snapshot(w)).toEqual(before);
    expect(await countRows(other.job.id)).toEqual(otherBefore);
  });

  it('an id that is not a UUID → 400 naming the field', async () => {
    const w = await buildWalkJob(people);
    const res = await postJson(inspector, w, { ...dr03(w), id: 'phone-1' }).expect(400);
    expect(res.body.error.fields).toHaveProperty('id');
  });
});

describe('GET /api/jobs/:jobId/findings', () => {
  async function seeded() {
    const w = await buildWalkJob(people);
    // Logged a second apart, so the loggedAt sorts have no ties.
    const at = (n: number) => new Date(Date.now() - (10 - n) * 1000);
    const f1 = await insertFinding(w, { severity: 'major', note: 'Lift too high', dueOn: '2020-01-01', loggedAt: at(1) });
    const f2 = await insertFinding(w, {
      severity: 'critical',
      companyId: w.subB.companyId,
      unitId: w.wall.id,
      code: w.notForCassettes.code,
      dueOn: '2099-01-01',
      loggedAt: at(2),
    });
    const f3 = await insertFinding(w, { severity: 'minor', status: 'closed', unitId: w.cassette2.id, code: 'MT-01', dueOn: '2020-01-01', loggedAt: at(3) });
    const f4 = await insertFinding(w, { severity: 'major', status: 'fix_submitted', unitId: null, code: 'MT-01', dueOn: '2099-06-01', loggedAt: at(4) });
    return { w, f1, f2, f3, f4 };
  }
  const ids = (res: request.Response) => res.body.items.map((f: { id: string }) => f.id);

  it('lists every finding for the GC manager and inspector, newest first, with total and counts', async () => {
    const { w, f1, f2, f3, f4 } = await seeded();
    for (const who of [gc, inspector]) {
      const res = await who.agent.get(`/api/jobs/${w.job.id}/findings`).expect(200);
      expect(ids(res)).toEqual([f4.id, f3.id, f2.id, f1.id]);
      expect(res.body.total).toBe(4);
      expect(res.body.counts).toEqual({
        byStatus: { open: 2, fix_submitted: 1, closed: 1, voided: 0 },
        bySeverity: { critical: 1, major: 2, minor: 1 },
      });
      expect(res.body.nextCursor).toBeNull();
    }
    const first = (await gc.agent.get(`/api/jobs/${w.job.id}/findings?sort=number`).expect(200)).body.items[0];
    expect(first).toMatchObject({ label: `#${f1.number}`, overdue: true, unitTag: 'IU-3-01', companyId: w.subA.companyId });
  });

  it('filters by level, space, unit, kind, status, severity, company, defect type, overdue and text', async () => {
    const { w, f1, f2, f3, f4 } = await seeded();
    const get = async (qs: string) => ids(await gc.agent.get(`/api/jobs/${w.job.id}/findings?sort=number&${qs}`).expect(200));
    expect(await get(`levelId=${w.level.id}`)).toEqual([f1.id, f2.id, f3.id, f4.id]);
    expect(await get(`levelId=${w.otherLevel.id}`)).toEqual([]);
    expect(await get(`spaceId=${w.space.id}`)).toEqual([f1.id, f3.id]);
    expect(await get(`unitId=${w.cassette.id}`)).toEqual([f1.id]);
    expect(await get('kind=wall_mounted')).toEqual([f2.id]);
    expect(await get('status=open,fix_submitted')).toEqual([f1.id, f2.id, f4.id]);
    expect(await get('severity=critical')).toEqual([f2.id]);
    expect(await get(`companyId=${w.subB.companyId}`)).toEqual([f2.id]);
    expect(await get(`catalogueItemId=${w.byCode('MT-01').id}`)).toEqual([f3.id, f4.id]);
    expect(await get('overdue=true')).toEqual([f1.id]);
    expect(await get('q=lift%20too')).toEqual([f1.id]);
    expect(await get('q=IU-3-03')).toEqual([f2.id]);
    expect(await get(`q=%23${f3.number}`)).toEqual([f3.id]);
    expect(await get('q=MT-01')).toEqual([f3.id, f4.id]);
    const filtered = await gc.agent.get(`/api/jobs/${w.job.id}/findings?status=open`).expect(200);
    expect(filtered.body.total).toBe(2);
    // Status counts ignore the status filter (for tabs); severity counts respect it.
    expect(filtered.body.counts.byStatus).toEqual({ open: 2, fix_submitted: 1, closed: 1, voided: 0 });
    expect(filtered.body.counts.bySeverity).toEqual({ critical: 1, major: 1, minor: 0 });
  });

  it('sorts from an allowlist and pages with an opaque cursor in every sort', async () => {
    const { w, f1, f2, f3, f4 } = await seeded();
    const all = async (sort: string) => {
      const out: string[] = [];
      let cursor: string | null = null;
      do {
        const qs: string = `sort=${sort}&limit=1${cursor ? `&cursor=${cursor}` : ''}`;
        const res = await gc.agent.get(`/api/jobs/${w.job.id}/findings?${qs}`).expect(200);
        out.push(...ids(res));
        expect(res.body.total).toBe(4);
        cursor = res.body.nextCursor;
      } while (cursor);
      return out;
    };
    expect(await all('number')).toEqual([f1.id, f2.id, f3.id, f4.id]);
    expect(await all('-number')).toEqual([f4.id, f3.id, f2.id, f1.id]);
    expect(await all('severity')).toEqual([f2.id, ...[f1.id, f4.id].sort(), f3.id]);
    expect(await all('-severity')).toEqual([f3.id, ...[f1.id, f4.id].sort().reverse(), f2.id]);
    expect((await all('dueOn')).slice(2)).toEqual([f2.id, f4.id]);
    expect((await all('-dueOn')).slice(0, 2)).toEqual([f4.id, f2.id]);
    expect(await all('loggedAt')).toEqual([f1.id, f2.id, f3.id, f4.id]);
    expect(await all('-loggedAt')).toEqual([f4.id, f3.id, f2.id, f1.id]);
  });

  it('shows a subcontractor only their own company findings (list, counts and detail)', async () => {
    const { w, f1, f2, f3, f4 } = await seeded();
    const mine = await subA.agent.get(`/api/jobs/${w.job.id}/findings?sort=number`).expect(200);
    expect(ids(mine)).toEqual([f1.id, f3.id, f4.id]);
    expect(mine.body.total).toBe(3);
    expect(mine.body.counts.bySeverity).toEqual({ critical: 0, major: 2, minor: 1 });
    const asked = await subA.agent.get(`/api/jobs/${w.job.id}/findings?companyId=${w.subB.companyId}`).expect(200);
    expect(asked.body.items).toEqual([]);
    expect(asked.body.total).toBe(0);
    const theirs = await subB.agent.get(`/api/jobs/${w.job.id}/findings`).expect(200);
    expect(ids(theirs)).toEqual([f2.id]);
    await subA.agent.get(`/api/jobs/${w.job.id}/findings/${f1.id}`).expect(200);
    const hidden = await subA.agent.get(`/api/jobs/${w.job.id}/findings/${f2.id}`).expect(404);
    expect(hidden.body.error.message).toBe('Finding not found.');
    expect(JSON.stringify(hidden.body)).not.toContain(f2.id);
  });

  it('answers 400 for bad filters, 404 to a non-member, 401 signed out', async () => {
    const w = await buildWalkJob(people);
    const bad = async (qs: string) => (await gc.agent.get(`/api/jobs/${w.job.id}/findings?${qs}`).expect(400)).body.error.message as string;
    expect(await bad('sort=note')).toBe('query.sort: One of number, -number, dueOn, -dueOn, loggedAt, -loggedAt, severity, -severity.');
    expect(await bad('status=open,lost')).toBe('query.status: Use one or more of open, fix_submitted, closed, voided, separated by commas.');
    expect(await bad('limit=201')).toBe('query.limit: At most 200.');
    expect(await bad('levelId=3')).toBe('query.levelId: This link does not name a level: open the level from its list.');
    expect(await bad('order=number')).toMatch(/order|Unrecognized/);
    expect(await bad('cursor=abc')).toBe('This list position is not valid any more; start again from the first page.');
    await outsider.agent.get(`/api/jobs/${w.job.id}/findings`).expect(404);
    await request(trimout.app).get(`/api/jobs/${w.job.id}/findings`).expect(401);
  });
});

describe('GET /api/jobs/:jobId/findings/:findingId', () => {
  it('shows photos, the measured value with its limit, the timeline and an ETag; 404 outside the scope', async () => {
    const w = await buildWalkJob(people);
    const created = await postMultipart(inspector, w, { ...dr03(w), measuredText: '34 in' }, [{ buffer: jpeg, name: 'a.jpg' }]).expect(201);
    for (const who of [gc, inspector, subA]) {
      const res = await who.agent.get(`/api/jobs/${w.job.id}/findings/${created.body.id}`).expect(200);
      expect(res.headers.etag).toBe('"v1"');
      expect(res.body.photos).toHaveLength(1);
      expect(res.body.events.map((e: { kind: string }) => e.kind)).toEqual(['logged']);
      expect(res.body.ruleResult.limitSource).toBe('Model CX-24 installation manual, p. 12');
    }
    await subB.agent.get(`/api/jobs/${w.job.id}/findings/${created.body.id}`).expect(404);
    await outsider.agent.get(`/api/jobs/${w.job.id}/findings/${created.body.id}`).expect(404);
    await gc.agent.get(`/api/jobs/${w.job.id}/findings/${MISSING}`).expect(404);
    const bad = await gc.agent.get(`/api/jobs/${w.job.id}/findings/42`).expect(400);
    expect(bad.body.error.message).toBe('params.findingId: This link does not name a finding: open the finding from its list.');
    await request(trimout.app).get(`/api/jobs/${w.job.id}/findings/${created.body.id}`).expect(401);
    const other = await buildWalkJob(people);
    await gc.agent.get(`/api/jobs/${other.job.id}/findings/${created.body.id}`).expect(404);
  });
});

describe('finding_events is append-only', () => {
  it('refuses UPDATE, DELETE and TRUNCATE in the database', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    await expect(db.sequelize.query(`UPDATE finding_events SET reason = 'rewritten' WHERE finding_id = $1`, { bind: [f.id] })).rejects.toThrow(
      /append-only: UPDATE is not allowed/,
    );
    await expect(db.sequelize.query(`DELETE FROM finding_events WHERE finding_id = $1`, { bind: [f.id] })).rejects.toThrow(
      /append-only: DELETE is not allowed/,
    );
    await expect(db.sequelize.query(`TRUNCATE finding_events CASCADE`)).rejects.toThrow(/append-only: TRUNCATE is not allowed/);
    const [rows] = await db.sequelize.query(`SELECT reason FROM finding_events WHERE finding_id = $1`, { bind: [f.id] });
    expect(rows).toEqual([{ reason: null }]);
  });
});
