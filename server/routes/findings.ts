/**
 * Findings and their photos.
 * GET  /jobs/:jobId/findings                   every role; a subcontractor sees only their company's findings
 * POST /jobs/:jobId/findings                   inspector, GC manager (Idempotency-Key); JSON, or multipart with
 *                                              a `data` field (the JSON) and up to 10 `photos` → 201 FindingDetail
 * GET  /jobs/:jobId/findings/:findingId        every role (subcontractor: own company, else 404); ETag
 * GET  /jobs/:jobId/photos/:photoId            as the finding it belongs to
 * GET  /jobs/:jobId/photos/:photoId/thumb      as the finding it belongs to
 *
 * A finding and its photos are saved all or nothing: the photos are read and re-encoded first
 * (any bad file refuses the request before anything is stored), then stored, then the finding,
 * its photo rows and its "logged" event are written in ONE transaction; if that fails, the
 * stored objects are deleted again (server/services/photos.ts withStoredPhotos).
 * Uploads: the policy and the per-user upload rate run before the body is read; the photos go
 * to temporary files, never memory (server/middleware/upload.ts).
 */
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { Router } from 'express';
import { QueryTypes } from 'sequelize';
import {
  createFindingSchema,
  findingListQuerySchema,
  findingParamsSchema,
  FINDINGS_LIST_LIMIT_DEFAULT,
  photoParamsSchema,
  type CreateFindingParsed,
  type FindingListQueryParsed,
} from '../../shared/schemas/findings';
import type { Severity } from '../../shared/words';
import { badRequest, notFound } from '../errors';
import { createUploadGuard, photosWithJsonData, uploadedFiles, type UploadGuard } from '../middleware/upload';
import { valid, validate, zodFieldErrors } from '../middleware/validate';
import { CatalogueItem, Finding, Level, Photo, Space, Unit, UnitCheck, UnitModel } from '../models';
import { policy } from '../policies';
import { companyOnJob, dueOnFor, limitResolverFor, measure, nextFindingNumber, recordFindingEvent, suggestCompany } from '../services/findings';
import { findingDetail, findingFiltersOf, findingListOrder, listFindings, visiblePhoto } from '../services/findingQueries';
import { notifyCriticalAssignment } from '../digests/events';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { pendingUploads } from '../services/pendingUploads';
import { discardStoredPhotos, keysOf, photoRowValues, processPhotos, sendPhoto, withStoredPhotos, type ProcessedPhoto } from '../services/photos';
import { sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';
import type { ObjectStore } from '../storage/types';

const WRITE_ROLES = ['gc_manager', 'inspector'] as const;

export interface FindingsRouterOptions {
  /** Photo storage (server/storage). */
  store: ObjectStore;
  /** Per-user upload limits and temporary files, shared by every upload route of the app. */
  uploads?: UploadGuard;
  log?: (message: string, err?: unknown) => void;
}

/** Validates the body after multipartOrJson and keeps the original for the idempotency fingerprint. */
function validateFindingBody(req: Request, _res: Response, next: NextFunction) {
  const result = createFindingSchema.safeParse(req.body ?? {});
  req.valid ??= {};
  if (!result.success) {
    const fields = zodFieldErrors(result.error);
    const first = Object.entries(fields)[0]!;
    return next(badRequest(`${first[0]}: ${first[1]}`, fields));
  }
  req.valid.body = result.data;
  next();
}

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

/** True when this user already holds a finished answer under the request's Idempotency-Key. */
async function alreadyAnswered(req: Request): Promise<boolean> {
  const key = req.get('idempotency-key');
  if (!key || !req.user) return false;
  const rows = await sequelizeOf(req).query<{ n: number }>(
    `SELECT 1 AS n FROM idempotency_keys WHERE user_id = $1 AND key = $2 AND response_status <> 0`,
    { bind: [req.user.id, key], type: QueryTypes.SELECT },
  );
  return rows.length > 0;
}

export function findingsRouter(options: FindingsRouterOptions): Router {
  const { store } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const uploads = options.uploads ?? createUploadGuard();
  /** Multipart: photos plus the finding as JSON in `data`; a JSON body (no photos) passes through. */
  const multipartOrJson = photosWithJsonData('finding', 'next', { tempRoot: uploads.tempRoot });
  const router = Router();

  router.get(
    '/jobs/:jobId/findings',
    policy.jobMember(),
    validate({ query: findingListQuerySchema }),
    async (req, res) => {
      const q = valid<FindingListQueryParsed>(req.valid.query);
      const sort = q.sort ?? '-number';
      const page = pageRequest(req, findingListOrder(sort), FINDINGS_LIST_LIMIT_DEFAULT);
      const body = await listFindings(sequelizeOf(req), req.scope!, findingFiltersOf(q), sort, page);
      res.json(body);
    },
  );

  router.post('/jobs/:jobId/findings', policy.jobMember(WRITE_ROLES), uploads.rate, multipartOrJson, validateFindingBody, async (req, res) => {
    const body = valid<CreateFindingParsed>(req.valid.body);
    const { job } = req.membership!;
    const user = req.user!;
    const sequelize = sequelizeOf(req);
    const files = uploadedFiles(req);

    // A retry of a request that already succeeded: replay its answer, store nothing.
    if (await alreadyAnswered(req)) {
      await idempotentWrite(req, res, async () => {
        throw badRequest('This request was already answered.');
      });
      return;
    }

    // Everything that can be refused is refused before any photo is stored.
    const item = await CatalogueItem.findOne({ where: { id: body.catalogueItemId, jobId: job.id } });
    if (!item) refuse('catalogueItemId', 'Not a defect type of this job.');
    if (item.retiredAt) refuse('catalogueItemId', `${item.code} ${item.title} is retired from this job's catalogue.`);
    const place = await placementOf(job.id, body);
    if (place.unit && !item.unitKinds.includes(place.unit.kind)) {
      refuse('catalogueItemId', `${item.code} ${item.title} does not apply to this unit's kind (${place.unit.kind}).`);
    }
    const company = body.companyId
      ? await companyOnJob(sequelize, job.id, body.companyId)
      : await suggestCompany(sequelize, job.id, item.trade);
    if (!company) {
      if (body.companyId) refuse('companyId', 'That company is not on this job.');
      refuse('companyId', `No company on this job covers the ${item.trade} trade; choose the responsible company.`);
    }
    if (body.walkId) {
      const walk = await sequelize.query<{ level_id: string }>(`SELECT level_id FROM walks WHERE id = $1 AND job_id = $2`, {
        bind: [body.walkId, job.id],
        type: QueryTypes.SELECT,
      });
      if (!walk[0]) refuse('walkId', 'That walk is not on this job.');
      if (walk[0].level_id !== place.levelId) refuse('walkId', 'That walk is on another level.');
    }
    if (body.unitCheckId) {
      const check = await UnitCheck.findOne({ where: { id: body.unitCheckId, jobId: job.id } });
      if (!check || check.unitId !== place.unit?.id) refuse('unitCheckId', 'That unit check is not of this unit.');
    }
    const model = place.unit?.modelId ? await UnitModel.findOne({ where: { id: place.unit.modelId, jobId: job.id } }) : null;
    const measured = body.measuredText ? measure(item, body.measuredText, limitResolverFor(job, model), job, 'measuredText') : null;
    const severity: Severity = body.severity ?? item.defaultSeverity;
    const dueOn = body.dueOn ?? dueOnFor(job, severity);

    const processed: ProcessedPhoto[] =
      files.length > 0 ? await processPhotos(files, { charge: (pixels) => uploads.chargePixels(user.id, pixels) }) : [];
    const pending = pendingUploads(sequelize);
    await withStoredPhotos(
      store,
      processed,
      async (stored, claim) => {
        await idempotentWrite(req, res, async (transaction) => {
          const number = await nextFindingNumber(sequelize, job.id, transaction);
          const finding = await Finding.create(
            {
              jobId: job.id,
              number,
              unitId: place.unit?.id ?? null,
              spaceId: place.spaceId,
              levelId: place.levelId,
              catalogueItemId: item.id,
              walkId: body.walkId ?? null,
              unitCheckId: body.unitCheckId ?? null,
              severity,
              companyId: company.id,
              dueOn,
              note: body.note ?? '',
              measuredText: measured?.measuredText ?? null,
              measuredValue: measured?.measuredValue ?? null,
              ruleResult: measured?.result ?? null,
              loggedBy: user.id,
              loggedAt: new Date(),
              pinX: body.pinX ?? null,
              pinY: body.pinY ?? null,
            },
            { transaction },
          );
          if (stored.length > 0) {
            await claim(transaction);
            // Photos keep the order they were sent in: created_at one millisecond apart (the list orders by it).
            const base = finding.loggedAt.getTime();
            await Photo.bulkCreate(
              photoRowValues(stored, { jobId: job.id, uploadedBy: user.id, findingId: finding.id }).map((row, i) => ({
                ...row,
                createdAt: new Date(base + i),
              })),
              { transaction },
            );
          }
          await recordFindingEvent(
            {
              findingId: finding.id,
              jobId: job.id,
              actorId: user.id,
              kind: 'logged',
              from: null,
              to: {
                status: 'open',
                severity,
                companyId: company.id,
                companyName: company.name,
                dueOn,
                ...(measured ? { measuredText: measured.measuredText, pass: measured.result.pass } : {}),
              },
              photoIds: stored.map((p) => p.id),
              at: finding.loggedAt,
            },
            transaction,
          );
          await notifyCriticalAssignment(req, transaction, { jobId: job.id, findingId: finding.id, companyId: company.id, severity, how: 'logged' });
          const detail = await findingDetail(sequelize, req.scope!, finding.id, transaction);
          setEtag(res, finding.version);
          return { status: 201, body: detail };
        });
        // Lost a race with an identical retry: the first request's answer was replayed, so
        // the photos stored by this one are referenced by nothing.
        if (res.get('Idempotent-Replayed') === 'true' && stored.length > 0) {
          await discardStoredPhotos(store, keysOf(stored), { pending, log }, 'of a replayed request');
        }
      },
      { pending, log },
    );
  });

  router.get('/jobs/:jobId/findings/:findingId', policy.jobMember(), validate({ params: findingParamsSchema }), async (req, res) => {
    const { findingId } = valid<{ findingId: string }>(req.valid.params);
    const detail = await findingDetail(sequelizeOf(req), req.scope!, findingId);
    if (!detail) throw notFound('Finding not found.');
    setEtag(res, detail.version);
    res.json(detail);
  });

  const servePhoto = (variant: 'full' | 'thumb'): RequestHandler => async (req, res) => {
    const { photoId } = valid<{ photoId: string }>(req.valid.params);
    const photo = await visiblePhoto(sequelizeOf(req), req.scope!, photoId);
    if (!photo) throw notFound('Photo not found.');
    await sendPhoto(store, res, photo, variant);
  };
  router.get('/jobs/:jobId/photos/:photoId', policy.jobMember(), validate({ params: photoParamsSchema }), servePhoto('full'));
  router.get('/jobs/:jobId/photos/:photoId/thumb', policy.jobMember(), validate({ params: photoParamsSchema }), servePhoto('thumb'));

  return router;
}
