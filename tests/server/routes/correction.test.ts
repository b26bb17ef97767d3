/**
 * The correction loop: the whole transition table (every status × every action × every role,
 * allowed or refused with the exact code and, for 409, the message naming the status), a
 * subcontractor acting on another company's finding (404, nothing leaked, nothing written),
 * If-Match (428 / 412 with the current finding, two concurrent PATCHes: one wins), retried
 * fixes (one fix, one set of photos), bulk all or nothing, and the re-inspection queue.
 */
import sharp from 'sharp';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Finding } from '../../../server/models';
import { decide } from '../../../server/services/findingStatus';
import { FINDING_ACTIONS, type FindingAction } from '../../../shared/schemas/findings';
import { FINDING_STATUSES, type FindingStatus } from '../../../shared/words';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { addMember, buildUser } from '../../support/factories';
import { buildWalkJob, countRows, insertFinding, type People, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { connectTestDb } from '../../support/db';

jest.setTimeout(300_000);

let db: Database;
let trimout: TrimoutApp;
let s3: FakeS3;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let subB: SignedIn;
let jpeg: Buffer;

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  jpeg = await sharp({ create: { width: 120, height: 90, channels: 3, background: { r: 30, g: 90, b: 160 } } })
    .jpeg()
    .toBuffer();
  people = await buildWalkJob();
  gc = await signIn(trimout.app, people.gcManager.email);
  inspector = await signIn(trimout.app, people.inspector.email);
  subA = await signIn(trimout.app, people.subA.email);
  subB = await signIn(trimout.app, people.subB.email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await s3.close();
});

/** A signed-out agent with a CSRF token, so the answer is 401 and not a CSRF refusal. */
async function anon() {
  const agent = request.agent(trimout.app);
  return { agent, csrf: await csrfFor(agent) };
}

const path = (w: WalkJob, f: { id: string }, rest = '') => `/api/jobs/${w.job.id}/findings/${f.id}${rest}`;
const v = (n: number) => ({ 'If-Match': `"v${n}"` });

function postFix(who: SignedIn, w: WalkJob, f: { id: string }, note = 'Re-pitched the drain and re-strapped it.', key?: string, photos = 1) {
  const req = who.agent.post(path(w, f, '/fixes')).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  req.field('data', JSON.stringify({ note }));
  for (let i = 0; i < photos; i++) req.attach('photos', jpeg, { filename: `fix-${i}.jpg`, contentType: 'image/jpeg' });
  return req;
}
function reinspect(who: SignedIn, w: WalkJob, f: { id: string }, body: object, headers: Record<string, string> = v(1), key?: string) {
  const req = who.agent.post(path(w, f, '/reinspections')).set('X-CSRF-Token', who.csrf).set(headers);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body);
}
function patch(who: SignedIn, w: WalkJob, f: { id: string }, body: object, headers: Record<string, string> = v(1)) {
  return who.agent.patch(path(w, f)).set('X-CSRF-Token', who.csrf).set(headers).send(body);
}

// ---------------------------------------------------------------------------------------------
// The transition table
// ---------------------------------------------------------------------------------------------

type Actor = 'gc' | 'inspectorLogger' | 'inspectorOther' | 'sub';
const ACTORS: Actor[] = ['gc', 'inspectorLogger', 'inspectorOther', 'sub'];

