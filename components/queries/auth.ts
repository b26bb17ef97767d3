/**
 * Accounts by mail: sign-up, e-mail confirmation, invitation links, password reset.
 * Mutations that end signed in (confirm, accept, reset) replace the session like sign-in does.
 */
import { useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import type {
  AcceptedResponse,
  CaughtMailDto,
  InvitationAcceptInput,
  InvitationPreview,
  PasswordResetInput,
  PasswordResetPreview,
  PasswordResetRequestInput,
  SignUpInput,
} from '../../shared/schemas/auth';
import type { SessionResponse } from '../../shared/schemas/session';
import { apiGet, setCsrfToken } from '../api/client';
import { newWrite, sendWrite } from '../api/mutations';
import { sessionKeys } from './session';

export const authKeys = {
  invitation: (token: string) => ['invitation-link', token] as const,
  passwordReset: (token: string) => ['password-reset-link', token] as const,
  devMail: ['dev-mail'] as const,
};

const enc = encodeURIComponent;

/** Another user's data must not survive the switch: keep only the new session. */
function becomeSignedIn(queryClient: QueryClient, session: SessionResponse) {
  setCsrfToken(session.csrfToken);
  queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
  queryClient.setQueryData(sessionKeys.all, session);
}

export function useSignUpMutation() {
  return useMutation({
    mutationFn: (input: SignUpInput) => sendWrite<AcceptedResponse>(newWrite({ method: 'POST', path: '/api/signup', body: input })),
  });
}

export function useConfirmEmailMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (token: string) => sendWrite<SessionResponse>(newWrite({ method: 'POST', path: `/api/email-confirmations/${enc(token)}` })),
    onSuccess: (session) => becomeSignedIn(queryClient, session),
  });
}

export function useInvitationPreviewQuery(token: string) {
  return useQuery({
    queryKey: authKeys.invitation(token),
    queryFn: () => apiGet<InvitationPreview>(`/api/invitations/${enc(token)}`),
    enabled: Boolean(token),
    staleTime: Infinity,
  });
}

export function useAcceptInvitationMutation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: InvitationAcceptInput) =>
      sendWrite<SessionResponse & { jobId: string }>(newWrite({ method: 'POST', path: `/api/invitations/${enc(token)}`, body: input })),
    onSuccess: (session) => becomeSignedIn(queryClient, session),
  });
}

export function usePasswordResetRequestMutation() {
  return useMutation({
    mutationFn: (input: PasswordResetRequestInput) =>
      sendWrite<AcceptedResponse>(newWrite({ method: 'POST', path: '/api/password-resets', body: input })),
  });
}

export function usePasswordResetPreviewQuery(token: string) {
  return useQuery({
    queryKey: authKeys.passwordReset(token),
    queryFn: () => apiGet<PasswordResetPreview>(`/api/password-resets/${enc(token)}`),
    enabled: Boolean(token),
    staleTime: Infinity,
  });
}

export function useResetPasswordMutation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: PasswordResetInput) =>
      sendWrite<SessionResponse>(newWrite({ method: 'POST', path: `/api/password-resets/${enc(token)}`, body: input })),
    onSuccess: (session) => becomeSignedIn(queryClient, session),
  });
}

/** Development only: mails caught by the local fake SMTP server. */
export function useCaughtMailQuery() {
  return useQuery({
    queryKey: authKeys.devMail,
    queryFn: () => apiGet<{ items: CaughtMailDto[] }>('/api/dev/mail'),
    refetchInterval: 5_000,
  });
}
