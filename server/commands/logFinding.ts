/**
 * An inspector or the GC manager logs a finding: its defect type, where it is, the responsible
 * company (the one named, else the one suggested for the type's trade), its severity and due date
 * (the job's days for the severity unless one is named), a measured value checked against the
 * unit's limits, photos, and the plan pin. In ONE transaction: the job's next number, the finding,
 * its photo rows (claimed from the pending uploads), its "logged" event and, for a critical
 * finding, the mail to the company's subcontractors (sent after commit).
 *
 * Everything that can be refused is refused first (`checkNewFinding`), before any photo is stored.
 */
import type { CreateFindingParsed, FindingDetail } from '../../shared/schemas/findings';
import { dueOnFor } from '../../shared/rules/due';
import { DEFECT_TYPE_CHOICE } from '../../shared/schemas/findings/somethingElse';
import { unitKindLabel, type Severity } from '../../shared/words';
import { badRequest, conflict } from '../errors';
import { CatalogueItem, Finding, Level, Photo, Space, Unit, UnitCheck, UnitModel, Walk, type Job } from '../models';
import { companyOnJob, limitResolverFor, measure, nextFindingNumber, recordFindingEvent, suggestCompany, type CompanyRef, type Measurement } from '../services/findings';
import { checkDueOn } from '../services/dueOn';
import { findingDetail } from '../services/findingQueries';
import { photoRowValues } from '../services/photos';
import { otherDefectType } from '../services/somethingElse';
import { noCompanyForTrade } from '../../shared/rules/suggestedCompany';
import { notifyCriticalAssignment, type CommandContext, type NewPhotos, type ReadContext } from './context';
import { detailOf } from './findingWrites';

/** Refuses a body field naming a record the job does not have (400, the field named). */
function refuse(field: string, message: string): never {
  throw badRequest(`${field}: ${message}`, { [field]: message });
}

interface Placement {
  unit: Unit | null;
  spaceId: string | null;
  levelId: string;
}

async function placementOf(jobId: string, body: CreateFindingParsed): Promise<Placement> {
  if (body.unitId) {
    const unit = await Unit.findOne({ where: { id: body.unitId, jobId } });
    if (!unit) refuse('unitId', 'That unit is not on this job.');
    if (body.spaceId && body.spaceId !== unit.spaceId) refuse('spaceId', 'The unit is not in that space.');
    if (body.levelId && body.levelId !== unit.levelId) refuse('levelId', 'The unit is not on that level.');
    return { unit, spaceId: unit.spaceId, levelId: unit.levelId };
  }
  if (body.spaceId) {
    const space = await Space.findOne({ where: { id: body.spaceId, jobId } });
    if (!space) refuse('spaceId', 'That space is not on this job.');
    if (body.levelId && body.levelId !== space.levelId) refuse('levelId', 'The space is not on that level.');
    return { unit: null, spaceId: space.id, levelId: space.levelId };
  }
  const level = await Level.findOne({ where: { id: body.levelId!, jobId } });
  if (!level) refuse('levelId', 'That level is not on this job.');
  return { unit: null, spaceId: null, levelId: level.id };
}

/** A finding that passed every check, ready to be written. */
export interface NewFinding {
  body: CreateFindingParsed;
  /** null for "Something else": body.title and body.trade name the defect. */
  item: CatalogueItem | null;
  place: Placement;
  company: CompanyRef;
  measured: Measurement | null;
  severity: Severity;
  dueOn: string;
  /** The due date is before today, back-dated by a GC manager on purpose (kept in the event). */
  backdated: boolean;
}

