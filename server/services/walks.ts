/** Walks: one inspector's pass over a level (reads and writes of routes/walks.ts), and the walk a unit check joins. */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { WalkDetail, WalkDto, WalkListQueryParsed, WalkSummary, WalkUnitsQueryParsed, WalkUnitsResponse } from '../../shared/schemas/findings';
import { SEVERITIES, type Severity } from '../../shared/words';
import { badRequest, conflict, forbidden, notFound } from '../errors';
import { Level, Walk } from '../models';
import { presentWalk, presentWalkDetail, type WalkRow } from '../presenters/walk';
import { finishPage, type PageRequest } from './paging';
import { lockRow } from './records';
import { levelCoverage, walkUnitCounts, walkUnitsPage } from './walkUnits';

/** A walk of this job that may take unit checks on `levelId`: 400 when unknown or on another level, 409 when finished. */
export async function usableWalk(jobId: string, walkId: string, levelId: string, transaction: Transaction): Promise<Walk> {
  const walk = await Walk.findOne({ where: { id: walkId, jobId }, transaction });
  if (!walk) throw badRequest('walkId: That walk is not on this job.', { walkId: 'That walk is not on this job.' });
  if (walk.levelId !== levelId) {
    throw badRequest('walkId: That walk is on another level than this unit.', { walkId: 'That walk is on another level than this unit.' });
  }
  if (walk.finishedAt) throw conflict('That walk is finished. Start a new walk to record more checks.', 'walk_finished');
  return walk;
}

const WALK_SELECT = `
  SELECT w.id, w.level_id, l.name AS level_name, w.inspector_id, u.name AS inspector_name,
         w.started_at, w.finished_at,
         to_char(w.started_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') AS started_text,
         (SELECT count(*) FROM unit_checks uc WHERE uc.walk_id = w.id) AS check_count,
         (SELECT count(DISTINCT uc.unit_id) FROM unit_checks uc WHERE uc.walk_id = w.id AND uc.complete) AS units_checked,
         -- Units the walk touched (a check saved unfinished, or a finding logged on them) without a complete check in it.
         (SELECT count(*) FROM (
             SELECT uc.unit_id FROM unit_checks uc WHERE uc.walk_id = w.id
             UNION
             SELECT f.unit_id FROM findings f WHERE f.walk_id = w.id AND f.unit_id IS NOT NULL AND f.status <> 'voided'
           ) touched
           WHERE NOT EXISTS (SELECT 1 FROM unit_checks done WHERE done.walk_id = w.id AND done.unit_id = touched.unit_id AND done.complete)
         ) AS units_in_progress,
         (SELECT count(*) FROM findings f WHERE f.walk_id = w.id AND f.status <> 'voided') AS finding_count
    FROM walks w JOIN levels l ON l.id = w.level_id JOIN users u ON u.id = w.inspector_id`;

