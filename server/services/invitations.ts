/** Invitations to a job: the pending list, withdrawing one, and what a link is for (routes/invitations.ts). */
import { Op, fn, type Transaction, type WhereOptions } from 'sequelize';
import type { InvitationList, InvitationPreview } from '../../shared/schemas/auth';
import { conflict, notFound } from '../errors';
import { AuthToken, Company, Job, User } from '../models';
import { presentInvitation, presentInvitationPreview } from '../presenters/invitation';
import { finishPage, type PageRequest } from './paging';
import { inspectToken } from './tokens';

/** The job's invitations not yet accepted, withdrawn or expired, newest first. */
export async function listPendingInvitations(jobId: string, page: PageRequest): Promise<InvitationList> {
  const where: WhereOptions<AuthToken> = {
    purpose: 'invitation',
    jobId,
    usedAt: null,
    revokedAt: null,
    expiresAt: { [Op.gt]: fn('now') },
  };
  if (page.after) {
    const at = new Date(page.after.value);
    Object.assign(where, { [Op.or]: [{ createdAt: { [Op.lt]: at } }, { createdAt: at, id: { [Op.lt]: page.after.id } }] });
  }
  const rows = await AuthToken.findAll({
    where,
    include: [
      { model: Company, as: 'company' },
      { model: User, as: 'inviter', attributes: ['id', 'name'] },
    ],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: page.limit + 1,
  });
  const { rows: kept, nextCursor } = finishPage(rows, page, (row) => row.createdAt.toISOString());
  return { items: kept.map(presentInvitation), nextCursor };
}

/** Withdraws a pending invitation (its link dies); withdrawing twice is harmless; an accepted one is 409. */
export async function withdrawInvitation(ctx: { transaction: Transaction; jobId: string }, invitationId: string): Promise<void> {
  const { transaction, jobId } = ctx;
  const row = await AuthToken.findOne({
    where: { id: invitationId, jobId, purpose: 'invitation' },
    transaction,
    lock: transaction.LOCK.UPDATE,
  });
  if (!row) throw notFound('Invitation not found.');
  if (row.usedAt) throw conflict('That invitation was already accepted. Remove the member instead.', 'already_accepted');
  if (!row.revokedAt) await row.update({ revokedAt: new Date() }, { transaction });
}

/** What an invitation link is for (the token is checked: unknown, used, withdrawn, expired). */
export async function invitationPreview(token: string): Promise<InvitationPreview> {
  const row = await inspectToken(token, 'invitation');
  const [job, company, inviter, existing] = await Promise.all([
    Job.findByPk(row.jobId!),
    Company.findByPk(row.companyId!),
    row.invitedBy ? User.findByPk(row.invitedBy, { attributes: ['id', 'name'] }) : null,
    User.findOne({ where: { email: row.email! }, attributes: ['id', 'passwordHash'] }),
  ]);
  if (!job || !company) throw notFound('This invitation is for a job that no longer exists.');
  return presentInvitationPreview(row, { job, company, inviterName: inviter?.name ?? null, existingAccount: Boolean(existing?.passwordHash) });
}
