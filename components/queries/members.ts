import { useQuery } from '@tanstack/react-query';
import type { MemberDto, UpdateMemberInput } from '../../shared/schemas/setup';
import { fetchAll, jobPath } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export const memberKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'members'),
  list: (jobId: string) => [...memberKeys.all(jobId), 'list'] as const,
};

export function useMembersQuery(jobId: string) {
  return useQuery({
    queryKey: memberKeys.list(jobId),
    queryFn: () => fetchAll<MemberDto>(jobPath(jobId, 'members')),
    enabled: Boolean(jobId),
  });
}

export function useUpdateMemberMutation(jobId: string) {
  return useSetupWrite(jobId, ({ member, input }: { member: MemberDto; input: UpdateMemberInput }) =>
    sendWrite<MemberDto>(newWrite({ method: 'PATCH', path: jobPath(jobId, 'members', member.id), body: input })),
  );
}

export function useRemoveMemberMutation(jobId: string) {
  return useSetupWrite(jobId, (member: MemberDto) =>
    sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'members', member.id) })),
  );
}
