/**
 * The demo job's sampling audits: one finished and accepted, one in progress. Both are planned by
 * the same command as a planned audit (commands/planAudit.ts) with fixed seeds, so every demo
 * database draws the same units; their results are unit checks made after they started, as the
 * inspector would record them (every applicable item marked: defect where the unit still has an
 * unresolved finding on the item, ok otherwise; no new findings). Only when the job has no audits.
 *
 * - Audit 1 (accepted): the tiered 10 percent practice on every unit of Level 2, started 6 days ago,
 *   the first tier re-checked 5 days ago without a new defect.
 * - Audit 2 (in progress): Z1.4 level II on the four-way cassettes of Levels 3 to 5 (critical none
 *   allowed, major AQL 1.0, minor AQL 4.0), started yesterday, the first six sampled units checked.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { planAudit } from '../commands/planAudit';
import { Audit, UnitCheck, UnitCheckItem } from '../models';

const DAY = 24 * 60 * 60 * 1000;

export async function seedDemoAudits(db: Database, jobId: string, users: { gc: string; inspector: string }, transaction: Transaction): Promise<boolean> {
  const sequelize = db.sequelize;
  if ((await Audit.count({ where: { jobId }, transaction })) > 0) return false;
  const levels = await sequelize.query<{ id: string; name: string }>(`SELECT id, name FROM levels WHERE job_id = $1 ORDER BY position`, {
    bind: [jobId],
    type: QueryTypes.SELECT,
    transaction,
  });
  const byName = new Map(levels.map((l) => [l.name, l.id]));
  const level2 = byName.get('Level 2');
  const upper = ['Level 3', 'Level 4', 'Level 5'].map((n) => byName.get(n)).filter((id): id is string => !!id);
  if (!level2 || upper.length === 0) return false;
  const now = Date.now();

  /** A complete re-check of a unit at `at`: every applicable item marked, unresolved findings' items as defects. */
  async function recheck(unitId: string, at: Date) {
    const items = await sequelize.query<{ id: string; defect: boolean }>(
      `SELECT ci.id, EXISTS (SELECT 1 FROM findings f WHERE f.unit_id = u.id AND f.catalogue_item_id = ci.id AND f.status IN ('open', 'fix_submitted')) AS defect
         FROM units u JOIN catalogue_items ci ON ci.job_id = u.job_id AND u.kind = ANY (ci.unit_kinds)
        WHERE u.id = $1 AND ci.retired_at IS NULL AND NOT ci.is_other
        ORDER BY ci.position, ci.code`,
      { bind: [unitId], type: QueryTypes.SELECT, transaction },
    );
    const check = await UnitCheck.create({ jobId, unitId, walkId: null, checkedBy: users.inspector, checkedAt: at, complete: true }, { transaction });
    await UnitCheckItem.bulkCreate(
      items.map((it, position) => ({ unitCheckId: check.id, catalogueItemId: it.id, mark: it.defect ? ('defect' as const) : ('ok' as const), measuredText: null, measuredValue: null, result: null, position })),
      { transaction },
    );
  }

  const accepted = await planAudit(
    { sequelize, transaction, jobId, actorId: users.gc, clock: () => new Date(now - 6 * DAY) },
    { name: 'Level 2, every unit: tiered spot check', scheme: 'tiered', inspectionLevel: 'II', classes: { critical: 'zero', major: '1.0', minor: '4.0' }, lot: { levelIds: [level2] }, seed: 'demo-level-2' },
  );
  for (const [i, s] of accepted.sample.filter((u) => u.tier === 1).entries()) await recheck(s.unitId, new Date(now - 5 * DAY + i * 12 * 60 * 1000));

  const running = await planAudit(
    { sequelize, transaction, jobId, actorId: users.inspector, clock: () => new Date(now - DAY) },
    {
      name: 'Four-way cassettes, Levels 3 to 5',
      scheme: 'z14',
      inspectionLevel: 'II',
      classes: { critical: 'zero', major: '1.0', minor: '4.0' },
      lot: { levelIds: upper, kinds: ['cassette_4way'] },
      seed: 'demo-cassettes-3-5',
    },
  );
  for (const [i, s] of running.sample.slice(0, 6).entries()) await recheck(s.unitId, new Date(now - DAY + (i + 1) * 15 * 60 * 1000));
  return true;
}
