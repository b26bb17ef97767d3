/**
 * Test records: reads in the caller's scope, the figures computed from what was typed, the job's
 * test settings, and the CSV rows. The writes are server/commands/recordTest.ts and witnessTest.ts.
 *
 * Scope: GC managers and inspectors see every record of the job. A subcontractor sees the records
 * of the systems their company is responsible for (systems.company_id; when a system names no
 * company, every company on the job with the mechanical trade) and of the units on those systems
 * (a unit with no system: the mechanical companies). Anything else answers 404.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import {
  DEFAULT_ATMOSPHERE_SOURCE,
  DEFAULT_DECAY_HOLD_MINUTES,
  DEFAULT_DECAY_HOLD_SOURCE,
  DEFAULT_DECAY_RISE_PA,
  DEFAULT_DECAY_RISE_SOURCE,
  DEFAULT_TARGET_VACUUM_PA,
  DEFAULT_TARGET_VACUUM_SOURCE,
  evaluateCharge,
  evaluateDrain,
  evaluateEvacuation,
  evaluatePressureTest,
  evaluateStartup,
  paToGauge,
  paToVacuum,
  parseAbsolutePressure,
  parseChargeFactor,
  parseGaugePressure,
  parseLength,
  parseMass,
  parseTemperature,
  parseVacuum,
  STANDARD_ATMOSPHERE_PA,
  type SourcedFigure,
} from '../../shared/calc/testRecords';
import {
  parseDuration,
  TEST_RECORD_CAUTION,
  TEST_SETTING_KEYS,
  type ChargeBasisDto,
  type ChargeBasisInput,
  type CreateTestRecordParsed,
  type TestPhotoDto,
  type TestPhotoStage,
  type TestRecordDto,
  type TestRecordKind,
  type TestResult,
  type TestSettingDto,
  type TestSettingKey,
  type TestSettingsDto,
  type TestSettingsInput,
} from '../../shared/schemas/testRecords';
import type { UnitKindKey } from '../../shared/words';
import { badRequest } from '../errors';
import { TestRecord } from '../models';
import { photoUrls } from '../presenters/photo';
import type { FindingScope } from './findingQueries';
import type { PageRequest } from './paging';
import { responsibleSql } from './testScope';

// ------------------------------------------------------------------------------------------------
// Settings

const PARSERS: Record<TestSettingKey, (s: string) => { ok: true; value: number } | { ok: false; error: string }> = {
  atmosphericPressure: (s) => {
    const r = parseAbsolutePressure(s);
    return r.ok ? { ok: true, value: r.value.pa } : r;
  },
  allowedPressureDrop: (s) => {
    const r = parseGaugePressure(s);
    return r.ok ? { ok: true, value: r.value.pa } : r;
  },
  minPressureHold: (s) => {
    const r = parseDuration(s);
    return r.ok ? { ok: true, value: r.value.minutes } : r;
  },
  targetVacuum: (s) => {
    const r = parseVacuum(s);
    return r.ok ? { ok: true, value: r.value.pa } : r;
  },
  decayRiseLimit: (s) => {
    const r = parseVacuum(s);
    return r.ok ? { ok: true, value: r.value.pa } : r;
  },
  minDecayHold: (s) => {
    const r = parseDuration(s);
    return r.ok ? { ok: true, value: r.value.minutes } : r;
  },
};

/** The job's test settings after a PATCH: merged by key, null removes one (its default applies again). */
export function mergeTestSettings(current: TestSettingsDto | null | undefined, input: TestSettingsInput): TestSettingsDto {
  const next: TestSettingsDto = { ...(current ?? {}) };
  for (const key of TEST_SETTING_KEYS) {
    const entry = input[key];
    if (entry === undefined) continue;
    if (entry === null) {
      delete next[key];
      continue;
    }
    const parsed = PARSERS[key](entry.value);
    if (!parsed.ok) throw badRequest(`testSettings.${key}.value: ${parsed.error}`, { [`testSettings.${key}.value`]: parsed.error });
    next[key] = { value: parsed.value, text: entry.value.trim(), source: entry.source.trim() };
  }
  return next;
}

/** Every setting a decision uses: the job's, or Trimout's stated default, each with its source. */
export interface ResolvedTestSettings {
  atmospheric: SourcedFigure;
  allowedDrop: SourcedFigure | null;
  minPressureHold: SourcedFigure | null;
  targetVacuum: SourcedFigure;
  riseLimit: SourcedFigure;
  minDecayHold: SourcedFigure;
}

