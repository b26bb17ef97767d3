/**
 * Sampling audits: who may plan and read them, 400/404 answers, the lot frozen at planning, the draw
 * reproducible from the recorded seed, the decision at the exact accept and reject numbers
 * (Z1.4 Table II-A: lot 120 at level II is letter F; major AQL 2.5 → 20 units, Ac 1 / Re 2; AQL 1.0 →
 * 13 units, Ac 0 / Re 1), the tiered scheme's expansion, the walk marks and the CSV report.
 */
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Unit, UnitCheck } from '../../../server/models';
import { drawSample, planTiered, planZ14 } from '../../../shared/calc/sampling';
import type { AuditDetail, AuditListResponse } from '../../../shared/schemas/audits';
import type { Severity } from '../../../shared/words';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildLevel, buildUser } from '../../support/factories';
import { buildWalkJob, insertFinding, type People, type WalkJob } from '../../support/findings';

jest.setTimeout(120_000);

let db: Database;
let trimout: TrimoutApp;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let outsider: SignedIn;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
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
});

const path = (w: WalkJob, rest = '') => `/api/jobs/${w.job.id}/audits${rest}`;
const post = (who: SignedIn, url: string, body: object, key?: string) => {
  const req = who.agent.post(url).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body);
};

/** A walk job with `n` more cassettes on a level of their own (the lot), returned sorted by id. */
async function jobWithLot(n: number) {
  const w = await buildWalkJob(people);
  const lotLevel = await buildLevel(w.job.id, { name: 'Level 5' });
  const units = await Unit.bulkCreate(
    Array.from({ length: n }, (_, i) => ({ jobId: w.job.id, levelId: lotLevel.id, tag: `IU-5-${String(i + 1).padStart(3, '0')}`, kind: 'cassette_4way' as const })),
  );
  return { w, lotLevel, units };
}

async function completeCheck(w: WalkJob, unitId: string, at = new Date()) {
  await UnitCheck.create({ jobId: w.job.id, unitId, walkId: null, checkedBy: w.inspector.id, checkedAt: at, complete: true });
}

async function defect(w: WalkJob, unitId: string, severity: Severity) {
  return insertFinding(w, { unitId, severity });
}

const z14Body = (lotLevelId: string, extra: object = {}) => ({
  name: 'Level 5 cassettes',
  scheme: 'z14',
  inspectionLevel: 'II',
  classes: { critical: 'zero', major: '2.5', minor: 'off' },
  lot: { levelIds: [lotLevelId], kinds: ['cassette_4way'] },
  ...extra,
});

