/**
 * Photos whenever needed: photos added to an open finding after it was logged, the inspector's own
 * photos and measurement at re-inspection, and the new measurement a fix of a measured defect
 * brings, judged by the same rule and limit as the finding as logged.
 */
import sharp from 'sharp';
import type { TrimoutApp } from '../../../server/app';
import { UnitModel } from '../../../server/models';
import { MAX_PHOTOS_PER_REQUEST, PHOTO_LIMITS } from '../../../shared/rules/photos';
import type { SignedIn } from '../../support/app';
import { buildWalkJob, countRows, insertFinding, startWalkApp, type People, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import request from 'supertest';
import { csrfFor } from '../../support/app';

jest.setTimeout(300_000);

let trimout: TrimoutApp;
let s3: FakeS3;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let subB: SignedIn;
let jpeg: Buffer;
let jpeg2: Buffer;

let api: Awaited<ReturnType<typeof startWalkApp>>;

beforeAll(async () => {
  s3 = await startFakeS3();
  api = await startWalkApp({ objectStore: s3.store });
  ({ trimout, people, gc, inspector, subA, subB } = api);
  jpeg = await sharp({ create: { width: 120, height: 90, channels: 3, background: { r: 30, g: 90, b: 160 } } }).jpeg().toBuffer();
  jpeg2 = await sharp({ create: { width: 90, height: 120, channels: 3, background: { r: 160, g: 90, b: 30 } } }).jpeg().toBuffer();
});
afterAll(async () => {
  await api.close();
  await s3.close();
});

const path = (w: WalkJob, f: { id: string }, rest = '') => `/api/jobs/${w.job.id}/findings/${f.id}${rest}`;

function addPhotos(who: SignedIn, w: WalkJob, f: { id: string }, options: { photos?: Buffer[]; data?: object; key?: string } = {}) {
  const req = who.agent.post(path(w, f, '/photos')).set('X-CSRF-Token', who.csrf);
  if (options.key) req.set('Idempotency-Key', options.key);
  req.field('data', JSON.stringify(options.data ?? {}));
  (options.photos ?? [jpeg]).forEach((b, i) => req.attach('photos', b, { filename: `p-${i}.jpg`, contentType: 'image/jpeg' }));
  return req;
}

function postFix(who: SignedIn, w: WalkJob, f: { id: string }, data: object, key?: string) {
  const req = who.agent.post(path(w, f, '/fixes')).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.field('data', JSON.stringify(data)).attach('photos', jpeg, { filename: 'fix.jpg', contentType: 'image/jpeg' });
}

function reinspectWithPhoto(who: SignedIn, w: WalkJob, f: { id: string; version: number }, data: object, options: { key?: string; photos?: Buffer[] } = {}) {
  const req = who.agent.post(path(w, f, '/reinspections')).set('X-CSRF-Token', who.csrf).set('If-Match', `"v${f.version}"`);
  if (options.key) req.set('Idempotency-Key', options.key);
  req.field('data', JSON.stringify(data));
  (options.photos ?? [jpeg2]).forEach((b, i) => req.attach('photos', b, { filename: `r-${i}.jpg`, contentType: 'image/jpeg' }));
  return req;
}

function reinspectJson(who: SignedIn, w: WalkJob, f: { id: string; version: number }, body: object) {
  return who.agent.post(path(w, f, '/reinspections')).set('X-CSRF-Token', who.csrf).set('If-Match', `"v${f.version}"`).send(body);
}

/** A pump-lift finding (DR-03) on the cassette whose model allows 30 in, logged through the API with its measurement. */
async function measuredFinding(w: WalkJob, measuredText = '34 in') {
  const res = await inspector.agent
    .post(`/api/jobs/${w.job.id}/findings`)
    .set('X-CSRF-Token', inspector.csrf)
    .send({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, companyId: w.subA.companyId, measuredText })
    .expect(201);
  expect(res.body.ruleResult.pass).toBe(false);
  return res.body as { id: string; version: number };
}

async function detail(w: WalkJob, f: { id: string }) {
  return (await inspector.agent.get(path(w, f)).expect(200)).body;
}

// ---------------------------------------------------------------------------------------------
// Photos added after logging
// ---------------------------------------------------------------------------------------------

describe('POST /findings/:findingId/photos', () => {
  it('adds photos of the defect to an open finding, with a "photo added" event and the note; the version stays', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const res = await addPhotos(inspector, w, f, { photos: [jpeg, jpeg2], data: { note: 'From the other side of the unit.' } }).expect(201);
    expect(res.body.photos).toHaveLength(2);
    expect(res.body.photos.every((p: { stage: string; fixId: null }) => p.stage === 'finding' && p.fixId === null)).toBe(true);
    expect(res.body.photoCount).toBe(2);
    expect(res.body.version).toBe(f.version);
    expect(res.headers.etag).toBe(`"v${f.version}"`);
    const event = res.body.events.find((e: { kind: string }) => e.kind === 'photo_added');
    expect(event).toMatchObject({ reason: 'From the other side of the unit.', to: { photoCount: 2 }, actor: { id: w.inspector.id } });
    expect(event.photoIds).toEqual(res.body.photos.map((p: { id: string }) => p.id));
    // The photo is served like the finding's own.
    await subA.agent.get(res.body.photos[0].url).expect(200).expect('Content-Type', 'image/jpeg');
  });

  it('lets the GC manager add to a returned finding (open again)', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    await postFix(subA, w, f, { note: 'Re-strapped.' }).expect(201);
    await reinspectJson(inspector, w, { id: f.id, version: 2 }, { verdict: 'return', reason: 'Still sags.' }).expect(200);
    const res = await addPhotos(gc, w, f).expect(201);
    expect(res.body.status).toBe('open');
    expect(res.body.returnCount).toBe(1);
  });

  it.each([['fix_submitted'], ['closed'], ['voided']] as const)('refuses a %s finding with 409 before reading the photos, storing nothing', async (status) => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w, { status });
    const before = await countRows(w.job.id);
    const res = await addPhotos(inspector, w, f).expect(409);
    expect(res.body.error.id).toBe('invalid_transition');
    expect(res.body.error.message).toMatch(/photos can be added only while it is open/);
    expect(await countRows(w.job.id)).toEqual(before);
  });

  it('refuses subcontractors (of its company or another) with 403 and another job or an unknown finding with 404', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const before = await countRows(w.job.id);
    expect((await addPhotos(subA, w, f).expect(403)).body.error.id).toBe('forbidden');
    await addPhotos(subB, w, f).expect(403);
    const other = await buildWalkJob();
    const elsewhere = await insertFinding(other);
    await addPhotos(inspector, w, elsewhere).expect(404); // the own job's path, another job's finding
    await addPhotos(inspector, other, elsewhere).expect(404); // not a member of that job
    await addPhotos(inspector, w, { id: '00000000-0000-4000-8000-000000000000' }).expect(404);
    expect(await countRows(w.job.id)).toEqual(before);
    const agent = request.agent(trimout.app);
    await agent.post(path(w, f, '/photos')).set('X-CSRF-Token', await csrfFor(agent)).field('data', '{}').attach('photos', jpeg, 'a.jpg').expect(401);
  });

  it('answers 400 without photos, 400 for an unknown data field and 413 for a photo over the size limit', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const none = await addPhotos(inspector, w, f, { photos: [] }).expect(400);
    expect(none.body.error.fields).toEqual({ photos: 'Add at least one photo.' });
    const json = await inspector.agent.post(path(w, f, '/photos')).set('X-CSRF-Token', inspector.csrf).send({}).expect(400);
    expect(json.body.error.fields.photos).toBeDefined();
    const extra = await addPhotos(inspector, w, f, { data: { caption: 'x' } }).expect(400);
    expect(extra.body.error.message).toMatch(/caption/);
    const big = Buffer.alloc(PHOTO_LIMITS.fileSize + 1, 0xff);
    const tooBig = await addPhotos(inspector, w, f, { photos: [big] }).expect(413);
    expect(tooBig.body.error.id).toBe('file_too_large');
    expect((await detail(w, f)).photos).toHaveLength(0);
  });

  it('keeps a finding to the photo limit: 409 photo_limit naming the room left, and 409 before reading once it is full', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    await addPhotos(inspector, w, f, { photos: Array.from({ length: MAX_PHOTOS_PER_REQUEST - 1 }, () => jpeg) }).expect(201);
    const over = await addPhotos(inspector, w, f, { photos: [jpeg, jpeg2] }).expect(409);
    expect(over.body.error).toMatchObject({ id: 'photo_limit', fields: { photos: expect.stringMatching(/add 1 more at most/) } });
    await addPhotos(inspector, w, f, { photos: [jpeg2] }).expect(201);
    const full = await addPhotos(inspector, w, f).expect(409);
    expect(full.body.error.id).toBe('photo_limit');
    expect((await detail(w, f)).photoCount).toBe(MAX_PHOTOS_PER_REQUEST);
  });

  it('replays a retry with the same Idempotency-Key (one set of photos), and 422 for the key with another photo', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const first = await addPhotos(inspector, w, f, { key: `add-photos-${f.id}` }).expect(201);
    const again = await addPhotos(inspector, w, f, { key: `add-photos-${f.id}` }).expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.photos.map((p: { id: string }) => p.id)).toEqual(first.body.photos.map((p: { id: string }) => p.id));
    expect((await detail(w, f)).photos).toHaveLength(1);
    await addPhotos(inspector, w, f, { key: `add-photos-${f.id}`, photos: [jpeg2] }).expect(422);
  });
});