export function resolveTestSettings(settings: TestSettingsDto | null | undefined): ResolvedTestSettings {
  const s = settings ?? {};
  const job = (d: TestSettingDto | undefined): SourcedFigure | null => (d ? { value: d.value, source: d.source, from: 'job' } : null);
  return {
    atmospheric: job(s.atmosphericPressure) ?? { value: STANDARD_ATMOSPHERE_PA, source: DEFAULT_ATMOSPHERE_SOURCE, from: 'default' },
    allowedDrop: job(s.allowedPressureDrop),
    minPressureHold: job(s.minPressureHold),
    targetVacuum: job(s.targetVacuum) ?? { value: DEFAULT_TARGET_VACUUM_PA, source: DEFAULT_TARGET_VACUUM_SOURCE, from: 'default' },
    riseLimit: job(s.decayRiseLimit) ?? { value: DEFAULT_DECAY_RISE_PA, source: DEFAULT_DECAY_RISE_SOURCE, from: 'default' },
    minDecayHold: job(s.minDecayHold) ?? { value: DEFAULT_DECAY_HOLD_MINUTES, source: DEFAULT_DECAY_HOLD_SOURCE, from: 'default' },
  };
}

/** The system's charge basis as stored: each factor converted to kg/m, with the text and source typed. */
export function chargeBasisOf(input: ChargeBasisInput | null): ChargeBasisDto | null {
  if (input === null) return null;
  return {
    factoryChargeSource: input.factoryChargeSource?.trim() || null,
    factors: input.factors.map((f, i) => {
      const parsed = parseChargeFactor(f.factor);
      if (!parsed.ok) throw badRequest(`chargeBasis.factors.${i}.factor: ${parsed.error}`, { [`chargeBasis.factors.${i}.factor`]: parsed.error });
      return { size: f.size.trim(), kgPerM: parsed.value.kgPerM, text: parsed.text, source: f.source.trim() };
    }),
  };
}

/** A stored charge_basis value (written by chargeBasisOf), or null. */
export function chargeBasisOfRow(value: unknown): ChargeBasisDto | null {
  if (!value || typeof value !== 'object') return null;
  const v = value as Partial<ChargeBasisDto>;
  return { factoryChargeSource: v.factoryChargeSource ?? null, factors: Array.isArray(v.factors) ? v.factors : [] };
}

// ------------------------------------------------------------------------------------------------
// Figures from what was typed

/** What a record is about, as the command loaded it. */
export interface TestTarget {
  system: {
    id: string;
    name: string;
    factoryCharge: number | null;
    chargeBasis: ChargeBasisDto | null;
    units: Array<{ id: string; tag: string; levelId: string }>;
  } | null;
  unit: { id: string; tag: string; levelId: string; kind: UnitKindKey; systemId: string | null } | null;
}

export interface ComputedRecord {
  result: TestResult;
  reasons: string[];
  data: Record<string, unknown>;
  figures: Record<string, unknown>;
}

function must<T>(r: { ok: true; value: T } | { ok: false; error: string }, field: string): T {
  if (!r.ok) throw badRequest(`${field}: ${r.error}`, { [field]: r.error });
  return r.value;
}

const micronsOf = (pa: number) => paToVacuum(pa, 'micron');

