/**
 * The responsible company (or the GC manager) says a finding is fixed: a note, 1–10 photos and, for
 * a measured defect, the new measurement (services/findings.ts fixMeasurement: required when the
 * finding was logged with a measured value; judged by the same rule and limit). In ONE transaction:
 * the fix, its photo rows (claimed from the pending uploads), the finding's
 * status (open → fix submitted) and version, and the "fix_submitted" event.
 *
 * `checkFixTarget` runs before the photos are read: the finding must be one the caller sees (404)
 * and may submit a fix for now (403 / 409). The transaction checks both again under its lock.
 */
import type { z } from 'zod';
import type { FixDetail, submitFixSchema } from '../../shared/schemas/findings';
import { decide } from '../../shared/findingStatus';
import { Finding, Fix, Photo } from '../models';
import { fixDto } from '../services/correction';
import { fixMeasurement, measurementEventFields, recordFindingEvent } from '../services/findings';
import { assertAllowed } from '../services/findingStatus';
import { photoRowValues } from '../services/photos';
import type { CommandContext, NewPhotos, ReadContext } from './context';
import { authorise, detailOf, lockFinding, saveChange, visibleFinding } from './findingWrites';

export async function checkFixTarget(ctx: ReadContext, findingId: string): Promise<void> {
  const finding = await visibleFinding(ctx, findingId);
  assertAllowed(finding.status, 'submit_fix', ctx.actor.role, finding.loggedBy === ctx.actor.id);
}

export type FixMeasurement = Awaited<ReturnType<typeof fixMeasurement>>;

/** After the body is read, before any photo is stored: the new measurement (400 `measuredText` when missing or unreadable). */
export async function checkFixMeasurement(ctx: ReadContext, findingId: string, input: z.infer<typeof submitFixSchema>): Promise<FixMeasurement> {
  const finding = await Finding.findOne({
    where: { id: findingId, jobId: ctx.scope.jobId },
    attributes: ['jobId', 'catalogueItemId', 'unitId', 'ruleResult', 'measuredText'],
  });
  if (!finding) return null; // gone since the target check: the transaction answers 404
  return fixMeasurement(finding, input.measuredText);
}

export async function submitFix(
  ctx: CommandContext,
  findingId: string,
  input: z.infer<typeof submitFixSchema>,
  photos: NewPhotos,
  measured: FixMeasurement = null,
): Promise<FixDetail> {
  const { transaction, actor, scope } = ctx;
  const finding = await lockFinding(ctx, findingId);
  const to = await authorise(ctx, finding, decide(finding.status, 'submit_fix', actor.role, finding.loggedBy === actor.id), { ifMatch: null });
  const at = ctx.clock();
  const fix = await Fix.create(
    {
      jobId: scope.jobId,
      findingId: finding.id,
      submittedBy: actor.id,
      note: input.note.trim(),
      submittedAt: at,
      measuredText: measured?.measuredText ?? null,
      measuredValue: measured?.measuredValue ?? null,
      ruleResult: measured?.result ?? null,
    },
    { transaction },
  );
  await photos.claim(transaction);
  await Photo.bulkCreate(
    photoRowValues(photos.stored, { jobId: scope.jobId, uploadedBy: actor.id, fixId: fix.id }).map((row, i) => ({ ...row, createdAt: new Date(at.getTime() + i) })),
    { transaction },
  );
  const from = finding.status;
  finding.status = to;
  await saveChange(ctx, finding);
  await recordFindingEvent(
    {
      findingId: finding.id,
      jobId: scope.jobId,
      actorId: actor.id,
      kind: 'fix_submitted',
      from: { status: from },
      to: { status: to, fixId: fix.id, note: fix.note, ...measurementEventFields(measured) },
      photoIds: photos.stored.map((p) => p.id),
      at,
    },
    transaction,
  );
  const detail = await detailOf(ctx, finding.id);
  const fixBody = await fixDto(ctx.sequelize, scope.jobId, fix.id, transaction);
  if (!fixBody) throw new Error('a fix written in this transaction was not read back');
  return { fix: fixBody, finding: detail };
}
