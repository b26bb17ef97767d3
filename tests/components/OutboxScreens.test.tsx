/**
 * The outbox on the screen: the header count linking to the sync screen, the warning before
 * signing out with work not sent (kept unless discarded, and discarding asks again), and the sync
 * screen's item needing attention with what was queued beside what the server holds now.
 */
import { act, fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { ApiError } from '../../components/api/client';
import { Outbox } from '../../components/outbox/engine';
import { OutboxCountLink, SignOutConfirm } from '../../components/outbox/HeaderParts';
import { setCurrentOutbox } from '../../components/outbox';
import { memoryOutboxStorage, type OutboxStorage } from '../../components/outbox/storage';
import { SyncScreen } from '../../components/outbox/SyncScreen';

jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());

let storage: OutboxStorage;
let outbox: Outbox;
const refuse = new Map<string, ApiError>();

beforeEach(async () => {
  storage = memoryOutboxStorage();
  refuse.clear();
  outbox = new Outbox('u1', {
    storage,
    send: async (w) => {
      const e = refuse.get(w.path);
      if (e) throw e;
      throw new ApiError(0, 'offline', 'No connection.');
    },
    read: async () => ({ data: { label: '#67', code: 'MT-03', title: 'Hanger not fixed', status: 'voided', voidedReason: 'Logged twice.', severity: 'critical', companyName: 'Kestrel', dueOn: '2026-12-05', version: 2 }, etag: '"v2"' }),
    signedInUser: async () => 'u1',
  });
  await outbox.load();
  act(() => setCurrentOutbox(outbox));
});
afterEach(() => {
  outbox.stop();
  act(() => setCurrentOutbox(null));
});

const check = (n: number) => ({ method: 'POST' as const, path: `/api/jobs/j1/units/u${n}/checks`, body: { items: [] }, idempotencyKey: `key-${n}` });

describe('outbox on the screen', () => {
  it('counts what waits in the header, as a link to the sync screen', async () => {
    render(<OutboxCountLink />);
    expect(screen.queryByTestId('header-outbox')).toBeNull();
    await act(async () => {
      await outbox.add(check(1), { jobId: 'j1', kind: 'check', label: 'Unit check · Unit A' });
      await outbox.add(check(2), { jobId: 'j1', kind: 'check', label: 'Unit check · Unit B' });
    });
    expect(screen.getByTestId('header-outbox').props.href).toBe('/sync');
    expect(screen.getByText('2 waiting to send')).toBeTruthy();
  });

  it('signing out with work waiting warns, keeps it by default, and discards only after a second confirmation', async () => {
    await act(async () => {
      for (const n of [1, 2, 3, 4, 5, 6]) await outbox.add(check(n), { jobId: 'j1', kind: 'check', label: `Unit check ${n}` });
    });
    const onSignOut = jest.fn();
    const onCancel = jest.fn();
    render(<SignOutConfirm onSignOut={onSignOut} onCancel={onCancel} />);
    expect(screen.getByText('6 items have not been sent.')).toBeTruthy();
    fireEvent.press(screen.getByTestId('sign-out-keep'));
    expect(onSignOut).toHaveBeenCalledTimes(1);
    expect(await storage.list('u1')).toHaveLength(6);

    fireEvent.press(screen.getByTestId('sign-out-discard'));
    expect(screen.getByText('Discard all 6 for good? They will never reach Trimout.')).toBeTruthy();
    fireEvent.press(screen.getByTestId('sign-out-discard-cancel'));
    expect(await storage.list('u1')).toHaveLength(6);
    fireEvent.press(screen.getByTestId('sign-out-discard'));
    fireEvent.press(screen.getByTestId('sign-out-discard-confirm'));
    await waitFor(() => expect(onSignOut).toHaveBeenCalledTimes(2));
    expect(await storage.list('u1')).toEqual([]);
  });

  it('the sync screen says when Trimout asked to wait, with its words and when the write is tried again', async () => {
    // The limit's window has 2 minutes left (Retry-After: 120): tried again then, not sooner.
    refuse.set('/api/jobs/j1/findings', new ApiError(429, 'too_many_requests', 'Too many uploads: at most 300 in 10 minutes per person.', {}, 120_000));
    const asked = Date.now();
    await act(async () => {
      await outbox.add({ method: 'POST', path: '/api/jobs/j1/findings', body: { note: 'x' }, idempotencyKey: 'k-f' }, { jobId: 'j1', kind: 'finding', label: 'Finding on unit A' });
      await outbox.sync(true);
    });
    const [kept] = await storage.list('u1');
    expect(kept!.notBefore).toBeGreaterThanOrEqual(asked + 120_000);
    render(<SyncScreen />);
    expect(screen.getByTestId('sync-summary').props.children).toMatch(/Trimout asked to wait before taking more/);
    const at = new Date(kept!.notBefore).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' });
    expect(screen.getByTestId('sync-item-delay').props.children).toBe(`Trimout asked to wait: Too many uploads: at most 300 in 10 minutes per person. Tries again by itself at ${at}.`);
  });

  it('the sync screen shows a refused write with both versions; discard asks first', async () => {
    refuse.set('/api/jobs/j1/findings/f1/fixes', new ApiError(409, 'finding_voided', 'This finding is voided; it cannot be given a fix.'));
    await act(async () => {
      await outbox.add(
        { method: 'POST', path: '/api/jobs/j1/findings/f1/fixes', body: { note: 'Re-hung on rod' }, idempotencyKey: 'k-fix' },
        { jobId: 'j1', kind: 'fix', label: 'Fix', record: 'finding:f1', readPath: '/api/jobs/j1/findings/f1' },
      );
      await outbox.add(check(1), { jobId: 'j1', kind: 'check', label: 'Unit check · Unit A', record: 'unit:1' });
      await outbox.sync(true);
    });
    render(<SyncScreen />);
    expect(screen.getByTestId('sync-summary').props.children).toMatch(/^1 waiting to send, 1 needs attention\./);
    expect(screen.getByTestId('sync-refusal').props.children).toBe('This finding is voided; it cannot be given a fix.');
    expect(screen.getByText('note: Re-hung on rod')).toBeTruthy();
    expect(screen.getByText('Status: Voided (Logged twice.)')).toBeTruthy();
    expect(screen.getAllByTestId('sync-item-waiting')).toHaveLength(1);
    fireEvent.press(screen.getByTestId('sync-discard'));
    expect(screen.getByText('Discard this for good? It will never reach Trimout.')).toBeTruthy();
    await act(async () => {
      fireEvent.press(screen.getByTestId('sync-discard-confirm'));
    });
    await waitFor(() => expect(screen.queryByTestId('sync-item-attention')).toBeNull());
    expect((await storage.list('u1')).map((i) => i.kind)).toEqual(['check']);
  });
});