/** The record's figures and verdict. Field errors (400) name the body path. */
export function computeRecord(input: CreateTestRecordParsed, target: TestTarget, settings: ResolvedTestSettings): ComputedRecord {
  const { kind: _kind, id: _id, note: _note, supersedesId: _s, photoStages: _p, ...data } = input;
  switch (input.kind) {
    case 'pressure': {
      const start = must(parseGaugePressure(input.startPressure), 'startPressure');
      const end = must(parseGaugePressure(input.endPressure), 'endPressure');
      const target = must(parseGaugePressure(input.targetPressure.value), 'targetPressure.value');
      const resolution = must(parseGaugePressure(input.gauge.resolution), 'gauge.resolution');
      const t1 = must(parseTemperature(input.startTemperature), 'startTemperature');
      const t2 = must(parseTemperature(input.endTemperature), 'endTemperature');
      const r = evaluatePressureTest({
        startGaugePa: start.pa,
        endGaugePa: end.pa,
        startKelvin: t1.kelvin,
        endKelvin: t2.kelvin,
        startAt: new Date(input.startAt),
        endAt: new Date(input.endAt),
        atmosphericPa: settings.atmospheric,
        gaugeResolutionPa: resolution.pa,
        allowedDropPa: settings.allowedDrop,
        targetPa: { value: target.pa, source: input.targetPressure.source, from: 'record' },
        minHoldMinutes: settings.minPressureHold,
      });
      const unit = start.unit;
      const fig = (pa: number) => ({ pa, value: paToGauge(pa, unit) });
      return {
        result: r.passed ? 'passed' : 'failed',
        reasons: r.reasons,
        data,
        figures: {
          unit,
          atmospheric: settings.atmospheric,
          target: { pa: target.pa, value: paToGauge(target.pa, unit), text: input.targetPressure.value, source: input.targetPressure.source },
          start: { ...fig(start.pa), absolutePa: r.startAbsolutePa, kelvin: t1.kelvin },
          end: { ...fig(end.pa), absolutePa: r.endAbsolutePa, kelvin: t2.kelvin },
          uncorrectedChange: fig(r.uncorrectedChangePa),
          correctedChange: fig(r.correctedChangePa),
          expectedEnd: fig(r.expectedEndGaugePa),
          allowedDrop: { ...r.allowedDrop, valueInUnit: paToGauge(r.allowedDrop.value, unit) },
          holdMinutes: r.holdMinutes,
          minHold: settings.minPressureHold,
          reachedTarget: r.reachedTarget ?? true,
          heldLongEnough: r.heldLongEnough,
          gaugeResolution: fig(resolution.pa),
        },
      };
    }
    case 'evacuation': {
      const atm = settings.atmospheric.value;
      const deepest = must(parseVacuum(input.deepestReading, atm), 'deepestReading');
      const isolated = must(parseVacuum(input.isolatedReading, atm), 'isolatedReading');
      const after = must(parseVacuum(input.afterHoldReading, atm), 'afterHoldReading');
      const r = evaluateEvacuation({
        deepestPa: deepest.pa,
        isolatedPa: isolated.pa,
        afterHoldPa: after.pa,
        holdMinutes: input.holdMinutes,
        targetPa: settings.targetVacuum,
        riseLimitPa: settings.riseLimit,
        minHoldMinutes: settings.minDecayHold,
      });
      const v = (pa: number) => ({ pa, microns: micronsOf(pa) });
      return {
        result: r.passed ? 'passed' : 'failed',
        reasons: r.reasons,
        data,
        figures: {
          deepest: v(deepest.pa),
          isolated: v(isolated.pa),
          afterHold: v(after.pa),
          rise: v(r.risePa),
          holdMinutes: input.holdMinutes,
          target: { ...r.target, microns: micronsOf(r.target.value) },
          riseLimit: { ...r.riseLimit, microns: micronsOf(r.riseLimit.value) },
          minHold: r.minHold,
          reachedTarget: r.reachedTarget,
          riseWithinLimit: r.riseWithinLimit,
          heldLongEnough: r.heldLongEnough,
          typedUnits: { deepest: deepest.unit, isolated: isolated.unit, afterHold: after.unit },
        },
      };
    }
    case 'charge': {
      const system = target.system!;
      const lines = input.liquidLines.map((l, i) => ({ size: l.size, lengthMm: must(parseLength(l.length), `liquidLines.${i}.length`).mm }));
      const weighed = must(parseMass(input.weighedIn), 'weighedIn');
      const basis = system.chargeBasis;
      const r = evaluateCharge({
        factoryCharge:
          system.factoryCharge !== null && basis?.factoryChargeSource
            ? { value: system.factoryCharge, source: basis.factoryChargeSource, from: 'job' }
            : null,
        liquidLines: lines,
        factors: basis?.factors ?? [],
        weighedInKg: weighed.kg,
      });
      return { result: 'recorded', reasons: [], data, figures: { ...r } };
    }
    case 'drain': {
      const r = evaluateDrain({
        waterPoured: input.waterPoured,
        reachesTermination: input.reachesTermination,
        pumpFitted: input.pumpFitted,
        pumpRunsAndLifts: input.pumpRunsAndLifts ?? null,
        floatSwitchFitted: input.floatSwitchFitted,
        floatSwitchStopsUnit: input.floatSwitchStopsUnit ?? null,
        noLeakAtJoints: input.noLeakAtJoints,
      });
      return { result: r.passed ? 'passed' : 'failed', reasons: r.reasons, data, figures: { needsPower: r.needsPower } };
    }
    case 'startup': {
      const system = target.system!;
      const tags = new Map(system.units.map((u) => [u.id, u.tag]));
      const rows = input.units.map((u, i) => ({
        unitId: u.unitId,
        answers: u.answers,
        addressed: u.addressed,
        faultShown: u.faultShown,
        supplyKelvin: u.supplyTemperature ? must(parseTemperature(u.supplyTemperature), `units.${i}.supplyTemperature`).kelvin : null,
        returnKelvin: u.returnTemperature ? must(parseTemperature(u.returnTemperature), `units.${i}.returnTemperature`).kelvin : null,
      }));
      const r = evaluateStartup(
        rows,
        system.units.map((u) => u.id),
      );
      return {
        result: r.passed ? 'passed' : 'failed',
        reasons: r.reasons,
        data,
        figures: {
          mode: input.mode,
          units: r.units.map((u, i) => ({ ...u, tag: tags.get(u.unitId) ?? null, supplyKelvin: rows[i]!.supplyKelvin, returnKelvin: rows[i]!.returnKelvin })),
          missingUnits: r.missingUnitIds.map((id) => ({ id, tag: tags.get(id) ?? '' })),
        },
      };
    }
  }
}

