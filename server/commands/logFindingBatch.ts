/**
 * One defect on many units: the same defect type, severity, company, due date and note logged on
 * each unit chosen on one level, each with its own measured value and photo. Every finding goes
 * through the single finding's own check (`checkNewFinding`) and write (`logFinding`), so a batch
 * refuses and records exactly what one-by-one logging would; all of it in the caller's ONE
 * transaction (idempotentPhotoWrite), so either every finding exists or none does.
 */
import type { CreateFindingBatchParsed, CreateFindingParsed, FindingDetail } from '../../shared/schemas/findings';
import { badRequest, HttpError } from '../errors';
import type { Job } from '../models';
import type { StoredPhoto } from '../services/photos';
import type { CommandContext, NewPhotos, ReadContext } from './context';
import { checkNewFinding, logFinding, type NewFinding } from './logFinding';

/** Fields of a single finding's refusal that belong to the unit, not to the whole batch. */
const PER_UNIT_FIELDS = new Set(['unitId', 'levelId', 'spaceId', 'measuredText', 'catalogueItemId', 'unitCheckId']);

/** The single finding's body for the batch's i-th unit. */
function findingBody(batch: CreateFindingBatchParsed, i: number): CreateFindingParsed {
  const unit = batch.units[i]!;
  const measured = unit.measuredText ?? batch.measuredText ?? null;
  return {
    catalogueItemId: batch.catalogueItemId,
    title: batch.title,
    trade: batch.trade,
    unitId: unit.unitId,
    levelId: batch.levelId,
    severity: batch.severity,
    companyId: batch.companyId,
    dueOn: batch.dueOn,
    backdated: batch.backdated,
    note: batch.note,
    measuredText: measured,
    walkId: batch.walkId ?? null,
  };
}

/**
 * Every unit's finding checked before any photo is stored. A refusal names the unit's place in
 * the list (`units.3.measuredText`); one about the shared fields (company, due date) keeps its
 * own name. The first refusal's sentence leads, prefixed with the unit's position.
 */
export async function checkFindingBatch(ctx: ReadContext, job: Job, batch: CreateFindingBatchParsed, photoCount: number): Promise<NewFinding[]> {
  const fields: Record<string, string> = {};
  let first: string | null = null;
  const checked: NewFinding[] = [];
  for (let i = 0; i < batch.units.length; i++) {
    const photo = batch.units[i]!.photo;
    if (photo !== undefined && photo >= photoCount) {
      const message = `There is no photo ${photo + 1} in this request (${photoCount} sent).`;
      fields[`units.${i}.photo`] = message;
      first ??= `units.${i}.photo: ${message}`;
      continue;
    }
    try {
      checked.push(await checkNewFinding(ctx, job, findingBody(batch, i)));
    } catch (err) {
      if (!(err instanceof HttpError) || err.status !== 400) throw err;
      for (const [field, message] of Object.entries(err.fields ?? {})) {
        const key = PER_UNIT_FIELDS.has(field) ? `units.${i}.${field}` : field;
        fields[key] ??= message;
        first ??= `${key}: ${message}`;
      }
      first ??= err.message;
    }
  }
  // A photo no unit names would be stored and belong to nothing.
  const named = new Set(batch.units.map((u) => u.photo));
  for (let p = 0; p < photoCount; p++) {
    if (!named.has(p)) {
      const message = `Photo ${p + 1} is not given to any unit.`;
      fields.photos ??= message;
      first ??= `photos: ${message}`;
    }
  }
  if (first) throw badRequest(first, fields);
  return checked;
}

/** Writes every checked finding with its own photo, in the order of the units; returns them as the caller sees them. */
export async function logFindingBatch(
  ctx: CommandContext,
  batch: CreateFindingBatchParsed,
  checked: readonly NewFinding[],
  photos: NewPhotos,
): Promise<FindingDetail[]> {
  // The request's photos are claimed once for the whole batch; each finding takes its own.
  if (photos.stored.length > 0) await photos.claim(ctx.transaction);
  const claimed = async () => undefined;
  const items: FindingDetail[] = [];
  for (let i = 0; i < checked.length; i++) {
    const index = batch.units[i]!.photo;
    const own: StoredPhoto[] = index === undefined ? [] : [photos.stored[index]!];
    items.push(await logFinding(ctx, checked[i]!, { stored: own, claim: claimed }));
  }
  return items;
}
