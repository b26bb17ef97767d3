/**
 * The systems on each floor, for the building view of the levels board: which levels a system's
 * units are on, whether its refrigerant charge is over the limit of a space it serves (the same
 * checks as the system's own page: services/refrigerantChecks.ts), and how many test records its
 * start-up still waits for (the same rule as readiness: services/board/testReadiness.ts).
 *
 * A fixed number of statements whatever the number of systems: readiness (from the exact cache,
 * readiness.ts), the job's systems, and the facts the refrigerant checks read for all of them at
 * once (units, spaces, permanent openings, latest charge records: systemDetails).
 */
import type { Sequelize } from 'sequelize';
import type { FloorSystem, FloorSystemsResponse } from '../../../shared/schemas/board';
import { Job, System } from '../../models';
import type { FindingScope } from '../findingQueries';
import { systemDetails } from '../refrigerantChecks';
import { loadReadiness } from './readiness';

export async function loadFloorSystems(sequelize: Sequelize, scope: FindingScope): Promise<FloorSystemsResponse> {
  const [job, readiness, systems] = await Promise.all([
    Job.findByPk(scope.jobId),
    loadReadiness(sequelize, scope),
    System.findAll({ where: { jobId: scope.jobId }, order: [['name', 'ASC'], ['id', 'ASC']] }),
  ]);
  if (!job || !readiness) return { systems: [] };
  const details = await systemDetails(job, systems);
  const judged = new Map(readiness.systems.map((s) => [s.systemId, s]));
  const out: FloorSystem[] = systems.map((system) => {
    const ready = judged.get(system.id);
    const levelIds = [...new Set((ready?.units ?? []).map((u) => u.levelId))];
    const detail = details.get(system.id)!;
    const over = detail.concentration.pass === false || detail.a2lFloorArea.some((a) => a.result.pass === false);
    const within = detail.concentration.pass === true && detail.a2lFloorArea.every((a) => a.result.pass !== false);
    return {
      systemId: system.id,
      name: system.name,
      levelIds,
      refrigerant: over ? 'over_limit' : within ? 'within_limit' : 'not_judged',
      startupReady: ready?.startupReady ?? false,
      recordsWaiting: ready?.startupBlockers.length ?? 0,
    };
  });
  return { systems: out };
}
