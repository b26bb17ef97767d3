import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Photos whenever needed, and the new measurement of a fix.
 *
 * photos.stage says what a photo shows: `finding` (the defect, as logged or added while the
 * finding was open), `fix` (the subcontractor's fixed work; fix_id set) or `reinspection` (the
 * inspector's own photo at re-inspection; finding_id set). The per-finding photo limit counts only
 * `finding` photos, and the before/after views pick each side by stage instead of guessing.
 *
 * fixes.measured_text / measured_value / rule_result: the fix's new measurement of a measured
 * defect, evaluated against the same rule and limit as the finding as logged (like findings'
 * columns of the same names).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('photos', 'stage', { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'finding' });
  await qi.sequelize.query(`UPDATE photos SET stage = 'fix' WHERE fix_id IS NOT NULL`);
  await qi.sequelize.query(`
    ALTER TABLE photos
      ADD CONSTRAINT photos_stage_check CHECK (stage IN ('finding', 'fix', 'reinspection')),
      ADD CONSTRAINT photos_stage_owner_check CHECK ((stage = 'fix') = (fix_id IS NOT NULL))`);
  await qi.addColumn('fixes', 'measured_text', { type: DataTypes.STRING(60), allowNull: true });
  await qi.addColumn('fixes', 'measured_value', { type: DataTypes.DOUBLE, allowNull: true });
  await qi.addColumn('fixes', 'rule_result', { type: DataTypes.JSONB, allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn('fixes', 'rule_result');
  await qi.removeColumn('fixes', 'measured_value');
  await qi.removeColumn('fixes', 'measured_text');
  // Re-inspection photos have no place in the older shape: they go with the column.
  await qi.sequelize.query(`DELETE FROM photos WHERE stage = 'reinspection'`);
  await qi.sequelize.query(`ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_stage_owner_check, DROP CONSTRAINT IF EXISTS photos_stage_check`);
  await qi.removeColumn('photos', 'stage');
}