describe('planning an audit', () => {
  it('answers 401 signed out, 404 to a non-member, 403 to a subcontractor', async () => {
    const { w, lotLevel } = await jobWithLot(3);
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    await agent.get(path(w)).expect(401);
    await agent.post(path(w)).set('X-CSRF-Token', csrf).send(z14Body(lotLevel.id)).expect(401);
    await outsider.agent.get(path(w)).expect(404);
    await post(outsider, path(w), z14Body(lotLevel.id)).expect(404);
    await subA.agent.get(path(w)).expect(403);
    await post(subA, path(w), z14Body(lotLevel.id)).expect(403);
  });

  it('answers 400 with field errors for a bad body or a lot too small, 404 for another job\'s level or audit', async () => {
    const { w, lotLevel } = await jobWithLot(3);
    const other = await jobWithLot(2);
    const bad = async (body: object) => (await post(gc, path(w), body).expect(400)).body.error;
    expect((await bad({ ...z14Body(lotLevel.id), name: ' ' })).fields).toHaveProperty('name');
    expect((await bad({ ...z14Body(lotLevel.id), classes: { critical: 'off', major: 'off', minor: 'off' } })).fields).toHaveProperty(['classes.major']);
    expect((await bad({ ...z14Body(lotLevel.id), classes: { critical: 'zero', major: '10', minor: 'off' } })).fields).toHaveProperty(['classes.major']);
    expect((await bad({ ...z14Body(lotLevel.id), inspectionLevel: 'S-1' })).fields).toHaveProperty('inspectionLevel');
    expect((await bad({ ...z14Body(lotLevel.id), extra: 1 })).message).toMatch(/extra/);
    expect((await bad({ ...z14Body(lotLevel.id), seed: 'a b' })).fields).toHaveProperty('seed');
    // One wall-mounted unit on the walk level: Z1.4 needs 2.
    const small = await bad({ ...z14Body(w.level.id), lot: { levelIds: [w.level.id], kinds: ['wall_mounted'] } });
    expect(small.fields).toEqual({ lot: expect.stringMatching(/has 1 unit/) });
    await post(gc, path(w), z14Body(other.lotLevel.id)).expect(404);
    const theirs = (await post(gc, path(other.w), z14Body(other.lotLevel.id)).expect(201)).body as AuditDetail;
    await gc.agent.get(path(w, `/${theirs.id}`)).expect(404);
    await gc.agent.get(path(w, `/${theirs.id}.csv`)).expect(404);
    await gc.agent.get(path(w, `?levelId=${other.lotLevel.id}`)).expect(404);
  });

  it('plans lot 120 at level II as letter F: major AQL 2.5 → 20 units Ac 1 / Re 2; AQL 1.0 → 13 units Ac 0 / Re 1 [Z1.4 Tables I and II-A]', async () => {
    const { w, lotLevel } = await jobWithLot(120);
    const res = await post(inspector, path(w), z14Body(lotLevel.id, { classes: { critical: 'zero', major: '2.5', minor: '1.0' } }), randomUUID()).expect(201);
    const audit = res.body as AuditDetail;
    expect(audit).toMatchObject({ number: 1, lotSize: 120, sampleSize: 20, decision: 'continue', checked: 0, scheme: 'z14', inspectionLevel: 'II' });
    expect(audit.plan).toMatchObject({ kind: 'z14', letter: 'F' });
    expect(audit.state.classes.map((c) => [c.severity, c.sampleSize, c.accept, c.reject])).toEqual([
      ['critical', 20, 0, 1],
      ['major', 20, 1, 2],
      ['minor', 13, 0, 1],
    ]);
    expect(audit.sample).toHaveLength(20);
    expect(audit.lotDescription).toBe('Levels: Level 5 · Kinds: Ceiling cassette, four-way');
    expect(audit.plannedBy.id).toBe(w.inspector.id);
  });

  it('is idempotent: the same key and body answer the same audit, one row', async () => {
    const { w, lotLevel } = await jobWithLot(10);
    const key = randomUUID();
    const a = await post(gc, path(w), z14Body(lotLevel.id), key).expect(201);
    const b = await post(gc, path(w), z14Body(lotLevel.id), key).expect(201);
    expect(b.body.id).toBe(a.body.id);
    await post(gc, path(w), z14Body(lotLevel.id, { name: 'Other' }), key).expect(422);
    const list = (await gc.agent.get(path(w)).expect(200)).body as AuditListResponse;
    expect(list.items).toHaveLength(1);
  });
});

