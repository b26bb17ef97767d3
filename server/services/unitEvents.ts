/**
 * unit_events: the append-only history of a unit's ceiling exclusion (a trigger refuses UPDATE,
 * DELETE and TRUNCATE). Written by the ceiling-exclusion commands and by a unit change that ends
 * an exclusion (services/units.ts changeUnit), always in the write's own transaction.
 */
import type { Transaction } from 'sequelize';
import { Unit } from '../models';

export type UnitEventKind = 'ceiling_excluded' | 'ceiling_exclusion_lifted';

export async function recordUnitEvent(
  transaction: Transaction,
  event: { jobId: string; unitId: string; actorId: string; kind: UnitEventKind; reason: string | null; at: Date },
): Promise<void> {
  await Unit.sequelize!.query(
    `INSERT INTO unit_events (id, job_id, unit_id, actor_id, at, kind, reason) VALUES (gen_random_uuid(), $1, $2, $3, $4, $5, $6)`,
    { bind: [event.jobId, event.unitId, event.actorId, event.at, event.kind, event.reason], transaction },
  );
}
