/**
 * Findings and their photos.
 * GET  /jobs/:jobId/findings                   every role; a subcontractor sees only their company's findings
 * POST /jobs/:jobId/findings                   inspector, GC manager (Idempotency-Key); JSON, or multipart with
 *                                              a `data` field (the JSON) and up to 10 `photos` → 201 FindingDetail;
 *                                              an optional phone-made `id` (same id again → 200 that finding)
 * POST /jobs/:jobId/findings/batch             inspector, GC manager (Idempotency-Key): one defect on many units of one
 *                                              level, JSON or multipart (`data` + up to 10 `photos`, one per unit at
 *                                              most) → 201 { items }; all or nothing (commands/logFindingBatch.ts)
 * GET  /jobs/:jobId/findings/:findingId        every role (subcontractor: own company, else 404); ETag
 * POST /jobs/:jobId/findings/:findingId/photos inspector, GC manager, while the finding is open (409 otherwise);
 *                                              multipart: `data` {note?} + 1–10 `photos`, at most 10 photos of the
 *                                              defect per finding (409 photo_limit); Idempotency-Key → 201 FindingDetail
 * GET  /jobs/:jobId/photos/:photoId            as the finding it belongs to
 * GET  /jobs/:jobId/photos/:photoId/thumb      as the finding it belongs to; both serve the flattened copy
 *                                              while the photo has marks (routes/photoMarks.ts), `?original=1`
 *                                              the photo as taken
 *
 * The write is server/commands/logFinding.ts. A finding and its photos are saved all or nothing:
 * every refusal first, then the photos are read and re-encoded (any bad file refuses the request
 * before anything is stored), then stored, then the finding, its photo rows and its "logged" event
 * are written in ONE transaction; if that fails, the stored objects are deleted again
 * (services/idempotency.ts idempotentPhotoWrite).
 * Uploads: the policy and the per-user upload rate run before the body is read; the photos go
 * to temporary files, never memory (server/middleware/upload.ts).
 */
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { Router } from 'express';
import type { z } from 'zod';
import {
  addFindingPhotosSchema,
  createFindingBatchSchema,
  createFindingSchema,
  findingListQuerySchema,
  findingParamsSchema,
  FINDINGS_LIST_LIMIT_DEFAULT,
  photoParamsSchema,
} from '../../shared/schemas/findings';
import { addFindingPhotos, checkAddPhotosTarget } from '../commands/addFindingPhotos';
import { checkNewFinding, findingAlreadyLogged, logFinding } from '../commands/logFinding';
import { checkFindingBatch, logFindingBatch } from '../commands/logFindingBatch';
import { contextOf } from '../commands/context';
import { badRequest, notFound } from '../errors';
import { createUploadGuard, photosWithJsonData, uploadedFiles, type UploadGuard } from '../middleware/upload';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { findingDetail, findingFiltersOf, findingListOrder, listFindings, visiblePhoto } from '../services/findingQueries';
import { alreadyAnswered, idempotentPhotoWrite, replayIfAnswered } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { photoServeQuerySchema } from '../../shared/schemas/photoMarks';
import { servedPhoto } from '../services/photoMarks';
import { processPhotos, sendPhoto } from '../services/photos';
import { sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';
import type { ObjectStore } from '../storage/types';

const WRITE_ROLES = ['gc_manager', 'inspector'] as const;

type FindingListQuery = z.infer<typeof findingListQuerySchema>;
type CreateFindingBody = z.infer<typeof createFindingSchema>;
type CreateFindingBatchBody = z.infer<typeof createFindingBatchSchema>;
type FindingParams = z.infer<typeof findingParamsSchema>;
type PhotoParams = z.infer<typeof photoParamsSchema>;
type PhotoServeQuery = z.infer<typeof photoServeQuerySchema>;
type AddFindingPhotosBody = z.infer<typeof addFindingPhotosSchema>;

const NEEDS_PHOTOS = 'Add at least one photo.';

/**
 * Before the body is read: the finding is one the caller sees (404), their role adds photos (403),
 * it is open (409) and has room for another photo (409). A retry of an answered request goes on to
 * its replay.
 */
async function addPhotosTarget(req: Request, _res: Response, next: NextFunction) {
  if (await alreadyAnswered(req)) return next();
  await checkAddPhotosTarget(contextOf(req), valid<FindingParams>(req.valid.params).findingId);
  next();
}

export interface FindingsRouterOptions {
  /** Photo storage (server/storage). */
  store: ObjectStore;
  /** Per-user upload limits and temporary files, shared by every upload route of the app. */
  uploads?: UploadGuard;
  log?: (message: string, err?: unknown) => void;
}

export function findingsRouter(options: FindingsRouterOptions): Router {
  const { store } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const uploads = options.uploads ?? createUploadGuard();
  /** Multipart: photos plus the finding as JSON in `data`; a JSON body (no photos) passes through. */
  const multipartOrJson = photosWithJsonData('finding', 'next', { tempRoot: uploads.tempRoot });
  const router = Router();

  router.get('/jobs/:jobId/findings', policy.jobMember(), validate({ query: findingListQuerySchema }), async (req, res) => {
    const q = valid<FindingListQuery>(req.valid.query);
    const sort = q.sort ?? '-number';
    const page = pageRequest(req, findingListOrder(sort), FINDINGS_LIST_LIMIT_DEFAULT);
    res.json(await listFindings(sequelizeOf(req), req.scope!, findingFiltersOf(q), sort, page));
  });

  router.post('/jobs/:jobId/findings', policy.jobMember(WRITE_ROLES), uploads.rate, multipartOrJson, validate({ body: createFindingSchema }), async (req, res) => {
    const body = valid<CreateFindingBody>(req.valid.body);
    // A retry of a request that already succeeded: replay its answer, store nothing.
    if (await replayIfAnswered(req, res)) return;
    const ctx = contextOf(req);
    // A phone-made id sent again (its first answer lost, its key gone): that finding, once.
    const same = body.id ? await findingAlreadyLogged(ctx, body.id) : null;
    if (same) {
      setEtag(res, same.version);
      res.status(200).json(same);
      return;
    }
    // Everything that can be refused is refused before any photo is stored.
    const checked = await checkNewFinding(ctx, req.membership!.job, body);
    const files = uploadedFiles(req);
    const processed = files.length > 0 ? await processPhotos(files, { charge: (pixels) => uploads.chargePixels(ctx.actor.id, pixels) }) : [];
    await idempotentPhotoWrite(req, res, { store, processed, log, what: 'of a replayed request' }, async (transaction, photos) => {
      const detail = await logFinding({ ...ctx, transaction }, checked, photos);
      setEtag(res, detail.version);
      return { status: 201, body: detail };
    });
  });

  router.post('/jobs/:jobId/findings/batch', policy.jobMember(WRITE_ROLES), uploads.rate, multipartOrJson, validate({ body: createFindingBatchSchema }), async (req, res) => {
    const body = valid<CreateFindingBatchBody>(req.valid.body);
    if (await replayIfAnswered(req, res)) return;
    const ctx = contextOf(req);
    const files = uploadedFiles(req);
    // Every unit's finding is checked before any photo is stored, as for one finding.
    const checked = await checkFindingBatch(ctx, req.membership!.job, body, files.length);
    const processed = files.length > 0 ? await processPhotos(files, { charge: (pixels) => uploads.chargePixels(ctx.actor.id, pixels) }) : [];
    await idempotentPhotoWrite(req, res, { store, processed, log, what: 'of a replayed batch of findings' }, async (transaction, photos) => {
      const items = await logFindingBatch({ ...ctx, transaction }, body, checked, photos);
      return { status: 201, body: { items } };
    });
  });

  router.get('/jobs/:jobId/findings/:findingId', policy.jobMember(), validate({ params: findingParamsSchema }), async (req, res) => {
    const { findingId } = valid<FindingParams>(req.valid.params);
    const detail = await findingDetail(sequelizeOf(req), req.scope!, findingId);
    if (!detail) throw notFound('Finding not found.');
    setEtag(res, detail.version);
    res.json(detail);
  });

  router.post(
    '/jobs/:jobId/findings/:findingId/photos',
    policy.jobMember(WRITE_ROLES),
    validate({ params: findingParamsSchema }),
    uploads.rate,
    addPhotosTarget,
    photosWithJsonData('finding\'s photos', () => badRequest(`photos: ${NEEDS_PHOTOS} Send multipart/form-data with "data" and "photos".`, { photos: NEEDS_PHOTOS }), {
      tempRoot: uploads.tempRoot,
    }),
    validate({ body: addFindingPhotosSchema }),
    async (req, res) => {
      const { findingId } = valid<FindingParams>(req.valid.params);
      const body = valid<AddFindingPhotosBody>(req.valid.body);
      if (await replayIfAnswered(req, res)) return;
      const files = uploadedFiles(req);
      if (files.length === 0) throw badRequest(`photos: ${NEEDS_PHOTOS}`, { photos: NEEDS_PHOTOS });
      const ctx = contextOf(req);
      const processed = await processPhotos(files, { charge: (pixels) => uploads.chargePixels(ctx.actor.id, pixels) });
      await idempotentPhotoWrite(req, res, { store, processed, log, what: 'of a replayed photo upload' }, async (transaction, photos) => {
        const detail = await addFindingPhotos({ ...ctx, transaction }, findingId, body, photos);
        setEtag(res, detail.version);
        return { status: 201, body: detail };
      });
    },
  );

  const servePhoto = (variant: 'full' | 'thumb'): RequestHandler => async (req, res) => {
    const { photoId } = valid<PhotoParams>(req.valid.params);
    const photo = await visiblePhoto(sequelizeOf(req), req.scope!, photoId);
    if (!photo) throw notFound('Photo not found.');
    // With marks, the flattened copy; `?original=1` the photo as taken (services/photoMarks.ts).
    if (valid<PhotoServeQuery>(req.valid.query).original) return sendPhoto(store, res, photo, variant);
    const served = await servedPhoto(sequelizeOf(req), photo);
    await sendPhoto(store, res, served.photo, variant, { etag: served.etag });
  };
  const photoValidation = validate({ params: photoParamsSchema, query: photoServeQuerySchema });
  router.get('/jobs/:jobId/photos/:photoId', policy.jobMember(), photoValidation, servePhoto('full'));
  router.get('/jobs/:jobId/photos/:photoId/thumb', policy.jobMember(), photoValidation, servePhoto('thumb'));

  return router;
}
