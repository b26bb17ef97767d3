/**
 * A finding's history: GET /events (who, when, kind, from, to, reason, photos) for everyone who
 * sees the finding; comments (GET/POST) visible to the same people; events append-only in the
 * database (UPDATE, DELETE, TRUNCATE refused) and complete for every change.
 */
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser } from '../../support/factories';
import { buildWalkJob, insertFinding, type People, type WalkJob } from '../../support/findings';

jest.setTimeout(180_000);

let db: Database;
let trimout: TrimoutApp;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let subB: SignedIn;
let outsider: SignedIn;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  people = await buildWalkJob();
  gc = await signIn(trimout.app, people.gcManager.email);
  inspector = await signIn(trimout.app, people.inspector.email);
  subA = await signIn(trimout.app, people.subA.email);
  subB = await signIn(trimout.app, people.subB.email);
  outsider = await signIn(trimout.app, (await buildUser()).email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

const path = (w: WalkJob, id: string, rest = '') => `/api/jobs/${w.job.id}/findings/${id}${rest}`;
const comment = (who: SignedIn, w: WalkJob, id: string, body: object, key?: string) => {
  const req = who.agent.post(path(w, id, '/comments')).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body);
};

describe('comments', () => {
  it('401, 400, 404 for another company / a non-member; visible to everyone who sees the finding', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const agent = request.agent(trimout.app);
    await agent.post(path(w, f.id, '/comments')).set('X-CSRF-Token', await csrfFor(agent)).send({ text: 'Hello' }).expect(401);
    await request(trimout.app).get(path(w, f.id, '/comments')).expect(401);
    const empty = await comment(subA, w, f.id, { text: '  ' }).expect(400);
    expect(empty.body.error.message).toBe('text: Write a comment.');
    await comment(subA, w, f.id, { text: 'x', extra: 1 }).expect(400);
    await comment(subB, w, f.id, { text: 'Is this ours?' }).expect(404);
    await comment(outsider, w, f.id, { text: 'Hello' }).expect(404);
    const c1 = await comment(subA, w, f.id, { text: 'Need the ceiling tile out first.' }).expect(201);
    expect(c1.body).toMatchObject({ kind: 'comment', actor: { id: w.subA.id, name: w.subA.name }, reason: 'Need the ceiling tile out first.' });
    await comment(gc, w, f.id, { text: 'Tiles come out Thursday.' }).expect(201);
    for (const who of [gc, inspector, subA]) {
      const list = await who.agent.get(path(w, f.id, '/comments')).expect(200);
      expect(list.body.items.map((e: { reason: string }) => e.reason)).toEqual(['Need the ceiling tile out first.', 'Tiles come out Thursday.']);
    }
    await subB.agent.get(path(w, f.id, '/comments')).expect(404);
    // A comment does not change the finding: its version stays.
    const detail = await gc.agent.get(path(w, f.id)).expect(200);
    expect(detail.headers.etag).toBe('"v1"');
  });

  it('a retried comment with the same Idempotency-Key is recorded once', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const a = await comment(inspector, w, f.id, { text: 'Checked again.' }, 'comment-key-0001').expect(201);
    const b = await comment(inspector, w, f.id, { text: 'Checked again.' }, 'comment-key-0001').expect(201);
    expect(b.headers['idempotent-replayed']).toBe('true');
    expect(b.body).toEqual(a.body);
    const list = await gc.agent.get(path(w, f.id, '/comments')).expect(200);
    expect(list.body.items).toHaveLength(1);
  });
});

describe('GET /events', () => {
  it('401, 404 for another company; every change is an event with who, when, from, to and reason', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    await request(trimout.app).get(path(w, f.id, '/events')).expect(401);
    await subB.agent.get(path(w, f.id, '/events')).expect(404);
    await outsider.agent.get(path(w, f.id, '/events')).expect(404);
    const bad = await gc.agent.get(`/api/jobs/${w.job.id}/findings/42/events`).expect(400);
    expect(bad.body.error.message).toBe('params.findingId: This link does not name a finding: open the finding from its list.');
    const send = (who: SignedIn, body: object, version: number) =>
      who.agent.patch(path(w, f.id)).set('X-CSRF-Token', who.csrf).set('If-Match', `"v${version}"`).send(body).expect(200);
    const started = Date.now();
    await send(gc, { dueOn: { to: '2027-01-20', reason: 'Ceiling access later.' } }, 1);
    await send(inspector, { severity: { to: 'critical', reason: 'Drips on a panel.' } }, 2);
    await send(inspector, { reassign: { companyId: w.subB.companyId, reason: 'Panel side is electrical.' } }, 3);
    await send(inspector, { close: { note: 'Dry on the walk.' } }, 4);
    await send(gc, { reopen: { reason: 'Wet again.' } }, 5);
    await send(gc, { void: { reason: 'Moved to the roof job.' } }, 6);
    const res = await gc.agent.get(path(w, f.id, '/events')).expect(200);
    const items = res.body.items as Array<{ kind: string; actor: { id: string }; at: string; from: object; to: object; reason: string | null }>;
    expect(items.map((e) => e.kind)).toEqual(['logged', 'due_changed', 'severity_changed', 'reassigned', 'closed_on_walk', 'reopened', 'voided']);
    expect(items.slice(1)).toEqual([
      expect.objectContaining({ actor: expect.objectContaining({ id: w.gcManager.id }), from: { dueOn: '2026-12-08' }, to: { dueOn: '2027-01-20' }, reason: 'Ceiling access later.' }),
      expect.objectContaining({ actor: expect.objectContaining({ id: w.inspector.id }), from: { severity: 'major' }, to: { severity: 'critical' }, reason: 'Drips on a panel.' }),
      expect.objectContaining({
        from: expect.objectContaining({ companyId: w.subA.companyId }),
        to: expect.objectContaining({ companyId: w.subB.companyId }),
        reason: 'Panel side is electrical.',
      }),
      expect.objectContaining({ from: { status: 'open' }, to: { status: 'closed' }, reason: 'Dry on the walk.' }),
      expect.objectContaining({ actor: expect.objectContaining({ id: w.gcManager.id }), from: { status: 'closed' }, to: { status: 'open' }, reason: 'Wet again.' }),
      expect.objectContaining({ from: { status: 'open' }, to: { status: 'voided' }, reason: 'Moved to the roof job.' }),
    ]);
    for (const e of items.slice(1)) expect(Date.parse(e.at)).toBeGreaterThanOrEqual(started - 1000);
    // Company B now holds the finding and sees its whole history; company A no longer sees it.
    const b = await subB.agent.get(path(w, f.id, '/events')).expect(200);
    expect(b.body.items).toHaveLength(7);
    await subA.agent.get(path(w, f.id, '/events')).expect(404);
  });

  it('the database refuses to change or delete an event (append-only)', async () => {
    const w = await buildWalkJob(people);
    const f = await insertFinding(w);
    const q = (sql: string) => db.sequelize.query(sql, { bind: [f.id] });
    await expect(q(`UPDATE finding_events SET reason = 'edited' WHERE finding_id = $1`)).rejects.toThrow(/append-only/);
    await expect(q(`DELETE FROM finding_events WHERE finding_id = $1`)).rejects.toThrow(/append-only/);
    await expect(db.sequelize.query(`TRUNCATE finding_events`)).rejects.toThrow(/append-only/);
    const res = await gc.agent.get(path(w, f.id, '/events')).expect(200);
    expect(res.body.items).toHaveLength(1);
  });
});
