/**
 * A GC manager invites an address to the job with a role, for a company on the job. A new
 * invitation to the same address replaces the pending one; the mail goes after the commit.
 * One transaction (the caller's, shared with the idempotency key).
 */
import { fn, type Transaction } from 'sequelize';
import type { InvitationCreateInput } from '../../shared/schemas/auth';
import { badRequest, conflict, HttpError, notFound } from '../errors';
import type { MailService } from '../mail';
import { invitationMail } from '../mail/messages';
import { AuthToken, Company, JobCompany, JobMember, User, type Job } from '../models';
import { issueToken } from '../services/tokens';

export interface InviteToJobContext {
  transaction: Transaction;
  mail: MailService;
  /** The job, and the company the inviting GC manager acts for on it. */
  scope: { job: Job; companyId: string };
  actor: { id: string; name: string };
}

/** A company is on the job when it owns the job or the job's company list holds it. */
async function companyIsOnJob(job: Job, companyId: string, transaction: Transaction): Promise<boolean> {
  if (companyId === job.ownerCompanyId) return true;
  return (await JobCompany.count({ where: { jobId: job.id, companyId }, transaction })) > 0;
}

/** Returns the invitation row with its company and inviter loaded (what the route presents). */
export async function inviteToJob(ctx: InviteToJobContext, input: InvitationCreateInput): Promise<AuthToken> {
  const { transaction, mail, scope, actor } = ctx;
  const { job } = scope;
  const email = input.email.toLowerCase();
  const companyId = input.companyId ?? scope.companyId;
  if (companyId !== scope.companyId && !(await companyIsOnJob(job, companyId, transaction))) {
    throw badRequest('companyId: That company is not on this job. Add it to the job first.', {
      companyId: 'That company is not on this job. Add it to the job first.',
    });
  }
  const company = await Company.findByPk(companyId, { transaction });
  if (!company) throw badRequest('companyId: That company is not on this job.', { companyId: 'That company is not on this job.' });
  const existing = await User.findOne({ where: { email }, transaction });
  if (existing && (await JobMember.count({ where: { jobId: job.id, userId: existing.id }, transaction })) > 0) {
    throw conflict('That person is already a member of this job.', 'already_member');
  }
  // A new invitation to the same address replaces the pending one.
  await AuthToken.update({ revokedAt: fn('now') as unknown as Date }, { where: { purpose: 'invitation', jobId: job.id, email, usedAt: null, revokedAt: null }, transaction });
  const { token, row } = await issueToken(
    'invitation',
    { email, name: input.name || null, jobId: job.id, role: input.role, companyId, invitedBy: actor.id },
    transaction,
  );
  mail.outbox.sendAfterCommit(
    transaction,
    invitationMail(
      { name: input.name || existing?.name, address: email },
      { jobName: job.name, role: input.role, companyName: company.name, inviterName: actor.name, existingAccount: Boolean(existing?.passwordHash) },
      mail.link(`/invite/${token}`),
    ),
  );
  row.company = company;
  row.inviter = (await User.findByPk(actor.id, { transaction })) ?? undefined;
  return row;
}

/**
 * Several invitations from a pasted list, all or none: the first person refused refuses the list,
 * and the message and fields name that person's line (`people.2.email`).
 */
export async function inviteSeveral(ctx: InviteToJobContext, people: InvitationCreateInput[]): Promise<AuthToken[]> {
  const rows: AuthToken[] = [];
  for (const [i, person] of people.entries()) {
    try {
      rows.push(await inviteToJob(ctx, person));
    } catch (err) {
      if (!(err instanceof HttpError)) throw err;
      const fields = Object.fromEntries(Object.entries(err.fields ?? { email: err.message }).map(([k, v]) => [`people.${i}.${k}`, v]));
      throw new HttpError(err.status, err.id, `Line ${i + 1} (${person.email}): ${err.message} Nobody was invited.`, fields);
    }
  }
  return rows;
}

/**
 * Sends a pending invitation again: a new link (the old one dies), same address, role and company.
 * An accepted, withdrawn or expired invitation is not pending: 409 (invite the person again instead).
 */
export async function resendInvitation(ctx: InviteToJobContext, invitationId: string): Promise<AuthToken> {
  const row = await AuthToken.findOne({
    where: { id: invitationId, jobId: ctx.scope.job.id, purpose: 'invitation' },
    transaction: ctx.transaction,
    lock: ctx.transaction.LOCK.UPDATE,
  });
  if (!row) throw notFound('Invitation not found.');
  if (row.usedAt) throw conflict('That invitation was already accepted.', 'not_pending');
  if (row.revokedAt || row.expiresAt.getTime() <= Date.now()) {
    throw conflict('That invitation was withdrawn or has expired: invite the person again.', 'not_pending');
  }
  return inviteToJob(ctx, { email: row.email!, name: row.name ?? undefined, role: row.role!, companyId: row.companyId ?? undefined });
}
