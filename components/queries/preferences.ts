/**
 * Mail preferences, "send me a digest now", and the unsubscribe link (docs/api-digests.md).
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  DigestNowResponse,
  PreferencesDto,
  PreferencesPatch,
  UnsubscribePreview,
  UnsubscribeResult,
} from '../../shared/schemas/preferences';
import { apiGet } from '../api/client';
import { versionTag } from '../api/lists';
import { newWrite, sendWrite, type Write } from '../api/mutations';

export const preferencesKeys = {
  mine: ['preferences'] as const,
  unsubscribe: (token: string) => ['unsubscribe-link', token] as const,
};

const enc = encodeURIComponent;

export function usePreferencesQuery() {
  return useQuery({ queryKey: preferencesKeys.mine, queryFn: () => apiGet<PreferencesDto>('/api/me/preferences') });
}

export function useSavePreferencesMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ patch, version }: { patch: PreferencesPatch; version: number }) =>
      sendWrite<PreferencesDto>(newWrite({ method: 'PATCH', path: '/api/me/preferences', body: patch, ifMatch: versionTag(version) })),
    onSuccess: (prefs) => queryClient.setQueryData(preferencesKeys.mine, prefs),
    onError: () => queryClient.invalidateQueries({ queryKey: preferencesKeys.mine }),
  });
}

/** The write is made once per press (the screen keeps it) so a retry reuses its Idempotency-Key. */
export function newDigestNowWrite(): Write {
  return newWrite({ method: 'POST', path: '/api/me/digest', body: {} });
}

export function useDigestNowMutation() {
  return useMutation({ mutationFn: (write: Write) => sendWrite<DigestNowResponse>(write) });
}

export function useUnsubscribePreviewQuery(token: string) {
  return useQuery({
    queryKey: preferencesKeys.unsubscribe(token),
    queryFn: () => apiGet<UnsubscribePreview>(`/api/unsubscribe/${enc(token)}`),
    enabled: Boolean(token),
    retry: false,
    staleTime: Infinity,
  });
}

export function useUnsubscribeMutation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => sendWrite<UnsubscribeResult>(newWrite({ method: 'POST', path: `/api/unsubscribe/${enc(token)}`, body: {} })),
    onSuccess: async (result) => {
      queryClient.setQueryData(preferencesKeys.unsubscribe(token), result);
      await queryClient.invalidateQueries({ queryKey: preferencesKeys.mine });
    },
  });
}
