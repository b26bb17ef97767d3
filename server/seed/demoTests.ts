/**
 * The demo job's test records, in every state the readiness screen shows: passed and witnessed,
 * failed then re-tested, passed but awaiting a witness, a witnessed record corrected by a newer one,
 * and systems and units with records still missing. Every figure is computed by the same code as a
 * recorded test (services/testRecords.ts computeRecord), from invented readings. The outdoor units'
 * additional-charge factors are invented round figures labelled as invented, not a real product's.
 * Only when the job has no test records yet.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { CreateTestRecordParsed } from '../../shared/schemas/testRecords';
import type { UnitKindKey } from '../../shared/words';
import type { Database } from '../db';
import { Job, System, TestRecord } from '../models';
import { chargeBasisOf, computeRecord, resolveTestSettings, type TestTarget } from '../services/testRecords';

interface UnitRow {
  id: string;
  tag: string;
  kind: UnitKindKey;
  level_id: string;
  system_id: string | null;
  position: number;
}

const INVENTED_FACTOR_SOURCE = 'Invented demo outdoor unit, invented manual table: not a real product’s factor. Enter it from the outdoor unit’s own manual.';

export async function seedDemoTests(
  db: Database,
  jobId: string,
  mechanicalCompanyId: string,
  users: { gc: string; inspector: string; mechanical: string },
  transaction: Transaction,
): Promise<boolean> {
  const sequelize = db.sequelize;
  if ((await TestRecord.count({ where: { jobId }, transaction })) > 0) return false;
  const job = await Job.findByPk(jobId, { transaction });
  const systems = await System.findAll({ where: { jobId }, order: [['name', 'ASC']], transaction });
  const units = await sequelize.query<UnitRow>(
    `SELECT u.id, u.tag, u.kind, u.level_id, u.system_id, l.position FROM units u JOIN levels l ON l.id = u.level_id
      WHERE u.job_id = $1 ORDER BY l.position, u.tag`,
    { bind: [jobId], type: QueryTypes.SELECT, transaction },
  );
  if (!job || systems.length === 0 || units.length === 0) return false;
  const settings = resolveTestSettings(job.testSettings);
  const now = Date.now();
  const day = 24 * 60 * 60 * 1000;
  const at = (daysAgo: number, hour = 9) => new Date(now - daysAgo * day + (hour - 12) * 60 * 60 * 1000);

  // The outdoor units' charge basis: invented factors, labelled so.
  for (const s of systems) {
    s.chargeBasis = chargeBasisOf({
      factoryChargeSource: `Nameplate of ${s.outdoorModel ?? 'the outdoor unit'}: invented demo figure.`,
      factors: [
        { size: '3/8"', factor: '0.35 lb/ft', source: INVENTED_FACTOR_SOURCE },
        { size: '1/4"', factor: '0.16 lb/ft', source: INVENTED_FACTOR_SOURCE },
        { size: '1/2"', factor: '0.68 lb/ft', source: INVENTED_FACTOR_SOURCE },
      ],
    });
    s.version += 1;
    await s.save({ transaction });
  }

  const unitsOf = (systemId: string) => units.filter((u) => u.system_id === systemId);
  const targetOf = (systemId: string): TestTarget => {
    const s = systems.find((x) => x.id === systemId)!;
    return {
      system: { id: s.id, name: s.name, factoryCharge: s.factoryCharge, chargeBasis: s.chargeBasis ?? null, units: unitsOf(s.id).map((u) => ({ id: u.id, tag: u.tag, levelId: u.level_id })) },
      unit: null,
    };
  };

  let made = 0;
  async function add(
    body: CreateTestRecordParsed,
    when: Date,
    options: { witnessedBy?: string; witnessedAt?: Date; supersedes?: string; note?: string; unit?: UnitRow } = {},
  ): Promise<string> {
    const systemId = body.kind === 'drain' ? options.unit!.system_id : body.systemId;
    const target: TestTarget = systemId
      ? { ...targetOf(systemId), unit: options.unit ? { id: options.unit.id, tag: options.unit.tag, levelId: options.unit.level_id, kind: options.unit.kind, systemId } : null }
      : { system: null, unit: null };
    const computed = computeRecord(body, target, settings);
    const id = randomUUID();
    await TestRecord.create(
      {
        id,
        jobId,
        kind: body.kind,
        systemId: systemId ?? null,
        unitId: options.unit?.id ?? null,
        companyId: mechanicalCompanyId,
        levelIds: null,
        recordedBy: users.mechanical,
        recordedAt: when,
        witnessedBy: options.witnessedBy ?? null,
        witnessedAt: options.witnessedBy ? (options.witnessedAt ?? new Date(when.getTime() + 2 * 60 * 60 * 1000)) : null,
        supersedesId: options.supersedes ?? null,
        result: computed.result,
        reasons: computed.reasons,
        data: computed.data,
        figures: computed.figures,
        note: options.note ?? null,
      },
      { transaction },
    );
    made += 1;
    return id;
  }

  const iso = (d: Date) => d.toISOString().replace(/\.\d{3}Z$/, 'Z');
  const pressure = (systemId: string, startedDaysAgo: number, end: string, endTemperature = '64 °F'): CreateTestRecordParsed => ({
    kind: 'pressure',
    systemId,
    medium: 'nitrogen',
    targetPressure: { value: '550 psig', source: 'Invented demo outdoor unit manual, test pressure: not a real product’s figure.' },
    startPressure: '550 psig',
    endPressure: end,
    startTemperature: '70 °F',
    endTemperature,
    startAt: iso(at(startedDaysAgo, 8)),
    endAt: iso(at(startedDaysAgo - 1, 8)),
    gauge: { identifier: 'KV-G-04', calibratedOn: '2026-05-12', resolution: '1 psi' },
  });
  const evacuation = (systemId: string, deepest: string, isolated: string, after: string): CreateTestRecordParsed => ({
    kind: 'evacuation',
    systemId,
    deepestReading: deepest,
    isolatedReading: isolated,
    afterHoldReading: after,
    holdMinutes: 15,
    gaugeIdentifier: 'KV-VG-02',
  });
  // Weighed in: the field charge the demo system already states, so its concentration check reads the same.
  const charge = (systemId: string, weighed: string, ft: [number, number]): CreateTestRecordParsed => ({
    kind: 'charge',
    systemId,
    liquidLines: [
      { size: '3/8"', length: `${ft[0]} ft` },
      { size: '1/4"', length: `${ft[1]} ft` },
    ],
    weighedIn: weighed,
    scaleIdentifier: 'KV-S-01',
  });
  const drain = (unit: UnitRow, over: Partial<Extract<CreateTestRecordParsed, { kind: 'drain' }>> = {}): CreateTestRecordParsed => ({
    kind: 'drain',
    unitId: unit.id,
    waterPoured: true,
    waterAmount: '2 L',
    reachesTermination: true,
    pumpFitted: unit.kind.startsWith('cassette'),
    pumpRunsAndLifts: unit.kind.startsWith('cassette') ? true : null,
    floatSwitchFitted: false,
    floatSwitchStopsUnit: null,
    noLeakAtJoints: true,
    ...over,
  });
  const startup = (systemId: string): CreateTestRecordParsed => ({
    kind: 'startup',
    systemId,
    mode: 'cooling',
    technician: 'Tomasz Reed',
    units: unitsOf(systemId).map((u, i) => ({
      unitId: u.id,
      answers: true,
      address: `1-${String(i + 1).padStart(2, '0')}`,
      addressed: true,
      faultShown: false,
      supplyTemperature: `${55 + (i % 3)} °F`,
      returnTemperature: `${74 + (i % 2)} °F`,
    })),
  });

  const [s1, s2, s3, s4] = systems;
  // First system: everything passed and witnessed, started up: accepted once its units are ready.
  if (s1) {
    await add(pressure(s1.id, 21, '549 psig', '68 °F'), at(20), { witnessedBy: users.inspector, note: 'Whole system, 24 h hold.' });
    await add(evacuation(s1.id, '310 microns', '330 microns', '470 microns'), at(18), { witnessedBy: users.inspector });
    await add(charge(s1.id, '8 lb', [15, 18]), at(17));
    for (const u of unitsOf(s1.id)) await add(drain(u), at(16), { unit: u });
    await add(startup(s1.id), at(10), { witnessedBy: users.gc });
  }
  // Second system: the pressure test failed (a flare nut found loose), re-tested and passed; the
  // evacuation failed its decay test, then passed; the first ducted drain leaked, then passed.
  if (s2) {
    await add(pressure(s2.id, 19, '531 psig'), at(18), { note: 'Drop traced to a loose flare nut at a branch joint.' });
    await add(pressure(s2.id, 15, '548 psig', '66 °F'), at(14), { witnessedBy: users.inspector, note: 'Re-test after the flare was remade.' });
    await add(evacuation(s2.id, '420 microns', '450 microns', '1650 microns'), at(13), { note: 'Rose fast: moisture suspected.' });
    await add(evacuation(s2.id, '290 microns', '300 microns', '410 microns'), at(12), { witnessedBy: users.inspector });
    await add(charge(s2.id, '9 lb 4 oz', [18, 18]), at(11));
    const ducted = unitsOf(s2.id).filter((u) => u.kind.startsWith('ducted'));
    for (const [i, u] of ducted.entries()) {
      if (i === 0) {
        await add(drain(u, { noLeakAtJoints: false }), at(12), { unit: u, note: 'Weep at the trap adapter.' });
        await add(drain(u), at(9), { unit: u, note: 'Adapter replaced; dry.' });
      } else await add(drain(u), at(12), { unit: u });
    }
  }
  // Third system: passed but still awaiting the inspector's witness; drains not yet tested.
  if (s3) {
    await add(pressure(s3.id, 4, '550 psig', '70 °F'), at(3));
    await add(evacuation(s3.id, '380 microns', '400 microns', '560 microns'), at(2));
  }
  // Fourth system: a witnessed test corrected by a newer record (the gauge was misread); the history keeps both.
  if (s4) {
    const first = await add(pressure(s4.id, 12, '545 psig'), at(11), { witnessedBy: users.inspector });
    await add(pressure(s4.id, 12, '550 psig'), at(10), { supersedes: first, witnessedBy: users.gc, note: 'Correction: end reading misread from the gauge photo.' });
  }
  // The other systems have nothing yet: their records are missing.
  return made > 0;
}
