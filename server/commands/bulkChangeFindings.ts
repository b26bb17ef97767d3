/**
 * One change to many findings at once (GC manager, inspector): reassign or a due date, all or
 * nothing in ONE transaction. It runs the single-finding steps of changeFinding.ts: the same
 * checks, events and mails. Differences, on purpose: every finding is checked before any is
 * changed (404 listing the ids not on the job, 409 listing the findings whose status refuses);
 * the change's input is read once for all; a finding already as asked is left as it is (no
 * event, no new version) instead of refusing the whole batch; no If-Match (the caller chose the
 * findings from a list, not from one version of each).
 */
import type { z } from 'zod';
import type { bulkChangeSchema, FindingDto } from '../../shared/schemas/findings';
import { HttpError } from '../errors';
import { Finding } from '../models';
import { findingsByIds } from '../services/findingQueries';
import type { CommandContext } from './context';
import { CHANGE_STEPS, changeKindOf } from './changeFinding';
import { saveChange } from './findingWrites';

export type BulkChange = z.infer<typeof bulkChangeSchema>;

export async function bulkChangeFindings(ctx: CommandContext, input: BulkChange): Promise<{ items: FindingDto[] }> {
  const { transaction, scope, actor } = ctx;
  const kind = changeKindOf(input.change);
  const step = CHANGE_STEPS[kind];
  const value = input.change[kind as keyof BulkChange['change']];
  const field = `change.${kind}`;

  const rows = await Finding.findAll({ where: { jobId: scope.jobId, id: input.findingIds }, order: [['id', 'ASC']], transaction, lock: transaction.LOCK.UPDATE });
  const found = new Set(rows.map((r) => r.id));
  const missing = input.findingIds.filter((id) => !found.has(id));
  if (missing.length > 0) {
    throw new HttpError(404, 'not_found', `Not found on this job: ${missing.join(', ')}. Nothing was changed.`, { findingIds: missing.join(',') });
  }
  const decisions = rows.map((r) => ({ finding: r, decision: step.decide(r, actor) }));
  const refused = decisions.filter((d) => !d.decision.allowed).map((d) => d.finding);
  if (refused.length > 0) {
    const labels = refused.map((r) => `#${r.number} (${r.status.replace('_', ' ')})`).join(', ');
    throw new HttpError(409, 'invalid_transition', `These findings cannot be changed now: ${labels}. Nothing was changed.`, {
      findingIds: refused.map((r) => r.id).join(','),
    });
  }
  const ready = await step.prepare(ctx, value, field);
  for (const { finding, decision } of decisions) {
    if (!decision.allowed) continue; // refused above
    if (!(await step.apply(ctx, finding, ready, decision.to))) continue;
    await saveChange(ctx, finding);
    await step.after?.(ctx, finding);
  }
  return { items: await findingsByIds(ctx.sequelize, scope, input.findingIds, transaction) };
}
