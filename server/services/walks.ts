import type { Transaction } from 'sequelize';
import { badRequest, conflict } from '../errors';
import { Walk } from '../models';

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
