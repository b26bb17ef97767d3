/**
 * Members of a job (invitations live in their own routes).
 * GET    /jobs/:jobId/members?role=&companyId=   all roles; e-mail addresses only for GC managers
 * PATCH  /jobs/:jobId/members/:memberId          GC manager; { role }
 * DELETE /jobs/:jobId/members/:memberId          GC manager; access ends at once (membership is read per request)
 * A job always keeps at least one GC manager (409).
 */
import { Router } from 'express';
import { Op, type Transaction } from 'sequelize';
import { memberListQuerySchema, memberParamsSchema, updateMemberSchema, type UpdateMemberInput } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import { conflict } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Company, JobMember, User } from '../models';
import { policy } from '../policies';
import { presentMember } from '../presenters/setup';
import { pageRequest } from '../services/paging';
import { inTransaction, lockRow, lockJob } from '../services/records';

/** The person, and the company the membership is for (which may differ from the person's home company). */
const MEMBER_INCLUDE = [
  { model: User, as: 'user', required: true },
  { model: Company, as: 'company', required: true },
];

async function refuseLastManager(jobId: string, member: JobMember, transaction: Transaction, doing: string): Promise<void> {
  if (member.role !== 'gc_manager') return;
  const managers = await JobMember.count({ where: { jobId, role: 'gc_manager' }, transaction });
  if (managers <= 1) {
    throw conflict(`This is the job's only GC manager: add another GC manager before ${doing}.`, 'last_manager');
  }
}

export function membersRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/members', policy.jobMember(), validate({ query: memberListQuerySchema }), async (req, res) => {
    const query = valid<{ role?: Role; companyId?: string; limit?: number; cursor?: string }>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    const { job, role } = req.membership!;
    const after = page.after
      ? { [Op.or]: [{ '$user.name$': { [Op.gt]: page.after.value } }, { '$user.name$': page.after.value, id: { [Op.gt]: page.after.id } }] }
      : {};
    const rows = await JobMember.findAll({
      where: {
        jobId: job.id,
        ...(query.role ? { role: query.role } : {}),
        ...(query.companyId ? { companyId: query.companyId } : {}),
        ...after,
      },
      include: MEMBER_INCLUDE,
      order: [[{ model: User, as: 'user' }, 'name', 'ASC'], ['id', 'ASC']],
      limit: page.limit + 1,
    });
    const more = rows.length > page.limit;
    const members = more ? rows.slice(0, page.limit) : rows;
    const last = members[members.length - 1];
    const showEmail = role === 'gc_manager';
    res.json({
      items: members.map((m) => presentMember(m, m.user!, showEmail)),
      nextCursor: more && last ? page.cursorAfter(last.user!.name, last.id) : null,
    });
  });

  router.patch(
    '/jobs/:jobId/members/:memberId',
    policy.jobMember(['gc_manager']),
    validate({ params: memberParamsSchema, body: updateMemberSchema }),
    async (req, res) => {
      const { memberId } = valid<{ memberId: string }>(req.valid.params);
      const body = valid<UpdateMemberInput>(req.valid.body);
      const jobId = req.membership!.job.id;
      const member = await inTransaction(req, async (transaction) => {
        await lockJob(req, jobId, transaction);
        const member = await lockRow(JobMember, { id: memberId, jobId }, transaction, 'Member not found.');
        if (body.role !== 'gc_manager') await refuseLastManager(jobId, member, transaction, 'changing this role');
        member.role = body.role;
        await member.save({ transaction });
        return JobMember.findOne({ where: { id: member.id }, include: MEMBER_INCLUDE, transaction });
      });
      res.json(presentMember(member!, member!.user!, true));
    },
  );

  router.delete(
    '/jobs/:jobId/members/:memberId',
    policy.jobMember(['gc_manager']),
    validate({ params: memberParamsSchema }),
    async (req, res) => {
      const { memberId } = valid<{ memberId: string }>(req.valid.params);
      const jobId = req.membership!.job.id;
      await inTransaction(req, async (transaction) => {
        await lockJob(req, jobId, transaction);
        const member = await lockRow(JobMember, { id: memberId, jobId }, transaction, 'Member not found.');
        await refuseLastManager(jobId, member, transaction, 'removing this one');
        await member.destroy({ transaction });
      });
      res.status(204).end();
    },
  );

  return router;
}
