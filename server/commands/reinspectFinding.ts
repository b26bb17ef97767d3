/**
 * An inspector or the GC manager re-inspects a submitted fix: accept (→ closed) or return (→ open,
 * return count + 1, a reason, and a new due date: today on the job's clock + the job's days for the
 * finding's severity, kept in the "returned" event as from/to dueOn), with their own photos and, for a measured defect, their own new
 * measurement if they take one (judged by the same rule and limit as the finding as logged).
 * If-Match; in ONE transaction with its photo rows (stage `reinspection`) and its "accepted" /
 * "returned" event, which carries the photos and the measurement.
 *
 * Accepting is refused (409 `measurement_fails`) while the latest new measurement fails the rule:
 * the inspector's own when they took one, else the latest fix's. The body is valid either way (a
 * failing value is worth recording, and returning the fix with it is how it is used); what is
 * refused is closing a finding against its own evidence, a conflict with the finding's state like
 * the other status rules. Returning the fix is never refused for it.
 *
 * `checkReinspectTarget` runs before an upload's body is read: the finding is one the caller sees
 * (404), their role may re-inspect (403), and a fix is waiting (409).
 */
import type { z } from 'zod';
import { decide } from '../../shared/findingStatus';
import type { FindingDetail, reinspectionSchema } from '../../shared/schemas/findings';
import { conflict } from '../errors';
import { daysToFix, dueOnFor } from '../../shared/rules/due';
import { Fix, Job, Photo } from '../models';
import { measurementEventFields, recordFindingEvent, remeasure } from '../services/findings';
import { assertAllowed } from '../services/findingStatus';
import { photoRowValues } from '../services/photos';
import type { CommandContext, NewPhotos, ReadContext } from './context';
import { authorise, detailOf, lockFinding, saveChange, visibleFinding, type Precondition } from './findingWrites';

type ReinspectionBody = z.infer<typeof reinspectionSchema>;

export async function checkReinspectTarget(ctx: ReadContext, findingId: string): Promise<void> {
  const finding = await visibleFinding(ctx, findingId);
  assertAllowed(finding.status, 'accept', ctx.actor.role, finding.loggedBy === ctx.actor.id);
}

const NO_PHOTOS: NewPhotos = { stored: [], claim: async () => undefined };

export async function reinspectFinding(
  ctx: CommandContext,
  findingId: string,
  input: ReinspectionBody,
  pre: Precondition,
  photos: NewPhotos = NO_PHOTOS,
): Promise<FindingDetail> {
  const { actor, transaction } = ctx;
  const finding = await lockFinding(ctx, findingId);
  const to = await authorise(ctx, finding, decide(finding.status, input.verdict, actor.role, finding.loggedBy === actor.id), pre);
  const measured = input.measuredText ? await remeasure(finding, input.measuredText, 'measuredText', transaction) : null;
  if (input.verdict === 'accept') {
    const latestFix = measured
      ? null
      : await Fix.findOne({ where: { findingId: finding.id, jobId: finding.jobId }, order: [['submittedAt', 'DESC'], ['id', 'DESC']], transaction });
    const failing = measured ? (measured.result.pass === false ? measured.measuredText : null) : latestFix?.ruleResult?.pass === false ? latestFix.measuredText : null;
    if (failing !== null) {
      const whose = measured ? 'Your new measurement' : 'The fix’s new measurement';
      throw conflict(`${whose} (${failing}) is outside the limit, so this finding cannot be closed: return the fix, or measure again.`, 'measurement_fails');
    }
  }
  const at = ctx.clock();
  const from: Record<string, unknown> = { status: finding.status, returnCount: finding.returnCount };
  const after: Record<string, unknown> = {};
  if (input.verdict === 'return') {
    // The company gets the job's days for the severity again, counted from today on the job's
    // clock: the old date has usually passed while the fix waited for the inspector.
    const job = await Job.findByPk(finding.jobId, { attributes: ['id', 'timeZone', 'severityDueDays'], transaction });
    const dueOn = dueOnFor({ timeZone: job?.timeZone ?? ctx.scope.timeZone, severityDueDays: job?.severityDueDays }, finding.severity, at);
    from.dueOn = finding.dueOn;
    after.dueOn = dueOn;
    after.daysToFix = daysToFix({ severityDueDays: job?.severityDueDays }, finding.severity);
    finding.returnCount += 1;
    finding.dueOn = dueOn;
  }
  finding.status = to;
  await saveChange(ctx, finding);
  if (photos.stored.length > 0) {
    await photos.claim(transaction);
    await Photo.bulkCreate(
      photoRowValues(photos.stored, { jobId: finding.jobId, uploadedBy: actor.id, findingId: finding.id, stage: 'reinspection' }).map((row, i) => ({
        ...row,
        createdAt: new Date(at.getTime() + i),
      })),
      { transaction },
    );
  }
  await recordFindingEvent(
    {
      findingId: finding.id,
      jobId: finding.jobId,
      actorId: actor.id,
      kind: input.verdict === 'accept' ? 'accepted' : 'returned',
      from,
      to: { status: to, returnCount: finding.returnCount, ...after, ...measurementEventFields(measured) },
      reason: input.reason || null,
      photoIds: photos.stored.map((p) => p.id),
      at,
    },
    transaction,
  );
  return detailOf(ctx, finding.id);
}
