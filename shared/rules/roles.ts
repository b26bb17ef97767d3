/**
 * Who may start a job. A job is set up by a general contractor's manager, who becomes its GC
 * manager. Someone new to Trimout (no job yet) may start their first; someone who works on jobs
 * only as an inspector or a subcontractor asks the GC to set the job up and invite them.
 */
import type { Role } from '../words';

export function mayStartJob(rolesOnJobs: readonly Role[]): boolean {
  return rolesOnJobs.length === 0 || rolesOnJobs.includes('gc_manager');
}

export const START_JOB_REFUSED =
  'Jobs are set up by a GC manager. You work on your jobs as an inspector or subcontractor: ask the general contractor to set the job up and invite you.';
