/**
 * The demo's crews: the mechanical subcontractor names two crews, and each unit records the one
 * that installed it (the lower levels one crew, the upper levels the other). Invented names. Only
 * when the job has no crew yet. (The demo's recurring defects are the ceiling company's, whose
 * units no crew of theirs installed: the board lists them under "crew not recorded".)
 */
import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { Crew } from '../models';

export const DEMO_CREWS = ['North crew', 'South crew'] as const;

/** Levels (by position) installed by the first crew; the rest by the second. */
const FIRST_CREW_LEVELS = 2;

export async function seedDemoCrews(db: Database, jobId: string, mechanicalCompanyId: string, transaction: Transaction): Promise<boolean> {
  if ((await Crew.count({ where: { jobId }, transaction })) > 0) return false;
  const made = [];
  for (const name of DEMO_CREWS) made.push(await Crew.create({ jobId, companyId: mechanicalCompanyId, name }, { transaction }));
  await db.sequelize.query(
    `UPDATE units u SET installed_by_crew_id = CASE WHEN l.position <= $2 THEN $3::uuid ELSE $4::uuid END
       FROM levels l
      WHERE l.id = u.level_id AND u.job_id = $1 AND u.installed_by_crew_id IS NULL`,
    { bind: [jobId, FIRST_CREW_LEVELS, made[0]!.id, made[1]!.id], transaction },
  );
  return true;
}