/** Written out by hand from the issue (not derived from the code under test). */
const WHO: Record<FindingAction, Actor[]> = {
  submit_fix: ['gc', 'sub'],
  accept: ['gc', 'inspectorLogger', 'inspectorOther'],
  return: ['gc', 'inspectorLogger', 'inspectorOther'],
  close: ['inspectorLogger', 'inspectorOther'],
  void: ['gc', 'inspectorLogger'],
  reopen: ['gc'],
  reassign: ['gc', 'inspectorLogger', 'inspectorOther'],
  change_severity: ['gc', 'inspectorLogger', 'inspectorOther'],
  change_due: ['gc', 'inspectorLogger', 'inspectorOther'],
};
const FROM: Record<FindingAction, Partial<Record<FindingStatus, FindingStatus>>> = {
  submit_fix: { open: 'fix_submitted' },
  accept: { fix_submitted: 'closed' },
  return: { fix_submitted: 'open' },
  close: { open: 'closed' },
  void: { open: 'voided', fix_submitted: 'voided' },
  reopen: { closed: 'open' },
  reassign: { open: 'open', fix_submitted: 'fix_submitted' },
  change_severity: { open: 'open', fix_submitted: 'fix_submitted' },
  change_due: { open: 'open', fix_submitted: 'fix_submitted' },
};
const WORDS: Record<FindingAction, string> = {
  submit_fix: 'given a fix',
  accept: 'accepted',
  return: 'returned',
  close: 'closed',
  void: 'voided',
  reopen: 'reopened',
  reassign: 'reassigned',
  change_severity: 'given another severity',
  change_due: 'given another due date',
};
const STATUS_WORDS: Record<FindingStatus, string> = { open: 'open', fix_submitted: 'fix submitted', closed: 'closed', voided: 'voided' };

function expected(status: FindingStatus, action: FindingAction, actor: Actor): 200 | 201 | 403 | 409 {
  if (!WHO[action].includes(actor)) return 403;
  if (FROM[action][status] === undefined) return 409;
  return action === 'submit_fix' ? 201 : 200;
}

describe('the status machine (pure)', () => {
  it('answers every status × action × role as the table says', () => {
    const roleOf = { gc: 'gc_manager', inspectorLogger: 'inspector', inspectorOther: 'inspector', sub: 'subcontractor' } as const;
    for (const status of FINDING_STATUSES) {
      for (const action of FINDING_ACTIONS) {
        for (const actor of ACTORS) {
          const d = decide(status, action, roleOf[actor], actor === 'inspectorLogger');
          const want = expected(status, action, actor);
          if (want === 403 || want === 409) {
            expect({ status, action, actor, d }).toEqual({ status, action, actor, d: expect.objectContaining({ allowed: false, code: want }) });
            if (want === 409) expect(d).toMatchObject({ message: `This finding is ${STATUS_WORDS[status]}; it cannot be ${WORDS[action]}.` });
          } else {
            expect({ status, action, actor, d }).toEqual({ status, action, actor, d: { allowed: true, to: FROM[action][status] } });
          }
        }
      }
    }
  });
});

describe('the transition table over HTTP', () => {
  let w: WalkJob;
  let otherInspector: SignedIn;
  beforeAll(async () => {
    w = await buildWalkJob(people);
    const u = await buildUser();
    await addMember(w.job.id, u.id, 'inspector');
    otherInspector = await signIn(trimout.app, u.email);
  });

  function send(actor: Actor, action: FindingAction, f: Finding) {
    const who = { gc, inspectorLogger: inspector, inspectorOther: otherInspector, sub: subA }[actor];
    switch (action) {
      case 'submit_fix':
        return postFix(who, w, f);
      case 'accept':
        return reinspect(who, w, f, { verdict: 'accept' });
      case 'return':
        return reinspect(who, w, f, { verdict: 'return', reason: 'The trap still holds water.' });
      case 'close':
        return patch(who, w, f, { close: { note: 'Found fixed on the walk.' } });
      case 'void':
        return patch(who, w, f, { void: { reason: 'Logged twice.' } });
      case 'reopen':
        return patch(who, w, f, { reopen: { reason: 'Leaking again after start-up.' } });
      case 'reassign':
        return patch(who, w, f, { reassign: { companyId: w.subB.companyId, reason: 'Controls wiring, not piping.' } });
      case 'change_severity':
        return patch(who, w, f, { severity: { to: 'critical', reason: 'Water above the ceiling grid.' } });
      case 'change_due':
        return patch(who, w, f, { dueOn: { to: '2027-03-01' } });
    }
  }

  for (const status of FINDING_STATUSES) {
    for (const action of FINDING_ACTIONS) {
      it(`${status} × ${action}`, async () => {
        for (const actor of ACTORS) {
          const f = await insertFinding(w, { status });
          const before = await countRows(w.job.id);
          const res = await send(actor, action, f);
          const want = expected(status, action, actor);
          expect({ actor, status: res.status, body: res.body }).toEqual({ actor, status: want, body: expect.anything() });
          const after = await Finding.findByPk(f.id);
          if (want === 403 || want === 409) {
            if (want === 409) {
              expect(res.body.error).toEqual({ id: 'invalid_transition', message: `This finding is ${STATUS_WORDS[status]}; it cannot be ${WORDS[action]}.` });
            }
            expect(after!.version).toBe(1);
            expect(after!.status).toBe(status);
            expect(await countRows(w.job.id)).toEqual(before);
          } else {
            const to = FROM[action][status]!;
            expect(after!.version).toBe(2);
            expect(after!.status).toBe(to);
            expect(res.headers.etag).toBe('"v2"');
            const finding = action === 'submit_fix' ? res.body.finding : res.body;
            expect(finding).toMatchObject({ status: to, version: 2 });
            expect((await countRows(w.job.id)).events).toBe(before.events + 1);
            if (action === 'return') expect(after!.returnCount).toBe(1);
          }
        }
      });
    }
  }
});

