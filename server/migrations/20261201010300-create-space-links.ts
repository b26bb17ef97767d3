import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Permanent openings between two spaces: they count as one volume in the refrigerant check.
 * Stored once per pair with space_a_id < space_b_id.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('space_links', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    space_a_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'spaces', key: 'id' }, onDelete: 'CASCADE' },
    space_b_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'spaces', key: 'id' }, onDelete: 'CASCADE' },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('space_links', ['space_a_id', 'space_b_id'], { unique: true, name: 'space_links_pair_unique' });
  await qi.addIndex('space_links', ['space_b_id'], { name: 'space_links_space_b_id' });
  await qi.addIndex('space_links', ['job_id'], { name: 'space_links_job_id' });
  await qi.sequelize.query(`ALTER TABLE space_links ADD CONSTRAINT space_links_order_check CHECK (space_a_id < space_b_id)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('space_links');
}
