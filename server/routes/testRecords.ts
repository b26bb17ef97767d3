/**
 * Test records (docs/api-test-records.md).
 * GET  /jobs/:jobId/test-records                     every role (subcontractor: their company's systems and units); filters, paged
 * POST /jobs/:jobId/test-records                     inspector, subcontractor of the responsible company (Idempotency-Key);
 *                                                    JSON, or multipart with `data` (the JSON) and up to 10 `photos` → 201
 * GET  /jobs/:jobId/test-records.csv                 every role, same scope and filters; rate-limited
 * GET  /jobs/:jobId/test-records/:recordId           every role in scope (else 404); ETag
 * POST /jobs/:jobId/test-records/:recordId/witness   inspector, GC manager; If-Match (428/412); Idempotency-Key → 200
 *
 * The writes are server/commands/recordTest.ts and witnessTest.ts; a record and its photos are saved
 * all or nothing, as a finding's are (services/idempotency.ts idempotentPhotoWrite).
 */
import { Router } from 'express';
import type { z } from 'zod';
import { jobParamsSchema } from '../../shared/schemas/setup';
import {
  createTestRecordSchema,
  testRecordCsvQuerySchema,
  testRecordListQuerySchema,
  testRecordParamsSchema,
  witnessTestRecordSchema,
} from '../../shared/schemas/testRecords';
import { contextOf } from '../commands/context';
import { checkNewTestRecord, recordTest, testRecordAlreadyMade } from '../commands/recordTest';
import { witnessTest } from '../commands/witnessTest';
import { notFound } from '../errors';
import { createUploadGuard, photosWithJsonData, uploadedFiles, type UploadGuard } from '../middleware/upload';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { csvFileName, exportLimiter } from '../services/csvSafe';
import { sendRecordsAsCsv } from '../services/csvStream';
import { idempotentPhotoWrite, idempotentWrite, replayIfAnswered } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { processPhotos } from '../services/photos';
import { sequelizeOf } from '../services/records';
import { allTestRecords, figuresSummary, listTestRecords, testRecordDetail, TEST_RECORDS_CSV_HEADER } from '../services/testRecords';
import { setEtag } from '../services/versioning';
import type { ObjectStore } from '../storage/types';

/** Who makes a record: an inspector, or a subcontractor of the responsible company (checked per system). */
const RECORD_ROLES = ['inspector', 'subcontractor'] as const;
/** Who witnesses one. */
const WITNESS_ROLES = ['inspector', 'gc_manager'] as const;

type CreateBody = z.infer<typeof createTestRecordSchema>;
type ListQuery = z.infer<typeof testRecordListQuerySchema>;
type CsvQuery = z.infer<typeof testRecordCsvQuerySchema>;
type Params = z.infer<typeof testRecordParamsSchema>;
type WitnessBody = z.infer<typeof witnessTestRecordSchema>;

export interface TestRecordsRouterOptions {
  store: ObjectStore;
  uploads?: UploadGuard;
  log?: (message: string, err?: unknown) => void;
}

export function testRecordsRouter(options: TestRecordsRouterOptions): Router {
  const { store } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const uploads = options.uploads ?? createUploadGuard();
  const multipartOrJson = photosWithJsonData('test record', 'next', { tempRoot: uploads.tempRoot });
  const router = Router();

  router.get('/jobs/:jobId/test-records', policy.jobMember(), validate({ params: jobParamsSchema, query: testRecordListQuerySchema }), async (req, res) => {
    const q = valid<ListQuery>(req.valid.query);
    const page = pageRequest(req, { sort: '-recordedAt', value: 'timestamp' });
    const { limit: _l, cursor: _c, ...filters } = q;
    res.json(await listTestRecords(sequelizeOf(req), req.scope!, filters, page));
  });

  router.post(
    '/jobs/:jobId/test-records',
    policy.jobMember(RECORD_ROLES),
    validate({ params: jobParamsSchema }),
    uploads.rate,
    multipartOrJson,
    validate({ body: createTestRecordSchema }),
    async (req, res) => {
      const body = valid<CreateBody>(req.valid.body);
      if (await replayIfAnswered(req, res)) return;
      const ctx = contextOf(req);
      const same = body.id ? await testRecordAlreadyMade(ctx, body.id) : null;
      if (same) {
        setEtag(res, same.version);
        res.status(200).json(same);
        return;
      }
      const files = uploadedFiles(req);
      // Everything that can be refused is refused before any photo is stored.
      const checked = await checkNewTestRecord(ctx, req.membership!.job, body, files.length);
      const processed = files.length > 0 ? await processPhotos(files, { charge: (pixels) => uploads.chargePixels(ctx.actor.id, pixels) }) : [];
      await idempotentPhotoWrite(req, res, { store, processed, log, what: 'of a replayed test record' }, async (transaction, photos) => {
        const detail = await recordTest({ ...ctx, transaction }, checked, photos);
        setEtag(res, detail.version);
        return { status: 201, body: detail };
      });
    },
  );

  router.get(
    '/jobs/:jobId/test-records.csv',
    policy.jobMember(),
    exportLimiter(),
    validate({ params: jobParamsSchema, query: testRecordCsvQuerySchema }),
    async (req, res) => {
      const filters = valid<CsvQuery>(req.valid.query);
      const { job } = req.membership!;
      const records = await allTestRecords(sequelizeOf(req), req.scope!, filters);
      await sendRecordsAsCsv(res, csvFileName('test-records', job.name), [
        [...TEST_RECORDS_CSV_HEADER],
        ...records.map((r) => [
          r.id,
          r.kind,
          r.system?.name ?? null,
          r.unit?.tag ?? null,
          r.company?.name ?? null,
          r.result,
          r.reasons.join(' '),
          figuresSummary(r),
          r.recordedBy.name,
          r.recordedAt,
          r.witnessedBy?.name ?? null,
          r.witnessedAt,
          r.supersedesId,
          r.supersededById,
          r.note,
        ]),
      ]);
    },
  );

  router.get('/jobs/:jobId/test-records/:recordId', policy.jobMember(), validate({ params: testRecordParamsSchema }), async (req, res) => {
    const { recordId } = valid<Params>(req.valid.params);
    const detail = await testRecordDetail(sequelizeOf(req), req.scope!, recordId);
    if (!detail) throw notFound('Test record not found.');
    setEtag(res, detail.version);
    res.json(detail);
  });

  router.post(
    '/jobs/:jobId/test-records/:recordId/witness',
    policy.jobMember(WITNESS_ROLES),
    validate({ params: testRecordParamsSchema, body: witnessTestRecordSchema }),
    async (req, res) => {
      const { recordId } = valid<Params>(req.valid.params);
      const body = valid<WitnessBody>(req.valid.body);
      const ctx = contextOf(req);
      await idempotentWrite(req, res, async (transaction) => {
        const detail = await witnessTest({ ...ctx, transaction }, recordId, req.get('if-match'), body);
        setEtag(res, detail.version);
        return { status: 200, body: detail };
      });
    },
  );

  return router;
}
