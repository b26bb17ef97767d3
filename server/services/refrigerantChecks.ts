/**
 * The refrigerant checks of one system, from its units and the spaces they serve:
 * - concentration (shared/calc checkRefrigerantConcentration): total charge against the smallest
 *   enclosed space (or group of spaces joined by permanent openings) its units serve;
 * - for A2L refrigerants with a stored LFL: the IEC 60335-2-40 Annex GG minimum floor area
 *   per unit, at the release height of its mounting position (the unit's own, else its model's
 *   installation position, else what its kind can only be; shared/calc mountPositionOf).
 * Spaces marked not enclosed do not count as served spaces. Trimout records; it does not certify.
 *
 * The checks themselves (judgeSystem) are pure, over facts read once: one system's for its page
 * (systemDetail), every system's at once for the building view (systemDetails: a fixed number of
 * statements whatever the number of systems).
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { checkA2lFloorArea, checkRefrigerantConcentration, LFL, mountPositionOf, type MountPosition } from '../../shared/calc/refrigerant';
import type { SystemDetail } from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { Job, Space, SpaceLink, System } from '../models';
import { presentSystem } from '../presenters/system';
import { latestChargeRecord } from './testRecords';


type ChargeRecord = { recordId: string; weighedInKg: number; recordedAt: string } | null;

/** What the checks read of a unit (read as plain rows: a job's 2,000 units as models cost more than the checks). */
export interface UnitFact {
  id: string;
  tag: string;
  kind: UnitKindKey;
  spaceId: string | null;
  systemId: string | null;
  mountPosition: MountPosition | null;
  modelMountPosition: MountPosition | null;
}

/** The job's units (or one system's) by tag, with their model's mounting. */
async function unitFacts(jobId: string, systemId: string | null, transaction?: Transaction): Promise<UnitFact[]> {
  const rows = await Space.sequelize!.query<{
    id: string;
    tag: string;
    kind: UnitKindKey;
    space_id: string | null;
    system_id: string | null;
    mount_position: MountPosition | null;
    model_mount_position: MountPosition | null;
  }>(
    `SELECT u.id, u.tag, u.kind, u.space_id, u.system_id, u.mount_position, m.mount_position AS model_mount_position
       FROM units u LEFT JOIN unit_models m ON m.id = u.model_id
      WHERE u.job_id = $1${systemId ? ' AND u.system_id = $2' : ''}
      ORDER BY u.tag, u.id`,
    { bind: systemId ? [jobId, systemId] : [jobId], type: QueryTypes.SELECT, transaction },
  );
  return rows.map((r) => ({
    id: r.id,
    tag: r.tag,
    kind: r.kind,
    spaceId: r.space_id,
    systemId: r.system_id,
    mountPosition: r.mount_position,
    modelMountPosition: r.model_mount_position,
  }));
}

/** What the checks of a system read: its units (by tag, with their model's mounting), the job's spaces and permanent openings, its latest charge record. */
export interface SystemFacts {
  units: UnitFact[];
  spaces: Map<string, Space>;
  /** The job's permanent openings, by space id (each link under both of its spaces). */
  linksBySpace: Map<string, SpaceLink[]>;
  chargeRecord: ChargeRecord;
}

async function jobSpaces(jobId: string, transaction?: Transaction): Promise<Pick<SystemFacts, 'spaces' | 'linksBySpace'>> {
  const [spaces, links] = await Promise.all([
    Space.findAll({ where: { jobId }, order: [['id', 'ASC']], transaction }),
    SpaceLink.findAll({ where: { jobId }, order: [['id', 'ASC']], transaction }),
  ]);
  const linksBySpace = new Map<string, SpaceLink[]>();
  for (const l of links) {
    for (const id of new Set([l.spaceAId, l.spaceBId])) {
      const list = linksBySpace.get(id);
      if (list) list.push(l);
      else linksBySpace.set(id, [l]);
    }
  }
  return { spaces: new Map(spaces.map((x) => [x.id, x])), linksBySpace };
}

