/**
 * Readiness that waits for test records (GET /readiness): a level's ceilings close only when every
 * system with pipework on it has a passed, witnessed pressure test covering it and every concealed
 * unit a passed drain test; the blockers name the missing or failed record (with its id); a level
 * flips to ready exactly when the last missing record passes. A system is ready for start-up with
 * its pressure tests and evacuation passed and its charge recorded, and accepted with its start-up
 * record and every unit's drain test. Built by hand: one system on Level 3 (two cassettes, a wall
 * unit, a ducted unit) and Level 4 (a cassette).
 */
import type { SignedIn } from '../../support/app';
import { buildUnit } from '../../support/factories';
import { buildSystem } from '../../support/factories';
import { buildWalkJob, everyItem, startWalkApp, type People } from '../../support/findings';
import { Unit } from '../../../server/models';
import type { ReadinessWithTests, TestBlocker } from '../../../shared/schemas/testRecords';

jest.setTimeout(300_000);

let api: Awaited<ReturnType<typeof startWalkApp>>;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let subB: SignedIn;

beforeAll(async () => {
  api = await startWalkApp();
  ({ people, gc, inspector, subA, subB } = api);
});
afterAll(async () => {
  await api.close();
});

async function setup() {
  const w = await buildWalkJob(people);
  const system = await buildSystem(w.job.id, { name: 'VRF-3' });
  const ducted = await buildUnit(w.job.id, w.level.id, { tag: 'IU-3-04', kind: 'ducted_low', systemId: system.id });
  await Unit.update({ systemId: system.id }, { where: { id: [w.cassette.id, w.cassette2.id, w.wall.id, w.upstairs.id] } });
  // Today's rule first: every unit has a complete unit check.
  for (const u of [w.cassette, w.cassette2, w.wall, ducted, w.upstairs]) {
    const res = await inspector.agent
      .post(`/api/jobs/${w.job.id}/units/${u.id}/checks`)
      .set('X-CSRF-Token', inspector.csrf)
      .send({ items: await everyItem(w.job.id, u.kind), complete: true });
    expect(res.status).toBe(201);
  }
  return { ...w, system, ducted };
}
type Setup = Awaited<ReturnType<typeof setup>>;

const recordsPath = (s: Setup) => `/api/jobs/${s.job.id}/test-records`;
async function record(who: SignedIn, s: Setup, body: object): Promise<string> {
  const res = await who.agent.post(recordsPath(s)).set('X-CSRF-Token', who.csrf).send(body);
  expect(res.status).toBe(201);
  return res.body.id as string;
}
async function witness(s: Setup, id: string) {
  await inspector.agent.post(`${recordsPath(s)}/${id}/witness`).set('X-CSRF-Token', inspector.csrf).set('If-Match', '"v1"').send({}).expect(200);
}
async function readiness(who: SignedIn, s: Setup): Promise<ReadinessWithTests> {
  return (await who.agent.get(`/api/jobs/${s.job.id}/readiness`).expect(200)).body as ReadinessWithTests;
}
const level3 = async (who: SignedIn, s: Setup) => (await readiness(who, s)).levels.find((l) => l.levelId === s.level.id)!;

const pressure = (s: Setup, over: object = {}) => ({
  kind: 'pressure',
  systemId: s.system.id,
  medium: 'nitrogen',
  targetPressure: { value: '600 psig', source: 'Outdoor unit manual, p. 31 (invented for the test)' },
  startPressure: '600 psig',
  endPressure: '600 psig',
  startTemperature: '20 °C',
  endTemperature: '20 °C',
  startAt: '2026-12-01T08:00:00Z',
  endAt: '2026-12-02T08:00:00Z',
  gauge: { identifier: 'G-17', calibratedOn: '2026-06-01', resolution: '1 psi' },
  ...over,
});
const drain = (unitId: string, over: object = {}) => ({
  kind: 'drain',
  unitId,
  waterPoured: true,
  reachesTermination: true,
  pumpFitted: true,
  pumpRunsAndLifts: true,
  floatSwitchFitted: false,
  noLeakAtJoints: true,
  ...over,
});
const blocker = (s: Setup, over: Partial<TestBlocker>): TestBlocker => ({
  kind: 'pressure',
  state: 'missing',
  systemId: s.system.id,
  systemName: 'VRF-3',
  unitId: null,
  unitTag: null,
  levelId: null,
  recordId: null,
  ...over,
});