/** Every refusal of a new finding (400 naming the field), before any photo is stored. */
export async function checkNewFinding(ctx: ReadContext, job: Job, body: CreateFindingParsed): Promise<NewFinding> {
  const { sequelize } = ctx;
  // "Something else" (no defect type named): the job's other type, made when the finding is written.
  const item = body.catalogueItemId ? await CatalogueItem.findOne({ where: { id: body.catalogueItemId, jobId: job.id, isOther: false } }) : null;
  if (body.catalogueItemId && !item) refuse('catalogueItemId', DEFECT_TYPE_CHOICE);
  if (item?.retiredAt) refuse('catalogueItemId', `${item.code} ${item.title} is retired from this job's catalogue. ${DEFECT_TYPE_CHOICE}`);
  const place = await placementOf(job.id, body);
  if (item && place.unit && !item.unitKinds.includes(place.unit.kind)) {
    refuse('catalogueItemId', `${item.code} ${item.title} does not apply to this unit's kind (${unitKindLabel(place.unit.kind)}). ${DEFECT_TYPE_CHOICE}`);
  }
  const trade = item?.trade ?? body.trade!;
  const company = body.companyId ? await companyOnJob(sequelize, job.id, body.companyId) : await suggestCompany(sequelize, job.id, trade);
  if (!company) {
    if (body.companyId) refuse('companyId', 'That company is not on this job.');
    refuse('companyId', noCompanyForTrade(trade));
  }
  if (body.walkId) {
    const walk = await Walk.findOne({ where: { id: body.walkId, jobId: job.id }, attributes: ['levelId'] });
    if (!walk) refuse('walkId', 'That walk is not on this job.');
    if (walk.levelId !== place.levelId) refuse('walkId', 'That walk is on another level.');
  }
  if (body.unitCheckId) {
    const check = await UnitCheck.findOne({ where: { id: body.unitCheckId, jobId: job.id } });
    if (!check || check.unitId !== place.unit?.id) refuse('unitCheckId', 'That unit check is not of this unit.');
  }
  const model = place.unit?.modelId ? await UnitModel.findOne({ where: { id: place.unit.modelId, jobId: job.id } }) : null;
  const measured = item && body.measuredText ? measure(item, body.measuredText, limitResolverFor(job, model, place.unit), job, 'measuredText') : null;
  // The schema asks "Something else" for its severity: it has no type to take a default from.
  const severity: Severity = body.severity ?? item?.defaultSeverity ?? 'minor';
  const now = ctx.clock();
  // A named date before today counts as overdue at once: only a GC manager may do that, on purpose.
  const backdated = body.dueOn ? checkDueOn('dueOn', { dueOn: body.dueOn, backdated: body.backdated }, ctx.actor.role, job.timeZone, now).backdated : false;
  const dueOn = body.dueOn ?? dueOnFor(job, severity, now);
  return { body, item, place, company, measured, severity, dueOn, backdated };
}

/**
 * A finding id made on the phone is the idempotency of its creation: the same id from the same
 * person on the same job is that finding again (answered as it is now, nothing written); an id
 * that names anything else is refused (409) before anything is checked or stored.
 */
export async function findingAlreadyLogged(ctx: ReadContext, findingId: string): Promise<FindingDetail | null> {
  const found = await Finding.findByPk(findingId, { attributes: ['id', 'jobId', 'loggedBy'] });
  if (!found) return null;
  if (found.jobId !== ctx.scope.jobId || found.loggedBy !== ctx.actor.id) {
    throw conflict('This finding id is already used. Log the finding again to give it a new id.', 'finding_id_taken');
  }
  return findingDetail(ctx.sequelize, ctx.scope, findingId);
}

/** Writes the checked finding with its photos, number, event and mail; returns it as the caller sees it. */
export async function logFinding(ctx: CommandContext, input: NewFinding, photos: NewPhotos): Promise<FindingDetail> {
  const { sequelize, transaction, actor, scope } = ctx;
  const { body, item, place, company, measured, severity, dueOn, backdated } = input;
  const jobId = scope.jobId;
  const type = item ?? (await otherDefectType(jobId, transaction));
  const number = await nextFindingNumber(sequelize, jobId, transaction);
  const finding = await Finding.create(
    {
      ...(body.id ? { id: body.id } : {}),
      jobId,
      number,
      unitId: place.unit?.id ?? null,
      spaceId: place.spaceId,
      levelId: place.levelId,
      catalogueItemId: type.id,
      title: item ? null : body.title!,
      walkId: body.walkId ?? null,
      unitCheckId: body.unitCheckId ?? null,
      severity,
      companyId: company.id,
      dueOn,
      note: body.note ?? '',
      measuredText: measured?.measuredText ?? null,
      measuredValue: measured?.measuredValue ?? null,
      ruleResult: measured?.result ?? null,
      loggedBy: actor.id,
      loggedAt: ctx.clock(),
      pinX: body.pinX ?? null,
      pinY: body.pinY ?? null,
    },
    { transaction },
  );
  if (photos.stored.length > 0) {
    await photos.claim(transaction);
    // Photos keep the order they were sent in: created_at one millisecond apart (the list orders by it).
    const base = finding.loggedAt.getTime();
    await Photo.bulkCreate(
      photoRowValues(photos.stored, { jobId, uploadedBy: actor.id, findingId: finding.id }).map((row, i) => ({ ...row, createdAt: new Date(base + i) })),
      { transaction },
    );
  }
  await recordFindingEvent(
    {
      findingId: finding.id,
      jobId,
      actorId: actor.id,
      kind: 'logged',
      from: null,
      to: {
        status: 'open',
        severity,
        companyId: company.id,
        companyName: company.name,
        dueOn,
        ...(backdated ? { backdated: true } : {}),
        ...(measured ? { measuredText: measured.measuredText, pass: measured.result.pass } : {}),
      },
      photoIds: photos.stored.map((p) => p.id),
      at: finding.loggedAt,
    },
    transaction,
  );
  await notifyCriticalAssignment(ctx, { jobId, findingId: finding.id, companyId: company.id, severity, how: 'logged' });
  return detailOf(ctx, finding.id);
}
