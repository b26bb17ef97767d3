/**
 * Reaching the server: a request that fails for want of a network makes the app offline even
 * while the browser says it is online (a Wi-Fi with no way out): the no-signal banner shows,
 * react-query pauses its reads, and the server is asked again every 15 s until it answers.
 */
import { onlineManager } from '@tanstack/react-query';
import { act, render, screen } from '@testing-library/react-native';
import { apiGet } from '../../components/api/client';
// Wires reach to react-query's onlineManager, as the app does at start.
import '../../components/queries/queryClient';
import { noteReached, REACH_PROBE_MS, serverUnreachable } from '../../components/api/reach';
import { Outbox } from '../../components/outbox/engine';
import { OfflineBanner } from '../../components/outbox/HeaderParts';
import { setCurrentOutbox } from '../../components/outbox';
import { memoryOutboxStorage } from '../../components/outbox/storage';

let outbox: Outbox;
beforeEach(async () => {
  outbox = new Outbox('u1', { storage: memoryOutboxStorage(), send: async () => ({}), read: async () => ({ data: null, etag: null }), signedInUser: async () => 'u1' });
  await outbox.load();
  act(() => setCurrentOutbox(outbox));
});
afterEach(() => {
  outbox.stop();
  act(() => setCurrentOutbox(null));
  act(() => noteReached(true));
  jest.useRealTimers();
});

it('a failed request shows the no-signal banner and pauses reads; the probe brings it back when the server answers', async () => {
  jest.useFakeTimers();
  const answers: Array<'fail' | 'ok'> = ['fail', 'fail', 'ok'];
  const calls: string[] = [];
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string) => {
    calls.push(path);
    if (answers.shift() === 'fail') throw new TypeError('Failed to fetch');
    return { ok: true, status: 200, json: async () => ({ ok: true }), headers: { get: () => null } };
  });
  render(<OfflineBanner />);
  expect(screen.queryByTestId('offline-banner')).toBeNull();

  await act(async () => {
    await expect(apiGet('/api/jobs')).rejects.toMatchObject({ status: 0, id: 'offline' });
  });
  expect(serverUnreachable()).toBe(true);
  expect(onlineManager.isOnline()).toBe(false);
  expect(screen.getByTestId('offline-banner')).toBeTruthy();

  // The first probe finds nothing; the second gets an answer.
  await act(async () => {
    jest.advanceTimersByTime(REACH_PROBE_MS);
    await Promise.resolve();
  });
  expect(calls).toEqual(['/api/jobs', '/api/health']);
  expect(serverUnreachable()).toBe(true);
  await act(async () => {
    jest.advanceTimersByTime(REACH_PROBE_MS);
    await Promise.resolve();
    await Promise.resolve();
  });
  expect(calls).toEqual(['/api/jobs', '/api/health', '/api/health']);
  expect(serverUnreachable()).toBe(false);
  expect(onlineManager.isOnline()).toBe(true);
  expect(screen.queryByTestId('offline-banner')).toBeNull();
});
