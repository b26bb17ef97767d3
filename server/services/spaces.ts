/** Spaces of a job: reads and the writes of routes/spaces.ts (a space, its links, and its units' level). */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { SpaceDto } from '../../shared/schemas/setup';
import { badRequest, conflict, notFound } from '../errors';
import { Level, Space, SpaceLink, Unit } from '../models';
import { presentSpace } from '../presenters/space';
import { afterCursor, finishPage, type PageRequest } from './paging';
import { destroyOrConflict, lockJob, lockVersioned, refuseIfReferenced, type SetupWrite } from './records';

/** Spaces with their level's name, their links and their unit counts. */
export async function spaceDtos(spaces: Space[], transaction?: Transaction): Promise<SpaceDto[]> {
  if (spaces.length === 0) return [];
  const ids = spaces.map((s) => s.id);
  const levels = await Level.findAll({ where: { id: [...new Set(spaces.map((s) => s.levelId))] }, transaction });
  const levelName = new Map(levels.map((l) => [l.id, l.name]));
  const links = await SpaceLink.findAll({ where: { [Op.or]: [{ spaceAId: ids }, { spaceBId: ids }] }, transaction });
  const linked = new Map<string, string[]>(ids.map((id) => [id, []]));
  for (const l of links) {
    linked.get(l.spaceAId)?.push(l.spaceBId);
    linked.get(l.spaceBId)?.push(l.spaceAId);
  }
  const unitCounts = await Space.sequelize!.query<{ space_id: string; n: string }>(
    `SELECT space_id, count(*) AS n FROM units WHERE space_id = ANY($1::uuid[]) GROUP BY space_id`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  const units = new Map(unitCounts.map((r) => [r.space_id, Number(r.n)]));
  return spaces.map((s) =>
    presentSpace(s, {
      levelName: levelName.get(s.levelId) ?? '',
      linkedSpaceIds: (linked.get(s.id) ?? []).sort(),
      unitCount: units.get(s.id) ?? 0,
    }),
  );
}

export async function spaceDto(space: Space, transaction?: Transaction): Promise<SpaceDto> {
  return (await spaceDtos([space], transaction))[0]!;
}

export async function listSpaces(jobId: string, levelId: string | undefined, page: PageRequest): Promise<{ items: SpaceDto[]; nextCursor: string | null }> {
  const rows = await Space.findAll({
    where: { jobId, ...(levelId ? { levelId } : {}), ...afterCursor('name', page) },
    order: [['name', 'ASC'], ['id', 'ASC']],
    limit: page.limit + 1,
  });
  const { rows: spaces, nextCursor } = finishPage(rows, page, (s) => s.name);
  return { items: await spaceDtos(spaces), nextCursor };
}

/** One space of the job, or 404. */
export async function findSpace(jobId: string, spaceId: string): Promise<Space> {
  const space = await Space.findOne({ where: { id: spaceId, jobId } });
  if (!space) throw notFound('Space not found.');
  return space;
}

export async function requireLevel(jobId: string, levelId: string, transaction: Transaction): Promise<Level> {
  const level = await Level.findOne({ where: { id: levelId, jobId }, transaction });
  if (!level) throw badRequest('levelId: Not a level of this job.', { levelId: 'Not a level of this job.' });
  return level;
}

/** Replaces the links of one space with `linkedIds` (checked to be other spaces of the job). */
export async function replaceLinks(jobId: string, spaceId: string, linkedIds: string[], transaction: Transaction): Promise<void> {
  if (linkedIds.includes(spaceId)) {
    throw badRequest('linkedSpaceIds: A space cannot be linked to itself.', { linkedSpaceIds: 'A space cannot be linked to itself.' });
  }
  if (linkedIds.length > 0) {
    const found = await Space.count({ where: { jobId, id: linkedIds }, transaction });
    if (found !== linkedIds.length) {
      throw badRequest('linkedSpaceIds: Not all are spaces of this job.', { linkedSpaceIds: 'Not all are spaces of this job.' });
    }
  }
  await SpaceLink.destroy({ where: { jobId, [Op.or]: [{ spaceAId: spaceId }, { spaceBId: spaceId }] }, transaction });
  if (linkedIds.length > 0) {
    await SpaceLink.bulkCreate(
      linkedIds.map((other) => {
        const [a, b] = spaceId < other ? [spaceId, other] : [other, spaceId];
        return { jobId, spaceAId: a, spaceBId: b };
      }),
      { transaction },
    );
  }
}

/** Units carry their level too: they move with their space. */
export async function moveSpaceUnits(jobId: string, spaceId: string, levelId: string, transaction: Transaction): Promise<void> {
  await Space.sequelize!.query(`UPDATE units SET level_id = $1, version = version + 1, updated_at = now() WHERE space_id = $2 AND job_id = $3`, {
    bind: [levelId, spaceId, jobId],
    transaction,
  });
}

/** Deletes a space without units (409 naming them); its links go with it (ON DELETE CASCADE). */
export async function deleteSpace({ transaction, jobId, ifMatch }: SetupWrite, spaceId: string): Promise<void> {
  const space = await lockVersioned(Space, { id: spaceId, jobId }, transaction, 'Space not found.', ifMatch, (s) => spaceDto(s, transaction));
  const units = await Unit.count({ where: { spaceId }, transaction });
  refuseIfReferenced(space.name, [[units, 'unit', 'units']], 'Move those units to another space (or clear their space) first.');
  await destroyOrConflict(space, transaction, space.name);
}

/**
 * Several spaces on one level at once (names only), all or none: a name the level already has is
 * refused (409 naming them), because an import matches spaces by name on their level.
 */
export async function createSpaces(
  { transaction, jobId }: { transaction: Transaction; jobId: string },
  levelId: string,
  names: string[],
  create: (input: { levelId: string; name: string }) => Promise<Space>,
): Promise<Space[]> {
  await lockJob(jobId, transaction);
  const level = await requireLevel(jobId, levelId, transaction);
  const taken = new Set((await Space.findAll({ where: { jobId, levelId }, attributes: ['name'], transaction })).map((s) => s.name.trim().toLowerCase()));
  const clashes = names.filter((n) => taken.has(n.trim().toLowerCase()));
  if (clashes.length > 0) {
    throw conflict(`${level.name} already has ${clashes.map((n) => `"${n}"`).join(', ')}: nothing was added. Leave ${clashes.length === 1 ? 'it' : 'them'} out and paste again.`, 'duplicate');
  }
  const created: Space[] = [];
  for (const name of names) created.push(await create({ levelId, name }));
  return created;
}
