/**
 * Runs the signed-in person's outbox while the signed-in screens are open: loads what is kept,
 * sends it on start, on the 'online' event and every minute while writes wait, and refreshes the
 * screens a sent write changes (the same keys the write's hook refreshes online).
 */
import { useQueryClient } from '@tanstack/react-query';
import { useEffect, type ReactNode } from 'react';
import type { SessionResponse } from '../../shared/schemas/session';
import { apiGet, setCsrfToken } from '../api/client';
import { readCurrent, sendWrite } from '../api/mutations';
import { correctionKeys } from '../queries/correction';
import { findingKeys } from '../queries/findings';
import { refreshWalkData } from '../queries/walks';
import { Outbox } from './engine';
import { setCurrentOutbox, setFindingLabelLookup } from './index';
import { defaultOutboxStorage } from './storage';

const MINUTE = 60_000;

export function OutboxProvider({ userId, children }: { userId: string; children: ReactNode }) {
  const queryClient = useQueryClient();
  useEffect(() => {
    const outbox = new Outbox(userId, {
      storage: defaultOutboxStorage(),
      send: (write) => sendWrite(write),
      read: (path) => readCurrent<unknown>(path),
      signedInUser: async () => {
        const session = await apiGet<SessionResponse>('/api/session');
        setCsrfToken(session.csrfToken);
        return session.user?.id ?? null;
      },
      onSent: (item) => {
        refreshWalkData(queryClient, item.jobId);
        void queryClient.invalidateQueries({ queryKey: correctionKeys.inboxAll });
      },
      setTimer: (fn, ms) => setTimeout(fn, ms),
      clearTimer: (h) => clearTimeout(h as ReturnType<typeof setTimeout>),
    });
    setCurrentOutbox(outbox);
    // A write on a finding made on its page names it on the sync screen by the label shown there.
    setFindingLabelLookup((jobId, findingId) => queryClient.getQueryData<{ label?: unknown }>(findingKeys.detail(jobId, findingId))?.label as string | undefined);
    void outbox.load().then(() => outbox.sync(true));
    const online = () => void outbox.sync(true);
    const target = globalThis as { addEventListener?: (t: string, f: () => void) => void; removeEventListener?: (t: string, f: () => void) => void };
    target.addEventListener?.('online', online);
    const minute = setInterval(() => {
      if (outbox.snapshot().items.some((i) => i.state === 'waiting')) void outbox.sync(false);
    }, MINUTE);
    return () => {
      clearInterval(minute);
      target.removeEventListener?.('online', online);
      outbox.stop();
      setFindingLabelLookup(null);
      setCurrentOutbox(null);
    };
  }, [userId, queryClient]);
  return <>{children}</>;
}
