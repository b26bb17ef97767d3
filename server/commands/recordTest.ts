/**
 * Recording a test record (POST /test-records). Who: an inspector, or a subcontractor of the
 * company responsible for the system (services/testRecords.ts responsibleSql); a system or unit
 * outside a subcontractor's scope answers 404, like one on another job.
 *
 * checkNewTestRecord refuses everything it can before any photo is stored (404 target, 400 fields,
 * 409 on a record already corrected); recordTest writes the record and its photos in the write's
 * transaction. A correction names the record it supersedes (same kind and system or unit); the
 * history keeps both, and a record is corrected at most once (the next correction names the newer).
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes, UniqueConstraintError } from 'sequelize';
import type { CreateTestRecordParsed, TestPhotoStage, TestRecordDto } from '../../shared/schemas/testRecords';
import type { UnitKindKey } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { Photo, TestRecord, type Job } from '../models';
import { photoRowValues } from '../services/photos';
import { chargeBasisOfRow, computeRecord, resolveTestSettings, testRecordDetail, type ComputedRecord, type TestTarget } from '../services/testRecords';
import { responsibleSql } from '../services/testScope';
import type { CommandContext, NewPhotos, ReadContext } from './context';

export interface CheckedTestRecord {
  body: CreateTestRecordParsed;
  target: TestTarget;
  computed: ComputedRecord;
  companyId: string | null;
  systemId: string | null;
}

interface SystemRow {
  id: string;
  name: string;
  factory_charge: number | null;
  charge_basis: unknown;
  company_id: string | null;
  responsible: boolean;
}

/** The same phone-made id again from the same person: that record (200); used otherwise: 409. */
export async function testRecordAlreadyMade(ctx: ReadContext, id: string): Promise<TestRecordDto | null> {
  const found = await TestRecord.findByPk(id, { attributes: ['id', 'jobId', 'recordedBy'] });
  if (!found) return null;
  if (found.jobId !== ctx.scope.jobId || found.recordedBy !== ctx.actor.id) {
    throw conflict('This record id is already used. Record the test again to give it a new id.', 'record_id_taken');
  }
  return testRecordDetail(ctx.sequelize, ctx.scope, id);
}

async function loadSystem(ctx: ReadContext, systemId: string): Promise<SystemRow | null> {
  const bind: unknown[] = [ctx.scope.jobId, systemId, ctx.scope.companyId];
  const [row] = await ctx.sequelize.query<SystemRow>(
    `SELECT s.id, s.name, s.factory_charge, s.charge_basis, s.company_id,
            ($3::uuid IS NULL OR ${responsibleSql('s', '$3')}) AS responsible
       FROM systems s WHERE s.job_id = $1 AND s.id = $2::uuid`,
    { bind, type: QueryTypes.SELECT, transaction: ctx.transaction },
  );
  return row && row.responsible ? row : null;
}

/** The company a record is made for: the system's own, else the recorder's (a subcontractor), else the job's one mechanical company. */
async function companyFor(ctx: ReadContext, system: SystemRow | null): Promise<string | null> {
  if (system?.company_id) return system.company_id;
  if (ctx.scope.companyId) return ctx.scope.companyId;
  const rows = await ctx.sequelize.query<{ company_id: string }>(
    `SELECT company_id FROM job_companies WHERE job_id = $1 AND 'mechanical' = ANY (trades) LIMIT 2`,
    { bind: [ctx.scope.jobId], type: QueryTypes.SELECT, transaction: ctx.transaction },
  );
  return rows.length === 1 ? rows[0]!.company_id : null;
}