describe('the lot and the draw', () => {
  it('freezes the lot at planning: units added later are not in it, and the sample does not move', async () => {
    const { w, lotLevel } = await jobWithLot(40);
    const audit = (await post(gc, path(w), z14Body(lotLevel.id)).expect(201)).body as AuditDetail;
    await Unit.create({ jobId: w.job.id, levelId: lotLevel.id, tag: 'IU-5-LATE', kind: 'cassette_4way' });
    const again = (await gc.agent.get(path(w, `/${audit.id}`)).expect(200)).body as AuditDetail;
    expect(again.lotSize).toBe(40);
    expect(again.sample.map((s) => s.unitId)).toEqual(audit.sample.map((s) => s.unitId));
    const csv = await gc.agent.get(path(w, `/${audit.id}.csv`)).expect(200);
    expect(csv.text).not.toContain('IU-5-LATE');
    // A new audit on the same filters takes the new unit.
    const next = (await post(gc, path(w), z14Body(lotLevel.id)).expect(201)).body as AuditDetail;
    expect(next).toMatchObject({ number: 2, lotSize: 41 });
  });

  it('draws reproducibly from the recorded seed: the same seed draws the same units, the shared draw names them', async () => {
    const { w, lotLevel, units } = await jobWithLot(60);
    const seed = 'reproduce-me-7';
    const a = (await post(gc, path(w), z14Body(lotLevel.id, { seed })).expect(201)).body as AuditDetail;
    const b = (await post(inspector, path(w), z14Body(lotLevel.id, { seed })).expect(201)).body as AuditDetail;
    expect(a.seed).toBe(seed);
    expect(b.sample.map((s) => s.unitId)).toEqual(a.sample.map((s) => s.unitId));
    const plan = planZ14(60, 'II', { critical: { aql: null }, major: { aql: '2.5' } });
    const expected = drawSample(units.map((u) => u.id), seed, plan).map((s) => s.unitId);
    expect(a.sample.map((s) => s.unitId)).toEqual(expected);
    const c = (await post(gc, path(w), z14Body(lotLevel.id)).expect(201)).body as AuditDetail;
    expect(c.seed).toMatch(/^[0-9a-f]{16}$/);
    expect(c.sample.map((s) => s.unitId)).not.toEqual(a.sample.map((s) => s.unitId));
  });
});

