/**
 * The fix form and the re-inspection keep their write on the phone at the press, before the screen
 * reacts (the mutation has not started while the record is being written), a second press keeps
 * nothing more, and what waits names the finding ("Return of finding #12"); the sync screen's
 * buttons and links are touch targets.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import React from 'react';
import { StyleSheet } from 'react-native';
import { ApiError } from '../../components/api/client';
import { newWrite, type Write } from '../../components/api/mutations';
import { FixForm } from '../../components/correction/FixForm';
import { ReinspectControls } from '../../components/correction/ReinspectControls';
import { setCurrentOutbox, setFindingLabelLookup, submitWrite } from '../../components/outbox';
import { describeWrite } from '../../components/outbox/describe';
import { Outbox } from '../../components/outbox/engine';
import { memoryOutboxStorage, type OutboxItem, type OutboxStorage } from '../../components/outbox/storage';
import { SyncScreen } from '../../components/outbox/SyncScreen';
import { touchTarget } from '../../components/theme';
import type { FindingDetail } from '../../shared/schemas/findings';

jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());
// A file chooser that picks one small photo at a press (jsdom has no file input to drive).
jest.mock('../../components/findings/PhotoPicker', () => {
  const { createElement } = jest.requireActual<typeof import('react')>('react');
  const rn = jest.requireActual<typeof import('react-native')>('react-native');
  return {
    PhotoPicker: ({ onPick, testID }: { onPick: (p: unknown[]) => void; testID?: string }) =>
      createElement(
        rn.Pressable,
        { testID, onPress: () => onPick([{ key: 'p1', name: 'fix.jpg', type: 'image/jpeg', uri: 'blob:fix', blob: new Blob([new Uint8Array([1, 2, 3])], { type: 'image/jpeg' }) }]) },
        createElement(rn.Text, null, 'Pick'),
      ),
  };
});

jest.setTimeout(30_000);

const JOB = '00000000-0000-4000-8000-0000000000a1';
const FINDING = '00000000-0000-4000-8000-0000000000f1';

const finding = {
  id: FINDING,
  version: 3,
  label: '#12',
  status: 'open',
  returnCount: 0,
  measuredText: null,
  ruleResult: null,
  catalogue: { rule: null },
} as unknown as FindingDetail;

let storage: OutboxStorage;
let outbox: Outbox;
let client: QueryClient;
/** Each put waits for release(): the record is "being written to IndexedDB". */
let puts: OutboxItem[];
let release: () => void;
let sent: Write[];

beforeEach(async () => {
  const real = memoryOutboxStorage();
  puts = [];
  const held = new Promise<void>((r) => (release = r));
  storage = {
    ...real,
    put: async (item) => {
      puts.push(item);
      await held;
      await real.put(item);
    },
  };
  sent = [];
  outbox = new Outbox('u1', {
    storage,
    send: async (w) => {
      sent.push(w);
      throw new ApiError(0, 'offline', 'No connection.');
    },
    read: async () => ({ data: {}, etag: null }),
    signedInUser: async () => 'u1',
  });
  await outbox.load();
  setCurrentOutbox(outbox);
  client = new QueryClient({ defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false, gcTime: Infinity } } });
});
afterEach(() => {
  outbox.stop();
  setCurrentOutbox(null);
  setFindingLabelLookup(null);
});

function renderIn(ui: React.ReactElement) {
  return render(<QueryClientProvider client={client}>{ui}</QueryClientProvider>);
}

describe('FixForm keeps the fix at the press', () => {
  it('the fix is being kept before the mutation starts, a second press keeps nothing more, and it waits as "Fix of finding #12"', async () => {
    renderIn(<FixForm jobId={JOB} finding={finding} system="imperial" onStale={jest.fn()} />);
    fireEvent.changeText(screen.getByTestId('fix-form-note'), 'Re-hung on rod.');
    fireEvent.press(screen.getByTestId('fix-form-files'));
    fireEvent.press(screen.getByTestId('fix-form-submit'));
    fireEvent.press(screen.getByTestId('fix-form-submit'));
    await waitFor(() => expect(puts).toHaveLength(1));
    // Handed to storage while nothing else has happened: no mutation, nothing sent.
    expect(client.isMutating()).toBe(0);
    expect(sent).toEqual([]);
    fireEvent.press(screen.getByTestId('fix-form-submit'));
    await act(async () => release());
    expect(await screen.findByTestId('fix-form-waiting')).toBeTruthy();
    const kept = await storage.list('u1');
    expect(kept.map((i) => [i.kind, i.label, i.write.path])).toEqual([['fix', 'Fix of finding #12', `/api/jobs/${JOB}/findings/${FINDING}/fixes`]]);
    expect(kept[0]!.write.body.kind).toBe('form');
    expect(new Set(puts.map((p) => p.id)).size).toBe(1);
  });
});

