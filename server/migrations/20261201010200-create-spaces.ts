import { DataTypes, type QueryInterface } from 'sequelize';

/** Rooms or areas on a level. floor_area in m², ceiling_height in mm (base units). */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('spaces', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    level_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'levels', key: 'id' }, onDelete: 'RESTRICT' },
    name: { type: DataTypes.STRING(120), allowNull: false },
    floor_area: { type: DataTypes.DOUBLE, allowNull: true },
    ceiling_height: { type: DataTypes.DOUBLE, allowNull: true },
    occupancy: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'general' },
    enclosed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('spaces', ['job_id', 'level_id', 'name'], { name: 'spaces_job_level_name' });
  await qi.addIndex('spaces', ['level_id'], { name: 'spaces_level_id' });
  await qi.sequelize.query(
    `ALTER TABLE spaces ADD CONSTRAINT spaces_occupancy_check CHECK (occupancy IN ('general', 'institutional')),
       ADD CONSTRAINT spaces_floor_area_check CHECK (floor_area IS NULL OR floor_area > 0),
       ADD CONSTRAINT spaces_ceiling_height_check CHECK (ceiling_height IS NULL OR ceiling_height > 0)`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('spaces');
}
