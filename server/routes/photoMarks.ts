/**
 * Marks drawn on a photo (server/services/photoMarks.ts).
 * GET /photos/:photoId/marks   whoever may see the photo (a member of its job who sees its finding, fix or
 *                              test record; 404 otherwise) → PhotoMarks; ETag "v<version>" (v0 before any)
 * PUT /photos/:photoId/marks   whoever may add photos there (a finding's: GC manager, inspector, while open;
 *                              a fix's: the responsible subcontractor or a GC manager while it waits for
 *                              review); { marks } (an empty list clears them), If-Match (428/412) → PhotoMarks
 * The photo's own addresses (routes/findings.ts) then serve the flattened copy; `?original=1` the photo as taken.
 */
import { Router, type Request } from 'express';
import type { z } from 'zod';
import { photoMarksParamsSchema, putPhotoMarksSchema } from '../../shared/schemas/photoMarks';
import { notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { pendingUploads } from '../services/pendingUploads';
import { checkMayMark, photoAccessFor, readPhotoMarks, savePhotoMarks, type PhotoAccess } from '../services/photoMarks';
import { sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';
import type { ObjectStore } from '../storage/types';

type Params = z.infer<typeof photoMarksParamsSchema>;
type Body = z.infer<typeof putPhotoMarksSchema>;

async function accessOf(req: Request): Promise<PhotoAccess> {
  const { photoId } = valid<Params>(req.valid.params);
  const access = await photoAccessFor(sequelizeOf(req), req.user!.id, photoId);
  if (!access) throw notFound('Photo not found.');
  return access;
}

export function photoMarksRouter(deps: { store: ObjectStore; log: (message: string, err?: unknown) => void }): Router {
  const router = Router();

  router.get('/photos/:photoId/marks', policy.signedIn(), validate({ params: photoMarksParamsSchema }), async (req, res) => {
    const access = await accessOf(req);
    const marks = await readPhotoMarks(sequelizeOf(req), access.photoId);
    setEtag(res, marks.version);
    res.json(marks);
  });

  // The photo and the caller's rights are settled before the body is looked at (404 before 400).
  router.put(
    '/photos/:photoId/marks',
    policy.signedIn(),
    validate({ params: photoMarksParamsSchema }),
    async (req, res, next) => {
      const access = await accessOf(req);
      await checkMayMark(sequelizeOf(req), access);
      res.locals.access = access;
      next();
    },
    validate({ body: putPhotoMarksSchema }),
    async (req, res) => {
      const { marks } = valid<Body>(req.valid.body);
      const sequelize = sequelizeOf(req);
      const saved = await savePhotoMarks(
        { sequelize, store: deps.store, pending: pendingUploads(sequelize), log: deps.log },
        res.locals.access as PhotoAccess,
        req.user!.id,
        req.get('if-match'),
        marks,
      );
      setEtag(res, saved.version);
      res.json(saved);
    },
  );

  return router;
}