// ---------------------------------------------------------------------------------------------
// Fixes
// ---------------------------------------------------------------------------------------------

describe('POST /findings/:findingId/fixes', () => {
  it('401 signed out; 400 without a photo, without a note, or as JSON; 403 for an inspector; 404 for an unknown finding', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const a = await anon();
    await a.agent.post(path(w, f, '/fixes')).set('X-CSRF-Token', a.csrf).field('data', '{"note":"x"}').attach('photos', jpeg, 'a.jpg').expect(401);
    const noPhoto = await subA.agent.post(path(w, f, '/fixes')).set('X-CSRF-Token', subA.csrf).field('data', JSON.stringify({ note: 'Done.' })).expect(400);
    expect(noPhoto.body.error.message).toBe('photos: Add at least one photo of the fix.');
    const noNote = await postFix(subA, w, f, '   ').expect(400);
    expect(noNote.body.error.message).toBe('note: Say what was fixed.');
    const json = await subA.agent.post(path(w, f, '/fixes')).set('X-CSRF-Token', subA.csrf).send({ note: 'Done.' }).expect(400);
    expect(json.body.error.fields).toEqual({ photos: 'Add at least one photo of the fix.' });
    await postFix(inspector, w, f).expect(403);
    await postFix(subA, w, { id: '00000000-0000-4000-8000-000000000000' }).expect(404);
    expect((await Finding.findByPk(f.id))!.status).toBe('open');
  });

  it('stores the fix with its photos; the same people as the finding see them, another company gets 404', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const res = await postFix(subA, w, f, 'Re-pitched the drain.', undefined, 2).expect(201);
    expect(res.body.fix).toMatchObject({ findingId: f.id, note: 'Re-pitched the drain.', submittedBy: { id: w.subA.id } });
    expect(res.body.fix.photos).toHaveLength(2);
    expect(res.body.finding.photos.map((p: { fixId: string }) => p.fixId)).toEqual([res.body.fix.id, res.body.fix.id]);
    const ev = res.body.finding.events.at(-1);
    expect(ev).toMatchObject({ kind: 'fix_submitted', actor: { id: w.subA.id }, from: { status: 'open' }, to: { status: 'fix_submitted', fixId: res.body.fix.id } });
    expect(ev.photoIds.sort()).toEqual(res.body.fix.photos.map((p: { id: string }) => p.id).sort());
    const url = res.body.fix.photos[0].url as string;
    for (const who of [subA, gc, inspector]) {
      const img = await who.agent.get(url).expect(200);
      expect(img.headers['content-type']).toBe('image/jpeg');
    }
    await subB.agent.get(url).expect(404);
    await subB.agent.get(`${url}/thumb`).expect(404);
  });

  it('refuses a bad photo with nothing saved: no fix, no photo row, no stored object, status unchanged', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const before = { rows: await countRows(w.job.id), keys: await s3.keys() };
    const notImage = await subA.agent
      .post(path(w, f, '/fixes'))
      .set('X-CSRF-Token', subA.csrf)
      .field('data', JSON.stringify({ note: 'Done.' }))
      .attach('photos', jpeg, { filename: 'good.jpg', contentType: 'image/jpeg' })
      .attach('photos', Buffer.from('not a photo at all'), { filename: 'bad.jpg', contentType: 'image/jpeg' })
      .expect(415);
    expect(notImage.body.error.message).toMatch(/^Photo 2 of 2: /);
    const extra = await subA.agent
      .post(path(w, f, '/fixes'))
      .set('X-CSRF-Token', subA.csrf)
      .field('data', JSON.stringify({ note: 'Done.' }))
      .field('status', 'closed')
      .attach('photos', jpeg, { filename: 'good.jpg', contentType: 'image/jpeg' })
      .expect(400);
    expect(extra.body.error.message).toBe('status: Unknown form field; send the fix as JSON in "data".');
    expect({ rows: await countRows(w.job.id), keys: await s3.keys() }).toEqual(before);
    expect(await Finding.findByPk(f.id)).toMatchObject({ status: 'open', version: 1 });
  });

  it('a retried fix with the same Idempotency-Key makes one fix and stores its photos once', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const first = await postFix(subA, w, f, 'Replaced the trap.', 'fix-retry-0001').expect(201);
    const keys = await s3.keys();
    const again = await postFix(subA, w, f, 'Replaced the trap.', 'fix-retry-0001').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body).toEqual(first.body);
    expect(await s3.keys()).toEqual(keys);
    const [row] = await db.sequelize.query<{ n: string }>(`SELECT count(*) AS n FROM fixes WHERE finding_id = $1`, { bind: [f.id], type: 'SELECT' as never });
    expect(Number(row!.n)).toBe(1);
    // Two at once with one key: still one fix.
    const g = await insertFinding(w);
    // The second either waits out the first and replays it (201), or finds it still inside its
    // transaction and is told to retry (409 idempotency_in_flight); a retry then replays it.
    const both = await Promise.all([postFix(subA, w, g, 'Same.', 'fix-race-00001'), postFix(subA, w, g, 'Same.', 'fix-race-00001')]);
    const statuses = both.map((r) => r.status).sort();
    expect([[201, 201], [201, 409]]).toContainEqual(statuses);
    const created = both.find((r) => r.status === 201)!;
    for (const r of both.filter((x) => x.status === 409)) expect(r.body.error.id).toBe('idempotency_in_flight');
    const retried = await postFix(subA, w, g, 'Same.', 'fix-race-00001').expect(201);
    expect(retried.headers['idempotent-replayed']).toBe('true');
    expect(retried.body).toEqual(created.body);
    const [row2] = await db.sequelize.query<{ n: string }>(`SELECT count(*) AS n FROM fixes WHERE finding_id = $1`, { bind: [g.id], type: 'SELECT' as never });
    expect(Number(row2!.n)).toBe(1);
  });

  it('the same Idempotency-Key with another photo (same note) → 422, never the first answer replayed; nothing stored', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    await postFix(subA, w, f, 'Replaced the trap.', 'fix-photo-00001').expect(201);
    const before = { rows: await countRows(w.job.id), keys: await s3.keys() };
    const other = await sharp({ create: { width: 120, height: 90, channels: 3, background: { r: 200, g: 200, b: 40 } } }).jpeg().toBuffer();
    const swapped = await subA.agent
      .post(path(w, f, '/fixes'))
      .set('X-CSRF-Token', subA.csrf)
      .set('Idempotency-Key', 'fix-photo-00001')
      .field('data', JSON.stringify({ note: 'Replaced the trap.' }))
      .attach('photos', other, { filename: 'fix-0.jpg', contentType: 'image/jpeg' })
      .expect(422);
    expect(swapped.headers['idempotent-replayed']).toBeUndefined();
    expect(swapped.body.error).toEqual({ id: 'unprocessable', message: 'This Idempotency-Key was already used for a different request.' });
    expect({ rows: await countRows(w.job.id), keys: await s3.keys() }).toEqual(before);
    // The very same request still replays.
    const again = await postFix(subA, w, f, 'Replaced the trap.', 'fix-photo-00001').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
  });
});