// ------------------------------------------------------------------------------------------------
// Reads

interface RecordRow {
  id: string;
  job_id: string;
  kind: TestRecordKind;
  system_id: string | null;
  system_name: string | null;
  unit_id: string | null;
  unit_tag: string | null;
  unit_level_id: string | null;
  company_id: string | null;
  company_name: string | null;
  recorded_by: string;
  recorded_by_name: string;
  recorded_at: Date;
  witnessed_by: string | null;
  witnessed_by_name: string | null;
  witnessed_at: Date | null;
  witness_note: string | null;
  supersedes_id: string | null;
  superseded_by_id: string | null;
  result: TestResult;
  reasons: string[];
  data: Record<string, unknown>;
  figures: Record<string, unknown>;
  note: string | null;
  version: number;
}

const SELECT_SQL = `SELECT r.id, r.job_id, r.kind, r.unit_id, u.tag AS unit_tag, u.level_id AS unit_level_id,
       s.id AS system_id, s.name AS system_name, r.company_id, c.name AS company_name,
       r.recorded_by, rb.name AS recorded_by_name, r.recorded_at, r.witnessed_by, wb.name AS witnessed_by_name,
       r.witnessed_at, r.witness_note, r.supersedes_id, nx.id AS superseded_by_id, r.result, r.reasons, r.data,
       r.figures, r.note, r.version
  FROM test_records r
  LEFT JOIN units u ON u.id = r.unit_id
  LEFT JOIN systems s ON s.id = CASE WHEN r.kind = 'drain' THEN u.system_id ELSE r.system_id END
  LEFT JOIN companies c ON c.id = r.company_id
  JOIN users rb ON rb.id = r.recorded_by
  LEFT JOIN users wb ON wb.id = r.witnessed_by
  LEFT JOIN test_records nx ON nx.supersedes_id = r.id`;

export interface TestRecordFilters {
  systemId?: string;
  unitId?: string;
  kind?: TestRecordKind;
  result?: TestResult;
  witnessed?: boolean;
  current?: boolean;
}

function whereOf(scope: FindingScope, filters: TestRecordFilters, bind: unknown[]): string {
  const conds = ['r.job_id = $1'];
  const add = (v: unknown) => `$${bind.push(v)}`;
  if (scope.companyId) conds.push(responsibleSql('s', add(scope.companyId)));
  if (filters.systemId) conds.push(`s.id = ${add(filters.systemId)}::uuid`);
  if (filters.unitId) conds.push(`r.unit_id = ${add(filters.unitId)}::uuid`);
  if (filters.kind) conds.push(`r.kind = ${add(filters.kind)}`);
  if (filters.result) conds.push(`r.result = ${add(filters.result)}`);
  if (filters.witnessed !== undefined) conds.push(filters.witnessed ? 'r.witnessed_at IS NOT NULL' : 'r.witnessed_at IS NULL');
  if (filters.current !== undefined) conds.push(filters.current ? 'nx.id IS NULL' : 'nx.id IS NOT NULL');
  return conds.join(' AND ');
}

