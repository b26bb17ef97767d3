/**
 * An inspector or the GC manager adds photos of the defect to a finding after logging it, while it
 * is open (shared/findingStatus.ts decideAddPhotos: a returned finding is open again; 409 in any
 * other status). A finding carries at most MAX_PHOTOS_PER_REQUEST photos of the defect (409
 * `photo_limit`, naming how many it may still take). In ONE transaction: the photo rows (claimed
 * from the pending uploads) and a "photo_added" event with the photos and the note. Like a
 * comment, more evidence is no change of the finding: its version stays, so a change someone has
 * open (or queued on a phone) with If-Match is not made stale by a photo.
 *
 * `checkAddPhotosTarget` runs before the body is read: visible (404), role (403), status (409) and
 * room for at least one more photo (409). The transaction checks all of it again under its lock,
 * now knowing how many photos came.
 */
import { QueryTypes } from 'sequelize';
import type { z } from 'zod';
import { decideAddPhotos } from '../../shared/findingStatus';
import { MAX_PHOTOS_PER_REQUEST } from '../../shared/rules/photos';
import type { addFindingPhotosSchema, FindingDetail } from '../../shared/schemas/findings';
import { HttpError } from '../errors';
import { Photo } from '../models';
import { recordFindingEvent } from '../services/findings';
import { refusalError } from '../services/findingStatus';
import { photoRowValues } from '../services/photos';
import type { CommandContext, NewPhotos, ReadContext } from './context';
import { detailOf, lockFinding, visibleFinding } from './findingWrites';

/** Photos of the defect the finding already has (as logged and added; not its fix or re-inspection photos). */
async function defectPhotoCount(ctx: ReadContext, findingId: string): Promise<number> {
  const [row] = await ctx.sequelize.query<{ n: string }>(
    `SELECT count(*) AS n FROM photos WHERE job_id = $1 AND finding_id = $2 AND stage = 'finding'`,
    { bind: [ctx.scope.jobId, findingId], type: QueryTypes.SELECT, transaction: ctx.transaction },
  );
  return Number(row?.n ?? 0);
}

function photoLimit(has: number, adding: number): HttpError {
  const room = Math.max(MAX_PHOTOS_PER_REQUEST - has, 0);
  const message =
    room === 0
      ? `This finding already has ${has} photos, the most a finding carries (${MAX_PHOTOS_PER_REQUEST}).`
      : `This finding has ${has} photos and takes at most ${MAX_PHOTOS_PER_REQUEST}: add ${room} more at most, not ${adding}.`;
  return new HttpError(409, 'photo_limit', message, { photos: message });
}

function refuseUnlessAllowed(status: Parameters<typeof decideAddPhotos>[0], role: Parameters<typeof decideAddPhotos>[1]): void {
  const decision = decideAddPhotos(status, role);
  if (!decision.allowed) throw refusalError(decision);
}

export async function checkAddPhotosTarget(ctx: ReadContext, findingId: string): Promise<void> {
  const finding = await visibleFinding(ctx, findingId);
  refuseUnlessAllowed(finding.status, ctx.actor.role);
  const has = await defectPhotoCount(ctx, finding.id);
  if (has >= MAX_PHOTOS_PER_REQUEST) throw photoLimit(has, 1);
}

export async function addFindingPhotos(
  ctx: CommandContext,
  findingId: string,
  input: z.infer<typeof addFindingPhotosSchema>,
  photos: NewPhotos,
): Promise<FindingDetail> {
  const { transaction, actor } = ctx;
  const finding = await lockFinding(ctx, findingId);
  refuseUnlessAllowed(finding.status, actor.role);
  const has = await defectPhotoCount(ctx, finding.id);
  if (has + photos.stored.length > MAX_PHOTOS_PER_REQUEST) throw photoLimit(has, photos.stored.length);
  const at = ctx.clock();
  await photos.claim(transaction);
  await Photo.bulkCreate(
    photoRowValues(photos.stored, { jobId: finding.jobId, uploadedBy: actor.id, findingId: finding.id }).map((row, i) => ({ ...row, createdAt: new Date(at.getTime() + i) })),
    { transaction },
  );
  await recordFindingEvent(
    {
      findingId: finding.id,
      jobId: finding.jobId,
      actorId: actor.id,
      kind: 'photo_added',
      from: null,
      to: { photoCount: has + photos.stored.length },
      reason: input.note?.trim() || null,
      photoIds: photos.stored.map((p) => p.id),
      at,
    },
    transaction,
  );
  return detailOf(ctx, finding.id);
}
