/**
 * The correction loop: fixes, re-inspections, changes, comments, bulk, inbox, queue. Paths under /api/jobs/:jobId/findings/:findingId unless said.
 * POST  /fixes              subcontractor (their company's finding), GC manager; multipart: `data` {note, measuredText?} + 1–10
 *                           `photos`; Idempotency-Key → 201 FixDetail (finding ETag)
 * POST  /reinspections      inspector, GC manager; {verdict, reason, measuredText?} as JSON, or multipart with it in
 *                           `data` and up to 10 `photos` (the inspector's own); If-Match; Idempotency-Key → 200
 *                           FindingDetail; accepting while the new measurement fails the rule → 409 measurement_fails
 * PATCH (the finding)       one change (reassign | severity | dueOn | void | reopen | close | pin); If-Match → 200 FindingDetail
 *                           (a voided finding takes no pin: 409)
 * GET   /events             everyone who sees the finding → { items: FindingEventDto[] }
 * GET   /comments           everyone who sees the finding → { items } (events of kind 'comment')
 * POST  /comments           everyone who sees the finding; Idempotency-Key → 201 FindingEventDto
 * POST  /api/jobs/:jobId/findings/bulk          GC manager, inspector; all or nothing → 200 { items }
 * GET   /api/jobs/:jobId/reinspections/queue    GC manager, inspector → ReinspectionQueueResponse
 * GET   /api/inbox                               subcontractors (403 for a user who is no job's subcontractor)
 *
 * The writes are commands (server/commands: submitFix, reinspectFinding, changeFinding,
 * bulkChangeFindings, commentOnFinding); this file parses, authorises by policy, calls one and
 * presents its answer. Who may do what and from which status is decided ONLY in
 * shared/findingStatus.ts. Every change locks the finding (SELECT ... FOR UPDATE), checks If-Match
 * where required, writes its event in the same transaction, and raises the version (comments do
 * not: they are not a change of the finding).
 */