// ---------------------------------------------------------------------------------------------
// Another company's finding
// ---------------------------------------------------------------------------------------------

describe("a subcontractor and another company's finding", () => {
  it('answers 404 on every route and writes nothing', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w, { companyId: w.subA.companyId });
    const fixed = await insertFinding(w, { companyId: w.subA.companyId });
    const fix = await postFix(subA, w, fixed).expect(201);
    const before = await countRows(w.job.id);
    const keys = await s3.keys();
    const answers = [
      await subB.agent.get(path(w, f)),
      await subB.agent.get(path(w, f, '/events')),
      await subB.agent.get(path(w, f, '/comments')),
      await subB.agent.post(path(w, f, '/comments')).set('X-CSRF-Token', subB.csrf).send({ text: 'Not ours?' }),
      await postFix(subB, w, f),
      await patch(subB, w, f, { close: {} }),
      await subB.agent.get(fix.body.fix.photos[0].url),
    ];
    for (const res of answers) {
      expect(res.status).toBe(404);
      expect(JSON.stringify(res.body)).not.toContain(f.id);
      expect(JSON.stringify(res.body)).not.toContain('DR-03');
    }
    expect(await countRows(w.job.id)).toEqual(before);
    expect(await s3.keys()).toEqual(keys);
  });

  it('a subcontractor cannot change severity, assignee or due date of their own finding (403, nothing written)', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const before = await countRows(w.job.id);
    for (const body of [{ severity: { to: 'minor' } }, { reassign: { companyId: w.subB.companyId, reason: 'Not ours.' } }, { dueOn: { to: '2027-06-01' } }]) {
      await patch(subA, w, f, body).expect(403);
    }
    expect(await countRows(w.job.id)).toEqual(before);
    expect((await Finding.findByPk(f.id))!.version).toBe(1);
  });
});

