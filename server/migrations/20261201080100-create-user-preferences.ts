import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Mail preferences, one row per user, made on the first change (server/digests/preferences.ts).
 * A user without a row has the defaults: digest daily at 07:00 when they are a GC manager or a
 * subcontractor on some job, off otherwise (inspectors); the critical-assignment mail on.
 * NULL columns also mean "the default": digest_frequency NULL = by role, time_zone NULL = the time
 * zone of the user's first job (by membership date). Versioned for If-Match.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('user_preferences', {
    user_id: { type: DataTypes.UUID, primaryKey: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    digest_frequency: { type: DataTypes.STRING(10), allowNull: true },
    /** ISO weekday for a weekly digest: 1 Monday … 7 Sunday. */
    digest_weekday: { type: DataTypes.SMALLINT, allowNull: false, defaultValue: 1 },
    /** Local hour 0–23 in time_zone. */
    digest_hour: { type: DataTypes.SMALLINT, allowNull: false, defaultValue: 7 },
    time_zone: { type: DataTypes.STRING(64), allowNull: true },
    critical_assignment_mail: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(
    `ALTER TABLE user_preferences ADD CONSTRAINT user_preferences_frequency_check
       CHECK (digest_frequency IS NULL OR digest_frequency IN ('daily', 'weekly', 'off'))`,
  );
  await sql(`ALTER TABLE user_preferences ADD CONSTRAINT user_preferences_weekday_check CHECK (digest_weekday BETWEEN 1 AND 7)`);
  await sql(`ALTER TABLE user_preferences ADD CONSTRAINT user_preferences_hour_check CHECK (digest_hour BETWEEN 0 AND 23)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('user_preferences');
}
