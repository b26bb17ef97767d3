import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * A level's plan image: at most one per level, stored in the object store under a
 * server-made key (`plans/<level id>/<uuid>.png|jpg`), never the uploaded file name.
 * `plan_version` counts uploads (0 = never had one) and is the cache key of the image URL;
 * the level's own `version` is raised too, since the plan is part of the level record.
 * All plan columns are set together or are all null (the level has no plan).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('levels', 'plan_key', { type: DataTypes.STRING(200), allowNull: true });
  await qi.addColumn('levels', 'plan_content_type', { type: DataTypes.STRING(20), allowNull: true });
  await qi.addColumn('levels', 'plan_source_type', { type: DataTypes.STRING(30), allowNull: true });
  await qi.addColumn('levels', 'plan_width', { type: DataTypes.INTEGER, allowNull: true });
  await qi.addColumn('levels', 'plan_height', { type: DataTypes.INTEGER, allowNull: true });
  await qi.addColumn('levels', 'plan_byte_size', { type: DataTypes.INTEGER, allowNull: true });
  await qi.addColumn('levels', 'plan_uploaded_at', { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn('levels', 'plan_uploaded_by', {
    type: DataTypes.UUID,
    allowNull: true,
    references: { model: 'users', key: 'id' },
    onDelete: 'SET NULL',
  });
  await qi.addColumn('levels', 'plan_version', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.sequelize.query(
    `ALTER TABLE levels ADD CONSTRAINT levels_plan_check CHECK (
       (plan_key IS NULL AND plan_content_type IS NULL AND plan_source_type IS NULL AND plan_width IS NULL
          AND plan_height IS NULL AND plan_byte_size IS NULL AND plan_uploaded_at IS NULL)
       OR (plan_key IS NOT NULL AND plan_content_type IN ('image/png', 'image/jpeg')
          AND plan_source_type IN ('image/png', 'image/jpeg', 'application/pdf')
          AND plan_width > 0 AND plan_height > 0 AND plan_byte_size > 0 AND plan_uploaded_at IS NOT NULL
          AND plan_version > 0))`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE levels DROP CONSTRAINT IF EXISTS levels_plan_check`);
  for (const column of [
    'plan_version',
    'plan_uploaded_by',
    'plan_uploaded_at',
    'plan_byte_size',
    'plan_height',
    'plan_width',
    'plan_source_type',
    'plan_content_type',
    'plan_key',
  ]) {
    await qi.removeColumn('levels', column);
  }
}
