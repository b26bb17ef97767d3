import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { System } from '../../../server/models';
import { a2lMinFloorArea } from '../../../shared/calc/refrigerant';
import { KG_PER_POUND } from '../../../shared/calc/quantity';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, buildLevel, buildSpace, buildSystem, buildUnit } from '../../support/factories';

jest.setTimeout(60_000);

let db: Database;
let trimout: TrimoutApp;
let crew: SignedCrew;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  crew = await signInCrew(trimout.app);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

const FT2 = 0.09290304; // m² per ft² (exact)
const FT = 304.8; // mm per ft (exact)

describe('systems', () => {
  it('answers 401 signed out', async () => {
    const job = await newJobFor(crew);
    await request(trimout.app).get(jobPath(job.id, '/systems')).expect(401);
  });

  it('creates a system with charges typed in lb and kg (stored in kg)', async () => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/systems'), {
      name: 'VRF-1',
      outdoorModel: 'OU-120',
      refrigerant: 'R-410A',
      factoryCharge: '38 lb',
      fieldCharge: '2.5 kg',
    });
    expect(res.status).toBe(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body.factoryCharge).toBeCloseTo(38 * KG_PER_POUND, 12);
    expect(res.body.totalCharge).toBeCloseTo(38 * KG_PER_POUND + 2.5, 12);
    const dup = await crew.gc.post(jobPath(job.id, '/systems'), { name: 'vrf-1', refrigerant: 'R-32' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.message).toBe('This job already has a system named "vrf-1".');
  });

  it.each([
    [{ refrigerant: 'R-22' }, /^refrigerant: Choose a refrigerant: R-410A, R-32, R-454B\./],
    [{ factoryCharge: '38' }, /^factoryCharge: "38" is a bare number/],
    [{ concentrationLimitOverride: { value: 5, unit: 'lb/Mcf' } }, /^concentrationLimitOverride\.source: /],
  ])('answers 400 with a message for %j', async (change, message) => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/systems'), { name: 'S', refrigerant: 'R-410A', ...change });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(message);
  });

  it('computes the R-410A concentration check over the spaces its units serve (fails for a 10×10×8 ft office)', async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    const small = await buildSpace(job.id, level.id, { name: 'Office 3-12', floorArea: 100 * FT2, ceilingHeight: 8 * FT });
    const big = await buildSpace(job.id, level.id, { name: 'Open office', floorArea: 400, ceilingHeight: 2700 });
    const system = await buildSystem(job.id, { name: 'VRF-3', factoryCharge: 30 * KG_PER_POUND, fieldCharge: 8 * KG_PER_POUND });
    await buildUnit(job.id, level.id, { spaceId: small.id, systemId: system.id, kind: 'wall_mounted' });
    await buildUnit(job.id, level.id, { spaceId: big.id, systemId: system.id });
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const res = await who.get(jobPath(job.id, `/systems/${system.id}`));
      expect(res.status).toBe(200);
      expect(res.headers.etag).toBe('"v1"');
      // 800 ft³ × 26 lb/1000 ft³ = 20.8 lb allowed; 38 lb total (ASHRAE 34 RCL for R-410A, as stored in shared/calc).
      expect(res.body.concentration).toMatchObject({ status: 'fail', pass: false, refrigerant: 'R-410A' });
      expect(res.body.concentration.governing.names).toEqual(['Office 3-12']);
      expect(res.body.concentration.governing.allowedCharge).toBeCloseTo(20.8 * KG_PER_POUND, 9);
      expect(res.body.a2lFloorArea).toEqual([]);
      expect(res.body.unitCount).toBe(2);
    }
  });

  it('lists each system on the floors its units are on, with the same refrigerant verdict as its page, for the building view of the board', async () => {
    const job = await newJobFor(crew);
    const ground = await buildLevel(job.id, { name: 'Ground' });
    const first = await buildLevel(job.id, { name: 'First' });
    const small = await buildSpace(job.id, ground.id, { name: 'Office 3-12', floorArea: 100 * FT2, ceilingHeight: 8 * FT });
    const hall = await buildSpace(job.id, first.id, { name: 'Hall', floorArea: 400, ceilingHeight: 2700 });
    // 38 lb in an 800 ft³ office: over the 20.8 lb the R-410A limit allows (the page's own check, above).
    const over = await buildSystem(job.id, { name: 'VRF-A', factoryCharge: 30 * KG_PER_POUND, fieldCharge: 8 * KG_PER_POUND });
    const fine = await buildSystem(job.id, { name: 'VRF-B', factoryCharge: 10, fieldCharge: 0 });
    const bare = await buildSystem(job.id, { name: 'VRF-C' });
    await buildUnit(job.id, ground.id, { spaceId: small.id, systemId: over.id, kind: 'wall_mounted' });
    await buildUnit(job.id, first.id, { spaceId: hall.id, systemId: over.id });
    await buildUnit(job.id, first.id, { spaceId: hall.id, systemId: fine.id });
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const res = await who.get(jobPath(job.id, '/board/systems'));
      expect(res.status).toBe(200);
      const byName = Object.fromEntries(res.body.systems.map((s: { name: string }) => [s.name, s]));
      expect(Object.keys(byName)).toEqual(['VRF-A', 'VRF-B', 'VRF-C']);
      expect(byName['VRF-A']).toMatchObject({ systemId: over.id, refrigerant: 'over_limit', startupReady: false });
      expect([...byName['VRF-A'].levelIds].sort()).toEqual([ground.id, first.id].sort());
      expect(byName['VRF-B']).toMatchObject({ refrigerant: 'within_limit', levelIds: [first.id] });
      expect(byName['VRF-C']).toMatchObject({ systemId: bare.id, levelIds: [] });
      // Start-up waits for records (pressure test, evacuation, charge): counted, as readiness lists them.
      const readiness = await who.get(jobPath(job.id, '/readiness'));
      const a = readiness.body.systems.find((s: { systemId: string }) => s.systemId === over.id);
      expect(byName['VRF-A'].recordsWaiting).toBe(a.startupBlockers.length);
      // A subcontractor sees the records of their own company's systems only (none here).
      if (who !== crew.sub) expect(byName['VRF-A'].recordsWaiting).toBeGreaterThan(0);
      // The verdict is the system page's own.
      const page = await who.get(jobPath(job.id, `/systems/${fine.id}`));
      expect(page.body.concentration.pass).toBe(true);
    }
    await request(trimout.app).get(jobPath(job.id, '/board/systems')).expect(401);
    const other = await buildJobWithCrew();
    expect((await crew.gc.get(jobPath(other.job.id, '/board/systems'))).status).toBe(404);
  });

  it('counts linked spaces together: a permanent opening to the corridor makes the same charge pass', async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    const small = await buildSpace(job.id, level.id, { name: 'Office', floorArea: 100 * FT2, ceilingHeight: 8 * FT });
    const corridor = await buildSpace(job.id, level.id, { name: 'Corridor', floorArea: 100, ceilingHeight: 2700 });
    const system = await buildSystem(job.id, { factoryCharge: 30 * KG_PER_POUND, fieldCharge: 8 * KG_PER_POUND });
    await buildUnit(job.id, level.id, { spaceId: small.id, systemId: system.id });
    await crew.gc.patch(jobPath(job.id, `/spaces/${small.id}`), { linkedSpaceIds: [corridor.id] }, ifMatch(1));
    const res = await crew.gc.get(jobPath(job.id, `/systems/${system.id}`));
    expect(res.body.concentration.status).toBe('pass');
    expect(res.body.concentration.governing.names.sort()).toEqual(['Corridor', 'Office']);
  });

  it('gives an R-32 system the A2L minimum floor area per unit, by mounting (IEC 60335-2-40 Annex GG)', async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    const room = await buildSpace(job.id, level.id, { name: 'Flat 2', floorArea: 30, ceilingHeight: 2700 });
    const system = await buildSystem(job.id, { refrigerant: 'R-32', factoryCharge: 3, fieldCharge: 0.5 });
    await buildUnit(job.id, level.id, { tag: 'A', spaceId: room.id, systemId: system.id, kind: 'wall_mounted' });
    await buildUnit(job.id, level.id, { tag: 'B', spaceId: room.id, systemId: system.id, kind: 'floor_console' });
    await buildUnit(job.id, level.id, { tag: 'C', spaceId: room.id, systemId: system.id, kind: 'ducted_low' });
    await buildUnit(job.id, level.id, { tag: 'D', systemId: system.id, kind: 'floor_ceiling' });
    const res = await crew.insp.get(jobPath(job.id, `/systems/${system.id}`));
    const rows = res.body.a2lFloorArea as Array<{ tag: string; mount: string | null; mountFrom: string | null; result: { status: string; minArea: number; message: string } }>;
    // 3.5 kg R-32 is between m1 (1.84 kg) and m2 (7.98 kg): A_min applies, by release height.
    // A ducted unit or a floor/ceiling unit with no position recorded is not guessed as ceiling-mounted.
    expect(rows.map((r) => [r.tag, r.mount, r.mountFrom, r.result.status])).toEqual([
      ['A', 'wall', 'kind', 'pass'],
      ['B', 'floor', 'kind', 'fail'],
      ['C', null, null, 'not_measured'],
      ['D', null, null, 'not_measured'],
    ]);
    expect(rows[0]!.result.minArea).toBeCloseTo(a2lMinFloorArea(3.5, 'wall'), 12);
    expect(rows[2]!.result.message).toMatch(/record whether the unit is floor-standing, wall-mounted or ceiling-mounted/);
  });

  it("takes the release height from the unit's mounting position, else its model's installation position (IEC 60335-2-40 Annex GG)", async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    // 30 m²: 3.5 kg needs 104 m² floor-standing (h0 0.6 m) and 7.8 m² ceiling-mounted (h0 2.2 m).
    const room = await buildSpace(job.id, level.id, { name: 'Closet and flat', floorArea: 30, ceilingHeight: 2700 });
    const system = await buildSystem(job.id, { refrigerant: 'R-32', factoryCharge: 3, fieldCharge: 0.5 });
    const kit = await crew.gc.post(jobPath(job.id, '/models'), { name: 'Kit 36', unitKind: 'ahu_coil_kit', mountPosition: 'floor' });
    expect(kit.status).toBe(201);
    expect(kit.body.mountPosition).toBe('floor');
    const ducted = await crew.gc.post(jobPath(job.id, '/models'), { name: 'Ducted 24', unitKind: 'ducted_low', mountPosition: 'ceiling' });
    const post = (body: object) => crew.gc.post(jobPath(job.id, '/units'), { levelId: level.id, spaceId: room.id, systemId: system.id, ...body });
    expect((await post({ tag: 'AHU-1', kind: 'ahu_coil_kit', modelId: kit.body.id })).status).toBe(201);
    expect((await post({ tag: 'DU-1', kind: 'ducted_low', modelId: ducted.body.id })).status).toBe(201);
    const closet = await post({ tag: 'DU-2', kind: 'ducted_low', modelId: ducted.body.id, mountPosition: 'floor' });
    expect(closet.status).toBe(201);
    expect(closet.body).toMatchObject({ mountPosition: 'floor', effectiveMount: { mount: 'floor', from: 'unit' } });

    const res = await crew.insp.get(jobPath(job.id, `/systems/${system.id}`));
    const rows = res.body.a2lFloorArea as Array<{ tag: string; mount: string; mountFrom: string; result: { status: string; minArea: number } }>;
    expect(rows.map((r) => [r.tag, r.mount, r.mountFrom, r.result.status])).toEqual([
      ['AHU-1', 'floor', 'model', 'fail'],
      ['DU-1', 'ceiling', 'model', 'pass'],
      ['DU-2', 'floor', 'unit', 'fail'],
    ]);
    expect(rows[0]!.result.minArea).toBeCloseTo(a2lMinFloorArea(3.5, 0.6), 12);

    // The unit's own field cleared: its model's position applies again.
    const unit = await crew.gc.get(jobPath(job.id, `/units/${closet.body.id}`));
    const cleared = await crew.gc.patch(jobPath(job.id, `/units/${closet.body.id}`), { mountPosition: null }, ifMatch(unit.body.version));
    expect(cleared.status).toBe(200);
    expect(cleared.body).toMatchObject({ mountPosition: null, effectiveMount: { mount: 'ceiling', from: 'model' } });
  });

  it('refuses a mounting position other than floor, wall or ceiling (400 naming the field)', async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    const unit = await crew.gc.post(jobPath(job.id, '/units'), { tag: 'X-1', kind: 'ducted_low', levelId: level.id, mountPosition: 'roof' });
    expect(unit.status).toBe(400);
    expect(unit.body.error.fields).toMatchObject({ mountPosition: 'Choose floor, wall or ceiling.' });
    const model = await crew.gc.post(jobPath(job.id, '/models'), { name: 'M', unitKind: 'ducted_low', mountPosition: 'suspended' });
    expect(model.status).toBe(400);
    expect(model.body.error.fields).toMatchObject({ mountPosition: 'Choose floor, wall or ceiling.' });
  });

  it('asks for an entered limit for R-454B, and uses it once entered with its source', async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    const room = await buildSpace(job.id, level.id, { floorArea: 30, ceilingHeight: 2700 });
    const system = await buildSystem(job.id, { refrigerant: 'R-454B', factoryCharge: 5, fieldCharge: 0 });
    await buildUnit(job.id, level.id, { spaceId: room.id, systemId: system.id });
    const before = await crew.gc.get(jobPath(job.id, `/systems/${system.id}`));
    expect(before.body.concentration.status).toBe('limit_not_set');
    const after = await crew.gc.patch(
      jobPath(job.id, `/systems/${system.id}`),
      { concentrationLimitOverride: { value: 0.1, unit: 'kg/m³', source: 'Job engineer letter 2026-11-02 (invented for the test)' } },
      ifMatch(1),
    );
    expect(after.status).toBe(200);
    expect(after.headers.etag).toBe('"v2"');
    expect(after.body.concentration.status).toBe('pass');
    expect(after.body.concentration.limit.source).toMatch(/^Job entry: /);
  });

  it('changes with If-Match (428 / 412) and refuses to delete a system with units (409)', async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    const system = await buildSystem(job.id, { name: 'VRF-8' });
    const path = jobPath(job.id, `/systems/${system.id}`);
    expect((await crew.gc.patch(path, { name: 'VRF-9' })).status).toBe(428);
    const stale = await crew.gc.patch(path, { name: 'VRF-9' }, ifMatch(2));
    expect(stale.status).toBe(412);
    expect(stale.body.current).toMatchObject({ name: 'VRF-8', version: 1 });
    await buildUnit(job.id, level.id, { systemId: system.id });
    await buildUnit(job.id, level.id, { systemId: system.id });
    const refused = await crew.gc.del(path, ifMatch(1));
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe('VRF-8 still has 2 units. Move those units to another system (or clear their system) first.');
    const empty = await buildSystem(job.id);
    expect((await crew.gc.del(jobPath(job.id, `/systems/${empty.id}`), ifMatch(1))).status).toBe(204);
  });

  it.each(['insp', 'sub'] as const)('refuses system writes to the %s (403)', async (who) => {
    const job = await newJobFor(crew);
    const system = await buildSystem(job.id);
    expect((await crew[who].get(jobPath(job.id, '/systems'))).status).toBe(200);
    expect((await crew[who].post(jobPath(job.id, '/systems'), { name: 'X', refrigerant: 'R-32' })).status).toBe(403);
    expect((await crew[who].patch(jobPath(job.id, `/systems/${system.id}`), { name: 'X' }, ifMatch(1))).status).toBe(403);
    expect((await crew[who].del(jobPath(job.id, `/systems/${system.id}`), ifMatch(1))).status).toBe(403);
    expect(await System.count({ where: { jobId: job.id } })).toBe(1);
  });

  it("answers 404 for another job's systems", async () => {
    const other = await buildJobWithCrew();
    const system = await buildSystem(other.job.id);
    expect((await crew.gc.get(jobPath(other.job.id, '/systems'))).status).toBe(404);
    const mine = await newJobFor(crew);
    expect((await crew.gc.get(jobPath(mine.id, `/systems/${system.id}`))).status).toBe(404);
  });

  it('replays a create with the same Idempotency-Key', async () => {
    const job = await newJobFor(crew);
    const key = { 'Idempotency-Key': `system-${job.id}` };
    const first = await crew.gc.post(jobPath(job.id, '/systems'), { name: 'VRF-1', refrigerant: 'R-410A' }, key);
    const again = await crew.gc.post(jobPath(job.id, '/systems'), { name: 'VRF-1', refrigerant: 'R-410A' }, key);
    expect(first.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(await System.count({ where: { jobId: job.id } })).toBe(1);
    expect((await crew.gc.post(jobPath(job.id, '/systems'), { name: 'VRF-2', refrigerant: 'R-410A' }, key)).status).toBe(422);
  });
});
