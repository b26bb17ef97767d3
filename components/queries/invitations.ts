/**
 * Invitations to a job (GC managers): the pending list, invite (one, or several pasted at once),
 * send again, withdraw. For the members screen.
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Invitation, InvitationBulkInput, InvitationCreateInput, InvitationList } from '../../shared/schemas/auth';
import { apiGet } from '../api/client';
import { newWrite, sendWrite } from '../api/mutations';

export const invitationKeys = {
  all: (jobId: string) => ['jobs', jobId, 'invitations'] as const,
};

const path = (jobId: string, ...rest: string[]) => ['/api/jobs', jobId, 'invitations', ...rest].map((p, i) => (i === 0 ? p : encodeURIComponent(p))).join('/');

export function useInvitationsQuery(jobId: string) {
  return useQuery({
    queryKey: invitationKeys.all(jobId),
    queryFn: async () => (await apiGet<InvitationList>(`${path(jobId)}?limit=200`)).items,
    enabled: Boolean(jobId),
  });
}

/** Make the write with newWrite() once per user action and pass it, so a retry reuses its key. */
export function inviteWrite(jobId: string, input: InvitationCreateInput) {
  return newWrite({ method: 'POST', path: path(jobId), body: input });
}

export function useCreateInvitationMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (write: ReturnType<typeof inviteWrite>) => sendWrite<Invitation>(write),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: invitationKeys.all(jobId) }),
  });
}

/** Several people at once (all or none): like inviteWrite, made once per press so a retry reuses its key. */
export function inviteSeveralWrite(jobId: string, people: InvitationBulkInput['people']) {
  return newWrite({ method: 'POST', path: path(jobId, 'bulk'), body: { people } });
}

export function useInviteSeveralMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (write: ReturnType<typeof inviteSeveralWrite>) => sendWrite<{ items: Invitation[] }>(write),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: invitationKeys.all(jobId) }),
  });
}

/**
 * A pending invitation sent again: the server answers with the new invitation (a new id and
 * link; the old link stops working). The list is read again either way: after a 404 or 409 the
 * invitation is no longer one that waits.
 */
export function useResendInvitationMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => sendWrite<Invitation>(newWrite({ method: 'POST', path: path(jobId, invitationId, 'resend') })),
    onSettled: () => queryClient.invalidateQueries({ queryKey: invitationKeys.all(jobId) }),
  });
}

export function useRevokeInvitationMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => sendWrite<void>(newWrite({ method: 'DELETE', path: path(jobId, invitationId) })),
    onSettled: () => queryClient.invalidateQueries({ queryKey: invitationKeys.all(jobId) }),
  });
}
