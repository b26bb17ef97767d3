import { DataTypes, type QueryInterface } from 'sequelize';

/** Job set-up settings: code editions, due days per severity, recurring-defect thresholds, job settings. */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('jobs', 'code_editions', { type: DataTypes.JSONB, allowNull: false, defaultValue: {} });
  await qi.addColumn('jobs', 'severity_due_days', {
    type: DataTypes.JSONB,
    allowNull: false,
    defaultValue: { critical: 2, major: 7, minor: 14 },
  });
  await qi.addColumn('jobs', 'recurring_thresholds', {
    type: DataTypes.JSONB,
    allowNull: false,
    defaultValue: { minUnits: 5, windowDays: 14 },
  });
  await qi.addColumn('jobs', 'settings', { type: DataTypes.JSONB, allowNull: false, defaultValue: {} });
  await qi.sequelize.query(
    `ALTER TABLE jobs ADD CONSTRAINT jobs_unit_system_check CHECK (unit_system IN ('imperial', 'metric'))`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE jobs DROP CONSTRAINT IF EXISTS jobs_unit_system_check`);
  await qi.removeColumn('jobs', 'settings');
  await qi.removeColumn('jobs', 'recurring_thresholds');
  await qi.removeColumn('jobs', 'severity_due_days');
  await qi.removeColumn('jobs', 'code_editions');
}
