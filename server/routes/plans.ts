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
import { QueryTypes, type Transaction } from 'sequelize';
import { planImageQuerySchema, type PlanImageQuery } from '../../shared/schemas/board';
import { levelParamsSchema } from '../../shared/schemas/setup';
import { badRequest, HttpError, notFound } from '../errors';
import { createUploadGuard, tempFileMulter, UploadFolderError, type UploadedFile, type UploadGuard } from '../middleware/upload';
import { valid, validate } from '../middleware/validate';
import { Level } from '../models';
import { policy } from '../policies';
import { presentLevel } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { pendingUploads } from '../services/pendingUploads';
import { PLAN_MAX_BYTES, processPlan, removePlanObject, sendPlan, withStoredPlan } from '../services/plans';
import { inTransaction, lockForChange, sequelizeOf } from '../services/records';
import { checkIfMatch, setEtag } from '../services/versioning';
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
  const { levelId } = valid<{ levelId: string }>(req.valid.params);
  const exists = await Level.findOne({ where: { id: levelId, jobId: req.membership!.job.id }, attributes: ['id'] });
  if (!exists) return next(notFound('Level not found.'));
  next();
}

async function countsFor(levelId: string, transaction?: Transaction): Promise<{ spaces: number; units: number }> {
  const [row] = await Level.sequelize!.query<{ spaces: string; units: string }>(
    `SELECT (SELECT count(*) FROM spaces WHERE level_id = $1) AS spaces, (SELECT count(*) FROM units WHERE level_id = $1) AS units`,
    { bind: [levelId], type: QueryTypes.SELECT, transaction },
  );
  return { spaces: Number(row?.spaces ?? 0), units: Number(row?.units ?? 0) };
}

export function plansRouter(options: PlansRouterOptions): Router {
  const { store } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const uploads = options.uploads ?? createUploadGuard();
  const router = Router();

  router.get(PATH, policy.jobMember(), validate({ params: levelParamsSchema, query: planImageQuerySchema }), async (req, res) => {
    const { levelId } = valid<{ levelId: string }>(req.valid.params);
    const { v } = valid<PlanImageQuery>(req.valid.query);
    const level = await Level.findOne({ where: { id: levelId, jobId: req.membership!.job.id } });
    if (!level || !level.planKey || !level.planContentType) throw notFound('This level has no plan.');
    await sendPlan(store, res, { levelId: level.id, key: level.planKey, contentType: level.planContentType, version: level.planVersion }, v, req.get('if-none-match'));
  });

  router.post(PATH, policy.jobMember(['gc_manager', 'inspector']), validate({ params: levelParamsSchema }), uploads.rate, levelTarget, uploadPlan(uploads.tempRoot), async (req, res) => {
    const { levelId } = valid<{ levelId: string }>(req.valid.params);
    const jobId = req.membership!.job.id;
    const file = req.file as UploadedFile | undefined;
    if (!file) throw badRequest('file: Choose the plan file (PNG, JPEG or PDF).', { file: 'Choose the plan file.' });
    // The idempotency fingerprint covers the file's SHA-256 (uploadDigests): the same key with another file is refused (422).

    // A retry of a request that already succeeded: replay its answer, convert and store nothing.
    if (await alreadyAnswered(req)) {
      await idempotentWrite(req, res, async () => {
        throw badRequest('This request was already answered.');
      });
      return;
    }
    // The level was found before the body was read (levelTarget); it is locked and checked again below.
    const plan = await processPlan(await readFile(file.path));
    let replacedKey: string | null = null;
    await withStoredPlan(
      store,
      levelId,
      plan,
      async (key, claim) => {
        await idempotentWrite(req, res, async (transaction) => {
          const level = await Level.findOne({ where: { id: levelId, jobId }, transaction, lock: transaction.LOCK.UPDATE });
          if (!level) throw notFound('Level not found.');
          if (req.get('if-match')) checkIfMatch(req, level.version, presentLevel(level, await countsFor(level.id, transaction)));
          await claim(transaction);
          replacedKey = level.planKey;
          level.planKey = key;
          level.planContentType = plan.contentType;
          level.planSourceType = plan.sourceType;
          level.planWidth = plan.width;
          level.planHeight = plan.height;
          level.planByteSize = plan.data.length;
          level.planUploadedAt = new Date();
          level.planUploadedBy = req.user!.id;
          level.planVersion += 1;
          level.version += 1;
          await level.save({ transaction });
          setEtag(res, level.version);
          return { status: 201, body: presentLevel(level, await countsFor(level.id, transaction)) };
        });
      },
      { pending: pendingUploads(sequelizeOf(req)), log },
    );
    await removePlanObject(store, replacedKey, log);
  });

  router.delete(PATH, policy.jobMember(['gc_manager']), validate({ params: levelParamsSchema }), async (req, res) => {
    const { levelId } = valid<{ levelId: string }>(req.valid.params);
    const jobId = req.membership!.job.id;
    const removedKey = await inTransaction(req, async (transaction) => {
      const level = await lockForChange(req, Level, { id: levelId, jobId }, transaction, 'Level not found.', async (l) =>
        presentLevel(l, await countsFor(l.id, transaction)),
      );
      if (!level.planKey) throw notFound('This level has no plan.');
      const key = level.planKey;
      level.planKey = null;
      level.planContentType = null;
      level.planSourceType = null;
      level.planWidth = null;
      level.planHeight = null;
      level.planByteSize = null;
      level.planUploadedAt = null;
      level.planUploadedBy = null;
      level.version += 1;
      await level.save({ transaction });
      return key;
    });
    await removePlanObject(store, removedKey, log);
    res.status(204).end();
  });

  return router;
}

/** True when this user already holds a finished answer under the request's Idempotency-Key. */
async function alreadyAnswered(req: Parameters<RequestHandler>[0]): Promise<boolean> {
  const key = req.get('idempotency-key');
  if (!key || !req.user) return false;
  const rows = await sequelizeOf(req).query<{ n: number }>(
    `SELECT 1 AS n FROM idempotency_keys WHERE user_id = $1 AND key = $2 AND response_status <> 0`,
    { bind: [req.user.id, key], type: QueryTypes.SELECT },
  );
  return rows.length > 0;
}
