/**
 * Accepting an invitation (the link's token). Someone with an account proves it with their current
 * password (an invitation never changes it); a new person chooses a name and password. Then, in
 * one transaction: the token is used, the account is made or confirmed, and the membership is made
 * for the company the invitation was for. The caller signs the person in afterwards.
 *
 * The slow work (verifying or hashing the password) happens before the transaction, so no row
 * is held while scrypt runs.
 */
import { fn, literal, type Sequelize } from 'sequelize';
import { invitationNewAccountSchema, type InvitationAcceptInput } from '../../shared/schemas/auth';
import { hashPassword, verifyPassword } from '../auth/passwords';
import { badRequest, forbidden, unauthorized } from '../errors';
import { zodFieldErrors } from '../middleware/validate';
import { AuthToken, JobMember, User } from '../models';
import { consumeToken, inspectToken } from '../services/tokens';

export interface AcceptInvitationContext {
  sequelize: Sequelize;
  clock?: () => Date;
}

export interface AcceptedInvitation {
  userId: string;
  jobId: string;
}

export async function acceptInvitation(ctx: AcceptInvitationContext, token: string, input: InvitationAcceptInput): Promise<AcceptedInvitation> {
  const now = ctx.clock ?? (() => new Date());
  const invitation = await inspectToken(token, 'invitation');
  const existing = await User.findOne({ where: { email: invitation.email! } });
  let newAccount: { name: string; passwordHash: string } | undefined;
  if (existing?.passwordHash) {
    if (existing.disabledAt) throw forbidden('This account is disabled. Ask the GC manager for help.');
    if (!(await verifyPassword(input.password, existing.passwordHash))) {
      throw unauthorized('That is not the password of your Trimout account. Use "Forgot your password?" on the sign-in page if you lost it.');
    }
  } else {
    const parsed = invitationNewAccountSchema.safeParse({ name: input.name || invitation.name || '', password: input.password });
    if (!parsed.success) {
      const fields = zodFieldErrors(parsed.error);
      const [field, message] = Object.entries(fields)[0]!;
      throw badRequest(`${field}: ${message}`, fields);
    }
    newAccount = { name: parsed.data.name, passwordHash: await hashPassword(parsed.data.password) };
  }

  return ctx.sequelize.transaction(async (transaction) => {
    const row = await consumeToken(token, 'invitation', transaction);
    let userId: string;
    if (existing) {
      userId = existing.id;
      await User.update(
        {
          // An account without a password (a sign-up never confirmed) is made here as a new one
          // would be: the name, password and company are the invitee's, nothing the sign-up chose.
          ...(newAccount ? { passwordHash: newAccount.passwordHash, name: newAccount.name, companyId: row.companyId! } : {}),
          emailConfirmedAt: fn('coalesce', literal('email_confirmed_at'), fn('now')) as unknown as Date,
        },
        { where: { id: userId }, transaction },
      );
      // The invitation proved the mailbox and set the password: pending sign-up confirmations
      // (which carry passwords chosen by whoever signed up with this address) die here.
      if (newAccount) {
        await AuthToken.update(
          { revokedAt: fn('now') as unknown as Date },
          { where: { userId, purpose: 'email_confirmation', usedAt: null, revokedAt: null }, transaction },
        );
      }
    } else {
      const user = await User.create(
        { email: row.email!, name: newAccount!.name, companyId: row.companyId!, passwordHash: newAccount!.passwordHash, emailConfirmedAt: now() },
        { transaction },
      );
      userId = user.id;
    }
    // The membership carries the company the invitation was for, which may not be the
    // person's home company: it decides what a subcontractor sees on this job.
    const [member] = await JobMember.findOrCreate({
      where: { jobId: row.jobId!, userId },
      defaults: { jobId: row.jobId!, userId, role: row.role!, companyId: row.companyId! },
      transaction,
    });
    await row.update({ userId }, { transaction });
    return { userId, jobId: member.jobId };
  });
}
