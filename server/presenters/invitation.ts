/** Invitations → Invitation (the GC manager's list) and InvitationPreview (what the invited person sees). */
import type { Invitation, InvitationPreview } from '../../shared/schemas/auth';
import type { AuthToken, Company, Job } from '../models';

/** An invitation token row with its company and inviter loaded. */
export function presentInvitation(row: AuthToken): Invitation {
  return {
    id: row.id,
    email: row.email!,
    name: row.name ?? null,
    role: row.role!,
    company: { id: row.companyId!, name: row.company?.name ?? '' },
    invitedBy: row.inviter ? { id: row.inviter.id, name: row.inviter.name } : null,
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
  };
}

export function presentInvitationPreview(
  row: AuthToken,
  found: { job: Job; company: Company; inviterName: string | null; existingAccount: boolean },
): InvitationPreview {
  return {
    email: row.email!,
    name: row.name ?? null,
    role: row.role!,
    job: { id: found.job.id, name: found.job.name },
    company: { name: found.company.name },
    invitedBy: found.inviterName,
    existingAccount: found.existingAccount,
    expiresAt: row.expiresAt.toISOString(),
  };
}
