/** A job membership → MemberDto. */
import type { MemberDto } from '../../shared/schemas/setup';
import type { JobMember, User } from '../models';

/** A member under the company their membership is for (member.company loaded), not their home company. */
export function presentMember(member: JobMember, user: User, showEmail: boolean): MemberDto {
  return {
    id: member.id,
    userId: user.id,
    name: user.name,
    role: member.role,
    companyId: member.companyId,
    companyName: member.company?.name ?? '',
    email: showEmail ? user.email : null,
  };
}
