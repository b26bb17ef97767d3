/**
 * Unit checks: every route per role, validation of items against the unit's kind and the job's
 * catalogue, measured values evaluated by shared/calc (a cassette pump lift of 34 in against a
 * model limit of 30 in fails by 4 in = 101.6 mm and proposes a finding), history and state.
 */
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { CatalogueItem } from '../../../server/models';
import { addDays, todayIn } from '../../../shared/rules/dates';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser } from '../../support/factories';
import { applicableTo, buildWalkJob, countRows, everyItem, insertFinding, type People, type WalkJob } from '../../support/findings';

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
  const outsiderUser = await buildUser();
  gc = await signIn(trimout.app, first.gcManager.email);
  inspector = await signIn(trimout.app, first.inspector.email);
  subA = await signIn(trimout.app, first.subA.email);
  outsider = await signIn(trimout.app, outsiderUser.email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

const MISSING = '00000000-0000-4000-8000-000000000000';

function post(who: SignedIn, w: WalkJob, unitId: string, body: unknown, key?: string) {
  const req = who.agent.post(`/api/jobs/${w.job.id}/units/${unitId}/checks`).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body as object);
}

const ok = (w: WalkJob, code: string) => ({ catalogueItemId: w.byCode(code).id, mark: 'ok' as const });

