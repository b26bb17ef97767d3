/**
 * The correction loop's forms (fix, comment, change, bulk change): the shared schemas' messages
 * under their fields before anything is sent, and the server's field messages (keyed by the
 * body's path) under the fields they name.
 */
import { fireEvent, screen, waitFor, within } from '@testing-library/react-native';
import { BulkBar } from '../../components/correction/BulkBar';
import { Comments } from '../../components/correction/Comments';
import { FindingActions } from '../../components/correction/FindingActions';
import { FixForm } from '../../components/correction/FixForm';
import { addDays, todayIn } from '../../shared/rules/dates';
import type { FindingDetail, FindingDto } from '../../shared/schemas/findings';
import type { JobCompanyDto } from '../../shared/schemas/setup';
import { refused, renderWithQueries } from '../support/components';

jest.setTimeout(30_000);

const JOB = '00000000-0000-4000-8000-0000000000a1';
const FINDING = '00000000-0000-4000-8000-0000000000f1';
const OTHER = '00000000-0000-4000-8000-0000000000f2';
const MECH: JobCompanyDto = { id: '00000000-0000-4000-8000-0000000000d1', name: 'Northside Mechanical', trades: ['mechanical'], isOwner: false, memberCount: 1, version: 1 };
const ELEC: JobCompanyDto = { id: '00000000-0000-4000-8000-0000000000d2', name: 'Bright Electric', trades: ['electrical'], isOwner: false, memberCount: 1, version: 1 };

const finding = {
  id: FINDING,
  version: 3,
  label: '#12',
  status: 'open',
  severity: 'major',
  dueOn: '2030-01-10',
  companyId: MECH.id,
  companyName: MECH.name,
  returnCount: 0,
  measuredText: null,
  ruleResult: null,
  catalogue: { rule: null },
} as unknown as FindingDetail;

type Answer = { status: number; body?: unknown };

/** jsdom has no fetch: reads answer from fixtures, each write takes the next answer given. */
function fakeApi(writes: Answer[]) {
  const fn = jest.fn(async (path: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    let answer: Answer;
    if (method === 'GET' && path.includes('/companies')) answer = { status: 200, body: { items: [MECH, ELEC], nextCursor: null } };
    else if (method === 'GET' && path.includes('/comments')) answer = { status: 200, body: { items: [] } };
    else answer = writes.shift() ?? { status: 500, body: {} };
    const { status, body } = answer;
    return { ok: status >= 200 && status < 300, status, json: async () => body, headers: { get: () => null } };
  });
  (globalThis as { fetch: unknown }).fetch = fn;
  return { writes: () => fn.mock.calls.filter(([, init]) => (init?.method ?? 'GET') !== 'GET') };
}

describe('FixForm', () => {
  it('asks for what was fixed and for a photo at once, and sends nothing', async () => {
    const api = fakeApi([]);
    renderWithQueries(<FixForm jobId={JOB} finding={finding} system="imperial" onStale={jest.fn()} />);
    fireEvent.press(screen.getByTestId('fix-form-submit'));
    expect(await screen.findByText('Say what was fixed.')).toBeTruthy();
    expect(within(screen.getByTestId('fix-form-photos-error')).getByText('Add at least one photo of the fixed work.')).toBeTruthy();
    expect(api.writes()).toEqual([]);
  });
});

describe('Comments', () => {
  it('asks for text, then puts the server’s field message under the comment box', async () => {
    const api = fakeApi([refused({ text: 'A comment is at most 2000 characters.' })]);
    renderWithQueries(<Comments jobId={JOB} findingId={FINDING} timeZone="UTC" />);
    fireEvent.press(screen.getByTestId('finding-comment-send'));
    expect(within(await screen.findByTestId('finding-comment-text-error')).getByText('Write a comment.')).toBeTruthy();
    expect(api.writes()).toEqual([]);

    fireEvent.changeText(screen.getByTestId('finding-comment-text'), 'Looks done.');
    fireEvent.press(screen.getByTestId('finding-comment-send'));
    expect(within(await screen.findByTestId('finding-comment-text-error')).getByText('A comment is at most 2000 characters.')).toBeTruthy();
    expect(JSON.parse(String(api.writes()[0]![1]!.body))).toEqual({ text: 'Looks done.' });
  });
});

