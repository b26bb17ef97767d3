import type { QueryInterface } from 'sequelize';

/**
 * Recurring-defect thresholds become { minUnits, minShare }: a defect type is recurring
 * when found on at least minUnits units and at least minShare of the checked units of the kinds
 * it applies to. Default 3 units and 10 %. Jobs still on the old default { minUnits: 5,
 * windowDays: 14 } take the new default; jobs with their own minUnits keep it and get
 * minShare 0.1 (windowDays stays in the row, unused, so down() can restore it).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE jobs ALTER COLUMN recurring_thresholds SET DEFAULT '{"minUnits": 3, "minShare": 0.1}'::jsonb`);
  await sql(`UPDATE jobs SET recurring_thresholds = '{"minUnits": 3, "minShare": 0.1}'::jsonb
              WHERE recurring_thresholds = '{"minUnits": 5, "windowDays": 14}'::jsonb`);
  await sql(`UPDATE jobs SET recurring_thresholds = recurring_thresholds || '{"minShare": 0.1}'::jsonb
              WHERE recurring_thresholds -> 'minShare' IS NULL`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE jobs ALTER COLUMN recurring_thresholds SET DEFAULT '{"minUnits": 5, "windowDays": 14}'::jsonb`);
  await sql(`UPDATE jobs SET recurring_thresholds = '{"minUnits": 5, "windowDays": 14}'::jsonb
              WHERE recurring_thresholds = '{"minUnits": 3, "minShare": 0.1}'::jsonb`);
  await sql(`UPDATE jobs SET recurring_thresholds = (recurring_thresholds - 'minShare')
                 || jsonb_build_object('windowDays', coalesce(recurring_thresholds -> 'windowDays', '14'::jsonb))`);
}