describe('POST /api/jobs/:jobId/units/:unitId/checks', () => {
  it('answers 401 signed out, 403 to a subcontractor, 404 to a non-member and for a unit of another job', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const body = { items: [ok(w, 'MT-01')], complete: true };
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    await agent.post(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).set('X-CSRF-Token', csrf).send(body).expect(401);
    await post(subA, w, w.cassette.id, body).expect(403);
    await post(outsider, w, w.cassette.id, body).expect(404);
    const foreign = await post(inspector, w, other.cassette.id, body).expect(404);
    expect(foreign.body.error.message).toBe('Unit not found.');
    await post(inspector, w, MISSING, body).expect(404);
  });

  it('records an all-ok complete check (201) for the inspector and the GC manager; the unit is then checked ok', async () => {
    const w = await buildWalkJob(people);
    const items = await everyItem(w.job.id, 'cassette_4way');
    const res = await post(inspector, w, w.cassette.id, { items, complete: true }).expect(201);
    expect(res.body).toMatchObject({
      unitId: w.cassette.id,
      walkId: null,
      checkedBy: { id: w.inspector.id },
      complete: true,
      missing: [],
      counts: { ok: items.length, defect: 0, notApplicable: 0, failedMeasurements: 0 },
    });
    expect(res.body.items.map((i: { catalogueItemId: string; mark: string; result: unknown }) => [i.catalogueItemId, i.mark, i.result])).toEqual(
      items.map((i) => [i.catalogueItemId, 'ok', null]),
    );
    await post(gc, w, w.cassette2.id, { items: await everyItem(w.job.id, 'cassette_4way'), complete: true }).expect(201);
    const state = await inspector.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(200);
    expect(state.body.unit).toMatchObject({ tag: 'IU-3-01', state: 'checked_ok' });
    expect(state.body.current.id).toBe(res.body.id);
  });

  it('evaluates a measured pump lift: 34 in against the model limit of 30 in fails by 4 in and proposes a finding', async () => {
    const w = await buildWalkJob(people);
    const dr03 = w.byCode('DR-03');
    const res = await post(inspector, w, w.cassette.id, {
      items: [{ catalogueItemId: dr03.id, mark: 'ok', measuredText: '34 in' }, ok(w, 'MT-01')],
      complete: true,
    }).expect(201);
    const item = res.body.items[0];
    // 34 in = 863.6 mm, 30 in = 762 mm (NIST SP 811: 1 in = 25.4 mm exactly); margin = 762 − 863.6 = −101.6 mm.
    expect(item).toMatchObject({
      code: 'DR-03',
      mark: 'defect', // a failed measurement is a defect whatever mark was sent
      measuredText: '34 in',
      quantity: 'length',
      pass: false,
      status: 'fail',
      limitSource: 'Model CX-24 installation manual, p. 12',
    });
    expect(item.measuredValue).toBeCloseTo(863.6, 9);
    expect(item.margin).toBeCloseTo(-101.6, 9);
    expect(item.result.limit).toBeCloseTo(762, 9);
    expect(item.message).toMatch(/over the maximum/);
    expect(item.proposedFinding).toMatchObject({
      unitId: w.cassette.id,
      levelId: w.level.id,
      spaceId: w.space.id,
      catalogueItemId: dr03.id,
      code: 'DR-03',
      severity: 'major',
      companyId: w.subA.companyId, // mechanical trade → company A
      dueOn: addDays(todayIn('UTC'), 7), // major: 7 days (default policy)
      measuredText: '34 in',
      limitSource: 'Model CX-24 installation manual, p. 12',
      unitCheckId: res.body.id,
    });
    expect(item.proposedFinding.limit).toBeCloseTo(762, 9);
    expect(res.body.items[1].proposedFinding).toBeNull();
    expect(res.body.counts).toEqual({ ok: 1, defect: 1, notApplicable: 0, failedMeasurements: 1 });
  });

  it('passes a lift typed as feet and inches within the limit, and says so when the unit has no model limit', async () => {
    const w = await buildWalkJob(people);
    const dr03 = w.byCode('DR-03');
    const pass = await post(inspector, w, w.cassette.id, {
      items: [{ catalogueItemId: dr03.id, mark: 'ok', measuredText: `2' 4"` }],
      complete: true,
    }).expect(201);
    // 28 in = 711.2 mm; 762 − 711.2 = 50.8 mm to spare.
    expect(pass.body.items[0]).toMatchObject({ mark: 'ok', pass: true, status: 'pass', proposedFinding: null });
    expect(pass.body.items[0].margin).toBeCloseTo(50.8, 9);
    const exact = await post(inspector, w, w.cassette.id, {
      items: [{ catalogueItemId: dr03.id, mark: 'ok', measuredText: '762 mm' }],
      complete: true,
    }).expect(201);
    expect(exact.body.items[0]).toMatchObject({ pass: true, margin: 0 });
    const noModel = await post(inspector, w, w.cassette2.id, {
      items: [{ catalogueItemId: dr03.id, mark: 'ok', measuredText: '34 in' }],
      complete: true,
    }).expect(201);
    expect(noModel.body.items[0]).toMatchObject({ mark: 'ok', pass: null, status: 'limit_not_set', proposedFinding: null });
  });

  it('answers 400 with the field and a clear message for every malformed check', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const send = async (body: unknown) => (await post(inspector, w, w.cassette.id, body).expect(400)).body.error.message as string;
    expect(await send({ complete: true })).toBe('items: Send items: the catalogue items checked, each with a mark.');
    expect(await send({ items: [], complete: true })).toBe('items: Mark at least one item.');
    expect(await send({ items: [ok(w, 'MT-01')], complete: 'yes' })).toBe('complete: Send complete: true or false.');
    expect(await send({ items: [ok(w, 'MT-01'), ok(w, 'MT-01')], complete: true })).toBe('items: A catalogue item appears twice.');
    expect(await send({ items: [{ ...ok(w, 'MT-01'), mark: 'good' }], complete: true })).toBe(
      'items.0.mark: Mark the item OK, defect or not applicable.',
    );
    expect(await send({ items: [ok(w, 'MT-01')], complete: true, inspector: 'me' })).toMatch(/inspector|Unrecognized/);
    expect(await send({ items: [ok(other, 'MT-01')], complete: true })).toBe("items.0.catalogueItemId: This item is no longer in the job's defect catalogue. Reload the unit check and mark the items shown.");
    expect(await send({ items: [ok(w, 'MT-01'), { catalogueItemId: w.notForCassettes.id, mark: 'ok' }], complete: true })).toBe(
      `items.1.catalogueItemId: ${w.notForCassettes.code} ${w.notForCassettes.title} does not apply to this unit's kind (Ceiling cassette, four-way). Reload the unit check and mark the items shown.`,
    );
    expect(await send({ items: [{ ...ok(w, 'MT-01'), measuredText: '3 in' }], complete: true })).toMatch(
      /^items\.0\.measuredText: MT-01 .* has no measured rule, so it takes no measured value\.$/,
    );
    expect(await send({ items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'ok', measuredText: '34' }], complete: true })).toMatch(
      /^items\.0\.measuredText: /,
    );
    expect(
      await send({ items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'not_applicable', measuredText: '3 in' }], complete: true }),
    ).toBe('items.0.measuredText: An item marked not applicable takes no measured value.');
    await CatalogueItem.update({ retiredAt: new Date() }, { where: { id: w.byCode('MT-02').id } });
    expect(await send({ items: [ok(w, 'MT-02')], complete: true })).toBe(
      `items.0.catalogueItemId: MT-02 ${w.byCode('MT-02').title} is retired from this job's catalogue. Reload the unit check and mark the items shown.`,
    );
    const walk = (await inspector.agent.post(`/api/jobs/${w.job.id}/walks`).set('X-CSRF-Token', inspector.csrf).send({ levelId: w.otherLevel.id }).expect(201))
      .body;
    expect(await send({ walkId: walk.id, items: [ok(w, 'MT-01')], complete: true })).toBe('walkId: That walk is on another level than this unit.');
    expect(await send({ walkId: MISSING, items: [ok(w, 'MT-01')], complete: true })).toBe('walkId: That walk is not on this job.');
    const none = await inspector.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(200);
    expect(none.body.items).toEqual([]);
    expect(none.body.current).toBeNull();
    expect(none.body.unit.state).toBe('not_checked');
  });

  it('replays a retried check with the same Idempotency-Key (one check recorded)', async () => {
    const w = await buildWalkJob(people);
    const body = { items: [ok(w, 'MT-01')], complete: true };
    const first = await post(inspector, w, w.cassette.id, body, 'check-retry-0001').expect(201);
    const again = await post(inspector, w, w.cassette.id, body, 'check-retry-0001').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    const changed = await post(inspector, w, w.cassette.id, { ...body, complete: false }, 'check-retry-0001').expect(422);
    expect(changed.body.error.message).toBe('This Idempotency-Key was already used for a different request.');
    const history = await inspector.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(200);
    expect(history.body.items).toHaveLength(1);
  });
});

