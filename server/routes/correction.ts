/**
 * The correction loop (issue 5). Paths under /api/jobs/:jobId/findings/:findingId unless said.
 * POST  /fixes              subcontractor (their company's finding), GC manager; multipart: `data` {note} + 1–10
 *                           `photos`; Idempotency-Key → 201 FixDetail (finding ETag)
 * POST  /reinspections      inspector, GC manager; {verdict, reason}; If-Match; Idempotency-Key → 200 FindingDetail
 * PATCH (the finding)       one change (reassign | severity | dueOn | void | reopen | close | pin); If-Match → 200 FindingDetail
 * GET   /events             everyone who sees the finding → { items: FindingEventDto[] }
 * GET   /comments           everyone who sees the finding → { items } (events of kind 'comment')
 * POST  /comments           everyone who sees the finding; Idempotency-Key → 201 FindingEventDto
 * POST  /api/jobs/:jobId/findings/bulk          GC manager, inspector; all or nothing → 200 { items }
 * GET   /api/jobs/:jobId/reinspections/queue    GC manager, inspector → ReinspectionQueueResponse
 * GET   /api/inbox                               subcontractors (403 for a user who is no job's subcontractor)
 *
 * Who may do what and from which status is decided ONLY in server/services/findingStatus.ts.
 * Every change locks the finding (SELECT ... FOR UPDATE), checks If-Match where required,
 * writes its event in the same transaction, and raises the version (comments do not: they
 * are not a change of the finding).
 */
import type { NextFunction, Request, Response } from 'express';
import { Router } from 'express';
import { QueryTypes, type Transaction, type WhereOptions } from 'sequelize';
import {
  bulkChangeSchema,
  commentSchema,
  findingChangeSchema,
  findingParamsSchema,
  inboxQuerySchema,
  reinspectionSchema,
  submitFixSchema,
  type BulkChangeParsed,
  type FindingAction,
  type FindingChangeParsed,
  type FindingEventDto,
  type FindingEventKind,
  type InboxQueryParsed,
  type SubmitFixInput,
} from '../../shared/schemas/findings';
import { jobParamsSchema } from '../../shared/schemas/setup';
import type { FindingStatus } from '../../shared/words';
import { badRequest, forbidden, HttpError, notFound } from '../errors';
import { createUploadGuard, photosWithJsonData, uploadedFiles, type UploadGuard } from '../middleware/upload';
import { valid, validate, zodFieldErrors } from '../middleware/validate';
import { Finding, Fix, Photo } from '../models';
import { policy } from '../policies';
import { inbox, fixDto, reinspectionQueue } from '../services/correction';
import { findingDetail, findingsByIds } from '../services/findingQueries';
import { companyOnJob, recordFindingEvent } from '../services/findings';
import { assertAllowed, decide, refusalError } from '../services/findingStatus';
import { notifyCriticalAssignment } from '../digests/events';
import { idempotentWrite } from '../services/idempotency';
import { pendingUploads } from '../services/pendingUploads';
import { discardStoredPhotos, keysOf, photoRowValues, processPhotos, withStoredPhotos, type ProcessedPhoto } from '../services/photos';
import { sequelizeOf } from '../services/records';
import { checkIfMatch, etagOf, setEtag } from '../services/versioning';
import type { ObjectStore } from '../storage/types';

const REINSPECT_ROLES = ['gc_manager', 'inspector'] as const;
/** Who may place a finding's pin on the level's plan. */
const PIN_ROLES: readonly string[] = ['gc_manager', 'inspector'];

export interface CorrectionRouterOptions {
  store: ObjectStore;
  /** Per-user upload limits and temporary files, shared by every upload route of the app. */
  uploads?: UploadGuard;
  log?: (message: string, err?: unknown) => void;
}

/** The finding in the caller's scope, locked for the rest of the transaction; 404 when it is not theirs to see. */
async function lockFinding(req: Request, findingId: string, transaction: Transaction): Promise<Finding> {
  const scope = req.scope!;
  const where: WhereOptions<Finding> = { id: findingId, jobId: scope.jobId };
  if (scope.companyId) Object.assign(where, { companyId: scope.companyId });
  const finding = await Finding.findOne({ where, transaction, lock: transaction.LOCK.UPDATE });
  if (!finding) throw notFound('Finding not found.');
  return finding;
}