import type { NextFunction, Request, Response } from 'express';
import { Router } from 'express';
import type { z } from 'zod';
import {
  bulkChangeSchema,
  commentSchema,
  findingChangeSchema,
  findingParamsSchema,
  inboxQuerySchema,
  reinspectionSchema,
  submitFixSchema,
} from '../../shared/schemas/findings';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { bulkChangeFindings } from '../commands/bulkChangeFindings';
import { changeFinding } from '../commands/changeFinding';
import { commentOnFinding } from '../commands/commentOnFinding';
import { contextOf } from '../commands/context';
import { checkReinspectTarget, reinspectFinding } from '../commands/reinspectFinding';
import { checkFixMeasurement, checkFixTarget, submitFix } from '../commands/submitFix';
import { badRequest, forbidden, notFound } from '../errors';
import { createUploadGuard, photosWithJsonData, uploadedFiles, type UploadGuard } from '../middleware/upload';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { inbox, isSubcontractorAnywhere, reinspectionQueue } from '../services/correction';
import { findingDetail } from '../services/findingQueries';
import { alreadyAnswered, idempotentPhotoWrite, idempotentWrite, replayIfAnswered } from '../services/idempotency';
import { processPhotos } from '../services/photos';
import { sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';
import type { ObjectStore } from '../storage/types';

const REINSPECT_ROLES = ['gc_manager', 'inspector'] as const;

type FindingParams = z.infer<typeof findingParamsSchema>;
type SubmitFixBody = z.infer<typeof submitFixSchema>;
type ReinspectionBody = z.infer<typeof reinspectionSchema>;
type FindingChangeBody = z.infer<typeof findingChangeSchema>;
type CommentBody = z.infer<typeof commentSchema>;
type BulkChangeBody = z.infer<typeof bulkChangeSchema>;
type InboxQuery = z.infer<typeof inboxQuerySchema>;

export interface CorrectionRouterOptions {
  store: ObjectStore;
  /** Per-user upload limits and temporary files, shared by every upload route of the app. */
  uploads?: UploadGuard;
  log?: (message: string, err?: unknown) => void;
}

/** multipart `data` (JSON) + `photos`; the parsed JSON becomes req.body. JSON bodies are refused: a fix needs photos. */
const fixUpload = (tempRoot: string) =>
  photosWithJsonData(
    'fix',
    () => badRequest('photos: A fix needs at least one photo; send multipart/form-data with "data" and "photos".', { photos: 'Add at least one photo of the fix.' }),
    { tempRoot },
  );

/**
 * Before the body is read: the finding must be one the caller sees (404) and may submit a fix
 * for now (403/409). A retry under a key this user already holds an answer for goes on to be
 * replayed (or refused with 422) as before: its finding has moved on since the first answer.
 */
async function fixTarget(req: Request, _res: Response, next: NextFunction) {
  if (await alreadyAnswered(req)) return next();
  await checkFixTarget(contextOf(req), valid<FindingParams>(req.valid.params).findingId);
  next();
}

/** A re-inspection with photos is an upload: refused (404/403/409) before its body is read. A JSON one goes on. */
async function reinspectTarget(req: Request, _res: Response, next: NextFunction) {
  if (!req.is('multipart/form-data') || (await alreadyAnswered(req))) return next();
  await checkReinspectTarget(contextOf(req), valid<FindingParams>(req.valid.params).findingId);
  next();
}

function requirePhotos(req: Request, _res: Response, next: NextFunction) {
  if (uploadedFiles(req).length === 0) return next(badRequest('photos: Add at least one photo of the fix.', { photos: 'Add at least one photo of the fix.' }));
  next();
}

export function correctionRouter(options: CorrectionRouterOptions): Router {
  const { store } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const uploads = options.uploads ?? createUploadGuard();
  const router = Router();
  const base = '/jobs/:jobId/findings/:findingId';

  // ---- Fixes -------------------------------------------------------------------------------
  router.post(
    `${base}/fixes`,
    policy.jobMember(['subcontractor', 'gc_manager']),
    validate({ params: findingParamsSchema }),
    uploads.rate,
    fixTarget,
    fixUpload(uploads.tempRoot),
    validate({ body: submitFixSchema }),
    requirePhotos,
    async (req, res) => {
      const { findingId } = valid<FindingParams>(req.valid.params);
      const body = valid<SubmitFixBody>(req.valid.body);
      if (await replayIfAnswered(req, res)) return;
      const ctx = contextOf(req);
      // Visible (404), role (403) and status (409) were checked before the body was read (fixTarget);
      // the new measurement (400) before any photo is read or stored.
      const measured = await checkFixMeasurement(ctx, findingId, body);
      const processed = await processPhotos(uploadedFiles(req), { charge: (pixels) => uploads.chargePixels(ctx.actor.id, pixels) });
      await idempotentPhotoWrite(req, res, { store, processed, log, what: 'of a replayed fix' }, async (transaction, photos) => {
        const result = await submitFix({ ...ctx, transaction }, findingId, body, photos, measured);
        setEtag(res, result.finding.version);
        return { status: 201, body: result };
      });
    },
  );

  // ---- Re-inspection -----------------------------------------------------------------------
  router.post(
    `${base}/reinspections`,
    policy.jobMember(REINSPECT_ROLES),
    validate({ params: findingParamsSchema }),
    uploads.rate,
    reinspectTarget,
    photosWithJsonData('re-inspection', 'next', { tempRoot: uploads.tempRoot }),
    validate({ body: reinspectionSchema }),
    async (req, res) => {
      const { findingId } = valid<FindingParams>(req.valid.params);
      const body = valid<ReinspectionBody>(req.valid.body);
      const files = uploadedFiles(req);
      if (files.length === 0) {
        await idempotentWrite(req, res, async (transaction) => {
          const detail = await reinspectFinding({ ...contextOf(req), transaction }, findingId, body, { ifMatch: req.get('if-match') });
          setEtag(res, detail.version);
          return { status: 200, body: detail };
        });
        return;
      }
      if (await replayIfAnswered(req, res)) return;
      const ctx = contextOf(req);
      const processed = await processPhotos(files, { charge: (pixels) => uploads.chargePixels(ctx.actor.id, pixels) });
      await idempotentPhotoWrite(req, res, { store, processed, log, what: 'of a replayed re-inspection' }, async (transaction, photos) => {
        const detail = await reinspectFinding({ ...ctx, transaction }, findingId, body, { ifMatch: req.get('if-match') }, photos);
        setEtag(res, detail.version);
        return { status: 200, body: detail };
      });
    },
  );

  // ---- One change to the finding -------------------------------------------------------------
  router.patch(base, policy.jobMember(), validate({ params: findingParamsSchema, body: findingChangeSchema }), async (req, res) => {
    const { findingId } = valid<FindingParams>(req.valid.params);
    const change = valid<FindingChangeBody>(req.valid.body);
    const ctx = contextOf(req);
    const detail = await ctx.sequelize.transaction((transaction) => changeFinding({ ...ctx, transaction }, findingId, change, { ifMatch: req.get('if-match') }));
    setEtag(res, detail.version);
    res.json(detail);
  });

  // ---- Timeline and comments -----------------------------------------------------------------
  const timeline = async (req: Request, kinds: 'all' | 'comments') => {
    const { findingId } = valid<FindingParams>(req.valid.params);
    const detail = await findingDetail(sequelizeOf(req), req.scope!, findingId);
    if (!detail) throw notFound('Finding not found.');
    return { items: kinds === 'all' ? detail.events : detail.events.filter((e) => e.kind === 'comment') };
  };
  router.get(`${base}/events`, policy.jobMember(), validate({ params: findingParamsSchema }), async (req, res) => {
    res.json(await timeline(req, 'all'));
  });
  router.get(`${base}/comments`, policy.jobMember(), validate({ params: findingParamsSchema }), async (req, res) => {
    res.json(await timeline(req, 'comments'));
  });
  router.post(`${base}/comments`, policy.jobMember(), validate({ params: findingParamsSchema, body: commentSchema }), async (req, res) => {
    const { findingId } = valid<FindingParams>(req.valid.params);
    const body = valid<CommentBody>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => ({ status: 201, body: await commentOnFinding({ ...contextOf(req), transaction }, findingId, body) }));
  });

  // ---- Bulk ----------------------------------------------------------------------------------
  router.post('/jobs/:jobId/findings/bulk', policy.jobMember(REINSPECT_ROLES), validate({ params: jobParamsSchema, body: bulkChangeSchema }), async (req, res) => {
    const body = valid<BulkChangeBody>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => ({ status: 200, body: await bulkChangeFindings({ ...contextOf(req), transaction }, body) }));
  });

  // ---- Re-inspection queue -------------------------------------------------------------------
  router.get('/jobs/:jobId/reinspections/queue', policy.jobMember(REINSPECT_ROLES), validate({ params: jobParamsSchema }), async (req, res) => {
    res.json(await reinspectionQueue(sequelizeOf(req), req.scope!));
  });

  // ---- Inbox ---------------------------------------------------------------------------------
  router.get('/inbox', policy.signedIn(), validate({ query: inboxQuerySchema }), async (req, res) => {
    const q = valid<InboxQuery>(req.valid.query);
    const user = req.user!;
    if (!(await isSubcontractorAnywhere(sequelizeOf(req), user.id))) {
      throw forbidden("The inbox lists a subcontractor company's findings; use the findings table of a job instead.");
    }
    res.json(await inbox(sequelizeOf(req), user.id, { jobId: q.jobId, statuses: q.status ?? ['open', 'fix_submitted'], groupBy: q.groupBy ?? 'none' }));
  });

  return router;
}
