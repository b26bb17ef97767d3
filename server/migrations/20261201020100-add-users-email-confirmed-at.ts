import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * When a user proved they read their mail. Self sign-ups start unconfirmed (null) and cannot
 * sign in until they follow the confirmation link; accounts made otherwise (invitation, seed,
 * existing rows) count as confirmed, hence the default.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('users', 'email_confirmed_at', { type: DataTypes.DATE, allowNull: true });
  await qi.sequelize.query(`UPDATE users SET email_confirmed_at = created_at`);
  await qi.sequelize.query(`ALTER TABLE users ALTER COLUMN email_confirmed_at SET DEFAULT now()`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn('users', 'email_confirmed_at');
}
