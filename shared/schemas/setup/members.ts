/**
 * Members of the job.
 */
import { z } from 'zod';
import { ROLES, type Role } from '../../words';
import { id, pageQuery } from './fields';

export const memberListQuerySchema = z
  .object({ role: z.enum(ROLES).optional(), companyId: id('company id').optional(), ...pageQuery })
  .strict();
export const updateMemberSchema = z.object({ role: z.enum(ROLES, { error: 'Choose a role.' }) }).strict();
export type UpdateMemberInput = z.input<typeof updateMemberSchema>;

export interface MemberDto {
  /** Membership id (the :memberId of the routes). */
  id: string;
  userId: string;
  name: string;
  role: Role;
  companyId: string;
  companyName: string;
  /** Only GC managers see e-mail addresses; null for others. */
  email: string | null;
}
