/**
 * Unit labels.
 * GET /jobs/:jobId/labels.pdf?levelId | systemId | unitIds=a,b&page&rows&columns&top&left&width&height&gapX&gapY
 *     GC manager, inspector (the people who walk and check units) → application/pdf
 *
 * Exactly one of levelId, systemId, unitIds; every id is looked up inside the job (another job's
 * level, system or unit → 404, nothing said about it). The sheet's settings fall back to the page's
 * common stock (shared/schemas/labels.ts); a grid that does not fit the page → 400 naming the field.
 * The codes hold each unit's address on PUBLIC_URL (never the request's Host header).
 */
import { Router } from 'express';
import { Op, type WhereOptions } from 'sequelize';
import { labelSheetOf, labelSheetProblems, labelsQuerySchema, type LabelsQueryParsed } from '../../shared/schemas/labels';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { unitAddress } from '../../shared/rules/unitAddress';
import { unitKindLabel } from '../../shared/words';
import { badRequest, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Level, Space, System, Unit } from '../models';
import { policy } from '../policies';
import { exportLimiter } from '../services/csvSafe';
import { renderLabelSheet, type LabelUnit } from './sheet';

const LABEL_ROLES = ['gc_manager', 'inspector'] as const;

export interface LabelsRouterOptions {
  /** env.publicOrigin: the origin the codes point at. */
  publicOrigin: string;
}

/** The units to label, in level order then tag; 404 when a named record is not on the job. */
async function unitsToLabel(jobId: string, q: LabelsQueryParsed): Promise<{ units: Unit[]; what: string }> {
  const where: WhereOptions<Unit> = { jobId };
  let what = 'units';
  if (q.levelId) {
    const level = await Level.findOne({ where: { id: q.levelId, jobId }, attributes: ['id', 'name'] });
    if (!level) throw notFound('Level not found.');
    Object.assign(where, { levelId: level.id });
    what = level.name;
  } else if (q.systemId) {
    const system = await System.findOne({ where: { id: q.systemId, jobId }, attributes: ['id', 'name'] });
    if (!system) throw notFound('System not found.');
    Object.assign(where, { systemId: system.id });
    what = system.name;
  } else if (q.unitIds) {
    Object.assign(where, { id: { [Op.in]: q.unitIds } });
  }
  const units = await Unit.findAll({
    where,
    attributes: ['id', 'tag', 'kind', 'levelId', 'spaceId'],
    include: [
      { model: Level, as: 'level', attributes: ['name', 'position'] },
      { model: Space, as: 'space', attributes: ['name'] },
    ],
    order: [
      [{ model: Level, as: 'level' }, 'position', 'ASC'],
      ['tag', 'ASC'],
    ],
  });
  // A list naming a unit that is not on this job: 404, as if none of them were there.
  if (q.unitIds && units.length !== q.unitIds.length) throw notFound('Unit not found.');
  return { units, what };
}

export function labelsRouter(options: LabelsRouterOptions): Router {
  const router = Router();
  router.get(
    '/jobs/:jobId/labels.pdf',
    policy.jobMember(LABEL_ROLES),
    exportLimiter(),
    validate({ params: jobParamsSchema, query: labelsQuerySchema }),
    async (req, res) => {
      const q = valid<LabelsQueryParsed>(req.valid.query);
      const sheet = labelSheetOf(q);
      const problems = labelSheetProblems(sheet);
      const first = Object.entries(problems)[0];
      if (first) throw badRequest(`${first[0]}: ${first[1]}`, problems);
      const jobId = req.membership!.job.id;
      const { units, what } = await unitsToLabel(jobId, q);
      if (units.length === 0) {
        const field = q.levelId ? 'levelId' : 'systemId';
        throw badRequest(`${field}: No units to label there yet.`, { [field]: 'No units to label there yet.' });
      }
      const labels: LabelUnit[] = units.map((u) => ({
        tag: u.tag,
        kind: unitKindLabel(u.kind),
        level: u.level?.name ?? '',
        space: u.space?.name ?? null,
        address: unitAddress(options.publicOrigin, jobId, u.id),
      }));
      const pdf = await renderLabelSheet(labels, sheet, `Unit labels: ${what}`);
      res.status(200);
      res.set('Content-Type', 'application/pdf');
      res.set('Content-Disposition', 'inline; filename="unit-labels.pdf"');
      res.set('X-Content-Type-Options', 'nosniff');
      res.set('X-Label-Count', String(labels.length));
      res.send(pdf);
    },
  );
  return router;
}