// ---------------------------------------------------------------------------------------------
// The new measurement of a fix
// ---------------------------------------------------------------------------------------------

describe('a fix of a measured defect', () => {
  it('needs the new measurement: 400 on measuredText without it, nothing stored', async () => {
    const w = await buildWalkJob(people);
    const f = await measuredFinding(w);
    const before = await countRows(w.job.id);
    const res = await postFix(subA, w, f, { note: 'Lowered the pump.' }).expect(400);
    expect(Object.keys(res.body.error.fields)).toEqual(['measuredText']);
    expect(res.body.error.fields.measuredText).toMatch(/again after the fix/);
    const unreadable = await postFix(subA, w, f, { note: 'Lowered the pump.', measuredText: 'low' }).expect(400);
    expect(Object.keys(unreadable.body.error.fields)).toEqual(['measuredText']);
    expect(await countRows(w.job.id)).toEqual(before);
    expect((await detail(w, f)).status).toBe('open');
  });

  it('stores it with its verdict against the limit the finding was logged against, in the fix and the history', async () => {
    const w = await buildWalkJob(people);
    const f = await measuredFinding(w);
    // The model's limit is edited after logging: the fix is still judged by the 30 in of the original.
    await UnitModel.update({ limits: { max_pump_lift: { value: 508, stated: 20, unit: 'in', text: '20 in', source: 'revised manual' } } }, { where: { id: w.model.id } });
    const res = await postFix(subA, w, f, { note: 'Lowered the pump.', measuredText: '28 in' }).expect(201);
    expect(res.body.fix).toMatchObject({ measuredText: '28 in', ruleResult: { pass: true, limitSource: expect.stringContaining('installation manual, p. 12') } });
    const event = res.body.finding.events.find((e: { kind: string }) => e.kind === 'fix_submitted');
    expect(event.to).toMatchObject({ measuredText: '28 in', pass: true, verdict: 'Within the limit of 2\' 6" (Model CX-24 installation manual, p. 12)' });
    // A fix on a finding logged without a measurement needs none.
    const plain = await insertFinding(w);
    await postFix(subA, w, plain, { note: 'Re-strapped.' }).expect(201);
  });

  it('refuses a measurement for a defect type that takes none', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w, { code: 'MT-01' });
    const res = await postFix(subA, w, f, { note: 'Done.', measuredText: '3 in' }).expect(400);
    expect(res.body.error.fields.measuredText).toMatch(/has no measured rule/);
  });

  it('a subcontractor of another company gets 404 for the finding (nothing leaked)', async () => {
    const w = await buildWalkJob(people);
    const f = await measuredFinding(w);
    await postFix(subB, w, f, { note: 'x', measuredText: '28 in' }).expect(404);
  });
});

