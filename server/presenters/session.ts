import type { SessionJob, SessionUser } from '../../shared/schemas/session';
import type { AuthUser } from '../auth/passport';
import type { Job } from '../models';
import type { Role } from '../../shared/words';

export function presentUser(user: AuthUser): SessionUser {
  return { id: user.id, email: user.email, name: user.name, company: { id: user.companyId, name: user.companyName } };
}

export function presentJobWithRole(job: Job, role: Role): SessionJob {
  return { id: job.id, name: job.name, number: job.number ?? null, address: job.address ?? null, role };
}