/** One walk with its level's coverage and the units completed in it, or null. */
export async function walkDetail(sequelize: Sequelize, jobId: string, walkId: string, transaction?: Transaction): Promise<WalkDetail | null> {
  const [row] = await sequelize.query<WalkRow>(`${WALK_SELECT} WHERE w.job_id = $1 AND w.id = $2`, {
    bind: [jobId, walkId],
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!row) return null;
  const coverage = await levelCoverage(sequelize, jobId, row.level_id, transaction);
  const [inWalk] = await sequelize.query<{ n: string }>(
    `SELECT count(DISTINCT unit_id) AS n FROM unit_checks WHERE walk_id = $1 AND complete`,
    { bind: [walkId], type: QueryTypes.SELECT, transaction },
  );
  return presentWalkDetail(row, coverage, Number(inWalk?.n ?? 0), await walkSummary(sequelize, jobId, row.id, row.level_id, transaction));
}

/**
 * Findings logged within the walk by severity, and the level's units whose current (latest) unit
 * check is not complete, the same rule as the level's coverage (services/walkUnits.ts).
 */
async function walkSummary(sequelize: Sequelize, jobId: string, walkId: string, levelId: string, transaction?: Transaction): Promise<WalkSummary> {
  const bySeverity = await sequelize.query<{ severity: Severity; n: string }>(
    `SELECT severity, count(*) AS n FROM findings WHERE job_id = $1 AND walk_id = $2 AND status <> 'voided' GROUP BY severity`,
    { bind: [jobId, walkId], type: QueryTypes.SELECT, transaction },
  );
  const findingsBySeverity = Object.fromEntries(SEVERITIES.map((s) => [s, 0])) as Record<Severity, number>;
  for (const r of bySeverity) findingsBySeverity[r.severity] = Number(r.n);
  const unchecked = await sequelize.query<{ id: string; tag: string; in_progress: boolean }>(
    `SELECT u.id, u.tag, (l.unit_id IS NOT NULL) AS in_progress
       FROM units u
       LEFT JOIN LATERAL (
         SELECT uc.unit_id, uc.complete FROM unit_checks uc WHERE uc.unit_id = u.id ORDER BY uc.checked_at DESC, uc.id DESC LIMIT 1
       ) l ON true
      WHERE u.job_id = $1 AND u.level_id = $2 AND NOT coalesce(l.complete, false)
      ORDER BY u.tag, u.id`,
    { bind: [jobId, levelId], type: QueryTypes.SELECT, transaction },
  );
  return { findingsBySeverity, unchecked: unchecked.map((u) => ({ id: u.id, tag: u.tag, inProgress: Boolean(u.in_progress) })) };
}

/** The job's walks, newest first: (started_at, id) descending; the cursor carries started_at as text (microseconds kept). */
export async function listWalks(
  sequelize: Sequelize,
  jobId: string,
  query: WalkListQueryParsed,
  page: PageRequest,
): Promise<{ items: WalkDto[]; nextCursor: string | null }> {
  const bind: unknown[] = [jobId];
  const conds = ['w.job_id = $1'];
  if (query.levelId) conds.push(`w.level_id = $${bind.push(query.levelId)}`);
  if (query.inspectorId) conds.push(`w.inspector_id = $${bind.push(query.inspectorId)}`);
  if (query.open === true) conds.push('w.finished_at IS NULL');
  if (query.open === false) conds.push('w.finished_at IS NOT NULL');
  if (page.after) {
    const a = bind.push(String(page.after.value));
    const b = bind.push(page.after.id);
    conds.push(`(w.started_at < $${a}::timestamptz OR (w.started_at = $${a}::timestamptz AND w.id < $${b}))`);
  }
  const limit = bind.push(page.limit + 1);
  const rows = await sequelize.query<WalkRow>(`${WALK_SELECT} WHERE ${conds.join(' AND ')} ORDER BY w.started_at DESC, w.id DESC LIMIT $${limit}`, {
    bind,
    type: QueryTypes.SELECT,
  });
  const { rows: kept, nextCursor } = finishPage(rows, page, (r) => r.started_text);
  return { items: kept.map(presentWalk), nextCursor };
}

export interface WalkWrite {
  sequelize: Sequelize;
  transaction: Transaction;
  jobId: string;
  /** Who starts or finishes the walk, and their role on the job. */
  actor: { id: string; role: string };
  clock?: () => Date;
}

/** The actor starts a walk on a level of the job (400 when the level is not on it). */
export async function startWalk({ sequelize, transaction, jobId, actor, clock }: WalkWrite, levelId: string, walkId?: string): Promise<WalkDetail> {
  if (walkId) {
    // A walk started on the phone with no signal names itself: sent again, it is that walk.
    const found = await Walk.findByPk(walkId, { attributes: ['id', 'jobId', 'levelId', 'inspectorId'], transaction });
    if (found) {
      if (found.jobId !== jobId || found.inspectorId !== actor.id || found.levelId !== levelId) {
        throw conflict('This walk id is already used. Start the walk again to give it a new id.', 'walk_id_taken');
      }
      return (await walkDetail(sequelize, jobId, found.id, transaction))!;
    }
  }
  const level = await Level.findOne({ where: { id: levelId, jobId }, transaction });
  if (!level) throw badRequest('levelId: That level is not on this job.', { levelId: 'That level is not on this job.' });
  const walk = await Walk.create(
    { ...(walkId ? { id: walkId } : {}), jobId, levelId: level.id, inspectorId: actor.id, startedAt: (clock ?? (() => new Date()))() },
    { transaction },
  );
  return (await walkDetail(sequelize, jobId, walk.id, transaction))!;
}

/** The walk's inspector or a GC manager finishes it; finishing twice keeps the first finish time (a retried request). */
export async function finishWalk({ sequelize, transaction, jobId, actor, clock }: WalkWrite, walkId: string): Promise<WalkDetail> {
  const walk = await lockRow(Walk, { id: walkId, jobId }, transaction, 'Walk not found.');
  if (actor.role !== 'gc_manager' && walk.inspectorId !== actor.id) {
    throw forbidden('Only the inspector who started this walk or a GC manager can finish it.');
  }
  if (!walk.finishedAt) {
    walk.finishedAt = (clock ?? (() => new Date()))();
    await walk.save({ transaction });
  }
  return (await walkDetail(sequelize, jobId, walk.id, transaction))!;
}

/**
 * A level's units with their walk state, the counts under the filters, and the level's coverage.
 * `pageOf` reads the cursor only once the level is known to be on the job (a level of another
 * job answers 404 whatever cursor came with it).
 */
export async function walkUnitsOf(
  sequelize: Sequelize,
  jobId: string,
  levelId: string,
  query: WalkUnitsQueryParsed,
  pageOf: () => PageRequest,
): Promise<WalkUnitsResponse> {
  const level = await Level.findOne({ where: { id: levelId, jobId } });
  if (!level) throw notFound('Level not found.');
  const page = pageOf();
  const filters = { spaceId: query.spaceId, systemId: query.systemId, kind: query.kind, q: query.q || undefined, state: query.state };
  const items = await walkUnitsPage(sequelize, jobId, level.id, filters, page);
  const { rows, nextCursor } = finishPage(items, page, (u) => u.tag);
  const counts = await walkUnitCounts(sequelize, jobId, level.id, filters);
  const coverage = await levelCoverage(sequelize, jobId, level.id);
  return {
    items: rows,
    nextCursor,
    counts: {
      total: counts.total,
      checked: counts.checked,
      notChecked: counts.notChecked,
      inProgress: counts.inProgress,
      withOpenFindings: counts.withOpenFindings,
    },
    coverage,
  };
}
