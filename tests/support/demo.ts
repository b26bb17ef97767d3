/** The seeded demo, as the browser tests find it. */
import { Job } from '../../server/models';
import { DEMO_JOBS } from '../../server/seed/demo';

/** The demo's first job (the one every browser test walks); seedDemo must have run. */
export async function demoJob(): Promise<Job> {
  const job = await Job.findOne({ where: { name: DEMO_JOBS[0]!.name } });
  if (!job) throw new Error('The demo job is missing: seed the demo first.');
  return job;
}
