import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { CatalogueItem, Crew, Job, JobCompany, JobMember, Level, Space, SpaceLink, System, Unit, UnitModel } from '../../../server/models';
import { buildTestApp, csrfFor, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, copyCatalogue, buildLevel, buildSpace, buildSystem, buildUnit, buildUnitModel, buildUser } from '../../support/factories';

let db: Database;
let trimout: TrimoutApp;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

describe('GET /api/jobs', () => {
  it('answers 401 signed out', async () => {
    await request(trimout.app).get('/api/jobs').expect(401);
  });

  it.each(['gcManager', 'inspector', 'subA'] as const)('lists the job with the role of the %s', async (who) => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew[who].email);
    const res = await agent.get('/api/jobs').expect(200);
    const role = { gcManager: 'gc_manager', inspector: 'inspector', subA: 'subcontractor' }[who];
    expect(res.body.items).toEqual([{ id: crew.job.id, name: crew.job.name, number: null, address: null, role }]);
  });

  it('is empty for a user with no membership', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, user.email);
    expect((await agent.get('/api/jobs').expect(200)).body.items).toEqual([]);
  });
});

describe('GET /api/jobs/:jobId', () => {
  it('answers a member with the job and their role', async () => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew.subB.email);
    const res = await agent.get(`/api/jobs/${crew.job.id}`).expect(200);
    expect(res.body).toMatchObject({ id: crew.job.id, role: 'subcontractor', timeZone: 'UTC', unitSystem: 'imperial' });
  });

  it("answers 404 for another job (its existence is not leaked)", async () => {
    const mine = await buildJobWithCrew();
    const theirs = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, mine.gcManager.email);
    const res = await agent.get(`/api/jobs/${theirs.job.id}`).expect(404);
    expect(res.body.error.message).toBe('Job not found.');
  });

  it('answers 400 for an id that is not a UUID', async () => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew.gcManager.email);
    const res = await agent.get('/api/jobs/not-a-uuid').expect(400);
    expect(res.body.error.fields).toEqual({ jobId: 'This link does not name a job: open the job from its list.' });
  });

  it('reads membership on every request: removing the member takes effect at once', async () => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew.inspector.email);
    await agent.get(`/api/jobs/${crew.job.id}`).expect(200);
    await JobMember.destroy({ where: { jobId: crew.job.id, userId: crew.inspector.id } });
    await agent.get(`/api/jobs/${crew.job.id}`).expect(404);
  });
});

