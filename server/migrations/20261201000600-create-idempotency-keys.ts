import { DataTypes, type QueryInterface } from 'sequelize';

/** Stored responses of client-made POSTs, so a retried request replays instead of writing twice. */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('idempotency_keys', {
    id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
    user_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    key: { type: DataTypes.STRING(100), allowNull: false },
    fingerprint: { type: DataTypes.STRING(64), allowNull: false },
    response_status: { type: DataTypes.INTEGER, allowNull: false },
    response_body: { type: DataTypes.JSONB, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await qi.addIndex('idempotency_keys', ['user_id', 'key'], { unique: true, name: 'idempotency_keys_user_key_unique' });
  await qi.addIndex('idempotency_keys', ['created_at'], { name: 'idempotency_keys_created_at' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('idempotency_keys');
}
