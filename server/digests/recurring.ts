/**
 * Defect types that became recurring during a digest's period: the levels board's recurring
 * defects (H1's loadRecurring in server/services/board.ts: at least minUnits distinct units and
 * minShare of the checked units of the kinds the type applies to) whose `recurringSince` (the
 * moment the minUnits-th distinct unit got its first such finding) falls within the period.
 * Counted over the whole job (the GC manager's view: companyId null).
 */
import type { Sequelize } from 'sequelize';
import { loadRecurring } from '../services/board';

export interface NewRecurring {
  catalogueItemId: string;
  code: string;
  title: string;
  unitCount: number;
  recurringSince: Date;
}

export async function newRecurring(sequelize: Sequelize, job: { id: string; timeZone: string }, since: Date, now: Date): Promise<NewRecurring[]> {
  const { items } = await loadRecurring(sequelize, { jobId: job.id, timeZone: job.timeZone, companyId: null });
  return items
    .map((r) => ({ catalogueItemId: r.catalogueItemId, code: r.code, title: r.title, unitCount: r.unitCount, recurringSince: new Date(r.recurringSince) }))
    .filter((r) => r.recurringSince.getTime() >= since.getTime() && r.recurringSince.getTime() <= now.getTime());
}