describe('POST /api/jobs/:jobId/copy', () => {
  it('starts a new job with the same levels, spaces and openings, models, catalogue as chosen, settings, companies and crews; no units, systems, findings or people', async () => {
    const crew = await buildJobWithCrew();
    const source = crew.job;
    const ground = await buildLevel(source.id, { name: 'Ground' });
    const first = await buildLevel(source.id, { name: 'First' });
    const office = await buildSpace(source.id, ground.id, { name: 'Office', floorArea: 20, ceilingHeight: 2700 });
    const corridor = await buildSpace(source.id, ground.id, { name: 'Corridor', floorArea: 40, ceilingHeight: 2700 });
    await SpaceLink.create({ jobId: source.id, spaceAId: [office.id, corridor.id].sort()[0]!, spaceBId: [office.id, corridor.id].sort()[1]! });
    await buildSpace(source.id, first.id, { name: 'Clinic room' });
    const model = await buildUnitModel(source.id, { name: 'Cassette 9', modelNumber: 'CS-9' });
    const system = await buildSystem(source.id, { name: 'VRF-1' });
    await buildUnit(source.id, ground.id, { spaceId: office.id, systemId: system.id, modelId: model.id });
    await JobCompany.create({ jobId: source.id, companyId: crew.gcCompany.id, trades: ['general'] });
    await JobCompany.create({ jobId: source.id, companyId: crew.subA.companyId, trades: ['mechanical'] });
    await Crew.create({ jobId: source.id, companyId: crew.subA.companyId, name: 'North crew' });
    // A catalogue choice: one item retired, one retitled.
    await copyCatalogue(source.id);
    const [retired, retitled] = await CatalogueItem.findAll({ where: { jobId: source.id }, order: [['position', 'ASC']], limit: 2 });
    await retired!.update({ retiredAt: new Date() });
    await retitled!.update({ title: 'Our own words for this defect', followsBuiltin: false });
    await source.update({ timeZone: 'America/Chicago', unitSystem: 'metric', severityDueDays: { critical: 1, major: 5, minor: 20 } });

    const gc = await signIn(trimout.app, crew.gcManager.email);
    const name = `Clinic, second building ${source.id.slice(0, 8)}`;
    const res = await gc.agent
      .post(`/api/jobs/${source.id}/copy`)
      .set('X-CSRF-Token', gc.csrf)
      .set('Idempotency-Key', `copy-${source.id}`)
      .send({ name, number: 'J-2' })
      .expect(201);
    expect(res.body).toMatchObject({ name, number: 'J-2', role: 'gc_manager', timeZone: 'America/Chicago', unitSystem: 'metric' });
    const copy = res.body.id as string;
    expect(copy).not.toBe(source.id);
    // The same request again is the same job (idempotent), not a second copy.
    const again = await gc.agent
      .post(`/api/jobs/${source.id}/copy`)
      .set('X-CSRF-Token', gc.csrf)
      .set('Idempotency-Key', `copy-${source.id}`)
      .send({ name, number: 'J-2' })
      .expect(201);
    expect(again.body.id).toBe(copy);
    expect(await Job.count({ where: { name } })).toBe(1);

    const names = async (Model: typeof Level | typeof Space | typeof UnitModel, jobId: string) =>
      (await (Model as typeof Level).findAll({ where: { jobId } })).map((r) => r.name).sort();
    expect(await names(Level, copy)).toEqual(await names(Level, source.id));
    expect(await names(Space, copy)).toEqual(['Clinic room', 'Corridor', 'Office']);
    expect(await names(UnitModel, copy)).toEqual(['Cassette 9']);
    // The opening joins the copies of the same two spaces, on the copy's own level.
    const copiedLinks = await SpaceLink.findAll({ where: { jobId: copy } });
    expect(copiedLinks).toHaveLength(1);
    const linked = await Space.findAll({ where: { id: [copiedLinks[0]!.spaceAId, copiedLinks[0]!.spaceBId] }, include: [{ model: Level, as: 'level' }] });
    expect(linked.map((s) => s.name).sort()).toEqual(['Corridor', 'Office']);
    expect(linked.every((s) => s.jobId === copy && s.level!.jobId === copy && s.level!.name === 'Ground')).toBe(true);
    // The catalogue as chosen.
    const items = await CatalogueItem.findAll({ where: { jobId: copy } });
    expect(items).toHaveLength(await CatalogueItem.count({ where: { jobId: source.id } }));
    expect(items.find((i) => i.code === retired!.code)!.retiredAt).not.toBeNull();
    expect(items.find((i) => i.code === retitled!.code)).toMatchObject({ title: 'Our own words for this defect', followsBuiltin: false });
    // Companies with their trades, and crews; the GC manager is the only member.
    const companies = async (jobId: string) => (await JobCompany.findAll({ where: { jobId } })).map((c) => `${c.companyId}:${c.trades.join(',')}`).sort();
    expect(await companies(copy)).toEqual(await companies(source.id));
    expect((await Crew.findAll({ where: { jobId: copy } })).map((c) => [c.companyId, c.name])).toEqual([[crew.subA.companyId, 'North crew']]);
    expect((await JobMember.findAll({ where: { jobId: copy } })).map((m) => [m.userId, m.role])).toEqual([[crew.gcManager.id, 'gc_manager']]);
    expect((await Job.findByPk(copy))!.severityDueDays).toEqual({ critical: 1, major: 5, minor: 20 });
    // Not copied: units, systems.
    expect(await Unit.count({ where: { jobId: copy } })).toBe(0);
    expect(await System.count({ where: { jobId: copy } })).toBe(0);
  });

  it('answers 400 without a name, 403 to an inspector or a subcontractor, 404 to a non-member, 401 signed out; nothing is created', async () => {
    const crew = await buildJobWithCrew();
    const before = await Job.count();
    const gc = await signIn(trimout.app, crew.gcManager.email);
    const bad = await gc.agent.post(`/api/jobs/${crew.job.id}/copy`).set('X-CSRF-Token', gc.csrf).send({}).expect(400);
    expect(bad.body.error.fields).toHaveProperty('name');
    for (const who of [crew.inspector, crew.subA]) {
      const s = await signIn(trimout.app, who.email);
      await s.agent.post(`/api/jobs/${crew.job.id}/copy`).set('X-CSRF-Token', s.csrf).send({ name: 'Copy' }).expect(403);
    }
    const outsider = await signIn(trimout.app, (await buildUser()).email);
    await outsider.agent.post(`/api/jobs/${crew.job.id}/copy`).set('X-CSRF-Token', outsider.csrf).send({ name: 'Copy' }).expect(404);
    const anon = request.agent(trimout.app);
    await anon.post(`/api/jobs/${crew.job.id}/copy`).set('X-CSRF-Token', await csrfFor(anon)).send({ name: 'Copy' }).expect(401);
    expect(await Job.count()).toBe(before);
  });
});

