import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Unit checks: one row per check event (the latest per unit is the unit's current check),
 * and one row per catalogue item marked in it (ok / defect / not_applicable, with the measured
 * value in base units and the rule's evaluation from shared/calc).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('unit_checks', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    unit_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'units', key: 'id' }, onDelete: 'NO ACTION' },
    walk_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'walks', key: 'id' }, onDelete: 'NO ACTION' },
    checked_by: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
    checked_at: { type: DataTypes.DATE, allowNull: false },
    complete: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  // The unit's current check: ORDER BY checked_at DESC, id DESC per unit.
  await qi.sequelize.query(`CREATE INDEX unit_checks_unit_latest ON unit_checks (unit_id, checked_at DESC, id DESC)`);
  await qi.addIndex('unit_checks', ['walk_id'], { name: 'unit_checks_walk_id' });
  await qi.addIndex('unit_checks', ['job_id', 'checked_at'], { name: 'unit_checks_job_checked_at' });

  await qi.createTable('unit_check_items', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    unit_check_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'unit_checks', key: 'id' }, onDelete: 'CASCADE' },
    catalogue_item_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'catalogue_items', key: 'id' }, onDelete: 'NO ACTION' },
    mark: { type: DataTypes.STRING(20), allowNull: false },
    measured_text: { type: DataTypes.STRING(60), allowNull: true },
    measured_value: { type: DataTypes.DOUBLE, allowNull: true },
    result: { type: DataTypes.JSONB, allowNull: true },
    position: { type: DataTypes.INTEGER, allowNull: false },
  });
  await qi.addIndex('unit_check_items', ['unit_check_id', 'catalogue_item_id'], { unique: true, name: 'unit_check_items_check_item_unique' });
  await qi.addIndex('unit_check_items', ['catalogue_item_id'], { name: 'unit_check_items_catalogue_item_id' });
  await qi.sequelize.query(
    `ALTER TABLE unit_check_items ADD CONSTRAINT unit_check_items_mark_check CHECK (mark IN ('ok', 'defect', 'not_applicable'))`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('unit_check_items');
  await qi.dropTable('unit_checks');
}