describe('a level waits for its pressure test and its concealed units’ drain tests', () => {
  it('names each missing, failed or unwitnessed record, and flips to ready exactly when the last one passes', async () => {
    const s = await setup();
    const drainMissing = blocker(s, { kind: 'drain', unitId: s.ducted.id, unitTag: 'IU-3-04' });
    const before = await level3(gc, s);
    // Today's rule alone would let the ceilings close: every unit is checked, no finding is open.
    expect(before).toMatchObject({ ceilingUnits: 3, ceilingUnitsUnchecked: 0, blockers: [], ceilingState: 'blocked', ceilingReady: false, testsReady: false });
    expect(before.testBlockers).toEqual([blocker(s, { levelId: s.level.id }), drainMissing]);
    // The levels board counts them and agrees.
    const boardLevel3 = async () => (await gc.agent.get(`/api/jobs/${s.job.id}/board`).expect(200)).body.levels.find((l: { levelId: string }) => l.levelId === s.level.id);
    expect(await boardLevel3()).toMatchObject({ ceilingBlockers: 0, ceilingTestBlockers: 2, ceilingState: 'blocked' });

    // A test of the Level 4 part of the pipework does not cover Level 3.
    const upstairs = await record(subA, s, pressure(s, { levelIds: [s.otherLevel.id] }));
    await witness(s, upstairs);
    expect((await level3(gc, s)).testBlockers).toEqual([blocker(s, { levelId: s.level.id }), drainMissing]);

    const whole = await record(subA, s, pressure(s));
    expect((await level3(gc, s)).testBlockers).toEqual([blocker(s, { levelId: s.level.id, state: 'awaiting_witness', recordId: whole }), drainMissing]);
    await witness(s, whole);
    expect((await level3(gc, s)).testBlockers).toEqual([drainMissing]);

    const leaking = await record(subA, s, drain(s.ducted.id, { noLeakAtJoints: false }));
    expect((await level3(gc, s)).testBlockers).toEqual([{ ...drainMissing, state: 'failed', recordId: leaking }]);
    expect((await level3(gc, s)).ceilingReady).toBe(false);

    // The re-test is the last missing record: the level flips to ready with it.
    await record(subA, s, drain(s.ducted.id));
    const after = await level3(gc, s);
    expect(after).toMatchObject({ testsReady: true, testBlockers: [], ceilingState: 'ready', ceilingReady: true });
    expect(await boardLevel3()).toMatchObject({ ceilingTestBlockers: 0, ceilingState: 'ready', ceilingReady: true });

    // A correction that fails replaces the witnessed test: blocked again, naming the correction.
    const corrected = await record(subA, s, pressure(s, { supersedesId: whole, endPressure: '560 psig' }));
    expect((await level3(gc, s)).testBlockers).toEqual([blocker(s, { levelId: s.level.id, state: 'failed', recordId: corrected })]);
  });

  it('a subcontractor is held back only by what their company answers for', async () => {
    const s = await setup();
    // Company A is the job's mechanical company: the system is theirs, so its records are missing for them.
    expect((await level3(subA, s)).testBlockers.map((b) => b.kind)).toEqual(['pressure', 'drain']);
    // Company B (electrical) answers for no system: nothing of theirs holds the level back.
    expect(await level3(subB, s)).toMatchObject({ testsReady: true, testBlockers: [], ceilingReady: true });
  });
});

describe('a system waits for start-up and for acceptance', () => {
  it('start-up: pressure on every level and evacuation passed, charge recorded; accepted: start-up passed and every unit’s drain test', async () => {
    const s = await setup();
    const sys = async () => (await readiness(gc, s)).systems.find((x) => x.systemId === s.system.id)!;
    const first = await sys();
    expect(first).toMatchObject({ ready: true, startupReady: false, accepted: false });
    expect(first.startupBlockers.map((b) => [b.kind, b.state, b.levelId])).toEqual([
      ['pressure', 'missing', s.level.id],
      ['pressure', 'missing', s.otherLevel.id],
      ['evacuation', 'missing', null],
      ['charge', 'missing', null],
    ]);
    // No witness needed for start-up: a passed test is enough.
    await record(subA, s, pressure(s));
    await record(subA, s, { kind: 'evacuation', systemId: s.system.id, deepestReading: '300 microns', isolatedReading: '300 microns', afterHoldReading: '420 microns', holdMinutes: 15 });
    expect((await sys()).startupBlockers.map((b) => b.kind)).toEqual(['charge']);
    await record(subA, s, { kind: 'charge', systemId: s.system.id, liquidLines: [{ size: '3/8"', length: '30 m' }], weighedIn: '1.6 kg' });
    const started = await sys();
    expect(started).toMatchObject({ startupReady: true, startupBlockers: [], accepted: false });
    // A pumped unit's drain test needs power: it waits for acceptance, not for start-up.
    expect(started.acceptanceBlockers.map((b) => [b.kind, b.unitTag])).toEqual([
      ['startup', null],
      ['drain', 'IU-3-01'],
      ['drain', 'IU-3-02'],
      ['drain', 'IU-3-03'],
      ['drain', 'IU-3-04'],
      ['drain', 'IU-4-01'],
    ]);
    const units = [s.cassette, s.cassette2, s.wall, s.ducted, s.upstairs];
    await record(subA, s, {
      kind: 'startup',
      systemId: s.system.id,
      mode: 'cooling',
      technician: 'R. Diaz',
      units: units.map((u) => ({ unitId: u.id, answers: true, addressed: true, faultShown: false, supplyTemperature: '13 °C', returnTemperature: '24 °C' })),
    });
    for (const u of units.slice(0, -1)) await record(subA, s, drain(u.id));
    expect((await sys()).acceptanceBlockers.map((b) => [b.kind, b.unitTag])).toEqual([['drain', 'IU-4-01']]);
    await record(subA, s, drain(s.upstairs.id));
    expect(await sys()).toMatchObject({ startupReady: true, accepted: true, acceptanceBlockers: [] });
  });
});
