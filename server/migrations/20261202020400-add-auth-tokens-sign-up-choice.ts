import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * A sign-up's choices travel on its confirmation token, not on the account: the password hash
 * and the company name typed with that sign-up. Until an address is confirmed, anyone may sign
 * up with it, so nothing they chose may stick to the account; confirming proves the mailbox and
 * applies exactly the choices of the sign-up whose link was followed.
 *
 * Confirmation links already mailed carry the password the account holds now, and unconfirmed
 * accounts give up their password (they could not sign in with it anyway): from here on, a
 * password reaches an account only through a confirmed link.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('auth_tokens', 'password_hash', { type: DataTypes.STRING(300), allowNull: true });
  await qi.addColumn('auth_tokens', 'company_name', { type: DataTypes.STRING(120), allowNull: true });
  await qi.sequelize.query(`
    UPDATE auth_tokens t SET password_hash = u.password_hash
      FROM users u
     WHERE t.user_id = u.id AND t.purpose = 'email_confirmation' AND u.email_confirmed_at IS NULL`);
  await qi.sequelize.query(`UPDATE users SET password_hash = NULL WHERE email_confirmed_at IS NULL`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    UPDATE users u SET password_hash = t.password_hash
      FROM (SELECT DISTINCT ON (user_id) user_id, password_hash FROM auth_tokens
             WHERE purpose = 'email_confirmation' AND password_hash IS NOT NULL
             ORDER BY user_id, created_at DESC) t
     WHERE u.id = t.user_id AND u.email_confirmed_at IS NULL`);
  await qi.removeColumn('auth_tokens', 'company_name');
  await qi.removeColumn('auth_tokens', 'password_hash');
}