/** 428 without If-Match; 412 with the current finding when it is stale. */
async function requireIfMatch(req: Request, finding: Finding, transaction: Transaction): Promise<void> {
  const header = req.get('if-match');
  const fresh = !header || header.split(',').some((t) => ['*', etagOf(finding.version)].includes(t.trim()));
  const current = fresh ? undefined : await findingDetail(sequelizeOf(req), req.scope!, finding.id, transaction);
  checkIfMatch(req, finding.version, current);
}

/** Role first (403, nothing read further), then If-Match (428 / 412), then status (409). Returns the status after. */
async function authorise(req: Request, finding: Finding, action: FindingAction, transaction: Transaction, ifMatch: boolean): Promise<FindingStatus> {
  const { role } = req.membership!;
  const d = decide(finding.status, action, role, finding.loggedBy === req.user!.id);
  if (!d.allowed && d.code === 403) throw refusalError(d);
  if (ifMatch) await requireIfMatch(req, finding, transaction);
  if (!d.allowed) throw refusalError(d);
  return d.to;
}

async function answerWithFinding(req: Request, res: Response, finding: Finding, transaction: Transaction, status = 200) {
  const detail = await findingDetail(sequelizeOf(req), req.scope!, finding.id, transaction);
  setEtag(res, finding.version);
  return { status, body: detail };
}

