/**
 * Several findings at once: an inspector accepts the ticked fixes (each its own write with its own
 * If-Match; one refused is named, the others accepted; findings not waiting are left out), and a
 * subcontractor's one fix for many asks for the note and a photo before sending anything.
 */
import { fireEvent, screen, waitFor, within } from '@testing-library/react-native';
import { BulkAcceptBar, BulkFixBar } from '../../components/correction/BulkBar';
import type { FindingDto } from '../../shared/schemas/findings';
import { refused, renderWithQueries } from '../support/components';

jest.setTimeout(30_000);

const JOB = '00000000-0000-4000-8000-0000000000a1';
const id = (n: number) => `00000000-0000-4000-8000-0000000000f${n}`;
const row = (n: number, status: string, version: number) =>
  ({ id: id(n), label: `#${n}`, status, version, code: 'MT-01', title: 'Not hung on threaded rod', unitTag: `IU-${n}`, thumbUrl: null }) as unknown as FindingDto;
const rows = [row(1, 'fix_submitted', 4), row(2, 'fix_submitted', 7), row(3, 'open', 2)];

type Answer = { status: number; body?: unknown };
function fakeApi(writes: Answer[]) {
  const fn = jest.fn(async (_path: string, init?: RequestInit) => {
    const { status, body } = (init?.method ?? 'GET') === 'GET' ? { status: 200, body: {} } : (writes.shift() ?? { status: 500, body: {} });
    return { ok: status >= 200 && status < 300, status, json: async () => body, headers: { get: () => null } };
  });
  (globalThis as { fetch: unknown }).fetch = fn;
  return { writes: () => fn.mock.calls.filter(([, init]) => (init?.method ?? 'GET') !== 'GET') };
}

describe('BulkAcceptBar', () => {
  it('accepts each fix waiting with its own If-Match, names the one refused, leaves out the open one', async () => {
    const api = fakeApi([{ status: 200, body: { id: id(1) } }, { status: 412, body: { error: { id: 'stale', message: 'Changed meanwhile.' } } }]);
    const onClear = jest.fn();
    renderWithQueries(<BulkAcceptBar jobId={JOB} selected={[id(1), id(2), id(3)]} rows={rows} onClear={onClear} />);
    expect(screen.getByTestId('bulk-accept-count').props.children.join('')).toBe('Accept 2 fixes');
    expect(screen.getByTestId('bulk-accept-skipped')).toHaveTextContent('Not waiting for re-inspection, left out: #3.');
    expect(screen.getByTestId('bulk-accept-item-#1')).toBeTruthy();
    expect(screen.queryByTestId('bulk-accept-item-#3')).toBeNull();
    fireEvent.press(screen.getByTestId('bulk-accept-send'));
    await waitFor(() => expect(screen.getByTestId('bulk-accept-refused')).toBeTruthy());
    const sent = api.writes();
    expect(sent.map(([path]) => path)).toEqual([`/api/jobs/${JOB}/findings/${id(1)}/reinspections`, `/api/jobs/${JOB}/findings/${id(2)}/reinspections`]);
    expect(sent.map(([, init]) => (init!.headers as Record<string, string>)['If-Match'])).toEqual(['"v4"', '"v7"']);
    expect(sent.map(([, init]) => JSON.parse(String(init!.body)))).toEqual([{ verdict: 'accept' }, { verdict: 'accept' }]);
    expect(screen.getByTestId('bulk-accept-done')).toHaveTextContent('Accepted: #1.');
    expect(within(screen.getByTestId('bulk-accept-refused')).getByText(/#2: /)).toBeTruthy();
    // Not everything went: the selection stays for another look.
    expect(onClear).not.toHaveBeenCalled();
  });
});

describe('BulkFixBar', () => {
  it('asks for what was fixed and a photo before sending anything; counts only the open findings', async () => {
    const api = fakeApi([refused({})]);
    renderWithQueries(<BulkFixBar jobId={JOB} selected={[id(1), id(3)]} rows={rows} onClear={jest.fn()} />);
    expect(screen.getByTestId('bulk-fix-skipped')).toHaveTextContent('Not open, left out: #1.');
    fireEvent.press(screen.getByTestId('bulk-fix-send'));
    expect(await screen.findByText('Say what was fixed.')).toBeTruthy();
    expect(within(screen.getByTestId('bulk-fix-photos-error')).getByText('Add at least one photo of the fixed work.')).toBeTruthy();
    expect(api.writes()).toEqual([]);
  });
});
