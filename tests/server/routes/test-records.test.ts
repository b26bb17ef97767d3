/**
 * Test records over the API: every kind with its computed figures in the answer, photos of the
 * gauge, witnessing and the lock it puts on a record, corrections that supersede, company scoping
 * (other company → 404, other job → 404, signed out → 401), 400 field errors, 409, 412/428, the
 * list's filters and pages, and the CSV (injection-safe, scoped).
 *
 * Check values (sources beside them):
 * - 600 psig at 20 °C read at 10 °C expects 579.03 psig: ideal gas law at constant volume with
 *   absolute pressure and temperature (any physics handbook); 1 psi = 6.894757 kPa and the standard
 *   atmosphere 101.325 kPa (NIST SP 811). Worked by hand in tests/shared/calc/testRecords.test.ts.
 * - 1 micron = 0.001 mmHg = 0.1333224 Pa; 1 inHg = 3.386389 kPa (NIST SP 811).
 * - 500 microns target and rise: common practice (from memory), Trimout's stated defaults.
 * - Charge factors are invented round figures for the test, not a real product's.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { Unit } from '../../../server/models';
import { TEST_RECORD_CAUTION, type TestRecordDto } from '../../../shared/schemas/testRecords';
import { csrfFor, type SignedIn } from '../../support/app';
import { buildSystem } from '../../support/factories';
import { buildWalkJob, startWalkApp, type People, type WalkJob } from '../../support/findings';
import { startFakeS3, type FakeS3 } from '../../support/storage';

jest.setTimeout(300_000);

let s3: FakeS3;
let api: Awaited<ReturnType<typeof startWalkApp>>;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let subB: SignedIn;
let jpeg: Buffer;

beforeAll(async () => {
  s3 = await startFakeS3();
  api = await startWalkApp({ objectStore: s3.store });
  ({ people, gc, inspector, subA, subB } = api);
  jpeg = await sharp({ create: { width: 120, height: 90, channels: 3, background: { r: 30, g: 90, b: 160 } } }).jpeg().toBuffer();
});
afterAll(async () => {
  await api.close();
  await s3.close();
});

const MISSING = '00000000-0000-4000-8000-000000000000';

/** A job with one system on Level 3 (both cassettes and the wall unit) and the Level 4 cassette on no system. */
async function setup() {
  const w = await buildWalkJob(people);
  const system = await buildSystem(w.job.id, { name: 'VRF-1', factoryCharge: 11.8, fieldCharge: null });
  await Unit.update({ systemId: system.id }, { where: { id: [w.cassette.id, w.cassette2.id, w.wall.id] } });
  return { ...w, system };
}
type Setup = Awaited<ReturnType<typeof setup>>;

const base = (w: WalkJob, rest = '') => `/api/jobs/${w.job.id}/test-records${rest}`;
function post(who: SignedIn, url: string, body: object, key?: string) {
  const req = who.agent.post(url).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body);
}
function witness(who: SignedIn, w: WalkJob, r: { id: string }, etag?: string, body: object = {}) {
  const req = who.agent.post(base(w, `/${r.id}/witness`)).set('X-CSRF-Token', who.csrf);
  if (etag) req.set('If-Match', etag);
  return req.send(body);
}

const pressure = (s: Setup, over: object = {}) => ({
  kind: 'pressure',
  systemId: s.system.id,
  medium: 'nitrogen',
  targetPressure: { value: '600 psig', source: 'Outdoor unit installation manual, p. 31 (invented for the test)' },
  startPressure: '600 psig',
  endPressure: '579 psig',
  startTemperature: '20 °C',
  endTemperature: '10 °C',
  startAt: '2026-12-01T08:00:00Z',
  endAt: '2026-12-02T08:00:00Z',
  gauge: { identifier: 'G-17', calibratedOn: '2026-06-01', resolution: '1 psi' },
  ...over,
});
const evacuation = (s: Setup, over: object = {}) => ({
  kind: 'evacuation',
  systemId: s.system.id,
  deepestReading: '350 microns',
  isolatedReading: '380 microns',
  afterHoldReading: '610 microns',
  holdMinutes: 15,
  ...over,
});
const drain = (unitId: string, over: object = {}) => ({
  kind: 'drain',
  unitId,
  waterPoured: true,
  reachesTermination: true,
  pumpFitted: false,
  floatSwitchFitted: false,
  noLeakAtJoints: true,
  ...over,
});

