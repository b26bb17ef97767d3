import type { SessionJob } from '../../shared/schemas/session';
import { Job, JobMember } from '../models';
import { presentJobWithRole } from '../presenters/session';

/** The caller's jobs with their role on each, by job name. */
export async function jobsOf(userId: string): Promise<SessionJob[]> {
  const rows = await JobMember.findAll({
    where: { userId },
    include: [{ model: Job, as: 'job', required: true }],
    order: [[{ model: Job, as: 'job' }, 'name', 'ASC']],
  });
  return rows.map((m) => presentJobWithRole(m.job!, m.role));
}