// ---------------------------------------------------------------------------------------------
// Re-inspection: the inspector's photo and measurement
// ---------------------------------------------------------------------------------------------

describe('re-inspection with photos and a measurement', () => {
  it('accepts with the inspector photo and a passing measurement: stage reinspection, in the event, not counted as the defect photos', async () => {
    const w = await buildWalkJob(people);
    const f = await measuredFinding(w);
    await postFix(subA, w, f, { note: 'Lowered the pump.', measuredText: '28 in' }).expect(201);
    const res = await reinspectWithPhoto(inspector, w, { id: f.id, version: 2 }, { verdict: 'accept', measuredText: '29 in' }, { key: `ri-${f.id}` }).expect(200);
    expect(res.body.status).toBe('closed');
    const mine = res.body.photos.filter((p: { stage: string }) => p.stage === 'reinspection');
    expect(mine).toHaveLength(1);
    expect(mine[0].uploadedBy.id).toBe(w.inspector.id);
    expect(res.body.photos.filter((p: { stage: string }) => p.stage === 'fix')).toHaveLength(1);
    expect(res.body.photoCount).toBe(0);
    const event = res.body.events.find((e: { kind: string }) => e.kind === 'accepted');
    expect(event.photoIds).toEqual([mine[0].id]);
    expect(event.to).toMatchObject({ status: 'closed', measuredText: '29 in', pass: true, verdict: expect.stringMatching(/^Within the limit of/) });
    // A retry is a replay: one re-inspection, one photo.
    const again = await reinspectWithPhoto(inspector, w, { id: f.id, version: 2 }, { verdict: 'accept', measuredText: '29 in' }, { key: `ri-${f.id}` }).expect(200);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect((await detail(w, f)).photos.filter((p: { stage: string }) => p.stage === 'reinspection')).toHaveLength(1);
    // The queue's "as logged" side keeps to the defect photos.
  });

  it('refuses to close while the latest new measurement fails the rule (409 measurement_fails); returning is allowed', async () => {
    const w = await buildWalkJob(people);
    const f = await measuredFinding(w);
    await postFix(subA, w, f, { note: 'Moved the pump.', measuredText: '33 in' }).expect(201);
    const before = await countRows(w.job.id);
    const refused = await reinspectJson(inspector, w, { id: f.id, version: 2 }, { verdict: 'accept' }).expect(409);
    expect(refused.body.error.id).toBe('measurement_fails');
    expect(refused.body.error.message).toMatch(/33 in/);
    // The inspector's own measurement, failing, with a photo: refused too, and nothing stored.
    await reinspectWithPhoto(inspector, w, { id: f.id, version: 2 }, { verdict: 'accept', measuredText: '31 in' }).expect(409);
    expect(await countRows(w.job.id)).toEqual(before);
    // Their own passing measurement decides over the fix's.
    const returned = await reinspectWithPhoto(inspector, w, { id: f.id, version: 2 }, { verdict: 'return', reason: 'Lift still too high.', measuredText: '32 in' }).expect(200);
    expect(returned.body.status).toBe('open');
    expect(returned.body.events.find((e: { kind: string }) => e.kind === 'returned').to).toMatchObject({ pass: false, verdict: expect.stringMatching(/^Outside the limit of/) });
  });

  it('closes on the inspector measurement when it passes although the fix measurement failed', async () => {
    const w = await buildWalkJob(people);
    const f = await measuredFinding(w);
    await postFix(subA, w, f, { note: 'Moved the pump.', measuredText: '33 in' }).expect(201);
    const res = await reinspectJson(inspector, w, { id: f.id, version: 2 }, { verdict: 'accept', measuredText: '29 in' }).expect(200);
    expect(res.body.status).toBe('closed');
  });

  it('the queue carries the measured rule, and its "as logged" photos leave out a returned re-inspection’s photos', async () => {
    const w = await buildWalkJob(people);
    const f = await measuredFinding(w);
    await addPhotos(inspector, w, f).expect(201);
    await postFix(subA, w, f, { note: 'Moved the pump.', measuredText: '33 in' }).expect(201);
    await reinspectWithPhoto(inspector, w, { id: f.id, version: 2 }, { verdict: 'return', reason: 'Still too high.' }).expect(200);
    await postFix(subA, w, f, { note: 'Moved it again.', measuredText: '29 in' }).expect(201);
    const queue = (await inspector.agent.get(`/api/jobs/${w.job.id}/reinspections/queue`).expect(200)).body;
    const item = queue.levels.flatMap((l: { items: unknown[] }) => l.items).find((i: { finding: { id: string } }) => i.finding.id === f.id);
    expect(item.rule).toMatchObject({ comparison: 'at_most', quantity: 'length' });
    expect(item.originalPhotos).toHaveLength(1);
    expect(item.originalPhotos[0].stage).toBe('finding');
    expect(item.latestFix).toMatchObject({ measuredText: '29 in', ruleResult: { pass: true } });
  });

  it('refuses an upload on a finding with no fix waiting (409) or by a subcontractor (403) before reading it', async () => {
    const w = await buildWalkJob(people);
    const closed = await insertFinding(w, { status: 'closed' });
    const before = await countRows(w.job.id);
    expect((await reinspectWithPhoto(inspector, w, closed, { verdict: 'accept' }).expect(409)).body.error.id).toBe('invalid_transition');
    const waiting = await insertFinding(w, { status: 'fix_submitted' });
    await reinspectWithPhoto(subA, w, waiting, { verdict: 'accept' }).expect(403);
    const big = Buffer.alloc(PHOTO_LIMITS.fileSize + 1, 0xff);
    await reinspectWithPhoto(inspector, w, waiting, { verdict: 'accept' }, { photos: [big] }).expect(413);
    expect(await countRows(w.job.id)).toEqual({ ...before, findings: before.findings + 1, events: before.events + 1 });
  });
});
