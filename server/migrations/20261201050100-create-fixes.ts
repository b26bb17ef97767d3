import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Fixes: what a subcontractor (or a GC manager) sent back for a finding: a note and its photos
 * (photos.fix_id, key added in 20261201050200). Immutable once written, like events: a new fix
 * is a new row. job_id is kept for scoping every query by job.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('fixes', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    finding_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'findings', key: 'id' }, onDelete: 'CASCADE' },
    submitted_by: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
    note: { type: DataTypes.TEXT, allowNull: false },
    submitted_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('fixes', ['finding_id', 'submitted_at'], { name: 'fixes_finding_submitted_at' });
  await qi.addIndex('fixes', ['job_id'], { name: 'fixes_job_id' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('fixes');
}