interface PhotoRow {
  id: string;
  test_record_id: string;
  stage: TestPhotoStage;
  content_type: string;
  width: number | null;
  height: number | null;
}

async function photosOf(sequelize: Sequelize, jobId: string, ids: string[], transaction?: Transaction): Promise<Map<string, TestPhotoDto[]>> {
  const out = new Map<string, TestPhotoDto[]>();
  if (ids.length === 0) return out;
  const rows = await sequelize.query<PhotoRow>(
    `SELECT id, test_record_id, stage, content_type, width, height FROM photos
      WHERE job_id = $1 AND test_record_id = ANY ($2::uuid[]) ORDER BY created_at, id`,
    { bind: [jobId, ids], type: QueryTypes.SELECT, transaction },
  );
  for (const p of rows) {
    const list = out.get(p.test_record_id) ?? [];
    list.push({ id: p.id, ...photoUrls(jobId, p.id), stage: p.stage, contentType: p.content_type, width: p.width, height: p.height });
    out.set(p.test_record_id, list);
  }
  return out;
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

function present(r: RecordRow, photos: TestPhotoDto[]): TestRecordDto {
  return {
    id: r.id,
    jobId: r.job_id,
    kind: r.kind,
    system: r.system_id ? { id: r.system_id, name: r.system_name ?? '' } : null,
    unit: r.unit_id ? { id: r.unit_id, tag: r.unit_tag ?? '', levelId: r.unit_level_id ?? '' } : null,
    company: r.company_id ? { id: r.company_id, name: r.company_name ?? '' } : null,
    result: r.result,
    reasons: r.reasons ?? [],
    note: r.note,
    recordedBy: { id: r.recorded_by, name: r.recorded_by_name },
    recordedAt: iso(r.recorded_at)!,
    witnessedBy: r.witnessed_by ? { id: r.witnessed_by, name: r.witnessed_by_name ?? '' } : null,
    witnessedAt: iso(r.witnessed_at),
    witnessNote: r.witness_note,
    locked: r.witnessed_at !== null,
    supersedesId: r.supersedes_id,
    supersededById: r.superseded_by_id,
    current: r.superseded_by_id === null,
    photos,
    version: r.version,
    caution: TEST_RECORD_CAUTION,
    data: r.data,
    figures: r.figures,
    // data and figures were written for this kind by computeRecord: the row's kind names their shape.
  } as unknown as TestRecordDto;
}

/** One record in the caller's scope, or null (→ 404). */
export async function testRecordDetail(sequelize: Sequelize, scope: FindingScope, id: string, transaction?: Transaction): Promise<TestRecordDto | null> {
  const bind: unknown[] = [scope.jobId];
  const where = whereOf(scope, {}, bind);
  const [row] = await sequelize.query<RecordRow>(`${SELECT_SQL} WHERE ${where} AND r.id = $${bind.push(id)}::uuid`, { bind, type: QueryTypes.SELECT, transaction });
  if (!row) return null;
  return present(row, (await photosOf(sequelize, scope.jobId, [row.id], transaction)).get(row.id) ?? []);
}

/** The list, newest first (recorded_at, id), paged. */
export async function listTestRecords(
  sequelize: Sequelize,
  scope: FindingScope,
  filters: TestRecordFilters,
  page: PageRequest,
): Promise<{ items: TestRecordDto[]; nextCursor: string | null; caution: string }> {
  const bind: unknown[] = [scope.jobId];
  let where = whereOf(scope, filters, bind);
  if (page.after) {
    const v = `$${bind.push(page.after.value)}::timestamptz`;
    const i = `$${bind.push(page.after.id)}::uuid`;
    where += ` AND (r.recorded_at < ${v} OR (r.recorded_at = ${v} AND r.id < ${i}))`;
  }
  const rows = await sequelize.query<RecordRow>(`${SELECT_SQL} WHERE ${where} ORDER BY r.recorded_at DESC, r.id DESC LIMIT ${page.limit + 1}`, {
    bind,
    type: QueryTypes.SELECT,
  });
  const kept = rows.slice(0, page.limit);
  const photos = await photosOf(sequelize, scope.jobId, kept.map((r) => r.id));
  const last = kept[kept.length - 1];
  return {
    items: kept.map((r) => present(r, photos.get(r.id) ?? [])),
    nextCursor: rows.length > page.limit && last ? page.cursorAfter(new Date(last.recorded_at).toISOString(), last.id) : null,
    caution: TEST_RECORD_CAUTION,
  };
}

/** Every record in scope matching the filters, oldest first (the CSV). */
export async function allTestRecords(sequelize: Sequelize, scope: FindingScope, filters: TestRecordFilters): Promise<TestRecordDto[]> {
  const bind: unknown[] = [scope.jobId];
  const where = whereOf(scope, filters, bind);
  const rows = await sequelize.query<RecordRow>(`${SELECT_SQL} WHERE ${where} ORDER BY r.recorded_at, r.id`, { bind, type: QueryTypes.SELECT });
  return rows.map((r) => present(r, []));
}

/** The system's latest charge record not superseded, with the amount weighed in (kg); null when none. */
export async function latestChargeRecord(
  jobId: string,
  systemId: string,
  transaction?: Transaction,
): Promise<{ recordId: string; weighedInKg: number; recordedAt: string } | null> {
  const [row] = await TestRecord.sequelize!.query<{ id: string; weighed: number | null; recorded_at: Date }>(
    `SELECT r.id, (r.figures ->> 'weighedInKg')::float8 AS weighed, r.recorded_at FROM test_records r
      WHERE r.job_id = $1 AND r.system_id = $2 AND r.kind = 'charge'
        AND NOT EXISTS (SELECT 1 FROM test_records nx WHERE nx.supersedes_id = r.id)
      ORDER BY r.recorded_at DESC, r.created_at DESC, r.id DESC LIMIT 1`,
    { bind: [jobId, systemId], type: QueryTypes.SELECT, transaction },
  );
  return row && row.weighed !== null ? { recordId: row.id, weighedInKg: row.weighed, recordedAt: new Date(row.recorded_at).toISOString() } : null;
}

// ------------------------------------------------------------------------------------------------
// CSV

export const TEST_RECORDS_CSV_HEADER = [
  'Record id',
  'Kind',
  'System',
  'Unit',
  'Company',
  'Result',
  'Why it failed',
  'Figures',
  'Recorded by',
  'Recorded at',
  'Witnessed by',
  'Witnessed at',
  'Supersedes',
  'Superseded by',
  'Note',
] as const;

const round = (x: number, d = 2) => Math.round(x * 10 ** d) / 10 ** d;

/** One line of the record's main figures, in the units it was typed in. */
export function figuresSummary(r: TestRecordDto): string {
  switch (r.kind) {
    case 'pressure': {
      const f = r.figures;
      return `start ${round(f.start.value)} ${f.unit}, end ${round(f.end.value)} ${f.unit}; change as read ${round(f.uncorrectedChange.value)} ${f.unit}, corrected for temperature ${round(f.correctedChange.value)} ${f.unit}; allowed drop ${round(f.allowedDrop.valueInUnit)} ${f.unit}; hold ${round(f.holdMinutes / 60)} h`;
    }
    case 'evacuation': {
      const f = r.figures;
      return `deepest ${round(f.deepest.microns, 0)} microns (target ${round(f.target.microns, 0)}); rise ${round(f.rise.microns, 0)} microns in ${f.holdMinutes} min (limit ${round(f.riseLimit.microns, 0)})`;
    }
    case 'charge': {
      const f = r.figures;
      const additional = f.additionalKg === null ? `no factor for ${f.missingFactors.join(', ')}` : `${round(f.additionalKg, 3)} kg`;
      return `additional ${additional}; weighed in ${round(f.weighedInKg, 3)} kg; difference ${f.differenceKg === null ? 'unknown' : `${round(f.differenceKg, 3)} kg`}`;
    }
    case 'drain':
      return r.figures.needsPower ? 'pump or float switch proven with power' : 'gravity';
    case 'startup':
      return r.figures.units.map((u) => `${u.tag ?? u.unitId}: ${u.ok ? 'ok' : 'not ok'}${u.differenceK === null ? '' : `, Δ ${round(u.differenceK, 1)} K`}`).join('; ');
  }
}
