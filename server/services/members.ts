/**
 * Members of a job: the list, role changes and removal (routes/members.ts). A job always keeps at
 * least one GC manager (409); membership is read per request, so a removal ends access at once.
 */
import { Op, type Transaction } from 'sequelize';
import type { MemberDto, UpdateMemberInput } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import { conflict } from '../errors';
import { Company, JobMember, User } from '../models';
import { presentMember } from '../presenters/member';
import type { PageRequest } from './paging';
import { lockJob, lockRow, type SetupWrite } from './records';

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

/** E-mail addresses only when `showEmail` (the caller is a GC manager). */
export async function listMembers(
  jobId: string,
  filters: { role?: Role; companyId?: string },
  page: PageRequest,
  showEmail: boolean,
): Promise<{ items: MemberDto[]; nextCursor: string | null }> {
  const after = page.after
    ? { [Op.or]: [{ '$user.name$': { [Op.gt]: page.after.value } }, { '$user.name$': page.after.value, id: { [Op.gt]: page.after.id } }] }
    : {};
  const rows = await JobMember.findAll({
    where: {
      jobId,
      ...(filters.role ? { role: filters.role } : {}),
      ...(filters.companyId ? { companyId: filters.companyId } : {}),
      ...after,
    },
    include: MEMBER_INCLUDE,
    order: [[{ model: User, as: 'user' }, 'name', 'ASC'], ['id', 'ASC']],
    limit: page.limit + 1,
  });
  const more = rows.length > page.limit;
  const members = more ? rows.slice(0, page.limit) : rows;
  const last = members[members.length - 1];
  return {
    items: members.map((m) => presentMember(m, m.user!, showEmail)),
    nextCursor: more && last ? page.cursorAfter(last.user!.name, last.id) : null,
  };
}

/** Changes a member's role; the last GC manager stays one. Returns the member with person and company. */
export async function changeMemberRole({ transaction, jobId }: SetupWrite, memberId: string, input: UpdateMemberInput): Promise<JobMember> {
  await lockJob(jobId, transaction);
  const member = await lockRow(JobMember, { id: memberId, jobId }, transaction, 'Member not found.');
  if (input.role !== 'gc_manager') await refuseLastManager(jobId, member, transaction, 'changing this role');
  member.role = input.role;
  await member.save({ transaction });
  return (await JobMember.findOne({ where: { id: member.id }, include: MEMBER_INCLUDE, transaction }))!;
}

export async function removeMember({ transaction, jobId }: SetupWrite, memberId: string): Promise<void> {
  await lockJob(jobId, transaction);
  const member = await lockRow(JobMember, { id: memberId, jobId }, transaction, 'Member not found.');
  await refuseLastManager(jobId, member, transaction, 'removing this one');
  await member.destroy({ transaction });
}