function eventDto(e: { id: string; kind: FindingEventKind; at: Date; from: Record<string, unknown> | null; to: Record<string, unknown> | null; reason: string | null; photoIds: string[] }, actor: { id: string; name: string }): FindingEventDto {
  return { id: e.id, kind: e.kind, actor, at: e.at.toISOString(), from: e.from, to: e.to, reason: e.reason, photoIds: e.photoIds };
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
 * for now (403/409). The transaction checks both again under its lock. A retry under a key this
 * user already holds an answer for goes on to be replayed (or refused with 422) as before: its
 * finding has moved on since the first answer.
 */
async function fixTarget(req: Request, _res: Response, next: NextFunction) {
  if (await alreadyAnswered(req)) return next();
  const { findingId } = valid<{ findingId: string }>(req.valid.params);
  const { job, role } = req.membership!;
  const scope = req.scope!;
  const visible = await Finding.findOne({
    where: { id: findingId, jobId: job.id, ...(scope.companyId ? { companyId: scope.companyId } : {}) },
    attributes: ['id', 'status', 'loggedBy'],
  });
  if (!visible) return next(notFound('Finding not found.'));
  assertAllowed(visible.status, 'submit_fix', role, visible.loggedBy === req.user!.id);
  next();
}

function validateFixBody(req: Request, _res: Response, next: NextFunction) {
  const result = submitFixSchema.safeParse(req.body ?? {});
  req.valid ??= {};
  if (!result.success) {
    const fields = zodFieldErrors(result.error);
    const first = Object.entries(fields)[0]!;
    return next(badRequest(`${first[0]}: ${first[1]}`, fields));
  }
  if (uploadedFiles(req).length === 0) return next(badRequest('photos: Add at least one photo of the fix.', { photos: 'Add at least one photo of the fix.' }));
  req.valid.body = result.data;
  next();
}

async function alreadyAnswered(req: Request): Promise<boolean> {
  const key = req.get('idempotency-key');
  if (!key || !req.user) return false;
  const rows = await sequelizeOf(req).query<{ n: number }>(
    `SELECT 1 AS n FROM idempotency_keys WHERE user_id = $1 AND key = $2 AND response_status <> 0`,
    { bind: [req.user.id, key], type: QueryTypes.SELECT },
  );
  return rows.length > 0;
}

export function correctionRouter(options: CorrectionRouterOptions): Router {
  const { store } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const uploads = options.uploads ?? createUploadGuard();
  const router = Router();
  const base = '/jobs/:jobId/findings/:findingId';

  // ---- Fixes -------------------------------------------------------------------------------
  router.post(`${base}/fixes`, policy.jobMember(['subcontractor', 'gc_manager']), validate({ params: findingParamsSchema }), uploads.rate, fixTarget, fixUpload(uploads.tempRoot), validateFixBody, async (req, res) => {
    const { findingId } = valid<{ findingId: string }>(req.valid.params);
    const body = valid<SubmitFixInput>(req.valid.body);
    const { job } = req.membership!;
    const user = req.user!;
    const sequelize = sequelizeOf(req);

    if (await alreadyAnswered(req)) {
      await idempotentWrite(req, res, async () => {
        throw badRequest('This request was already answered.');
      });
      return;
    }
    // Visible (404), role (403) and status (409) were checked before the body was read (fixTarget).
    const processed: ProcessedPhoto[] = await processPhotos(uploadedFiles(req), { charge: (pixels) => uploads.chargePixels(user.id, pixels) });
    const pending = pendingUploads(sequelize);
    await withStoredPhotos(
      store,
      processed,
      async (stored, claim) => {
        await idempotentWrite(req, res, async (transaction) => {
          const finding = await lockFinding(req, findingId, transaction);
          const to = await authorise(req, finding, 'submit_fix', transaction, false);
          const at = new Date();
          const fix = await Fix.create({ jobId: job.id, findingId: finding.id, submittedBy: user.id, note: body.note.trim(), submittedAt: at }, { transaction });
          await claim(transaction);
          await Photo.bulkCreate(
            photoRowValues(stored, { jobId: job.id, uploadedBy: user.id, fixId: fix.id }).map((row, i) => ({ ...row, createdAt: new Date(at.getTime() + i) })),
            { transaction },
          );
          const from = finding.status;
          finding.status = to;
          finding.version += 1;
          await finding.save({ transaction });
          await recordFindingEvent(
            {
              findingId: finding.id,
              jobId: job.id,
              actorId: user.id,
              kind: 'fix_submitted',
              from: { status: from },
              to: { status: to, fixId: fix.id, note: fix.note },
              photoIds: stored.map((p) => p.id),
              at,
            },
            transaction,
          );
          const detail = await findingDetail(sequelize, req.scope!, finding.id, transaction);
          const fixBody = await fixDto(sequelize, job.id, fix.id, transaction);
          setEtag(res, finding.version);
          return { status: 201, body: { fix: fixBody, finding: detail } };
        });
        if (res.get('Idempotent-Replayed') === 'true') {
          await discardStoredPhotos(store, keysOf(stored), { pending, log }, 'of a replayed fix');
        }
      },
      { pending, log },
    );
  });

  // ---- Re-inspection -----------------------------------------------------------------------
  router.post(`${base}/reinspections`, policy.jobMember(REINSPECT_ROLES), validate({ params: findingParamsSchema, body: reinspectionSchema }), async (req, res) => {
    const { findingId } = valid<{ findingId: string }>(req.valid.params);
    const body = valid<{ verdict: 'accept' | 'return'; reason?: string }>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const finding = await lockFinding(req, findingId, transaction);
      const to = await authorise(req, finding, body.verdict, transaction, true);
      const from = { status: finding.status, returnCount: finding.returnCount };
      finding.status = to;
      if (body.verdict === 'return') finding.returnCount += 1;
      finding.version += 1;
      await finding.save({ transaction });
      await recordFindingEvent(
        {
          findingId: finding.id,
          jobId: finding.jobId,
          actorId: req.user!.id,
          kind: body.verdict === 'accept' ? 'accepted' : 'returned',
          from,
          to: { status: to, returnCount: finding.returnCount },
          reason: body.reason || null,
        },
        transaction,
      );
      return answerWithFinding(req, res, finding, transaction);
    });
  });

  // ---- One change to the finding -------------------------------------------------------------
  router.patch(base, policy.jobMember(), validate({ params: findingParamsSchema, body: findingChangeSchema }), async (req, res) => {
    const { findingId } = valid<{ findingId: string }>(req.valid.params);
    const change = valid<FindingChangeParsed>(req.valid.body);
    const sequelize = sequelizeOf(req);
    const result = await sequelize.transaction(async (transaction) => {
      const finding = await lockFinding(req, findingId, transaction);
      const actorId = req.user!.id;
      const event = (kind: FindingEventKind, from: Record<string, unknown>, to: Record<string, unknown>, reason: string | null | undefined) =>
        recordFindingEvent({ findingId: finding.id, jobId: finding.jobId, actorId, kind, from, to, reason: reason || null }, transaction);

      if (change.reassign) {
        await authorise(req, finding, 'reassign', transaction, true);
        const company = await companyOnJob(sequelize, finding.jobId, change.reassign.companyId, transaction);
        if (!company) throw badRequest('reassign.companyId: That company is not on this job.', { 'reassign.companyId': 'That company is not on this job.' });
        if (company.id === finding.companyId) throw badRequest('reassign.companyId: The finding is already assigned to that company.', { 'reassign.companyId': 'Already assigned to that company.' });
        const previous = await companyOnJob(sequelize, finding.jobId, finding.companyId, transaction);
        await event('reassigned', { companyId: finding.companyId, companyName: previous?.name ?? null }, { companyId: company.id, companyName: company.name }, change.reassign.reason);
        finding.companyId = company.id;
      } else if (change.severity) {
        await authorise(req, finding, 'change_severity', transaction, true);
        if (change.severity.to === finding.severity) throw badRequest(`severity.to: The severity is already ${finding.severity}.`, { 'severity.to': 'That is the severity already.' });
        await event('severity_changed', { severity: finding.severity }, { severity: change.severity.to }, change.severity.reason);
        finding.severity = change.severity.to;
      } else if (change.dueOn) {
        await authorise(req, finding, 'change_due', transaction, true);
        if (change.dueOn.to === finding.dueOn) throw badRequest(`dueOn.to: The finding is already due on ${finding.dueOn}.`, { 'dueOn.to': 'That is the due date already.' });
        await event('due_changed', { dueOn: finding.dueOn }, { dueOn: change.dueOn.to }, change.dueOn.reason);
        finding.dueOn = change.dueOn.to;
      } else if (change.void) {
        const to = await authorise(req, finding, 'void', transaction, true);
        await event('voided', { status: finding.status }, { status: to }, change.void.reason);
        finding.status = to;
        finding.voidedReason = change.void.reason;
      } else if (change.reopen) {
        const to = await authorise(req, finding, 'reopen', transaction, true);
        await event('reopened', { status: finding.status }, { status: to }, change.reopen.reason);
        finding.status = to;
      } else if (change.pin !== undefined) {
        // A pin is where the finding is drawn on its level's plan, not a change of its status:
        // the GC manager and inspectors may place it in any status; no event is recorded.
        if (!PIN_ROLES.includes(req.membership!.role)) throw forbidden('Only the GC manager and inspectors place findings on the plan.');
        await requireIfMatch(req, finding, transaction);
        finding.pinX = change.pin?.x ?? null;
        finding.pinY = change.pin?.y ?? null;
      } else if (change.close) {
        const to = await authorise(req, finding, 'close', transaction, true);
        await event('closed_on_walk', { status: finding.status }, { status: to }, change.close.note || null);
        finding.status = to;
      }
      finding.version += 1;
      await finding.save({ transaction });
      if (change.reassign) {
        await notifyCriticalAssignment(req, transaction, { jobId: finding.jobId, findingId: finding.id, companyId: finding.companyId, severity: finding.severity, how: 'reassigned' });
      }
      return answerWithFinding(req, res, finding, transaction);
    });
    res.status(result.status).json(result.body);
  });

  // ---- Timeline and comments -----------------------------------------------------------------
  const timeline = async (req: Request, kinds: 'all' | 'comments') => {
    const { findingId } = valid<{ findingId: string }>(req.valid.params);
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
    const { findingId } = valid<{ findingId: string }>(req.valid.params);
    const { text } = valid<{ text: string }>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      // Locked like a change, so a comment is ordered with the changes around it in the history.
      const finding = await lockFinding(req, findingId, transaction);
      const e = await recordFindingEvent({ findingId: finding.id, jobId: finding.jobId, actorId: req.user!.id, kind: 'comment', reason: text }, transaction);
      return { status: 201, body: eventDto(e, { id: req.user!.id, name: req.user!.name }) };
    });
  });

  // ---- Bulk ----------------------------------------------------------------------------------
  router.post('/jobs/:jobId/findings/bulk', policy.jobMember(REINSPECT_ROLES), validate({ params: jobParamsSchema, body: bulkChangeSchema }), async (req, res) => {
    const body = valid<BulkChangeParsed>(req.valid.body);
    const { job, role } = req.membership!;
    const sequelize = sequelizeOf(req);
    const action: FindingAction = body.change.reassign ? 'reassign' : 'change_due';
    await idempotentWrite(req, res, async (transaction) => {
      const rows = await Finding.findAll({ where: { jobId: job.id, id: body.findingIds }, order: [['id', 'ASC']], transaction, lock: transaction.LOCK.UPDATE });
      const found = new Set(rows.map((r) => r.id));
      const missing = body.findingIds.filter((id) => !found.has(id));
      if (missing.length > 0) {
        throw new HttpError(404, 'not_found', `Not found on this job: ${missing.join(', ')}. Nothing was changed.`, { findingIds: missing.join(',') });
      }
      const refused = rows.filter((r) => !decide(r.status, action, role, r.loggedBy === req.user!.id).allowed);
      if (refused.length > 0) {
        const labels = refused.map((r) => `#${r.number} (${r.status.replace('_', ' ')})`).join(', ');
        throw new HttpError(409, 'invalid_transition', `These findings cannot be changed now: ${labels}. Nothing was changed.`, {
          findingIds: refused.map((r) => r.id).join(','),
        });
      }
      const company = body.change.reassign ? await companyOnJob(sequelize, job.id, body.change.reassign.companyId, transaction) : null;
      if (body.change.reassign && !company) {
        throw badRequest('change.reassign.companyId: That company is not on this job.', { 'change.reassign.companyId': 'That company is not on this job.' });
      }
      for (const finding of rows) {
        const base = { findingId: finding.id, jobId: job.id, actorId: req.user!.id };
        if (body.change.reassign && company) {
          if (finding.companyId === company.id) continue;
          const previous = await companyOnJob(sequelize, job.id, finding.companyId, transaction);
          await recordFindingEvent(
            { ...base, kind: 'reassigned', from: { companyId: finding.companyId, companyName: previous?.name ?? null }, to: { companyId: company.id, companyName: company.name }, reason: body.change.reassign.reason },
            transaction,
          );
          finding.companyId = company.id;
        } else if (body.change.dueOn) {
          if (finding.dueOn === body.change.dueOn.to) continue;
          await recordFindingEvent({ ...base, kind: 'due_changed', from: { dueOn: finding.dueOn }, to: { dueOn: body.change.dueOn.to }, reason: body.change.dueOn.reason || null }, transaction);
          finding.dueOn = body.change.dueOn.to;
        }
        finding.version += 1;
        await finding.save({ transaction });
        if (body.change.reassign && company) {
          await notifyCriticalAssignment(req, transaction, { jobId: job.id, findingId: finding.id, companyId: company.id, severity: finding.severity, how: 'reassigned' });
        }
      }
      const items = await findingsByIds(sequelize, req.scope!, body.findingIds, transaction);
      return { status: 200, body: { items } };
    });
  });

  // ---- Re-inspection queue -------------------------------------------------------------------
  router.get('/jobs/:jobId/reinspections/queue', policy.jobMember(REINSPECT_ROLES), validate({ params: jobParamsSchema }), async (req, res) => {
    res.json(await reinspectionQueue(sequelizeOf(req), req.scope!));
  });

  // ---- Inbox ---------------------------------------------------------------------------------
  router.get('/inbox', policy.signedIn(), validate({ query: inboxQuerySchema }), async (req, res) => {
    const q = valid<InboxQueryParsed>(req.valid.query);
    const user = req.user!;
    const [membership] = await sequelizeOf(req).query<{ n: number }>(`SELECT 1 AS n FROM job_members WHERE user_id = $1 AND role = 'subcontractor' LIMIT 1`, {
      bind: [user.id],
      type: QueryTypes.SELECT,
    });
    if (!membership) throw forbidden('The inbox lists a subcontractor company\'s findings; use the findings table of a job instead.');
    res.json(await inbox(sequelizeOf(req), user.id, { jobId: q.jobId, statuses: q.status ?? ['open', 'fix_submitted'], groupBy: q.groupBy ?? 'none' }));
  });

  return router;
}
