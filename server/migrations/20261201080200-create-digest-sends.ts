import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * One row per digest a user is sent for a period ("daily:2026-12-01", "weekly:2026-11-30"):
 * the claim that makes a digest go out at most once per period however many workers run.
 * A worker INSERTs ... ON CONFLICT (user_id, period_key) DO NOTHING and sends only when its
 * insert made the row; sent_at / failed_at are set afterwards. A claim whose send never finished
 * (the process died mid-send) stays claimed: at most once, never twice.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('digest_sends', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    user_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    period_key: { type: DataTypes.STRING(40), allowNull: false },
    claimed_at: { type: DataTypes.DATE, allowNull: false },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    failed_at: { type: DataTypes.DATE, allowNull: true },
    /** Who claimed it (pg-boss job id, "now" for the button, or a test's name). */
    claimed_by: { type: DataTypes.STRING(80), allowNull: true },
  });
  await qi.sequelize.query(`ALTER TABLE digest_sends ADD CONSTRAINT digest_sends_user_period_unique UNIQUE (user_id, period_key)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('digest_sends');
}
