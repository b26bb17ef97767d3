/** The seeded demo, as the browser tests find it. */
import { CatalogueItem, Job, UnitModel } from '../../server/models';
import { DEMO_JOBS } from '../../server/seed/demo';
import type { UnitKindKey } from '../../shared/words';
import { buildLevel, buildUnit, copyCatalogue } from './factories';

/** The demo's first job (the one every browser test walks); seedDemo must have run. */
export async function demoJob(): Promise<Job> {
  const job = await Job.findOne({ where: { name: DEMO_JOBS[0]!.name } });
  if (!job) throw new Error('The demo job is missing: seed the demo first.');
  return job;
}

export interface DemoLevel {
  jobId: string;
  levelId: string;
  /** In the order of the tags given. */
  unitIds: string[];
  modelId: string | null;
}

/**
 * A level of the test's own on the demo job (its catalogue copied when missing), with one unit of
 * `kind` per tag, all of one new unit model when `modelName` is given. seedDemo must have run.
 */
export async function demoLevel(levelName: string, tags: readonly string[], options: { kind: UnitKindKey; modelName?: string }): Promise<DemoLevel> {
  const jobId = (await demoJob()).id;
  if ((await CatalogueItem.count({ where: { jobId } })) === 0) await copyCatalogue(jobId);
  const level = await buildLevel(jobId, { name: levelName });
  const model = options.modelName
    ? await UnitModel.create({ jobId, name: options.modelName, modelNumber: null, unitKind: options.kind, nominalCapacity: null })
    : null;
  const unitIds: string[] = [];
  for (const tag of tags) unitIds.push((await buildUnit(jobId, level.id, { tag, kind: options.kind, ...(model ? { modelId: model.id } : {}) })).id);
  return { jobId, levelId: level.id, unitIds, modelId: model?.id ?? null };
}