describe('GET /api/jobs/:jobId/setup/checklist', () => {
  it('names what a GC manager still has to set up, line by line, and is complete once all of it is there', async () => {
    const crew = await buildJobWithCrew();
    const jobId = crew.job.id;
    const gc = await signIn(trimout.app, crew.gcManager.email);
    const read = async () => (await gc.agent.get(`/api/jobs/${jobId}/setup/checklist`).expect(200)).body;
    const keys = async () => (await read()).lines.map((l: { key: string }) => l.key);

    // A new job: no levels (and so no units) before anything else.
    expect(await keys()).toEqual(['no_levels', 'no_units']);

    const ground = await buildLevel(jobId, { name: 'Ground' });
    const first = await buildLevel(jobId, { name: 'First' });
    expect(await keys()).toEqual(['levels_without_spaces', 'no_units']);
    expect((await read()).lines[0]).toEqual({ key: 'levels_without_spaces', count: 2, examples: ['Ground', 'First'], section: 'spaces' });

    // A room with a unit on a system but no ceiling height; a system with no charge; an R-454B system with no limit entered; a model with no limits.
    const room = await buildSpace(jobId, ground.id, { name: 'Exam 1', ceilingHeight: null });
    await buildSpace(jobId, first.id, { name: 'Store', floorArea: null });
    const system = await buildSystem(jobId, { name: 'VRF-1', factoryCharge: null, fieldCharge: null });
    await buildSystem(jobId, { name: 'VRF-2', refrigerant: 'R-454B', factoryCharge: 5 });
    const model = await buildUnitModel(jobId, { name: 'Cassette 9' });
    await buildUnit(jobId, ground.id, { tag: 'IU-1', spaceId: room.id, systemId: system.id, modelId: model.id });
    await buildUnit(jobId, first.id, { tag: 'IU-2' });
    const lines = Object.fromEntries((await read()).lines.map((l: { key: string }) => [l.key, l]));
    expect(Object.keys(lines)).toEqual(['spaces_without_size', 'systems_without_charge', 'systems_without_limit', 'units_without_space', 'units_without_system', 'models_without_limits']);
    // Only a space a refrigerant check needs (served by a unit on a system) is named; the store room has no such unit.
    expect(lines.spaces_without_size).toMatchObject({ count: 1, examples: ['Exam 1'] });
    expect(lines.systems_without_charge).toMatchObject({ count: 1, examples: ['VRF-1'] });
    expect(lines.systems_without_limit).toMatchObject({ count: 1, examples: ['VRF-2'] });
    expect(lines.units_without_space).toMatchObject({ count: 1, examples: ['IU-2'] });

    // Fix each one: the checklist empties and says it is complete.
    await room.update({ ceilingHeight: 2700 });
    await system.update({ factoryCharge: 8 });
    await System.update({ concentrationLimitOverride: { value: 0.1, unit: 'kg/m³', source: 'Job engineer letter (invented for the test)' } }, { where: { jobId, name: 'VRF-2' } });
    await model.update({ limits: { max_pump_lift: { value: 700, stated: 0.7, unit: 'm', text: '0.7 m', source: 'Manual p. 12 (invented for the test)' } } });
    const store = await Space.findOne({ where: { jobId, name: 'Store' } });
    await Unit.update({ spaceId: store!.id, systemId: system.id }, { where: { jobId, tag: 'IU-2' } });
    await store!.update({ floorArea: 12 });
    expect(await read()).toEqual({ complete: true, lines: [] });
  });

  it('is the GC manager’s: 403 to an inspector or a subcontractor, 404 to a non-member, 401 signed out, 400 for a query', async () => {
    const crew = await buildJobWithCrew();
    for (const who of [crew.inspector, crew.subA]) {
      const s = await signIn(trimout.app, who.email);
      await s.agent.get(`/api/jobs/${crew.job.id}/setup/checklist`).expect(403);
    }
    const outsider = await signIn(trimout.app, (await buildUser()).email);
    await outsider.agent.get(`/api/jobs/${crew.job.id}/setup/checklist`).expect(404);
    await request(trimout.app).get(`/api/jobs/${crew.job.id}/setup/checklist`).expect(401);
    const gc = await signIn(trimout.app, crew.gcManager.email);
    await gc.agent.get(`/api/jobs/${crew.job.id}/setup/checklist?all=1`).expect(400);
  });
});