// ---------------------------------------------------------------------------------------------
// PATCH: validation, If-Match, concurrency
// ---------------------------------------------------------------------------------------------

describe('PATCH /findings/:findingId', () => {
  it('401, 400 (none / two changes, bad values), 428 without If-Match, 412 stale with the current finding', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const a = await anon();
    await a.agent.patch(path(w, f)).set('X-CSRF-Token', a.csrf).send({ close: {} }).expect(401);
    const none = await patch(gc, w, f, {}).expect(400);
    expect(none.body.error.message).toBe('change: Send exactly one change: reassign, severity, dueOn, void, reopen, close or pin.');
    await patch(gc, w, f, { close: {}, void: { reason: 'x' } }).expect(400);
    const noReason = await patch(gc, w, f, { void: { reason: ' ' } }).expect(400);
    expect(noReason.body.error.message).toBe('void.reason: Give a reason for voiding.');
    const badDate = await patch(gc, w, f, { dueOn: { to: '2027-02-30' } }).expect(400);
    expect(badDate.body.error.message).toBe('dueOn.to: Not a real date.');
    await patch(gc, w, f, { status: 'closed' }).expect(400);
    const foreign = await patch(gc, w, f, { reassign: { companyId: '00000000-0000-4000-8000-000000000000', reason: 'Moved.' } }).expect(400);
    expect(foreign.body.error.message).toBe('reassign.companyId: That company is not on this job.');
    const missing = await patch(gc, w, f, { dueOn: { to: '2027-02-01' } }, {}).expect(428);
    expect(missing.body.error.id).toBe('precondition_required');
    await patch(gc, w, f, { dueOn: { to: '2027-02-01' } }).expect(200);
    const stale = await patch(inspector, w, f, { severity: { to: 'minor' } }).expect(412);
    expect(stale.body.error.id).toBe('stale');
    expect(stale.body.current).toMatchObject({ id: f.id, dueOn: '2027-02-01', severity: 'major', version: 2 });
    expect((await Finding.findByPk(f.id))!.severity).toBe('major');
  });

  it('two PATCHes with the same If-Match: one 200, one 412, never a silent overwrite', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const [a, b] = await Promise.all([
      patch(gc, w, f, { dueOn: { to: '2027-04-01', reason: 'Ceiling closes later.' } }),
      patch(inspector, w, f, { severity: { to: 'critical', reason: 'Water on the grid.' } }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 412]);
    const after = await Finding.findByPk(f.id);
    expect(after!.version).toBe(2);
    const loser = a.status === 412 ? a : b;
    expect(loser.body.current.version).toBe(2);
    const [events] = await db.sequelize.query(`SELECT kind FROM finding_events WHERE finding_id = '${f.id}' ORDER BY at`);
    expect((events as Array<{ kind: string }>).map((e) => e.kind)).toHaveLength(2);
  });

  it('reassign, severity and due date record from / to / reason; voiding keeps the reason', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const r1 = await patch(inspector, w, f, { reassign: { companyId: w.subB.companyId, reason: 'Control wiring.' } }).expect(200);
    expect(r1.body).toMatchObject({ companyId: w.subB.companyId, version: 2 });
    expect(r1.body.events.at(-1)).toMatchObject({
      kind: 'reassigned',
      actor: { id: w.inspector.id },
      from: { companyId: w.subA.companyId },
      to: { companyId: w.subB.companyId },
      reason: 'Control wiring.',
    });
    // Company A no longer sees it; company B does.
    await subA.agent.get(path(w, f)).expect(404);
    await subB.agent.get(path(w, f)).expect(200);
    const r2 = await patch(gc, w, f, { severity: { to: 'critical' } }, v(2)).expect(200);
    expect(r2.body.events.at(-1)).toMatchObject({ kind: 'severity_changed', from: { severity: 'major' }, to: { severity: 'critical' }, reason: null });
    await patch(gc, w, f, { severity: { to: 'critical' } }, v(3)).expect(400);
    const r3 = await patch(gc, w, f, { void: { reason: 'Duplicate of another finding.' } }, v(3)).expect(200);
    expect(r3.body).toMatchObject({ status: 'voided', voidedReason: 'Duplicate of another finding.', version: 4 });
  });

  it('a pin is placed in any status but voided: a voided finding answers 409 and keeps its pin and version', async () => {
    const w = await buildWalkJob(people);
    for (const status of ['open', 'fix_submitted', 'closed'] as const) {
      const f = await insertFinding(w, { status });
      const res = await patch(inspector, w, f, { pin: { x: 0.25, y: 0.75 } }).expect(200);
      expect(res.body).toMatchObject({ status, pinX: 0.25, pinY: 0.75, version: 2 });
    }
    const voided = await insertFinding(w, { status: 'voided' });
    for (const who of [gc, inspector]) {
      const refused = await patch(who, w, voided, { pin: { x: 0.5, y: 0.5 } }).expect(409);
      expect(refused.body.error).toMatchObject({ id: 'invalid_transition', message: 'This finding is voided; it cannot be placed on the plan.' });
    }
    // Role first (403), then If-Match (412), then the status (409), as for every change.
    await patch(subA, w, voided, { pin: null }).expect(403);
    await patch(gc, w, voided, { pin: null }, v(7)).expect(412);
    const row = await Finding.findByPk(voided.id);
    expect([row!.pinX, row!.pinY, row!.version]).toEqual([null, null, 1]);
  });
});