describe('the decision', () => {
  async function z14Audit() {
    const { w, lotLevel } = await jobWithLot(120);
    const audit = (await post(gc, path(w), z14Body(lotLevel.id)).expect(201)).body as AuditDetail;
    return { w, audit, sample: audit.sample.map((s) => s.unitId) };
  }
  const state = async (w: WalkJob, id: string) => (await gc.agent.get(path(w, `/${id}`)).expect(200)).body as AuditDetail;

  it('accepts with major defects = Ac (1) once all 20 are checked, and not before', async () => {
    const { w, audit, sample } = await z14Audit();
    await defect(w, sample[3]!, 'major');
    for (const unitId of sample.slice(0, 19)) await completeCheck(w, unitId);
    const partial = await state(w, audit.id);
    expect(partial).toMatchObject({ decision: 'continue', checked: 19, decidedAt: null });
    await completeCheck(w, sample[19]!);
    const done = await state(w, audit.id);
    expect(done.decision).toBe('accept');
    expect(done.state.classes.find((c) => c.severity === 'major')).toMatchObject({ defects: 1, checked: 20, decision: 'accept' });
    expect(done.decidedAt).not.toBeNull();
    expect(done.followUp).toBeNull();
    // After the decision, a finding on a sampled unit does not reopen it.
    await defect(w, sample[5]!, 'major');
    expect((await state(w, audit.id)).decision).toBe('accept');
  });

  it('rejects at Re (2) major defects before the sample is finished; the follow-up is every unit of the lot', async () => {
    const { w, audit, sample } = await z14Audit();
    await completeCheck(w, sample[0]!);
    await defect(w, sample[0]!, 'major');
    expect((await state(w, audit.id)).decision).toBe('continue');
    await defect(w, sample[1]!, 'major');
    const rejected = await state(w, audit.id);
    expect(rejected.decision).toBe('reject');
    expect(rejected.followUp).toEqual({ levels: [expect.objectContaining({ levelName: 'Level 5', units: 120, checkedSince: 0 })], remaining: 120 });
    // The walk screens of the lot's level mark every unit still to check.
    const level = rejected.followUp!.levels[0]!.levelId;
    const marks = ((await inspector.agent.get(path(w, `?levelId=${level}`)).expect(200)).body as AuditListResponse).unitMarks!;
    expect(marks.filter((m) => m.mark === 'check_all')).toHaveLength(120);
    await completeCheck(w, sample[50] ?? sample[2]!, new Date(Date.now() + 1000));
    expect((await state(w, audit.id)).followUp!.remaining).toBe(119);
  });

  it('a voided finding does not count; a critical defect rejects at once (none allowed)', async () => {
    const { w, audit, sample } = await z14Audit();
    await insertFinding(w, { unitId: sample[0]!, severity: 'major', status: 'voided' });
    await insertFinding(w, { unitId: sample[1]!, severity: 'major', status: 'voided' });
    expect((await state(w, audit.id)).decision).toBe('continue');
    await defect(w, sample[2]!, 'critical');
    expect((await state(w, audit.id)).decision).toBe('reject');
  });

  it('a finding logged before the audit started, or on a unit outside the sample, does not count', async () => {
    const { w, lotLevel, units } = await jobWithLot(30);
    await insertFinding(w, { unitId: units[0]!.id, severity: 'critical', loggedAt: new Date(Date.now() - 60_000) });
    const audit = (await post(gc, path(w), z14Body(lotLevel.id)).expect(201)).body as AuditDetail;
    const outside = units.map((u) => u.id).find((id) => !audit.sample.some((s) => s.unitId === id))!;
    await defect(w, outside, 'critical');
    const now = await state(w, audit.id);
    expect(now.state.classes.find((c) => c.severity === 'critical')!.defects).toBe(0);
  });

  it('the tiered scheme expands to the second tier at 10 percent failed and marks it on the walk', async () => {
    const { w, lotLevel } = await jobWithLot(120);
    const audit = (await post(gc, path(w), { name: 'Tiered', scheme: 'tiered', lot: { levelIds: [lotLevel.id] } }).expect(201)).body as AuditDetail;
    expect(audit.plan).toEqual(planTiered(120));
    expect(audit).toMatchObject({ sampleSize: 12, lotSize: 120 });
    const first = audit.sample.filter((s) => s.tier === 1).map((s) => s.unitId);
    const second = audit.sample.filter((s) => s.tier === 2).map((s) => s.unitId);
    expect([first.length, second.length]).toEqual([12, 12]);
    const before = ((await gc.agent.get(path(w, `?levelId=${lotLevel.id}`)).expect(200)).body as AuditListResponse).unitMarks!;
    expect(before.map((m) => m.unitId).sort()).toEqual([...first].sort());
    await defect(w, first[0]!, 'major');
    await defect(w, first[1]!, 'minor'); // minor does not fail a unit
    expect((await state(w, audit.id)).decision).toBe('continue');
    await defect(w, first[2]!, 'major');
    const expanded = await state(w, audit.id);
    expect(expanded).toMatchObject({ decision: 'expand', sampleSize: 24 });
    expect(expanded.state.activeTier).toBe(2);
    const after = ((await gc.agent.get(path(w, `?levelId=${lotLevel.id}`)).expect(200)).body as AuditListResponse).unitMarks!;
    expect(after.map((m) => m.unitId).sort()).toEqual([...first, ...second].sort());
    for (const unitId of second) await completeCheck(w, unitId);
    expect((await state(w, audit.id)).decision).toBe('accept');
  });
});

describe('the audit report CSV', () => {
  it('names the plan, its source and the seed, and neutralises text a spreadsheet could run', async () => {
    const { w, lotLevel } = await jobWithLot(20);
    const audit = (await post(gc, path(w), z14Body(lotLevel.id, { name: '=HYPERLINK("http://x")' })).expect(201)).body as AuditDetail;
    const res = await gc.agent.get(path(w, `/${audit.id}.csv`)).expect(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="audit-1-/);
    expect(res.text).toContain(`"'=HYPERLINK(""http://x"")"`);
    expect(res.text).toContain('Table II-A');
    expect(res.text).toContain(audit.seed);
    expect(res.text).toContain('"Code letter","C"');
  });
});