export async function systemDetail(job: Job, system: System, transaction?: Transaction): Promise<SystemDetail> {
  const [units, spaces, chargeRecord] = await Promise.all([
    unitFacts(job.id, system.id, transaction),
    jobSpaces(job.id, transaction),
    latestChargeRecord(job.id, system.id, transaction),
  ]);
  return judgeSystem(job, system, { units, ...spaces, chargeRecord });
}

/** systemDetail of each of the job's `systems`, read in five statements for all of them. */
export async function systemDetails(job: Job, systems: System[], transaction?: Transaction): Promise<Map<string, SystemDetail>> {
  const [units, spaces, charges] = await Promise.all([
    unitFacts(job.id, null, transaction),
    jobSpaces(job.id, transaction),
    latestChargeRecords(job.id, transaction),
  ]);
  const bySystem = new Map<string, UnitFact[]>();
  for (const u of units) {
    if (!u.systemId) continue;
    const list = bySystem.get(u.systemId);
    if (list) list.push(u);
    else bySystem.set(u.systemId, [u]);
  }
  return new Map(systems.map((s) => [s.id, judgeSystem(job, s, { units: bySystem.get(s.id) ?? [], ...spaces, chargeRecord: charges.get(s.id) ?? null })]));
}

/**
 * Each system's latest charge record as latestChargeRecord (testRecords.ts) reads it for one:
 * the latest current record (not superseded), null when it weighed nothing in.
 */
async function latestChargeRecords(jobId: string, transaction?: Transaction): Promise<Map<string, ChargeRecord>> {
  const rows = await Space.sequelize!.query<{ system_id: string; id: string; weighed: number | null; recorded_at: Date }>(
    `SELECT DISTINCT ON (r.system_id) r.system_id, r.id, (r.figures ->> 'weighedInKg')::float8 AS weighed, r.recorded_at FROM test_records r
      WHERE r.job_id = $1 AND r.kind = 'charge' AND r.system_id IS NOT NULL
        AND NOT EXISTS (SELECT 1 FROM test_records nx WHERE nx.supersedes_id = r.id)
      ORDER BY r.system_id, r.recorded_at DESC, r.created_at DESC, r.id DESC`,
    { bind: [jobId], type: QueryTypes.SELECT, transaction },
  );
  return new Map(
    rows.map((r) => [r.system_id, r.weighed !== null ? { recordId: r.id, weighedInKg: r.weighed, recordedAt: new Date(r.recorded_at).toISOString() } : null]),
  );
}

/** The system's refrigerant checks from its facts (no I/O). */
export function judgeSystem(job: Job, system: System, facts: SystemFacts): SystemDetail {
  const { units, chargeRecord } = facts;
  const unitSpaceIds = [...new Set(units.map((u) => u.spaceId).filter((id): id is string => id !== null))];
  const spaces = unitSpaceIds.map((id) => facts.spaces.get(id)).filter((x): x is Space => x !== undefined);
  const served = spaces.filter((s) => s.enclosed).map((s) => s.id);

  // Spaces reachable from the served ones through permanent openings count with them.
  const known = new Map(spaces.map((s) => [s.id, s]));
  const links: Array<[string, string]> = [];
  let frontier = [...served];
  const seenLinks = new Set<string>();
  while (frontier.length > 0) {
    const found = [...new Set(frontier.flatMap((id) => facts.linksBySpace.get(id) ?? []))];
    const next: string[] = [];
    for (const l of found) {
      if (seenLinks.has(l.id)) continue;
      seenLinks.add(l.id);
      links.push([l.spaceAId, l.spaceBId]);
      for (const id of [l.spaceAId, l.spaceBId]) if (!known.has(id) && !next.includes(id)) next.push(id);
    }
    for (const id of next) {
      const space = facts.spaces.get(id);
      if (space) known.set(id, space);
    }
    frontier = next;
  }
  const groupSpaces = [...known.values()].filter((s) => s.enclosed);

  const factoryCharge = system.factoryCharge ?? 0;
  // The amount weighed in on the system's latest charge record wins over a field charge typed by hand.
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
          const { mount, from } = mountPositionOf({ kind: u.kind, unit: u.mountPosition, model: u.modelMountPosition });
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