// ---------------------------------------------------------------------------------------------
// Re-inspection
// ---------------------------------------------------------------------------------------------

describe('POST /findings/:findingId/reinspections', () => {
  it('401, 400 (return without a reason, unknown verdict), 403 subcontractor, 428, idempotent retry', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w, { status: 'fix_submitted' });
    const a = await anon();
    await a.agent.post(path(w, f, '/reinspections')).set('X-CSRF-Token', a.csrf).send({ verdict: 'accept' }).expect(401);
    const noReason = await reinspect(inspector, w, f, { verdict: 'return' }).expect(400);
    expect(noReason.body.error.message).toBe('reason: Say why the fix is returned.');
    await reinspect(inspector, w, f, { verdict: 'maybe' }).expect(400);
    await reinspect(subA, w, f, { verdict: 'accept' }).expect(403);
    await reinspect(inspector, w, f, { verdict: 'accept' }, {}).expect(428);
    const first = await reinspect(inspector, w, f, { verdict: 'return', reason: 'Still dripping.' }, v(1), 'reinspect-0001').expect(200);
    const again = await reinspect(inspector, w, f, { verdict: 'return', reason: 'Still dripping.' }, v(1), 'reinspect-0001').expect(200);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body).toEqual(first.body);
    const after = await Finding.findByPk(f.id);
    expect(after).toMatchObject({ status: 'open', returnCount: 1, version: 2 });
    // A second inspector still holding v1: 412 with the current finding, nothing written.
    const stale = await reinspect(gc, w, f, { verdict: 'accept' }, v(1)).expect(412);
    expect(stale.body.current).toMatchObject({ id: f.id, status: 'open', returnCount: 1, version: 2 });
    expect((await Finding.findByPk(f.id))!.version).toBe(2);
  });

  it('the whole loop: fix, return, fix, accept; the GC sees all five events in order', async () => {
    const w = await buildWalkJob(people);
    const logged = await inspector.agent
      .post(`/api/jobs/${w.job.id}/findings`)
      .set('X-CSRF-Token', inspector.csrf)
      .send({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, note: 'Drain runs uphill.' })
      .expect(201);
    const f = { id: logged.body.id as string };
    await postFix(subA, w, f, 'Re-pitched.').expect(201);
    await reinspect(inspector, w, f, { verdict: 'return', reason: 'Still holds water at the trap.' }, v(2)).expect(200);
    const mine = await subA.agent.get(path(w, f)).expect(200);
    expect(mine.body).toMatchObject({ status: 'open', returnCount: 1 });
    await postFix(subA, w, f, 'Replaced the trap.').expect(201);
    await reinspect(inspector, w, f, { verdict: 'accept' }, v(4)).expect(200);
    const timeline = await gc.agent.get(path(w, f, '/events')).expect(200);
    expect(timeline.body.items.map((e: { kind: string }) => e.kind)).toEqual(['logged', 'fix_submitted', 'returned', 'fix_submitted', 'accepted']);
    expect(timeline.body.items[2]).toMatchObject({
      actor: { id: w.inspector.id },
      from: { status: 'fix_submitted', returnCount: 0 },
      to: { status: 'open', returnCount: 1 },
      reason: 'Still holds water at the trap.',
    });
    expect(timeline.body.items[4]).toMatchObject({ from: { status: 'fix_submitted' }, to: { status: 'closed' } });
    const final = await gc.agent.get(path(w, f)).expect(200);
    expect(final.headers.etag).toBe('"v5"');
    expect(final.body).toMatchObject({ status: 'closed', returnCount: 1 });
  });
});