export async function checkNewTestRecord(ctx: ReadContext, job: Job, body: CreateTestRecordParsed, photoCount: number): Promise<CheckedTestRecord> {
  const { sequelize, scope } = ctx;
  if (body.photoStages && body.photoStages.length !== photoCount) {
    const message = `Send one stage per photo: ${photoCount} photo${photoCount === 1 ? '' : 's'}, ${body.photoStages.length} stage${body.photoStages.length === 1 ? '' : 's'}.`;
    throw badRequest(`photoStages: ${message}`, { photoStages: message });
  }
  let system: SystemRow | null = null;
  let unit: TestTarget['unit'] = null;
  if (body.kind === 'drain') {
    const [u] = await sequelize.query<{ id: string; tag: string; level_id: string; kind: UnitKindKey; system_id: string | null }>(
      `SELECT id, tag, level_id, kind, system_id FROM units WHERE job_id = $1 AND id = $2::uuid`,
      { bind: [scope.jobId, body.unitId], type: QueryTypes.SELECT },
    );
    if (!u) throw notFound('Unit not found.');
    unit = { id: u.id, tag: u.tag, levelId: u.level_id, kind: u.kind, systemId: u.system_id };
    if (u.system_id) {
      system = await loadSystem(ctx, u.system_id);
      if (!system) throw notFound('Unit not found.');
    } else if (scope.companyId) {
      // No system: the job's mechanical companies are responsible for the unit.
      const [ok] = await sequelize.query<{ ok: boolean }>(
        `SELECT EXISTS (SELECT 1 FROM job_companies jc WHERE jc.job_id = $1 AND jc.company_id = $2::uuid AND 'mechanical' = ANY (jc.trades)) AS ok`,
        { bind: [scope.jobId, scope.companyId], type: QueryTypes.SELECT },
      );
      if (!ok?.ok) throw notFound('Unit not found.');
    }
  } else {
    system = await loadSystem(ctx, body.systemId);
    if (!system) throw notFound('System not found.');
  }
  const units = system
    ? await sequelize.query<{ id: string; tag: string; level_id: string }>(`SELECT id, tag, level_id FROM units WHERE job_id = $1 AND system_id = $2 ORDER BY tag, id`, {
        bind: [scope.jobId, system.id],
        type: QueryTypes.SELECT,
      })
    : [];
  const target: TestTarget = {
    system: system
      ? {
          id: system.id,
          name: system.name,
          factoryCharge: system.factory_charge,
          chargeBasis: chargeBasisOfRow(system.charge_basis),
          units: units.map((u) => ({ id: u.id, tag: u.tag, levelId: u.level_id })),
        }
      : null,
    unit,
  };

  if (body.kind === 'pressure' && body.levelIds?.length) {
    const onSystem = new Set(units.map((u) => u.level_id));
    body.levelIds.forEach((id, i) => {
      if (!onSystem.has(id)) throw badRequest(`levelIds.${i}: Choose a level this system has units on.`, { [`levelIds.${i}`]: 'Choose a level this system has units on.' });
    });
  }
  if (body.kind === 'startup') {
    const onSystem = new Set(units.map((u) => u.id));
    const seen = new Set<string>();
    body.units.forEach((u, i) => {
      const field = `units.${i}.unitId`;
      if (!onSystem.has(u.unitId)) throw badRequest(`${field}: Choose a unit on this system.`, { [field]: 'Choose a unit on this system.' });
      if (seen.has(u.unitId)) throw badRequest(`${field}: This unit is listed twice.`, { [field]: 'This unit is listed twice.' });
      seen.add(u.unitId);
    });
  }
  if (body.supersedesId) await checkSupersedes(ctx, body, target);
  const computed = computeRecord(body, target, resolveTestSettings(job.testSettings));
  return { body, target, computed, companyId: await companyFor(ctx, system), systemId: system?.id ?? null };
}

async function checkSupersedes(ctx: ReadContext, body: CreateTestRecordParsed, target: TestTarget): Promise<void> {
  const old = await testRecordDetail(ctx.sequelize, ctx.scope, body.supersedesId!, ctx.transaction);
  if (!old) throw notFound('The record to correct was not found.');
  const same = old.kind === body.kind && (body.kind === 'drain' ? old.unit?.id === target.unit?.id : old.system?.id === target.system?.id);
  if (!same) {
    const message = 'A correction replaces a record of the same kind for the same system or unit.';
    throw badRequest(`supersedesId: ${message}`, { supersedesId: message });
  }
  if (!old.current) throw conflict('That record was already corrected: correct the newer record instead.', 'superseded');
}

/** Writes the checked record and its photos (in the caller's transaction); answers it as the caller sees it. */
export async function recordTest(ctx: CommandContext, checked: CheckedTestRecord, photos: NewPhotos): Promise<TestRecordDto> {
  const { sequelize, transaction, actor, scope, clock } = ctx;
  const { body, target, computed } = checked;
  if (body.supersedesId) {
    // Held until commit: two corrections of one record cannot both pass the check.
    await sequelize.query(`SELECT id FROM test_records WHERE id = $1 FOR UPDATE`, { bind: [body.supersedesId], transaction });
    await checkSupersedes(ctx, body, target);
  }
  const now = clock();
  let record: TestRecord;
  try {
    record = await TestRecord.create(
      {
        id: body.id ?? randomUUID(),
        jobId: scope.jobId,
        kind: body.kind,
        systemId: checked.systemId,
        unitId: target.unit?.id ?? null,
        companyId: checked.companyId,
        levelIds: body.kind === 'pressure' && body.levelIds?.length ? [...new Set(body.levelIds)] : null,
        recordedBy: actor.id,
        recordedAt: now,
        supersedesId: body.supersedesId ?? null,
        result: computed.result,
        reasons: computed.reasons,
        data: computed.data,
        figures: computed.figures,
        note: body.note ? body.note : null,
      },
      { transaction },
    );
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      // Two corrections of one record, or a phone-made id sent twice at once: decided by the index's column.
      if ('supersedes_id' in (err.fields ?? {})) throw conflict('That record was already corrected: correct the newer record instead.', 'superseded');
      throw conflict('This record id is already used. Record the test again to give it a new id.', 'record_id_taken');
    }
    throw err;
  }
  if (photos.stored.length > 0) {
    await photos.claim(transaction);
    const stages: TestPhotoStage[] = body.photoStages ?? photos.stored.map(() => 'test');
    const base = now.getTime();
    await Photo.bulkCreate(
      photoRowValues(photos.stored, { jobId: scope.jobId, uploadedBy: actor.id }).map((row, i) => ({
        ...row,
        findingId: null,
        fixId: null,
        testRecordId: record.id,
        stage: stages[i] ?? 'test',
        // Photos keep the order they were sent in.
        createdAt: new Date(base + i),
      })),
      { transaction },
    );
  }
  return (await testRecordDetail(sequelize, scope, record.id, transaction))!;
}
