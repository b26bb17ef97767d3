/**
 * Following a password-reset link with a new password: the password is set, every session of the
 * user ends (the session epoch rises), the address counts as confirmed (the link came to it), and
 * the user's other reset links and pending confirmation links die (they carry passwords chosen by
 * whoever signed up with this address). One transaction; the caller hashes first and signs in after.
 */
import { Op, fn, literal, type Transaction } from 'sequelize';
import { AuthToken, User } from '../models';
import { consumeToken } from '../services/tokens';

export interface ResetPasswordContext {
  transaction: Transaction;
}

/** Returns the user's id. */
export async function resetPassword({ transaction }: ResetPasswordContext, token: string, passwordHash: string): Promise<string> {
  const row = await consumeToken(token, 'password_reset', transaction);
  await User.update(
    {
      passwordHash,
      // Ends every session of this user (the session keeps the epoch it was made with).
      sessionEpoch: literal('session_epoch + 1') as unknown as number,
      emailConfirmedAt: fn('coalesce', literal('email_confirmed_at'), fn('now')) as unknown as Date,
    },
    { where: { id: row.userId! }, transaction },
  );
  await AuthToken.update(
    { revokedAt: fn('now') as unknown as Date },
    {
      where: { userId: row.userId!, purpose: ['password_reset', 'email_confirmation'], usedAt: null, revokedAt: null, id: { [Op.ne]: row.id } },
      transaction,
    },
  );
  return row.userId!;
}