// ---------------------------------------------------------------------------------------------
// Bulk
// ---------------------------------------------------------------------------------------------

describe('POST /findings/bulk', () => {
  const bulk = (who: SignedIn, w: WalkJob, body: object) =>
    who.agent.post(`/api/jobs/${w.job.id}/findings/bulk`).set('X-CSRF-Token', who.csrf).send(body);

  it('401, 400, 403 subcontractor; reassigns many at once with an event each', async () => {
    const w = await buildWalkJob(people);
    const fs = [await insertFinding(w), await insertFinding(w), await insertFinding(w, { status: 'fix_submitted' })];
    const a = await anon();
    await a.agent.post(`/api/jobs/${w.job.id}/findings/bulk`).set('X-CSRF-Token', a.csrf).send({}).expect(401);
    const empty = await bulk(gc, w, { findingIds: [], change: { dueOn: { to: '2027-01-10' } } }).expect(400);
    expect(empty.body.error.message).toBe('findingIds: Choose at least one finding.');
    await bulk(gc, w, { findingIds: [fs[0]!.id], change: {} }).expect(400);
    await bulk(subA, w, { findingIds: [fs[0]!.id], change: { dueOn: { to: '2027-01-10' } } }).expect(403);
    const res = await bulk(inspector, w, { findingIds: fs.map((f) => f.id), change: { reassign: { companyId: w.subB.companyId, reason: 'Electrical scope.' } } }).expect(200);
    expect(res.body.items.map((i: { id: string; companyId: string; version: number }) => [i.id, i.companyId, i.version])).toEqual(fs.map((f) => [f.id, w.subB.companyId, 2]));
    const [rows] = await db.sequelize.query(`SELECT count(*)::int AS n FROM finding_events WHERE job_id = '${w.job.id}' AND kind = 'reassigned'`);
    expect((rows as Array<{ n: number }>)[0]!.n).toBe(3);
  });

  it('all or nothing: a closed finding or an id of another job changes nothing and names them', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const a = await insertFinding(w);
    const closed = await insertFinding(w, { status: 'closed' });
    const elsewhere = await insertFinding(other);
    const before = await countRows(w.job.id);
    const refused = await bulk(gc, w, { findingIds: [a.id, closed.id], change: { dueOn: { to: '2027-05-05' } } }).expect(409);
    expect(refused.body.error.message).toBe(`These findings cannot be changed now: #${closed.number} (closed). Nothing was changed.`);
    expect(refused.body.error.fields).toEqual({ findingIds: closed.id });
    const missing = await bulk(gc, w, { findingIds: [a.id, elsewhere.id], change: { dueOn: { to: '2027-05-05' } } }).expect(404);
    expect(missing.body.error.fields).toEqual({ findingIds: elsewhere.id });
    expect(await countRows(w.job.id)).toEqual(before);
    expect((await Finding.findByPk(a.id))!.dueOn).toBe('2026-12-08');
    expect((await Finding.findByPk(elsewhere.id))!.version).toBe(1);
  });

  it('runs the single-finding steps: a due date each with its event; a finding already as asked is left as it is', async () => {
    const w = await buildWalkJob(people);
    const same = await insertFinding(w, { dueOn: '2027-03-01' });
    const moved = await insertFinding(w, { dueOn: '2027-01-15' });
    const res = await bulk(gc, w, { findingIds: [same.id, moved.id], change: { dueOn: { to: '2027-03-01', reason: 'Ceiling closes later.' } } }).expect(200);
    expect(res.body.items.map((i: { id: string; dueOn: string; version: number }) => [i.id, i.dueOn, i.version])).toEqual([
      [same.id, '2027-03-01', 1],
      [moved.id, '2027-03-01', 2],
    ]);
    const events = await patch(gc, w, moved, { pin: null }, v(2)).expect(200);
    expect(events.body.events.at(-1)).toMatchObject({ kind: 'due_changed', from: { dueOn: '2027-01-15' }, to: { dueOn: '2027-03-01' }, reason: 'Ceiling closes later.' });
    const [rows] = await db.sequelize.query(`SELECT count(*)::int AS n FROM finding_events WHERE finding_id = '${same.id}' AND kind = 'due_changed'`);
    expect((rows as Array<{ n: number }>)[0]!.n).toBe(0);
  });
});

