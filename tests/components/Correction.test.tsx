/**
 * The correction loop's controls: the one-tap verdict (a return needs its reason; If-Match and an
 * Idempotency-Key go with it; a stale version says "someone changed this" and reloads), what
 * each role is offered by status, and the timeline's words for a change.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { ReinspectControls } from '../../components/correction/ReinspectControls';
import { mayDo, mayBulkChange } from '../../components/correction/rules';
import { describeChange } from '../../components/correction/Timeline';
import type { FindingAction } from '../../shared/schemas/findings';
import type { FindingStatus, Role } from '../../shared/words';

jest.setTimeout(30_000);

const JOB = '00000000-0000-4000-8000-0000000000a1';
const FINDING = '00000000-0000-4000-8000-0000000000f1';

/** jsdom has no fetch: each test installs its own fake answering like the API. */
function fakeFetch(status: number, body: unknown) {
  const fn = jest.fn(async () => ({
    ok: status >= 200 && status < 300,
    status,
    json: async () => body,
    headers: { get: () => null },
  }));
  (globalThis as { fetch: unknown }).fetch = fn;
  return fn as unknown as jest.Mock<Promise<unknown>, [string, RequestInit & { headers: Record<string, string> }]>;
}

function renderControls(onStale = jest.fn(), onDone = jest.fn()) {
  const client = new QueryClient({
    defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false, gcTime: Infinity } },
  });
  render(
    <QueryClientProvider client={client}>
      <ReinspectControls jobId={JOB} finding={{ id: FINDING, version: 3, label: '#12' }} onStale={onStale} onDone={onDone} />
    </QueryClientProvider>,
  );
  return { onStale, onDone };
}

describe('ReinspectControls', () => {
  it('refuses a return without a reason and sends nothing', async () => {
    const fetchSpy = fakeFetch(200, {});
    renderControls();
    fireEvent.press(screen.getByTestId('reinspect-return'));
    expect(await screen.findByText('Say why the fix is returned.')).toBeTruthy();
    expect(fetchSpy).not.toHaveBeenCalled();
  });

  it('returns with the reason, If-Match of the version looked at and an Idempotency-Key', async () => {
    const fetchSpy = fakeFetch(200, { id: FINDING, status: 'open', version: 4 });
    const { onDone } = renderControls();
    fireEvent.changeText(screen.getByTestId('reinspect-reason'), 'Washers missing.');
    fireEvent.press(screen.getByTestId('reinspect-return'));
    await waitFor(() => expect(onDone).toHaveBeenCalledWith('return', expect.objectContaining({ id: FINDING, status: 'open', version: 4 })));
    const [path, init] = fetchSpy.mock.calls[0]!;
    expect(path).toBe(`/api/jobs/${JOB}/findings/${FINDING}/reinspections`);
    expect(init.method).toBe('POST');
    expect(init.headers['If-Match']).toBe('"v3"');
    expect(init.headers['Idempotency-Key']).toMatch(/^[0-9a-f-]{36}$/);
    expect(JSON.parse(String(init.body))).toEqual({ verdict: 'return', reason: 'Washers missing.' });
  });

  it('accepts in one tap without a reason', async () => {
    const fetchSpy = fakeFetch(200, { id: FINDING, status: 'closed', version: 4 });
    const { onDone } = renderControls();
    fireEvent.press(screen.getByTestId('reinspect-accept'));
    await waitFor(() => expect(onDone).toHaveBeenCalledWith('accept', expect.objectContaining({ id: FINDING, status: 'closed' })));
    expect(JSON.parse(String(fetchSpy.mock.calls[0]![1].body))).toEqual({ verdict: 'accept' });
  });

  it('says someone changed the finding on 412 and asks the screen to reload it', async () => {
    fakeFetch(412, { error: { id: 'precondition_failed', message: 'The record changed.' } });
    const { onStale, onDone } = renderControls();
    fireEvent.press(screen.getByTestId('reinspect-accept'));
    expect(await screen.findByText(/Someone changed this finding while you were looking at it/)).toBeTruthy();
    expect(onStale).toHaveBeenCalled();
    expect(onDone).not.toHaveBeenCalled();
  });

  it('shows the server’s message on 409', async () => {
    fakeFetch(409, { error: { id: 'invalid_transition', message: 'This finding is closed; it cannot be accepted.' } });
    renderControls();
    fireEvent.press(screen.getByTestId('reinspect-accept'));
    expect(await screen.findByText('This finding is closed; it cannot be accepted.')).toBeTruthy();
  });
});

describe('what each role is offered', () => {
  it.each<[FindingAction, FindingStatus, Role, boolean, boolean]>([
    ['submit_fix', 'open', 'subcontractor', false, true],
    ['submit_fix', 'fix_submitted', 'subcontractor', false, false],
    ['accept', 'fix_submitted', 'inspector', false, true],
    ['accept', 'fix_submitted', 'subcontractor', false, false],
    ['return', 'open', 'inspector', false, false],
    ['close', 'open', 'inspector', false, true],
    ['close', 'open', 'gc_manager', false, false],
    ['void', 'open', 'inspector', true, true],
    ['void', 'open', 'inspector', false, false],
    ['void', 'closed', 'gc_manager', false, false],
    ['reopen', 'closed', 'gc_manager', false, true],
    ['reopen', 'closed', 'inspector', false, false],
    ['reassign', 'fix_submitted', 'inspector', false, true],
    ['change_due', 'voided', 'gc_manager', false, false],
    ['change_severity', 'open', 'subcontractor', false, false],
  ])('%s on a %s finding for a %s (logged it: %s) → %s', (action, status, role, logger, expected) => {
    expect(mayDo(action, status, role, logger)).toBe(expected);
  });

  it('offers bulk changes to GC managers and inspectors only', () => {
    expect(mayBulkChange('gc_manager')).toBe(true);
    expect(mayBulkChange('inspector')).toBe(true);
    expect(mayBulkChange('subcontractor')).toBe(false);
    expect(mayBulkChange(undefined)).toBe(false);
  });
});

describe('the timeline’s words', () => {
  it('says what changed, in words, and leaves out ids and unchanged values', () => {
    expect(
      describeChange({
        from: { status: 'fix_submitted', returnCount: 1 },
        to: { status: 'closed', returnCount: 1 },
      }),
    ).toBe('Status: Fix submitted → Closed');
    expect(describeChange({ from: { companyId: 'a', companyName: 'Old Co' }, to: { companyId: 'b', companyName: 'New Co' } })).toBe('Company: Old Co → New Co');
    expect(describeChange({ from: null, to: { dueOn: '2026-12-04' } })).toBe('Due: Fri, 4 Dec 2026');
    // a back-dated due date and a returned fix's new due date say so in the history
    expect(describeChange({ from: { dueOn: '2026-12-04' }, to: { dueOn: '2026-11-30', backdated: true } })).toBe('Due: Fri, 4 Dec 2026 → Mon, 30 Nov 2026; Before today: back-dated on purpose by a GC manager');
    expect(describeChange({ from: { status: 'fix_submitted', returnCount: 0, dueOn: '2026-11-20' }, to: { status: 'open', returnCount: 1, dueOn: '2026-12-10', daysToFix: 7 } })).toBe(
      'Status: Fix submitted → Open; Due: Fri, 20 Nov 2026 → Thu, 10 Dec 2026; Days to fix: 7; Returns: 0 → 1',
    );
    expect(describeChange({ from: null, to: null })).toBeNull();
  });
});
