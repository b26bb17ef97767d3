/**
 * "Forgot your password?": a one-hour reset link to the address, if it has a usable account.
 * The route answers before this runs, so no answer time tells a known address from an unknown one.
 */
import type { Sequelize } from 'sequelize';
import type { MailService } from '../mail';
import { passwordResetMail } from '../mail/messages';
import { User } from '../models';
import { issueToken } from '../services/tokens';

export async function sendPasswordReset(ctx: { sequelize: Sequelize; mail: MailService }, email: string): Promise<void> {
  const user = await User.findOne({ where: { email: email.toLowerCase() } });
  if (!user || user.disabledAt) return;
  await ctx.sequelize.transaction(async (transaction) => {
    const { token } = await issueToken('password_reset', { userId: user.id }, transaction);
    // An unconfirmed account's name was typed by whoever signed up: leave it out.
    const name = user.emailConfirmedAt ? user.name : undefined;
    ctx.mail.outbox.sendAfterCommit(transaction, passwordResetMail({ name, address: user.email }, ctx.mail.link(`/reset/${token}`)));
  });
}
