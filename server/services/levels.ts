/** Levels of a job: ordered floors with a dense 1-based position (reads and writes of routes/levels.ts). */
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import type { CreateLevelInput, LevelDto, UpdateLevelInput } from '../../shared/schemas/setup';
import { conflict } from '../errors';
import { Level, Space, Unit } from '../models';
import { presentLevel } from '../presenters/level';
import { afterCursor, finishPage, type PageRequest } from './paging';
import { destroyOrConflict, lockJob, lockVersioned, lowerEquals, refuseIfReferenced, type SetupWrite } from './records';

export type LevelCounts = Map<string, { spaces: number; units: number }>;

/** Spaces and units on each level. */
export async function levelCounts(levelIds: string[], transaction?: Transaction): Promise<LevelCounts> {
  const counts: LevelCounts = new Map(levelIds.map((id) => [id, { spaces: 0, units: 0 }]));
  if (levelIds.length === 0) return counts;
  const sequelize = Level.sequelize!;
  const spaces = await sequelize.query<{ level_id: string; n: string }>(
    `SELECT level_id, count(*) AS n FROM spaces WHERE level_id = ANY($1::uuid[]) GROUP BY level_id`,
    { bind: [levelIds], type: QueryTypes.SELECT, transaction },
  );
  const units = await sequelize.query<{ level_id: string; n: string }>(
    `SELECT level_id, count(*) AS n FROM units WHERE level_id = ANY($1::uuid[]) GROUP BY level_id`,
    { bind: [levelIds], type: QueryTypes.SELECT, transaction },
  );
  for (const r of spaces) counts.get(r.level_id)!.spaces = Number(r.n);
  for (const r of units) counts.get(r.level_id)!.units = Number(r.n);
  return counts;
}

/** One level as the set-up screens show it (with its counts). */
export async function levelDto(level: Level, transaction?: Transaction): Promise<LevelDto> {
  const counts = await levelCounts([level.id], transaction);
  return presentLevel(level, counts.get(level.id));
}

const duplicateName = (name: string) => conflict(`This job already has a level named "${name}".`, 'duplicate');

export async function listLevels(jobId: string, page: PageRequest): Promise<{ items: LevelDto[]; nextCursor: string | null }> {
  const rows = await Level.findAll({
    where: { jobId, ...afterCursor('position', page) },
    order: [['position', 'ASC'], ['id', 'ASC']],
    limit: page.limit + 1,
  });
  const { rows: levels, nextCursor } = finishPage(rows, page, (l) => l.position);
  const counts = await levelCounts(levels.map((l) => l.id));
  return { items: levels.map((l) => presentLevel(l, counts.get(l.id))), nextCursor };
}

/** Appends a level last; level writes of one job are serialised so positions stay dense. */
export async function createLevel({ transaction, jobId }: SetupWrite, input: CreateLevelInput): Promise<Level> {
  await lockJob(jobId, transaction);
  const clash = await Level.findOne({ where: { jobId, ...lowerEquals('name', input.name) }, transaction });
  if (clash) throw duplicateName(input.name);
  const max = (await Level.max<number, Level>('position', { where: { jobId }, transaction })) ?? 0;
  return Level.create({ jobId, name: input.name, position: max + 1 }, { transaction });
}

/** Puts the job's levels in the order of `levelIds` (every level exactly once, else 409 stale_list). */
export async function reorderLevels({ transaction, jobId }: SetupWrite, levelIds: string[]): Promise<LevelDto[]> {
  await lockJob(jobId, transaction);
  const levels = await Level.findAll({ where: { jobId }, transaction, lock: transaction.LOCK.UPDATE });
  const held = new Set(levels.map((l) => l.id));
  if (levels.length !== levelIds.length || levelIds.some((id) => !held.has(id))) {
    throw conflict(
      'The level list has changed since you loaded it: send every level of the job exactly once. Reload and try again.',
      'stale_list',
    );
  }
  const byId = new Map(levels.map((l) => [l.id, l]));
  for (const [index, id] of levelIds.entries()) {
    const level = byId.get(id)!;
    if (level.position !== index + 1) {
      level.position = index + 1;
      level.version += 1;
      await level.save({ transaction });
    }
  }
  const counts = await levelCounts(levelIds, transaction);
  return levelIds.map((id) => presentLevel(byId.get(id)!, counts.get(id)));
}

export async function renameLevel({ transaction, jobId, ifMatch }: SetupWrite, levelId: string, input: UpdateLevelInput): Promise<Level> {
  try {
    const level = await lockVersioned(Level, { id: levelId, jobId }, transaction, 'Level not found.', ifMatch, (l) => levelDto(l, transaction));
    level.name = input.name;
    level.version += 1;
    await level.save({ transaction });
    return level;
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw duplicateName(input.name);
    throw err;
  }
}

/** Deletes an empty level (409 while spaces or units are on it) and closes the gap in positions. */
export async function deleteLevel({ transaction, jobId, ifMatch }: SetupWrite, levelId: string): Promise<void> {
  await lockJob(jobId, transaction);
  const level = await lockVersioned(Level, { id: levelId, jobId }, transaction, 'Level not found.', ifMatch, (l) => levelDto(l, transaction));
  const spaces = await Space.count({ where: { levelId }, transaction });
  const units = await Unit.count({ where: { levelId }, transaction });
  refuseIfReferenced(`${level.name}`, [[spaces, 'space', 'spaces'], [units, 'unit', 'units']], 'Move or delete them first.');
  await destroyOrConflict(level, transaction, `${level.name}`);
  await Level.sequelize!.query(
    `UPDATE levels SET position = position - 1, version = version + 1, updated_at = now() WHERE job_id = $1 AND position > $2`,
    { bind: [jobId, level.position], transaction },
  );
}

/** Several levels at once, appended last in the order given; a name the job has already refuses them all (409). */
export async function createLevels(write: SetupWrite, names: string[]): Promise<Level[]> {
  const created: Level[] = [];
  for (const name of names) created.push(await createLevel(write, { name }));
  return created;
}
