import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Walks: one inspector's pass over one level of a job. finished_at is null while the walk runs.
 * References inside the job are NO ACTION (checked at the end of the statement): deleting a
 * level with walks is refused, while deleting a whole job still cascades through everything.
 * The walks, unit-check and findings migrations follow the same rule; users stay RESTRICT.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('walks', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    level_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'levels', key: 'id' }, onDelete: 'NO ACTION' },
    inspector_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
    started_at: { type: DataTypes.DATE, allowNull: false },
    finished_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('walks', ['job_id', 'started_at'], { name: 'walks_job_started' });
  await qi.addIndex('walks', ['level_id', 'started_at'], { name: 'walks_level_started' });
  await qi.addIndex('walks', ['inspector_id'], { name: 'walks_inspector_id' });
  await qi.sequelize.query(
    `ALTER TABLE walks ADD CONSTRAINT walks_finished_after_start CHECK (finished_at IS NULL OR finished_at >= started_at)`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('walks');
}
