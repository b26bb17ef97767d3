/** A new space on a level, with its links to other spaces: one transaction. */
import type { Transaction } from 'sequelize';
import type { CreateSpaceInput, SpaceDto } from '../../shared/schemas/setup';
import { Space } from '../models';
import { optionalQuantity } from '../services/quantities';
import { replaceLinks, requireLevel, spaceDto } from '../services/spaces';

export interface CreateSpaceContext {
  transaction: Transaction;
  jobId: string;
}

export async function createSpace({ transaction, jobId }: CreateSpaceContext, input: CreateSpaceInput): Promise<{ space: Space; dto: SpaceDto }> {
  const floorArea = optionalQuantity(input.floorArea, 'area', 'floorArea') ?? null;
  const ceilingHeight = optionalQuantity(input.ceilingHeight, 'length', 'ceilingHeight') ?? null;
  await requireLevel(jobId, input.levelId, transaction);
  const space = await Space.create(
    {
      jobId,
      levelId: input.levelId,
      name: input.name,
      floorArea,
      ceilingHeight,
      ...(input.occupancy ? { occupancy: input.occupancy } : {}),
      ...(input.enclosed !== undefined ? { enclosed: input.enclosed } : {}),
    },
    { transaction },
  );
  if (input.linkedSpaceIds) await replaceLinks(jobId, space.id, input.linkedSpaceIds, transaction);
  return { space, dto: await spaceDto(space, transaction) };
}
