/**
 * Changes a space (If-Match): its fields, its links (replaced as a set) and, when it moves to
 * another level, its units' level with it. One transaction.
 */
import type { Transaction } from 'sequelize';
import type { UpdateSpaceInput } from '../../shared/schemas/setup';
import { Space } from '../models';
import { optionalQuantity } from '../services/quantities';
import { lockVersioned } from '../services/records';
import { moveSpaceUnits, replaceLinks, requireLevel, spaceDto } from '../services/spaces';

export interface ChangeSpaceContext {
  transaction: Transaction;
  jobId: string;
  /** The client's If-Match (428 without it, 412 with the current space when stale). */
  ifMatch?: string;
}

export async function changeSpace({ transaction, jobId, ifMatch }: ChangeSpaceContext, spaceId: string, input: UpdateSpaceInput): Promise<Space> {
  const floorArea = optionalQuantity(input.floorArea, 'area', 'floorArea');
  const ceilingHeight = optionalQuantity(input.ceilingHeight, 'length', 'ceilingHeight');
  const space = await lockVersioned(Space, { id: spaceId, jobId }, transaction, 'Space not found.', ifMatch, (s) => spaceDto(s, transaction));
  if (input.levelId !== undefined && input.levelId !== space.levelId) {
    await requireLevel(jobId, input.levelId, transaction);
    await moveSpaceUnits(jobId, spaceId, input.levelId, transaction);
    space.levelId = input.levelId;
  }
  if (input.name !== undefined) space.name = input.name;
  if (floorArea !== undefined) space.floorArea = floorArea;
  if (ceilingHeight !== undefined) space.ceilingHeight = ceilingHeight;
  if (input.occupancy !== undefined) space.occupancy = input.occupancy;
  if (input.enclosed !== undefined) space.enclosed = input.enclosed;
  if (input.linkedSpaceIds !== undefined) await replaceLinks(jobId, space.id, input.linkedSpaceIds, transaction);
  space.version += 1;
  await space.save({ transaction });
  return space;
}
