/**
 * A GC new to Trimout signs up: their company and first account, unconfirmed until the mailed
 * link is followed. Anyone can type any address, so nothing a sign-up chooses sticks to an
 * unconfirmed account: the password (hashed), the name and the company name travel on the
 * confirmation token, and only confirming applies them (commands/confirmEmail.ts). The mail to
 * the address carries none of the chosen words, so a stranger cannot put text in someone's inbox.
 *
 * Every outcome answers the same (no account enumeration); the address's owner learns by mail.
 */
import type { Transaction } from 'sequelize';
import type { SignUpInput } from '../../shared/schemas/auth';
import type { MailService } from '../mail';
import { confirmationMail, signUpExistsMail } from '../mail/messages';
import { Company, User } from '../models';
import { issueToken } from '../services/tokens';

export interface SignUpContext {
  transaction: Transaction;
  mail: MailService;
}

export async function signUp(ctx: SignUpContext, input: SignUpInput, passwordHash: string): Promise<void> {
  const { transaction, mail } = ctx;
  const email = input.email.toLowerCase();
  const choice = { passwordHash, name: input.name, companyName: input.companyName };
  const existing = await User.findOne({ where: { email }, transaction });
  if (existing?.disabledAt) return;
  if (existing?.emailConfirmedAt) {
    mail.outbox.sendAfterCommit(transaction, signUpExistsMail({ name: existing.name, address: existing.email }, mail.link('/sign-in'), mail.link('/forgot-password')));
    return;
  }
  let userId = existing?.id;
  if (!userId) {
    const company = await Company.create({ name: input.companyName }, { transaction });
    // No password until the address is confirmed: the confirmation applies the one chosen with it.
    const user = await User.create({ companyId: company.id, email, name: input.name, passwordHash: null, emailConfirmedAt: null }, { transaction });
    userId = user.id;
  }
  const { token } = await issueToken('email_confirmation', { userId, ...choice }, transaction);
  mail.outbox.sendAfterCommit(transaction, confirmationMail({ address: email }, mail.link(`/confirm/${token}`)));
}
