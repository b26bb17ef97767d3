/** A space → SpaceDto (volume from floor area and ceiling height). */
import type { SpaceDto } from '../../shared/schemas/setup';
import type { Space } from '../models';

export function presentSpace(space: Space, extra: { levelName: string; linkedSpaceIds: string[]; unitCount: number }): SpaceDto {
  const volume = space.floorArea !== null && space.ceilingHeight !== null ? (space.floorArea * space.ceilingHeight) / 1000 : null;
  return {
    id: space.id,
    levelId: space.levelId,
    levelName: extra.levelName,
    name: space.name,
    floorArea: space.floorArea,
    ceilingHeight: space.ceilingHeight,
    volume,
    occupancy: space.occupancy,
    enclosed: space.enclosed,
    linkedSpaceIds: extra.linkedSpaceIds,
    unitCount: extra.unitCount,
    version: space.version,
  };
}
