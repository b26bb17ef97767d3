/**
 * A level's plan image (issue 7). Paths under /api/jobs/:jobId/levels/:levelId:
 * GET    /plan[?v=N]  every role on the job → the image (image/png or image/jpeg), nosniff, ETag;
 *                     with v = the current plan version the answer may be cached for a year;
 *                     404 when the level has no plan (or is not on this job)
 * POST   /plan        GC manager, inspector; multipart/form-data with one file in `file`
 *                     (PNG, JPEG or PDF, type from the bytes, at most 15 MB); Idempotency-Key;
 *                     optional If-Match (the level's ETag) to refuse replacing a newer plan
 *                     → 201 LevelDto (with `plan`), ETag of the level
 * DELETE /plan        GC manager; If-Match (the level's ETag) → 204; 404 when there is no plan
 *
 * Pins are fields of units (PATCH /units/:unitId {pinX, pinY}) and findings (POST with pinX/pinY,
 * PATCH {pin: {x, y} | null}); they are fractions of the plan's width and height, so they keep
 * their place when a plan is replaced by a revision of the same sheet, and stay when a plan is
 * deleted (a new upload shows them again).
 *
 * Processing and storage: server/services/plans.ts. The upload is authorised before its body is
 * read (policy, per-user upload rate, the level exists on the job), and the file goes to a
 * temporary file, never memory (server/middleware/upload.ts).
 */
import { readFile } from 'node:fs/promises';
import { Router, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import multer from 'multer';
import type { z } from 'zod';
import { planImageQuerySchema } from '../../shared/schemas/board';
import { levelParamsSchema } from '../../shared/schemas/setup';
import { badRequest, HttpError, notFound } from '../errors';
import { createUploadGuard, tempFileMulter, UploadFolderError, type UploadedFile, type UploadGuard } from '../middleware/upload';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { alreadyAnswered, idempotentWrite, replayIfAnswered } from '../services/idempotency';
import { levelDto } from '../services/levels';
import { pendingUploads } from '../services/pendingUploads';
import { attachPlan, detachPlan, levelIsOnJob, PLAN_MAX_BYTES, processPlan, removePlanObject, sendPlan, storedPlanOf, withStoredPlan } from '../services/plans';
import { inTransaction, sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';
import type { ObjectStore } from '../storage/types';

export interface PlansRouterOptions {
  store: ObjectStore;
  /** Per-user upload limits and temporary files, shared by every upload route of the app. */
  uploads?: UploadGuard;
  log?: (message: string, err?: unknown) => void;
}

const PATH = '/jobs/:jobId/levels/:levelId/plan';
const MB = 1024 * 1024;

/** Largest body worth reading: the file at its limit plus the multipart framing. */
const MAX_PLAN_BODY_BYTES = PLAN_MAX_BYTES + 64 * 1024;

/** multipart/form-data with exactly one file in `file` and no other fields, into a temporary file. */
const uploadPlan = (tempRoot: string): RequestHandler => {
  const parser = tempFileMulter(tempRoot, { fileSize: PLAN_MAX_BYTES, files: 1, fields: 0, parts: 1, fieldNameSize: 100 }).single('file');
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) {
      return next(new HttpError(415, 'unsupported_media_type', 'Send the plan as multipart/form-data with the file in "file".'));
    }
    if (Number(req.get('content-length') ?? 0) > MAX_PLAN_BODY_BYTES) {
      res.set('Connection', 'close');
      return next(new HttpError(413, 'file_too_large', `A plan file must be at most ${PLAN_MAX_BYTES / MB} MB.`));
    }
    parser(req, res, (err?: unknown) => {
      if (!err) return next();
      if (err instanceof UploadFolderError) return next(err);
      if (err instanceof multer.MulterError) {
        switch (err.code) {
          case 'LIMIT_FILE_SIZE':
            return next(new HttpError(413, 'file_too_large', `A plan file must be at most ${PLAN_MAX_BYTES / MB} MB.`));
          case 'LIMIT_FILE_COUNT':
          case 'LIMIT_PART_COUNT':
          case 'LIMIT_FIELD_COUNT':
          case 'LIMIT_UNEXPECTED_FILE':
          case 'LIMIT_FIELD_KEY':
            return next(badRequest('file: Send exactly one file, in the "file" field, and nothing else.', { file: 'Send one plan file.' }));
          default:
            break;
        }
      }
      next(new HttpError(400, 'malformed_upload', 'The upload could not be read: the form data is malformed or incomplete.'));
    });
  };
};

/** Before the body is read: the level must be on the job (404). A retry of an answered key goes on to its replay. */
async function levelTarget(req: Request, _res: Response, next: NextFunction) {
  if (await alreadyAnswered(req)) return next();
  const { levelId } = valid<z.infer<typeof levelParamsSchema>>(req.valid.params);
  if (!(await levelIsOnJob(req.membership!.job.id, levelId))) return next(notFound('Level not found.'));
  next();
}

export function plansRouter(options: PlansRouterOptions): Router {
  const { store } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const uploads = options.uploads ?? createUploadGuard();
  const router = Router();

  router.get(PATH, policy.jobMember(), validate({ params: levelParamsSchema, query: planImageQuerySchema }), async (req, res) => {
    const { levelId } = valid<z.infer<typeof levelParamsSchema>>(req.valid.params);
    const { v } = valid<z.infer<typeof planImageQuerySchema>>(req.valid.query);
    const plan = await storedPlanOf(req.membership!.job.id, levelId);
    await sendPlan(store, res, plan, v, req.get('if-none-match'));
  });

  router.post(PATH, policy.jobMember(['gc_manager', 'inspector']), validate({ params: levelParamsSchema }), uploads.rate, levelTarget, uploadPlan(uploads.tempRoot), async (req, res) => {
    const { levelId } = valid<z.infer<typeof levelParamsSchema>>(req.valid.params);
    const jobId = req.membership!.job.id;
    const file = req.file as UploadedFile | undefined;
    if (!file) throw badRequest('file: Choose the plan file (PNG, JPEG or PDF).', { file: 'Choose the plan file.' });
    // The idempotency fingerprint covers the file's SHA-256 (uploadDigests): the same key with another file is refused (422).

    // A retry of a request that already succeeded: replay its answer, convert and store nothing.
    if (await replayIfAnswered(req, res)) return;
    // The level was found before the body was read (levelTarget); it is locked and checked again below.
    const plan = await processPlan(await readFile(file.path));
    let replacedKey: string | null = null;
    await withStoredPlan(
      store,
      levelId,
      plan,
      async (key, claim) => {
        await idempotentWrite(req, res, async (transaction) => {
          const write = { transaction, jobId, ifMatch: req.get('if-match') };
          const done = await attachPlan(write, { levelId, key, plan, uploadedBy: req.user!.id, at: new Date(), claim });
          replacedKey = done.replacedKey;
          setEtag(res, done.level.version);
          return { status: 201, body: await levelDto(done.level, transaction) };
        });
      },
      { pending: pendingUploads(sequelizeOf(req)), log },
    );
    await removePlanObject(store, replacedKey, log);
  });

  router.delete(PATH, policy.jobMember(['gc_manager']), validate({ params: levelParamsSchema }), async (req, res) => {
    const { levelId } = valid<z.infer<typeof levelParamsSchema>>(req.valid.params);
    const jobId = req.membership!.job.id;
    const removedKey = await inTransaction(req, (transaction) => detachPlan({ transaction, jobId, ifMatch: req.get('if-match') }, levelId));
    await removePlanObject(store, removedKey, log);
    res.status(204).end();
  });

  return router;
}

