import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('users', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    company_id: {
      type: DataTypes.UUID,
      allowNull: false,
      references: { model: 'companies', key: 'id' },
      onDelete: 'RESTRICT',
    },
    email: { type: DataTypes.STRING(254), allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    password_hash: { type: DataTypes.STRING(300), allowNull: true },
    session_epoch: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    disabled_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('users', ['email'], { unique: true, name: 'users_email_unique' });
  await qi.addIndex('users', ['company_id'], { name: 'users_company_id' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('users');
}
