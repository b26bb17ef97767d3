/**
 * Following a confirmation link proves the mailbox. The account then takes exactly the choices of
 * the sign-up whose link was followed (password, name, company name), every other session of the
 * account ends (the session epoch rises), and every other confirmation link dies: a password set by
 * someone who signed up with this address before its owner cannot survive the owner's confirmation.
 */
import { Op, fn, literal, type Transaction } from 'sequelize';
import { AuthToken, Company, User } from '../models';
import { consumeToken } from '../services/tokens';

/** Returns the confirmed user's id. */
export async function confirmEmail(ctx: { transaction: Transaction }, token: string): Promise<string> {
  const { transaction } = ctx;
  const row = await consumeToken(token, 'email_confirmation', transaction);
  const userId = row.userId!;
  const user = await User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE });
  if (!user) throw new Error('a confirmation token outlived its user'); // the foreign key cascades: cannot happen
  const firstConfirmation = !user.emailConfirmedAt;
  await User.update(
    {
      ...(row.passwordHash ? { passwordHash: row.passwordHash } : {}),
      ...(row.name && firstConfirmation ? { name: row.name } : {}),
      emailConfirmedAt: fn('coalesce', literal('email_confirmed_at'), fn('now')) as unknown as Date,
      sessionEpoch: literal('session_epoch + 1') as unknown as number,
    },
    { where: { id: userId }, transaction },
  );
  // The company was made by the first sign-up with this address; it is the confirmer's now.
  if (row.companyName && firstConfirmation && (await User.count({ where: { companyId: user.companyId }, transaction })) === 1) {
    await Company.update({ name: row.companyName }, { where: { id: user.companyId }, transaction });
  }
  await AuthToken.update(
    { revokedAt: fn('now') as unknown as Date },
    { where: { userId, purpose: 'email_confirmation', usedAt: null, revokedAt: null, id: { [Op.ne]: row.id } }, transaction },
  );
  return userId;
}
