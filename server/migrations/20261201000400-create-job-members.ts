import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('job_members', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    user_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    role: { type: DataTypes.STRING(20), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('job_members', ['job_id', 'user_id'], { unique: true, name: 'job_members_job_user_unique' });
  await qi.addIndex('job_members', ['user_id'], { name: 'job_members_user_id' });
  await qi.sequelize.query(
    `ALTER TABLE job_members ADD CONSTRAINT job_members_role_check CHECK (role IN ('gc_manager', 'inspector', 'subcontractor'))`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('job_members');
}
