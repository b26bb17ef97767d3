/**
 * The refrigerant checks of one system, from its units and the spaces they serve:
 * - concentration (shared/calc checkRefrigerantConcentration): total charge against the smallest
 *   enclosed space (or group of spaces joined by permanent openings) its units serve;
 * - for A2L refrigerants with a stored LFL: the IEC 60335-2-40 Annex GG minimum floor area
 *   per unit, at the release height of its mounting position (the unit's own, else its model's
 *   installation position, else what its kind can only be; shared/calc mountPositionOf).
 * Spaces marked not enclosed do not count as served spaces. Trimout records; it does not certify.
 */
import { Op, type Transaction } from 'sequelize';
import { checkA2lFloorArea, checkRefrigerantConcentration, LFL, mountPositionOf } from '../../shared/calc/refrigerant';
import type { SystemDetail } from '../../shared/schemas/setup';
import { Job, Space, SpaceLink, System, Unit, UnitModel } from '../models';
import { presentSystem } from '../presenters/system';
import { latestChargeRecord } from './testRecords';


export async function systemDetail(job: Job, system: System, transaction?: Transaction): Promise<SystemDetail> {
  const units = await Unit.findAll({
    where: { jobId: job.id, systemId: system.id },
    include: [{ model: UnitModel, as: 'model', attributes: ['id', 'mountPosition'] }],
    order: [['tag', 'ASC']],
    transaction,
  });
  const unitSpaceIds = [...new Set(units.map((u) => u.spaceId).filter((id): id is string => id !== null))];
  const spaces = unitSpaceIds.length > 0 ? await Space.findAll({ where: { jobId: job.id, id: unitSpaceIds }, transaction }) : [];
  const served = spaces.filter((s) => s.enclosed).map((s) => s.id);

  // Spaces reachable from the served ones through permanent openings count with them.
  const known = new Map(spaces.map((s) => [s.id, s]));
  const links: Array<[string, string]> = [];
  let frontier = [...served];
  const seenLinks = new Set<string>();
  while (frontier.length > 0) {
    const found = await SpaceLink.findAll({
      where: { jobId: job.id, [Op.or]: [{ spaceAId: frontier }, { spaceBId: frontier }] },
      transaction,
    });
    const next: string[] = [];
    for (const l of found) {
      if (seenLinks.has(l.id)) continue;
      seenLinks.add(l.id);
      links.push([l.spaceAId, l.spaceBId]);
      for (const id of [l.spaceAId, l.spaceBId]) if (!known.has(id) && !next.includes(id)) next.push(id);
    }
    if (next.length > 0) {
      for (const s of await Space.findAll({ where: { jobId: job.id, id: next }, transaction })) known.set(s.id, s);
    }
    frontier = next;
  }
  const groupSpaces = [...known.values()].filter((s) => s.enclosed);

  const factoryCharge = system.factoryCharge ?? 0;
  // The amount weighed in on the system's latest charge record wins over a field charge typed by hand.
  const chargeRecord = await latestChargeRecord(job.id, system.id, transaction);
  const fieldCharge = chargeRecord ? chargeRecord.weighedInKg : (system.fieldCharge ?? 0);
  const concentration = checkRefrigerantConcentration({
    refrigerant: system.refrigerant,
    factoryCharge,
    fieldCharge,
    servedSpaceIds: served,
    spaces: groupSpaces.map((s) => ({
      id: s.id,
      name: s.name,
      ...(s.floorArea !== null ? { floorArea: s.floorArea } : {}),
      ...(s.ceilingHeight !== null ? { ceilingHeight: s.ceilingHeight } : {}),
      institutional: s.occupancy === 'institutional',
    })),
    openings: links.filter(([a, b]) => known.get(a)?.enclosed && known.get(b)?.enclosed),
    editions: job.codeEditions ?? {},
    ...(system.concentrationLimitOverride ? { override: system.concentrationLimitOverride } : {}),
    system: job.unitSystem,
  });

  const a2lFloorArea: SystemDetail['a2lFloorArea'] =
    LFL[system.refrigerant] === undefined
      ? []
      : units.map((u) => {
          const space = u.spaceId ? known.get(u.spaceId) : undefined;
          const { mount, from } = mountPositionOf({ kind: u.kind, unit: u.mountPosition, model: u.model?.mountPosition });
          return {
            unitId: u.id,
            tag: u.tag,
            spaceId: space?.id ?? null,
            spaceName: space?.name ?? null,
            mount,
            mountFrom: from,
            result: checkA2lFloorArea({
              refrigerant: system.refrigerant,
              chargeKg: factoryCharge + fieldCharge,
              floorArea: space?.floorArea ?? null,
              mount,
              system: job.unitSystem,
            }),
          };
        });

  return { ...presentSystem(system, units.length), concentration, a2lFloorArea, chargeRecord };
}