describe('FindingActions: change this finding', () => {
  function renderActions() {
    renderWithQueries(<FindingActions jobId={JOB} finding={finding} role="gc_manager" isLogger={false} onStale={jest.fn()} />);
  }

  it('needs a reason to void, and keeps the reason typed while switching what to change', async () => {
    const api = fakeApi([{ status: 200, body: { ...finding, status: 'voided', version: 4 } }]);
    renderActions();
    fireEvent.press(await screen.findByTestId('finding-change-kind-void'));
    fireEvent.press(screen.getByTestId('finding-change-submit'));
    expect(within(await screen.findByTestId('finding-change-reason-error')).getByText('Give a reason for voiding.')).toBeTruthy();
    expect(api.writes()).toEqual([]);

    fireEvent.changeText(screen.getByTestId('finding-change-reason'), 'Logged twice.');
    fireEvent.press(screen.getByTestId('finding-change-kind-due'));
    fireEvent.press(screen.getByTestId('finding-change-kind-void'));
    expect(screen.getByTestId('finding-change-reason').props.value).toBe('Logged twice.');
    fireEvent.press(screen.getByTestId('finding-change-submit'));
    await screen.findByTestId('finding-change-saved');
    const [path, init] = api.writes()[0]!;
    expect(path).toBe(`/api/jobs/${JOB}/findings/${FINDING}`);
    expect(init!.headers).toMatchObject({ 'If-Match': '"v3"' });
    expect(JSON.parse(String(init!.body))).toEqual({ void: { reason: 'Logged twice.' } });
  });

  it('puts the server’s message for dueOn.to under the due date', async () => {
    const api = fakeApi([refused({ 'dueOn.to': 'Not a real date.' })]);
    renderActions();
    fireEvent.press(await screen.findByTestId('finding-change-kind-due'));
    expect(screen.getByTestId('finding-change-due').props.value).toBe('2030-01-10');
    fireEvent.changeText(screen.getByTestId('finding-change-due'), '2030-02-01');
    fireEvent.press(screen.getByTestId('finding-change-submit'));
    expect(within(await screen.findByTestId('finding-change-due-error')).getByText('Not a real date.')).toBeTruthy();
    expect(within(screen.getByTestId('finding-change-error')).getByText('dueOn.to: Not a real date.')).toBeTruthy();
    expect(JSON.parse(String(api.writes()[0]![1]!.body))).toEqual({ dueOn: { to: '2030-02-01' } });
  });

  it('says at the due date that a date before today is refused; a GC manager may back-date on purpose', async () => {
    const today = todayIn('UTC');
    const past = addDays(today, -2);
    const refusedMessage = `The due date is before today (${today} on this job's clock). Choose today or a later date.`;
    const api = fakeApi([{ status: 200, body: { ...finding, dueOn: past, version: 4 } }]);
    const inspector = renderWithQueries(<FindingActions jobId={JOB} finding={finding} role="inspector" isLogger={false} timeZone="UTC" onStale={jest.fn()} />);
    fireEvent.press(await screen.findByTestId('finding-change-kind-due'));
    fireEvent.changeText(screen.getByTestId('finding-change-due'), past);
    expect(screen.queryByTestId('finding-change-backdate')).toBeNull();
    fireEvent.press(screen.getByTestId('finding-change-submit'));
    expect(within(await screen.findByTestId('finding-change-due-error')).getByText(refusedMessage)).toBeTruthy();
    expect(api.writes()).toEqual([]);
    inspector.unmount();

    renderWithQueries(<FindingActions jobId={JOB} finding={finding} role="gc_manager" isLogger={false} timeZone="UTC" onStale={jest.fn()} />);
    fireEvent.press(await screen.findByTestId('finding-change-kind-due'));
    fireEvent.changeText(screen.getByTestId('finding-change-due'), past);
    fireEvent.press(screen.getByTestId('finding-change-submit'));
    expect(within(await screen.findByTestId('finding-change-due-error')).getByText(refusedMessage)).toBeTruthy();
    expect(api.writes()).toEqual([]);
    fireEvent.press(screen.getByTestId('finding-change-backdate-yes'));
    fireEvent.press(screen.getByTestId('finding-change-submit'));
    await screen.findByTestId('finding-change-saved');
    expect(JSON.parse(String(api.writes()[0]![1]!.body))).toEqual({ dueOn: { to: past, backdated: true } });
  });
});

describe('BulkBar', () => {
  const rows = [
    { id: FINDING, label: '#12' },
    { id: OTHER, label: '#13' },
  ] as unknown as FindingDto[];

  it('asks for a company and a reason before reassigning, then sends the ticked findings', async () => {
    const api = fakeApi([{ status: 200, body: { items: rows } }]);
    const onClear = jest.fn();
    renderWithQueries(<BulkBar jobId={JOB} selected={[FINDING, OTHER]} rows={rows} companies={[MECH, ELEC]} onClear={onClear} />);
    fireEvent.press(screen.getByTestId('bulk-apply'));
    expect(await screen.findByText('Choose a responsible company.')).toBeTruthy();
    expect(within(screen.getByTestId('bulk-reason-error')).getByText('Give a reason for the reassignment.')).toBeTruthy();
    expect(api.writes()).toEqual([]);

    fireEvent.press(screen.getByTestId('bulk-company'));
    fireEvent.press(screen.getByText('Bright Electric'));
    fireEvent.changeText(screen.getByTestId('bulk-reason'), 'Wiring, not mechanical.');
    fireEvent.press(screen.getByTestId('bulk-apply'));
    await waitFor(() => expect(onClear).toHaveBeenCalled());
    expect(JSON.parse(String(api.writes()[0]![1]!.body))).toEqual({
      findingIds: [FINDING, OTHER],
      change: { reassign: { companyId: ELEC.id, reason: 'Wiring, not mechanical.' } },
    });
  });

  it('says at the due date that a date before today is refused; a GC manager may back-date all on purpose', async () => {
    const today = todayIn('UTC');
    const past = addDays(today, -1);
    const api = fakeApi([{ status: 200, body: { items: rows } }]);
    const onClear = jest.fn();
    renderWithQueries(<BulkBar jobId={JOB} selected={[FINDING, OTHER]} rows={rows} companies={[MECH, ELEC]} onClear={onClear} role="gc_manager" timeZone="UTC" />);
    fireEvent.press(screen.getByTestId('bulk-kind-due'));
    fireEvent.changeText(screen.getByTestId('bulk-due'), past);
    fireEvent.press(screen.getByTestId('bulk-apply'));
    expect(within(await screen.findByTestId('bulk-due-error')).getByText(`The due date is before today (${today} on this job's clock). Choose today or a later date.`)).toBeTruthy();
    expect(api.writes()).toEqual([]);
    fireEvent.press(screen.getByTestId('bulk-backdate-yes'));
    fireEvent.press(screen.getByTestId('bulk-apply'));
    await waitFor(() => expect(onClear).toHaveBeenCalled());
    expect(JSON.parse(String(api.writes()[0]![1]!.body))).toEqual({ findingIds: [FINDING, OTHER], change: { dueOn: { to: past, backdated: true } } });
  });
});
