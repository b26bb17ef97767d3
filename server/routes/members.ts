/**
 * Members of a job (invitations live in their own routes).
 * GET    /jobs/:jobId/members?role=&companyId=   all roles; e-mail addresses only for GC managers
 * PATCH  /jobs/:jobId/members/:memberId          GC manager; { role }
 * DELETE /jobs/:jobId/members/:memberId          GC manager; access ends at once (membership is read per request)
 * A job always keeps at least one GC manager (409). Reads and writes: server/services/members.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { memberListQuerySchema, memberParamsSchema, updateMemberSchema } from '../../shared/schemas/setup';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentMember } from '../presenters/member';
import { changeMemberRole, listMembers, removeMember } from '../services/members';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';

export function membersRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/members', policy.jobMember(), validate({ query: memberListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof memberListQuerySchema>>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    const { job, role } = req.membership!;
    res.json(await listMembers(job.id, query, page, role === 'gc_manager'));
  });

  router.patch(
    '/jobs/:jobId/members/:memberId',
    policy.jobMember(['gc_manager']),
    validate({ params: memberParamsSchema, body: updateMemberSchema }),
    async (req, res) => {
      const { memberId } = valid<z.infer<typeof memberParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateMemberSchema>>(req.valid.body);
      const member = await inTransaction(req, (transaction) => changeMemberRole(setupWrite(req, transaction), memberId, body));
      res.json(presentMember(member, member.user!, true));
    },
  );

  router.delete('/jobs/:jobId/members/:memberId', policy.jobMember(['gc_manager']), validate({ params: memberParamsSchema }), async (req, res) => {
    const { memberId } = valid<z.infer<typeof memberParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) => removeMember(setupWrite(req, transaction), memberId));
    res.status(204).end();
  });

  return router;
}
