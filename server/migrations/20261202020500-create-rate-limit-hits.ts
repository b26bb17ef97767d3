import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Hits per rate-limit key (sign-in per account, per address, per device; mails per address; links
 * per token), shared by every server node: a limit kept in one process's memory is a limit per
 * node. One row per key and window; server/services/rateLimitStore.ts counts with one upsert.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('rate_limit_hits', {
    key: { type: DataTypes.STRING(300), primaryKey: true },
    hits: { type: DataTypes.INTEGER, allowNull: false },
    reset_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('rate_limit_hits', ['reset_at'], { name: 'rate_limit_hits_reset_at' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('rate_limit_hits');
}
