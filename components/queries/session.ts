import { QueryClient, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SessionResponse, SignInInput } from '../../shared/schemas/session';
import { apiGet, setCsrfToken } from '../api/client';
import { newWrite, sendWrite } from '../api/mutations';
import { forgetSignedIn } from '../outbox/OfflineStart';

export const sessionKeys = { all: ['session'] as const };

async function fetchSession(): Promise<SessionResponse> {
  const session = await apiGet<SessionResponse>('/api/session');
  setCsrfToken(session.csrfToken);
  return session;
}

/**
 * Another user's data must not survive a sign-in or sign-out. The session query itself stays
 * (screens observe it) and is overwritten or refetched.
 */
function forgetEverythingButSession(queryClient: QueryClient) {
  queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
}

/**
 * Asked even when the app believes it is offline (components/api/reach.ts pauses other reads): a
 * page opened with no network and no session kept must end in "No signal" (OfflineStart), not wait.
 */
export function useSessionQuery() {
  return useQuery({ queryKey: sessionKeys.all, queryFn: fetchSession, staleTime: 60_000, networkMode: 'always' });
}

export function useSignInMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SignInInput) => sendWrite<SessionResponse>(newWrite({ method: 'POST', path: '/api/session', body: input })),
    onSuccess: (session) => {
      setCsrfToken(session.csrfToken);
      forgetEverythingButSession(queryClient);
      queryClient.setQueryData(sessionKeys.all, session);
    },
  });
}

export function useSignOutMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => sendWrite<void>(newWrite({ method: 'DELETE', path: '/api/session' })),
    onSettled: async () => {
      forgetSignedIn();
      forgetEverythingButSession(queryClient);
      await queryClient.refetchQueries({ queryKey: sessionKeys.all });
    },
  });
}
