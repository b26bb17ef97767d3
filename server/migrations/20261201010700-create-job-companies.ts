import { DataTypes, type QueryInterface } from 'sequelize';

/** Companies working on a job, with the trades they cover there. */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('job_companies', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    company_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'companies', key: 'id' }, onDelete: 'RESTRICT' },
    trades: { type: DataTypes.ARRAY(DataTypes.STRING(20)), allowNull: false, defaultValue: [] },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('job_companies', ['job_id', 'company_id'], { unique: true, name: 'job_companies_job_company_unique' });
  await qi.addIndex('job_companies', ['company_id'], { name: 'job_companies_company_id' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('job_companies');
}