describe('ReinspectControls keep the verdict at the press', () => {
  it('the return is being kept before the mutation starts, pressing again (either button) keeps nothing more, and it waits as "Return of finding #12"', async () => {
    const onDone = jest.fn();
    renderIn(<ReinspectControls jobId={JOB} finding={{ id: FINDING, version: 3, label: '#12' }} onStale={jest.fn()} onDone={onDone} />);
    fireEvent.changeText(screen.getByTestId('reinspect-reason'), 'Washers missing.');
    fireEvent.press(screen.getByTestId('reinspect-return'));
    fireEvent.press(screen.getByTestId('reinspect-return'));
    await waitFor(() => expect(puts).toHaveLength(1));
    expect(client.isMutating()).toBe(0);
    expect(sent).toEqual([]);
    fireEvent.press(screen.getByTestId('reinspect-accept'));
    await act(async () => release());
    await waitFor(() => expect(onDone).toHaveBeenCalledWith('return', null));
    const kept = await storage.list('u1');
    expect(kept.map((i) => [i.kind, i.label, i.write.ifMatch])).toEqual([['reinspection', 'Return of finding #12', '"v3"']]);
    expect(new Set(puts.map((p) => p.id)).size).toBe(1);
    expect(onDone).toHaveBeenCalledTimes(1);
  });

  it('an accepted fix waits as "Fix accepted, finding #12" on the sync screen', async () => {
    renderIn(<ReinspectControls jobId={JOB} finding={{ id: FINDING, version: 3, label: '#12' }} onStale={jest.fn()} />);
    fireEvent.press(screen.getByTestId('reinspect-accept'));
    await waitFor(() => expect(puts).toHaveLength(1));
    await act(async () => release());
    await waitFor(async () => expect((await storage.list('u1')).map((i) => i.label)).toEqual(['Fix accepted, finding #12']));
    renderIn(<SyncScreen />);
    expect(await screen.findByText('Fix accepted, finding #12')).toBeTruthy();
  });
});

describe('what waits names the finding', () => {
  const path = (sub = '') => `/api/jobs/${JOB}/findings/${FINDING}${sub}`;
  it.each<[string, Write, string]>([
    ['a fix', newWrite({ method: 'POST', path: path('/fixes'), body: { note: 'x' } }), 'Fix of finding #12'],
    ['photos', newWrite({ method: 'POST', path: path('/photos'), body: {} }), 'Photos of finding #12'],
    ['a comment', newWrite({ method: 'POST', path: path('/comments'), body: { text: 'x' } }), 'Comment on finding #12'],
    ['a pin', newWrite({ method: 'PATCH', path: path(), body: { pin: { x: 0.5, y: 0.5 } } }), 'Pin of finding #12 on the plan'],
    ['a void', newWrite({ method: 'PATCH', path: path(), body: { void: { reason: 'Twice.' } } }), 'Void of finding #12'],
    ['a return', newWrite({ method: 'POST', path: path('/reinspections'), body: { verdict: 'return', reason: 'x' } }), 'Return of finding #12'],
    ['an acceptance', newWrite({ method: 'POST', path: path('/reinspections'), body: { verdict: 'accept' } }), 'Fix accepted, finding #12'],
  ])('%s', (_what, write, words) => {
    expect(describeWrite(write, '#12').label).toBe(words);
  });

  it('names a test record and its witness, one record so the witness waits behind it', () => {
    const RECORD = '00000000-0000-4000-8000-0000000000e1';
    const record = describeWrite(newWrite({ method: 'POST', path: `/api/jobs/${JOB}/test-records`, body: { id: RECORD, kind: 'pressure' } }), 'Pressure test · VRF-1');
    const witness = describeWrite(newWrite({ method: 'POST', path: `/api/jobs/${JOB}/test-records/${RECORD}/witness`, body: {} }), 'Pressure test · VRF-1');
    expect(record).toMatchObject({ kind: 'test', label: 'Test record · Pressure test · VRF-1', record: `test:${RECORD}`, readPath: `/api/jobs/${JOB}/test-records/${RECORD}` });
    expect(witness).toMatchObject({ kind: 'test', label: 'Witness of a test record · Pressure test · VRF-1', record: `test:${RECORD}` });
  });

  it('names one defect logged on many units by how many, not as a finding called "batch"', () => {
    const write = newWrite({ method: 'POST', path: `/api/jobs/${JOB}/findings/batch`, body: { catalogueItemId: 'x', levelId: 'y', units: [{ unitId: 'a' }, { unitId: 'b' }] } });
    expect(describeWrite(write)).toMatchObject({ kind: 'finding', label: 'Same defect on 2 units', record: null, readPath: null });
  });

  it('a write on a finding made without a label is named by the finding the screens hold', async () => {
    setFindingLabelLookup((jobId, findingId) => (jobId === JOB && findingId === FINDING ? '#12' : undefined));
    await act(async () => release());
    const answer = submitWrite(newWrite({ method: 'POST', path: path('/comments'), body: { text: 'Looks done.' } }));
    await waitFor(async () => expect((await storage.list('u1')).map((i) => i.label)).toEqual(['Comment on finding #12']));
    await answer.catch(() => undefined);
  });
});

describe('the sync screen at phone size', () => {
  it('every button and link on it is at least a touch target tall', async () => {
    await act(async () => release());
    await act(async () => {
      await outbox.add(newWrite({ method: 'POST', path: `/api/jobs/${JOB}/findings/${FINDING}/fixes`, body: { note: 'x' } }), {
        jobId: JOB,
        kind: 'fix',
        label: 'Fix of finding #12',
        record: `finding:${FINDING}`,
        readPath: null,
      });
    });
    renderIn(<SyncScreen />);
    await screen.findByText('Fix of finding #12');
    const targets = [...screen.UNSAFE_root.findAll((n) => typeof n.type === 'string' && (n.props.accessibilityRole === 'button' || n.props.role === 'button' || n.props.href !== undefined))];
    expect(targets.length).toBeGreaterThanOrEqual(2);
    for (const t of targets) {
      const style = typeof t.props.style === 'function' ? t.props.style({ pressed: false }) : t.props.style;
      const minHeight = (StyleSheet.flatten(style) as { minHeight?: number }).minHeight ?? 0;
      expect([t.props.testID, minHeight >= touchTarget]).toEqual([t.props.testID, true]);
    }
  });
});