describe('completeness is decided by the server', () => {
  const sentAndStored = async (checkId: string) =>
    (
      await db.sequelize.query<{ complete: boolean; complete_sent: boolean | null }>(`SELECT complete, complete_sent FROM unit_checks WHERE id = $1`, {
        bind: [checkId],
        type: QueryTypes.SELECT,
      })
    )[0];

  it('a check with one applicable item unanswered is not complete although the phone sent complete: true; the answer names the item', async () => {
    const w = await buildWalkJob(people);
    const applicable = await applicableTo(w.job.id, 'cassette_4way');
    expect(applicable.length).toBeGreaterThan(1);
    const left = applicable[applicable.length - 1]!;
    const res = await post(inspector, w, w.cassette.id, { items: await everyItem(w.job.id, 'cassette_4way', 'ok', [left.code]), complete: true }).expect(201);
    expect(res.body.complete).toBe(false);
    expect(res.body.missing).toEqual([{ catalogueItemId: left.id, code: left.code, title: left.title }]);
    expect(await sentAndStored(res.body.id)).toEqual({ complete: false, complete_sent: true });
    // Every reader follows the server's answer: the walk list, the walk coverage and the levels board.
    const state = await inspector.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(200);
    expect(state.body.unit).toMatchObject({ state: 'in_progress', lastCheck: { id: res.body.id, complete: false } });
    const units = await gc.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units`).expect(200);
    expect(units.body.counts).toMatchObject({ checked: 0, inProgress: 1 });
    const board = await gc.agent.get(`/api/jobs/${w.job.id}/board`).expect(200);
    expect(board.body.levels.find((r: { levelId: string }) => r.levelId === w.level.id)).toMatchObject({ unitsChecked: 0 });
    const ready = await gc.agent.get(`/api/jobs/${w.job.id}/readiness?levelId=${w.level.id}`).expect(200);
    const level = ready.body.levels.find((l: { levelId: string }) => l.levelId === w.level.id);
    expect(level.uncheckedCeilingUnits.map((u: { tag: string }) => u.tag)).toContain('IU-3-01');
  });

  it('becomes complete when the last answer arrives, whatever the phone says; an item the job adds must be answered too', async () => {
    const w = await buildWalkJob(people);
    const applicable = await applicableTo(w.job.id, 'cassette_4way');
    const first = await post(inspector, w, w.cassette.id, { items: await everyItem(w.job.id, 'cassette_4way', 'ok', [applicable[0]!.code]), complete: false }).expect(201);
    expect(first.body).toMatchObject({ complete: false, missing: [{ code: applicable[0]!.code }] });
    // The phone says not complete, but every applicable item has its answer now: complete.
    const second = await post(inspector, w, w.cassette.id, { items: await everyItem(w.job.id, 'cassette_4way', 'not_applicable'), complete: false }).expect(201);
    expect(second.body).toMatchObject({ complete: true, missing: [] });
    expect(await sentAndStored(second.body.id)).toEqual({ complete: true, complete_sent: false });
    // Leaving complete out is allowed; the job's own item for cassettes now counts, a retired one does not.
    const own = await CatalogueItem.create({
      jobId: w.job.id, code: 'JB-01', group: applicable[0]!.group, title: 'Job label missing', description: 'The job asks for its own label.',
      unitKinds: ['cassette_4way'], defaultSeverity: 'minor', trade: 'mechanical', measuredRule: null, fixGuidance: 'Fit the label.', caution: null,
      needsCeilingAccess: false, position: 999,
    });
    const retired = applicable[1]!;
    await retired.update({ retiredAt: new Date() });
    const before = await post(inspector, w, w.cassette.id, { items: await everyItem(w.job.id, 'cassette_4way', 'ok', [own.code]) }).expect(201);
    expect(before.body).toMatchObject({ complete: false, missing: [{ catalogueItemId: own.id, code: 'JB-01', title: 'Job label missing' }] });
    expect(await sentAndStored(before.body.id)).toEqual({ complete: false, complete_sent: null });
    const after = await post(inspector, w, w.cassette.id, { items: await everyItem(w.job.id, 'cassette_4way') }).expect(201);
    expect(after.body).toMatchObject({ complete: true, missing: [] });
    expect(after.body.items.map((i: { catalogueItemId: string }) => i.catalogueItemId)).not.toContain(retired.id);
    const units = await gc.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units`).expect(200);
    expect(units.body.counts).toMatchObject({ checked: 1, inProgress: 0 });
  });
});