async function record(who: SignedIn, s: Setup, body: object): Promise<TestRecordDto> {
  const res = await post(who, base(s), body);
  expect(res.status).toBe(201);
  return res.body as TestRecordDto;
}

describe('pressure test', () => {
  it('600 psig at 20 °C read 579 psig at 10 °C: the drop as read and corrected side by side, passed; gauge photos kept with their stage', async () => {
    const s = await setup();
    const res = await subA.agent
      .post(base(s))
      .set('X-CSRF-Token', subA.csrf)
      .field('data', JSON.stringify({ ...pressure(s), photoStages: ['gauge_start', 'gauge_end'], note: 'Whole system.' }))
      .attach('photos', jpeg, { filename: 'start.jpg', contentType: 'image/jpeg' })
      .attach('photos', jpeg, { filename: 'end.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(201);
    const r = res.body as Extract<TestRecordDto, { kind: 'pressure' }>;
    expect(r).toMatchObject({ kind: 'pressure', result: 'passed', reasons: [], locked: false, current: true, caution: TEST_RECORD_CAUTION });
    expect(r.system).toEqual({ id: s.system.id, name: 'VRF-1' });
    // The system names no company: the job's one mechanical company (A) answers for it.
    expect(r.company?.id).toBe(s.subA.companyId);
    expect(r.figures.unit).toBe('psi');
    expect(r.figures.expectedEnd.value).toBeCloseTo(579.03, 2);
    expect(r.figures.uncorrectedChange.value).toBeCloseTo(-21, 9);
    expect(r.figures.correctedChange.value).toBeCloseTo(-0.03, 2);
    expect(r.figures.allowedDrop).toMatchObject({ from: 'default', valueInUnit: 1 });
    expect(r.figures.atmospheric).toMatchObject({ value: 101325, from: 'default' });
    expect(r.figures.holdMinutes).toBe(24 * 60);
    expect(r.data).toMatchObject({ startPressure: '600 psig', gauge: { identifier: 'G-17' } });
    expect(r.photos.map((p) => p.stage)).toEqual(['gauge_start', 'gauge_end']);
    expect(res.headers.etag).toBe('"v1"');
    // The photo is served to whoever sees the record, and to nobody else.
    await gc.agent.get(r.photos[0]!.url).expect(200);
    await subB.agent.get(r.photos[0]!.url).expect(404);
  });

  it('read 575 psig instead: 4.03 psi lost beyond the temperature, failed with the reason', async () => {
    const s = await setup();
    const r = (await record(subA, s, pressure(s, { endPressure: '575 psig' }))) as Extract<TestRecordDto, { kind: 'pressure' }>;
    expect(r.result).toBe('failed');
    expect(r.figures.correctedChange.value).toBeCloseTo(-4.03, 2);
    expect(r.reasons).toEqual(['The pressure dropped more than allowed after temperature correction.']);
  });

  it('the job’s allowed drop and site pressure decide, named with their sources', async () => {
    const s = await setup();
    const job = await gc.agent.get(`/api/jobs/${s.job.id}`).expect(200);
    const patched = await gc.agent
      .patch(`/api/jobs/${s.job.id}`)
      .set('X-CSRF-Token', gc.csrf)
      .set('If-Match', job.headers.etag as string)
      .send({ testSettings: { allowedPressureDrop: { value: '5 psi', source: 'Job specification 23 23 00, 3.4 (invented)' }, atmosphericPressure: { value: '84 kPa', source: 'Site at 1,600 m' } } });
    expect(patched.status).toBe(200);
    expect(patched.body.testSettings.allowedPressureDrop).toMatchObject({ text: '5 psi', source: 'Job specification 23 23 00, 3.4 (invented)' });
    const r = (await record(inspector, s, pressure(s, { endPressure: '575 psig' }))) as Extract<TestRecordDto, { kind: 'pressure' }>;
    expect(r.figures.allowedDrop).toMatchObject({ from: 'job', source: 'Job specification 23 23 00, 3.4 (invented)' });
    expect(r.figures.atmospheric).toMatchObject({ value: 84_000, from: 'job' });
    expect(r.result).toBe('passed');
    const bad = await gc.agent
      .patch(`/api/jobs/${s.job.id}`)
      .set('X-CSRF-Token', gc.csrf)
      .set('If-Match', patched.headers.etag as string)
      .send({ testSettings: { targetVacuum: { value: '500 psi', source: 'x' } } });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(['testSettings.targetVacuum.value']);
  });

  it('400 with field errors for figures that do not parse, an end before the start, and a level the system is not on', async () => {
    const s = await setup();
    const a = await post(subA, base(s), pressure(s, { startPressure: '600', endAt: '2026-11-30T08:00:00Z' }));
    expect(a.status).toBe(400);
    expect(Object.keys(a.body.error.fields).sort()).toEqual(['endAt', 'startPressure']);
    const b = await post(subA, base(s), pressure(s, { levelIds: [s.otherLevel.id] }));
    expect(b.status).toBe(400);
    expect(b.body.error.fields).toHaveProperty(['levelIds.0']);
    const c = await post(subA, base(s), { kind: 'nonsense' });
    expect(c.status).toBe(400);
  });
});

describe('evacuation, charge, drain and start-up', () => {
  it('evacuation: microns and inHg vacuum, the decay rise against the stated limit, the job’s target with its source', async () => {
    const s = await setup();
    const ok = (await record(subA, s, evacuation(s))) as Extract<TestRecordDto, { kind: 'evacuation' }>;
    expect(ok.result).toBe('passed');
    expect(ok.figures.rise.microns).toBeCloseTo(230, 6);
    expect(ok.figures.target.from).toBe('default');
    expect(ok.figures.target.microns).toBeCloseTo(500, 9);
    expect(ok.figures.target.source).toMatch(/common practice/);
    // 29.9 inHg vacuum at the standard atmosphere = 101325 − 29.9 × 3386.389 = 71.97 Pa ≈ 539.8 microns.
    const vac = (await record(subA, s, evacuation(s, { deepestReading: '29.9 inHg vacuum' }))) as Extract<TestRecordDto, { kind: 'evacuation' }>;
    expect(vac.figures.deepest.microns).toBeCloseTo(539.81, 1);
    expect(vac.result).toBe('failed');
    expect(vac.reasons).toEqual(['The deepest reading did not reach the target vacuum.']);
    const leak = (await record(subA, s, evacuation(s, { afterHoldReading: '1500 microns' }))) as Extract<TestRecordDto, { kind: 'evacuation' }>;
    expect(leak.result).toBe('failed');
    expect(leak.figures.riseWithinLimit).toBe(false);
  });

  it('charge: additional charge from the lengths × the factors entered on the system with their source; a size without a factor is named, never invented', async () => {
    const s = await setup();
    const sys = await gc.agent.get(`/api/jobs/${s.job.id}/systems/${s.system.id}`).expect(200);
    const patched = await gc.agent
      .patch(`/api/jobs/${s.job.id}/systems/${s.system.id}`)
      .set('X-CSRF-Token', gc.csrf)
      .set('If-Match', sys.headers.etag as string)
      .send({
        chargeBasis: {
          factoryChargeSource: 'Outdoor unit nameplate (invented)',
          factors: [
            { size: '3/8"', factor: '0.054 kg/m', source: 'Outdoor unit manual, table 4 (invented)' },
            { size: '1/4"', factor: '22 g/m', source: 'Outdoor unit manual, table 4 (invented)' },
          ],
        },
      });
    expect(patched.status).toBe(200);
    expect(patched.body.chargeBasis.factors[1]).toMatchObject({ size: '1/4"', kgPerM: 0.022 });
    const r = (await record(subA, s, {
      kind: 'charge',
      systemId: s.system.id,
      liquidLines: [
        { size: '3/8"', length: '30 m' },
        { size: '1/4"', length: '45 m' },
      ],
      weighedIn: '2.7 kg',
    })) as Extract<TestRecordDto, { kind: 'charge' }>;
    // 30 × 0.054 + 45 × 0.022 = 1.62 + 0.99 = 2.61 kg; 2.7 − 2.61 = 0.09 kg; total 11.8 + 2.7 = 14.5 kg.
    expect(r.result).toBe('recorded');
    expect(r.figures.additionalKg).toBeCloseTo(2.61, 9);
    expect(r.figures.differenceKg).toBeCloseTo(0.09, 9);
    expect(r.figures.totalChargeKg).toBeCloseTo(14.5, 9);
    expect(r.figures.factoryCharge).toMatchObject({ value: 11.8, source: 'Outdoor unit nameplate (invented)' });
    // The weighed-in amount is the field charge the system's concentration check now uses: 11.8 + 2.7 kg.
    const detail = await gc.agent.get(`/api/jobs/${s.job.id}/systems/${s.system.id}`).expect(200);
    expect(detail.body.chargeRecord).toMatchObject({ recordId: r.id, weighedInKg: 2.7 });
    expect(detail.body.concentration.totalCharge).toBeCloseTo(14.5, 9);
    const missing = (await record(subA, s, { kind: 'charge', systemId: s.system.id, liquidLines: [{ size: '1/2"', length: '40 ft' }], weighedIn: '3 lb' })) as Extract<
      TestRecordDto,
      { kind: 'charge' }
    >;
    expect(missing.figures.missingFactors).toEqual(['1/2"']);
    expect(missing.figures.additionalKg).toBeNull();
  });

  it('drain test per unit: passed, a pump not proven fails, and a pump answer without a pump is a field error', async () => {
    const s = await setup();
    const ok = await record(subA, s, drain(s.cassette.id, { waterAmount: '2 L' }));
    expect(ok).toMatchObject({ kind: 'drain', result: 'passed', unit: { id: s.cassette.id, tag: 'IU-3-01' }, system: { id: s.system.id }, figures: { needsPower: false } });
    const pump = await record(subA, s, drain(s.cassette2.id, { pumpFitted: true, pumpRunsAndLifts: null }));
    expect(pump).toMatchObject({ result: 'failed', figures: { needsPower: true }, reasons: ['The pump did not run and lift.'] });
    const bad = await post(subA, base(s), drain(s.wall.id, { pumpRunsAndLifts: true }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('pumpRunsAndLifts');
    // The Level 4 cassette is on no system: the mechanical company still answers for it.
    expect((await post(subA, base(s), drain(s.upstairs.id))).status).toBe(201);
    expect((await post(subB, base(s), drain(s.upstairs.id))).status).toBe(404);
  });

  it('start-up: supply and return per unit with the difference; a unit missing or faulted fails; a unit of another system is a field error', async () => {
    const s = await setup();
    const unit = (id: string, over: object = {}) => ({ unitId: id, answers: true, addressed: true, faultShown: false, supplyTemperature: '13 °C', returnTemperature: '24 °C', ...over });
    const r = (await record(subA, s, {
      kind: 'startup',
      systemId: s.system.id,
      mode: 'cooling',
      technician: 'R. Diaz',
      units: [unit(s.cassette.id), unit(s.cassette2.id, { supplyTemperature: '55.4 °F', returnTemperature: '75.2 °F' }), unit(s.wall.id)],
    })) as Extract<TestRecordDto, { kind: 'startup' }>;
    expect(r.result).toBe('passed');
    expect(r.figures.units.map((u) => [u.tag, Math.round(u.differenceK! * 1000) / 1000])).toEqual([
      ['IU-3-01', 11],
      ['IU-3-02', 11],
      ['IU-3-03', 11],
    ]);
    const short = (await record(subA, s, { kind: 'startup', systemId: s.system.id, mode: 'cooling', technician: 'R. Diaz', units: [unit(s.cassette.id, { faultShown: true, faultCode: 'E7' })] })) as Extract<
      TestRecordDto,
      { kind: 'startup' }
    >;
    expect(short.result).toBe('failed');
    expect(short.figures.missingUnits.map((u) => u.tag).sort()).toEqual(['IU-3-02', 'IU-3-03']);
    const bad = await post(subA, base(s), { kind: 'startup', systemId: s.system.id, mode: 'cooling', technician: 'R. Diaz', units: [unit(s.upstairs.id)] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty(['units.0.unitId']);
  });
});

describe('witnessing, locking and corrections', () => {
  it('an inspector or GC manager witnesses with If-Match; then the record is locked, in the answer and in the database', async () => {
    const s = await setup();
    const r = await record(subA, s, pressure(s));
    expect((await witness(subA, s, r, '"v1"')).status).toBe(403);
    expect((await witness(inspector, s, r)).status).toBe(428);
    const stale = await witness(inspector, s, r, '"v7"');
    expect(stale.status).toBe(412);
    const ok = await witness(inspector, s, r, '"v1"', { note: 'Gauge read at both ends.' });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ locked: true, version: 2, witnessNote: 'Gauge read at both ends.', witnessedBy: { id: s.inspector.id } });
    expect(ok.headers.etag).toBe('"v2"');
    expect((await witness(gc, s, r, '"v2"')).status).toBe(409);
    expect((await witness(gc, s, r, '"v2"')).body.error.id).toBe('already_witnessed');
    // The lock is the database's own: no write path can change a witnessed record.
    await expect(api.db.sequelize.query(`UPDATE test_records SET result = 'failed' WHERE id = $1`, { bind: [r.id] })).rejects.toThrow(/locked/);
  });

  it('a person does not witness their own record', async () => {
    const s = await setup();
    const r = await record(inspector, s, pressure(s));
    const res = await witness(inspector, s, r, '"v1"');
    expect(res.status).toBe(403);
    expect(res.body.error.id).toBe('witness_own_record');
    expect((await witness(gc, s, r, '"v1"')).status).toBe(200);
  });

  it('a correction supersedes a witnessed record: history keeps both; the old one cannot be witnessed or corrected again', async () => {
    const s = await setup();
    const first = await record(subA, s, pressure(s, { endPressure: '575 psig' }));
    await witness(inspector, s, first, '"v1"').expect(200);
    const fixed = await record(subA, s, pressure(s, { supersedesId: first.id, note: 'Gauge misread: corrected.' }));
    expect(fixed.supersedesId).toBe(first.id);
    const old = await gc.agent.get(base(s, `/${first.id}`)).expect(200);
    expect(old.body).toMatchObject({ current: false, supersededById: fixed.id, locked: true, result: 'failed' });
    const again = await post(subA, base(s), pressure(s, { supersedesId: first.id }));
    expect(again.status).toBe(409);
    expect(again.body.error.id).toBe('superseded');
    const late = await witness(gc, s, { id: first.id }, old.headers.etag as string);
    expect(late.status).toBe(409);
    expect(late.body.error.id).toBe('superseded');
    const wrongKind = await post(subA, base(s), evacuation(s, { supersedesId: fixed.id }));
    expect(wrongKind.status).toBe(400);
    expect(wrongKind.body.error.fields).toHaveProperty('supersedesId');
    const list = await gc.agent.get(base(s, '?kind=pressure')).expect(200);
    expect(list.body.items.map((x: TestRecordDto) => x.id)).toEqual([fixed.id, first.id]);
    const current = await gc.agent.get(base(s, '?kind=pressure&current=true')).expect(200);
    expect(current.body.items.map((x: TestRecordDto) => x.id)).toEqual([fixed.id]);
  });

  it('an Idempotency-Key replay answers the first record; a phone-made id sent again is that record', async () => {
    const s = await setup();
    const key = `test-record-${randomUUID()}`;
    const a = await post(subA, base(s), evacuation(s), key);
    const b = await post(subA, base(s), evacuation(s), key);
    expect(a.status).toBe(201);
    expect(b.body.id).toBe(a.body.id);
    const id = randomUUID();
    expect((await post(subA, base(s), evacuation(s, { id }))).status).toBe(201);
    const again = await post(subA, base(s), evacuation(s, { id }));
    expect(again.status).toBe(200);
    expect(again.body.id).toBe(id);
    expect((await post(inspector, base(s), evacuation(s, { id }))).status).toBe(409);
  });
});

describe('scoping', () => {
  it('signed out 401; another company 404 for its records and systems; another job’s system 404; a GC manager does not record', async () => {
    const s = await setup();
    const r = await record(subA, s, pressure(s));
    const anon = request.agent(api.trimout.app);
    const csrf = await csrfFor(anon);
    await anon.get(base(s)).expect(401);
    await anon.post(base(s)).set('X-CSRF-Token', csrf).send(pressure(s)).expect(401);
    await subB.agent.get(base(s, `/${r.id}`)).expect(404);
    expect((await subB.agent.get(base(s)).expect(200)).body.items).toEqual([]);
    expect((await post(subB, base(s), pressure(s))).status).toBe(404);
    await subA.agent.get(base(s, `/${MISSING}`)).expect(404);
    const other = await setup();
    expect((await post(subA, base(s), pressure(other))).status).toBe(404);
    await gc.agent.get(`/api/jobs/${other.job.id}/test-records/${r.id}`).expect(404);
    expect((await post(gc, base(s), pressure(s))).status).toBe(403);
  });

  it('a system that names its company: only that company sees and records its tests', async () => {
    const s = await setup();
    const r = await record(subA, s, pressure(s));
    const sys = await gc.agent.get(`/api/jobs/${s.job.id}/systems/${s.system.id}`).expect(200);
    await gc.agent
      .patch(`/api/jobs/${s.job.id}/systems/${s.system.id}`)
      .set('X-CSRF-Token', gc.csrf)
      .set('If-Match', sys.headers.etag as string)
      .send({ companyId: s.subB.companyId })
      .expect(200);
    await subA.agent.get(base(s, `/${r.id}`)).expect(404);
    await subB.agent.get(base(s, `/${r.id}`)).expect(200);
    expect((await post(subA, base(s), evacuation(s))).status).toBe(404);
    expect((await post(subB, base(s), evacuation(s))).status).toBe(201);
    const res = await gc.agent
      .patch(`/api/jobs/${s.job.id}/systems/${s.system.id}`)
      .set('X-CSRF-Token', gc.csrf)
      .set('If-Match', '"v2"')
      .send({ companyId: MISSING });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('companyId');
  });
});

describe('list and CSV', () => {
  it('filters by kind, result, witnessed and unit; pages with a cursor', async () => {
    const s = await setup();
    const p = await record(subA, s, pressure(s));
    const f = await record(subA, s, pressure(s, { endPressure: '570 psig' }));
    const d = await record(subA, s, drain(s.cassette.id));
    await witness(inspector, s, p, '"v1"').expect(200);
    const ids = async (q: string) => ((await gc.agent.get(base(s, q)).expect(200)).body.items as TestRecordDto[]).map((x) => x.id).sort();
    expect(await ids('?result=failed')).toEqual([f.id]);
    expect(await ids('?witnessed=true')).toEqual([p.id]);
    expect(await ids(`?unitId=${s.cassette.id}`)).toEqual([d.id]);
    expect(await ids(`?systemId=${s.system.id}&kind=pressure`)).toEqual([p.id, f.id].sort());
    const first = await gc.agent.get(base(s, '?limit=2')).expect(200);
    expect(first.body.items).toHaveLength(2);
    const second = await gc.agent.get(base(s, `?limit=2&cursor=${encodeURIComponent(first.body.nextCursor)}`)).expect(200);
    expect(second.body.items).toHaveLength(1);
    expect(second.body.nextCursor).toBeNull();
    expect([...first.body.items, ...second.body.items].map((x: TestRecordDto) => x.id).sort()).toEqual([p.id, f.id, d.id].sort());
    expect((await gc.agent.get(base(s, '?kind=vacuum'))).status).toBe(400);
    expect((await gc.agent.get(base(s, '?cursor=nonsense'))).status).toBe(400);
  });

  it('CSV: one row per record in scope, the figures in words, formula-looking text neutralised', async () => {
    const s = await setup();
    await record(subA, s, pressure(s, { note: '=HYPERLINK("http://x.example","click")' }));
    await record(subA, s, drain(s.cassette.id, { note: '-2+3' }));
    const res = await gc.agent.get(base(s, '.csv')).expect(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="test-records-/);
    const text = res.text.replace(/^\uFEFF/, '');
    const lines = text.trim().split('\r\n');
    expect(lines).toHaveLength(3);
    expect(lines[0]).toBe('"Record id","Kind","System","Unit","Company","Result","Why it failed","Figures","Recorded by","Recorded at","Witnessed by","Witnessed at","Supersedes","Superseded by","Note"');
    expect(text).toContain(`"'=HYPERLINK(""http://x.example"",""click"")"`);
    expect(text).toContain(`"'-2+3"`);
    expect(text).toContain('corrected for temperature -0.03 psi');
    const sub = await subB.agent.get(base(s, '.csv')).expect(200);
    expect(sub.text.replace(/^\uFEFF/, '').trim().split('\r\n')).toHaveLength(1);
    const rows = await api.db.sequelize.query<{ n: string }>(`SELECT count(*) AS n FROM test_records WHERE job_id = $1`, { bind: [s.job.id], type: QueryTypes.SELECT });
    expect(Number(rows[0]!.n)).toBe(2);
  });
});