// ---------------------------------------------------------------------------------------------
// Re-inspection queue
// ---------------------------------------------------------------------------------------------

describe('GET /reinspections/queue', () => {
  it('401, 403 subcontractor; fix-submitted findings by level with the latest fix and the original photos', async () => {
    const w = await buildWalkJob(people);
    await request(trimout.app).get(`/api/jobs/${w.job.id}/reinspections/queue`).expect(401);
    await subA.agent.get(`/api/jobs/${w.job.id}/reinspections/queue`).expect(403);
    const logged = await inspector.agent
      .post(`/api/jobs/${w.job.id}/findings`)
      .set('X-CSRF-Token', inspector.csrf)
      .field('data', JSON.stringify({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id }))
      .attach('photos', jpeg, { filename: 'before.jpg', contentType: 'image/jpeg' })
      .expect(201);
    const f = { id: logged.body.id as string };
    await postFix(subA, w, f, 'First try.').expect(201);
    await reinspect(inspector, w, f, { verdict: 'return', reason: 'Not yet.' }, v(2)).expect(200);
    const second = await postFix(subA, w, f, 'Second try.').expect(201);
    await insertFinding(w); // open: not in the queue
    const res = await inspector.agent.get(`/api/jobs/${w.job.id}/reinspections/queue`).expect(200);
    expect(res.body.total).toBe(1);
    expect(res.body.levels).toHaveLength(1);
    expect(res.body.levels[0]).toMatchObject({ levelId: w.level.id, levelName: 'Level 3' });
    const item = res.body.levels[0].items[0];
    expect(item.finding).toMatchObject({ id: f.id, status: 'fix_submitted', returnCount: 1 });
    expect(item.latestFix).toMatchObject({ id: second.body.fix.id, note: 'Second try.' });
    expect(item.latestFix.photos).toHaveLength(1);
    expect(item.originalPhotos.map((p: { id: string }) => p.id)).toEqual(logged.body.photos.map((p: { id: string }) => p.id));
  });
});