describe('an item with an unresolved finding on the unit', () => {
  it('cannot be saved as OK while the finding is open or has a fix submitted: 409 open_finding_on_item naming it, nothing written', async () => {
    const w = await buildWalkJob(people);
    const item = w.byCode('DR-03');
    for (const status of ['open', 'fix_submitted'] as const) {
      const finding = await insertFinding(w, { code: 'DR-03', status });
      const before = await countRows(w.job.id);
      const res = await post(inspector, w, w.cassette.id, { items: [ok(w, 'MT-01'), ok(w, 'DR-03')], complete: true }).expect(409);
      expect(res.body.error.id).toBe('open_finding_on_item');
      expect(res.body.error.message).toContain(`#${finding.number}`);
      expect(res.body.error.message).toContain(item.title);
      expect(await countRows(w.job.id)).toEqual(before);
      await finding.update({ status: 'closed' });
    }
  });

  it('may be saved as a defect or not applicable, and as OK once the finding is closed or voided or is on another unit', async () => {
    const w = await buildWalkJob(people);
    await insertFinding(w, { code: 'DR-03', status: 'open' });
    await post(inspector, w, w.cassette.id, { items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'defect' }], complete: false }).expect(201);
    await post(inspector, w, w.cassette.id, { items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'not_applicable' }], complete: false }).expect(201);
    await post(inspector, w, w.cassette2.id, { items: [ok(w, 'DR-03')], complete: true }).expect(201);
    for (const status of ['closed', 'voided'] as const) {
      const v = await buildWalkJob(people);
      await insertFinding(v, { code: 'DR-03', status });
      await post(gc, v, v.cassette.id, { items: [ok(v, 'DR-03')], complete: true }).expect(201);
    }
  });
});

describe('GET /api/jobs/:jobId/units/:unitId/checks', () => {
  it('returns the unit state, the current (latest) check and the history newest first, paged', async () => {
    const w = await buildWalkJob(people);
    const walk = (await inspector.agent.post(`/api/jobs/${w.job.id}/walks`).set('X-CSRF-Token', inspector.csrf).send({ levelId: w.level.id }).expect(201))
      .body;
    const a = (await post(inspector, w, w.cassette.id, { walkId: walk.id, items: [ok(w, 'MT-01')], complete: true }).expect(201)).body;
    const b = (
      await post(inspector, w, w.cassette.id, {
        walkId: walk.id,
        items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'ok', measuredText: '34 in' }],
        complete: false,
      }).expect(201)
    ).body;
    const res = await gc.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(200);
    expect(res.body.items.map((c: { id: string }) => c.id)).toEqual([b.id, a.id]);
    expect(res.body.current.id).toBe(b.id);
    expect(res.body.unit).toMatchObject({ id: w.cassette.id, state: 'in_progress', lastCheck: { id: b.id, complete: false } });
    expect(res.body.items[0].items[0].proposedFinding).toMatchObject({ code: 'DR-03', walkId: walk.id, unitCheckId: b.id });
    const p1 = await gc.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks?limit=1`).expect(200);
    expect(p1.body.items.map((c: { id: string }) => c.id)).toEqual([b.id]);
    const p2 = await gc.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks?limit=1&cursor=${p1.body.nextCursor}`).expect(200);
    expect(p2.body.items.map((c: { id: string }) => c.id)).toEqual([a.id]);
    expect(p2.body.current.id).toBe(b.id);
    expect(p2.body.nextCursor).toBeNull();
  });

  it('answers 400 for a bad cursor or limit, 403 to a subcontractor, 404 to a non-member or another job, 401 signed out', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const badCursor = await inspector.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks?cursor=nonsense`).expect(400);
    expect(badCursor.body.error).toEqual({ id: 'invalid_cursor', message: 'This list position is not valid any more; start again from the first page.', fields: { cursor: 'This list position is not valid any more; start again from the first page.' } });
    const badLimit = await inspector.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks?limit=0`).expect(400);
    expect(badLimit.body.error.message).toBe('query.limit: A whole number from 1 to 200.');
    await subA.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(403);
    await outsider.agent.get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(404);
    await inspector.agent.get(`/api/jobs/${w.job.id}/units/${other.cassette.id}/checks`).expect(404);
    await request(trimout.app).get(`/api/jobs/${w.job.id}/units/${w.cassette.id}/checks`).expect(401);
  });
});
