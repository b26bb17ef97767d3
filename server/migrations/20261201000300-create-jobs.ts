import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('jobs', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    owner_company_id: {
      type: DataTypes.UUID,
      allowNull: false,
      references: { model: 'companies', key: 'id' },
      onDelete: 'RESTRICT',
    },
    name: { type: DataTypes.STRING(160), allowNull: false },
    number: { type: DataTypes.STRING(40), allowNull: true },
    address: { type: DataTypes.STRING(300), allowNull: true },
    starts_on: { type: DataTypes.DATEONLY, allowNull: true },
    ends_on: { type: DataTypes.DATEONLY, allowNull: true },
    time_zone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' },
    unit_system: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'imperial' },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('jobs', ['owner_company_id'], { name: 'jobs_owner_company_id' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('jobs');
}
