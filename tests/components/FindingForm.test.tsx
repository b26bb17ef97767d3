/**
 * The finding form: prefilled from the defect type (severity, the company whose trade fits, the
 * due date from the job's policy), the schema's messages under the fields before anything is
 * sent, the server's field messages under the fields it names, and one write per press (a retry
 * after a lost answer re-sends the same Idempotency-Key; a change makes a new one).
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, waitFor, within } from '@testing-library/react-native';
import { addDays, todayIn } from '../../components/findings/due';
import { FindingForm } from '../../components/findings/FindingForm';
import type { CatalogueItemDto, JobCompanyDto, JobDetail } from '../../shared/schemas/setup';

jest.setTimeout(30_000);

const JOB = '00000000-0000-4000-8000-0000000000a1';
const UNIT = '00000000-0000-4000-8000-0000000000b1';
const LEVEL = '00000000-0000-4000-8000-0000000000b2';

const job = {
  id: JOB,
  name: 'Harbour Street',
  timeZone: 'UTC',
  unitSystem: 'imperial',
  severityDueDays: { critical: 2, major: 7, minor: 21 },
} as unknown as JobDetail;

function item(id: string, code: string, group: CatalogueItemDto['group'], title: string, severity: CatalogueItemDto['defaultSeverity'], trade: CatalogueItemDto['trade']): CatalogueItemDto {
  return {
    id,
    code,
    group,
    title,
    description: `${title}.`,
    unitKinds: [],
    defaultSeverity: severity,
    trade,
    measuredRule: null,
    fixGuidance: '',
    caution: null,
    needsCeilingAccess: false,
    builtin: true,
    retiredAt: null,
    version: 1,
  } as CatalogueItemDto;
}

const HANGER = item('00000000-0000-4000-8000-0000000000c1', 'MT-01', 'mounting', 'Hanger on chain', 'critical', 'mechanical');
const LABEL = item('00000000-0000-4000-8000-0000000000c2', 'LB-01', 'labelling', 'Missing label', 'minor', 'electrical');

const company = (id: string, name: string, trades: JobCompanyDto['trades']): JobCompanyDto => ({ id, name, trades, isOwner: false, memberCount: 1, version: 1 });
const MECH = company('00000000-0000-4000-8000-0000000000d1', 'Northside Mechanical', ['mechanical']);
const ELEC = company('00000000-0000-4000-8000-0000000000d2', 'Bright Electric', ['electrical']);

type Answer = { status: number; body?: unknown } | Error;

/** jsdom has no fetch: lists answer from fixtures, each POST takes the next answer given. */
function fakeApi(posts: Answer[], companies: JobCompanyDto[] = [MECH, ELEC]) {
  const fn = jest.fn(async (path: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    let answer: Answer;
    if (method === 'GET' && path.includes('/catalogue')) answer = { status: 200, body: { items: [HANGER, LABEL], nextCursor: null } };
    else if (method === 'GET' && path.includes('/companies')) answer = { status: 200, body: { items: companies, nextCursor: null } };
    else answer = posts.shift() ?? { status: 500, body: {} };
    if (answer instanceof Error) throw answer;
    const { status, body } = answer;
    return { ok: status >= 200 && status < 300, status, json: async () => body, headers: { get: () => null } };
  });
  (globalThis as { fetch: unknown }).fetch = fn;
  const sent = () =>
    fn.mock.calls
      .filter(([, init]) => init?.method === 'POST')
      .map(([, init]) => ({ key: (init!.headers as Record<string, string>)['Idempotency-Key'], body: JSON.parse(String(init!.body)) as Record<string, unknown> }));
  return { sent };
}

function renderForm(role: JobDetail['role'] = 'inspector') {
  const onLogged = jest.fn();
  const client = new QueryClient({ defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false, gcTime: Infinity } } });
  render(
    <QueryClientProvider client={client}>
      <FindingForm job={{ ...job, role }} target={{ unitId: UNIT, levelId: LEVEL, label: 'Unit IU-3-07' }} walkId={null} onLogged={onLogged} />
    </QueryClientProvider>,
  );
  return { onLogged };
}

async function chooseItem(label: string) {
  fireEvent.press(await screen.findByTestId('finding-form-item'));
  fireEvent.press(screen.getByText(label));
}

const today = todayIn('UTC');

describe('FindingForm', () => {
  it('shows the schema’s message under the defect type and sends nothing', async () => {
    const api = fakeApi([]);
    renderForm();
    fireEvent.press(await screen.findByTestId('finding-form-submit'));
    expect(await screen.findByText('Choose the defect from the list, or describe it under Something else.')).toBeTruthy();
    expect(within(screen.getByTestId('finding-form-error')).getByText('Check 1 field: Defect type.')).toBeTruthy();
    expect(api.sent()).toEqual([]);
  });

  it('prefills severity, company and due date from the defect type and logs it', async () => {
    const api = fakeApi([{ status: 201, body: { id: 'f1', label: '#1', catalogueItemId: HANGER.id } }]);
    const { onLogged } = renderForm();
    await chooseItem('MT-01 · Hanger on chain (Mounting and hanging)');
    expect(screen.getByTestId('finding-form-severity-critical').props.accessibilityState).toMatchObject({ checked: true });
    expect(screen.getByTestId('finding-form-due').props.value).toBe(addDays(today, 2));
    expect(screen.getByText('Northside Mechanical (suggested)')).toBeTruthy();

    // Another severity moves the due date with the policy while nobody has typed one.
    fireEvent.press(screen.getByTestId('finding-form-severity-minor'));
    expect(screen.getByTestId('finding-form-due').props.value).toBe(addDays(today, 21));

    fireEvent.changeText(screen.getByTestId('finding-form-note'), '  North-east corner.  ');
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    await waitFor(() => expect(onLogged).toHaveBeenCalled());
    expect(api.sent()[0]!.body).toEqual({
      // made on the phone: later writes kept offline name the finding by it
      id: expect.stringMatching(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/),
      catalogueItemId: HANGER.id,
      unitId: UNIT,
      severity: 'minor',
      companyId: MECH.id,
      dueOn: addDays(today, 21),
      note: 'North-east corner.',
    });
  });

  it('logs something else: a title and a trade instead of a defect type, the company suggested from the trade', async () => {
    const api = fakeApi([{ status: 201, body: { id: 'f2', label: '#2', code: 'OTHER', title: 'Return grille hanging loose', catalogueItemId: 'other' } }]);
    const { onLogged } = renderForm();
    fireEvent.press(await screen.findByTestId('finding-form-other'));
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    expect(await screen.findByText('Say what is wrong, in a few words.')).toBeTruthy();
    expect(api.sent()).toEqual([]);

    fireEvent.changeText(screen.getByTestId('finding-form-title'), 'Return grille hanging loose');
    fireEvent.press(screen.getByTestId('finding-form-trade'));
    fireEvent.press(screen.getByText('Electrical'));
    expect(screen.getByText('Bright Electric (suggested)')).toBeTruthy();
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    await waitFor(() => expect(onLogged).toHaveBeenCalled());
    expect(api.sent()[0]!.body).toEqual({
      id: expect.any(String),
      title: 'Return grille hanging loose',
      trade: 'electrical',
      unitId: UNIT,
      severity: 'major',
      companyId: ELEC.id,
      dueOn: addDays(today, 7),
    });
  });

  it('keeps a typed due date when the severity changes', async () => {
    fakeApi([]);
    renderForm();
    await chooseItem('LB-01 · Missing label (Labelling)');
    fireEvent.changeText(screen.getByTestId('finding-form-due'), '2031-01-15');
    fireEvent.press(screen.getByTestId('finding-form-severity-critical'));
    expect(screen.getByTestId('finding-form-due').props.value).toBe('2031-01-15');
  });

  it('a defect type whose trade no company on the job covers, with no company chosen: said at the company, nothing sent or kept', async () => {
    // LB-01 is of the electrical trade; this job's only company covers mechanical work.
    const api = fakeApi([], [MECH]);
    renderForm();
    await chooseItem('LB-01 · Missing label (Labelling)');
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    expect(await screen.findByText('No company on this job covers the electrical trade; choose the responsible company.')).toBeTruthy();
    expect(api.sent()).toEqual([]);
  });

  it('puts the server’s field messages under their fields and its message above the button', async () => {
    fakeApi([{ status: 400, body: { error: { id: 'validation', message: 'dueOn: Not a real date.', fields: { dueOn: 'Not a real date.' } } } }]);
    renderForm();
    await chooseItem('MT-01 · Hanger on chain (Mounting and hanging)');
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    expect(await screen.findByText('Not a real date.')).toBeTruthy();
    expect(within(screen.getByTestId('finding-form-error')).getByText('dueOn: Not a real date.')).toBeTruthy();
  });

  it('says at the due date that a date before today is refused, and sends nothing; an inspector is not offered back-dating', async () => {
    const api = fakeApi([]);
    renderForm('inspector');
    await chooseItem('MT-01 · Hanger on chain (Mounting and hanging)');
    fireEvent.changeText(screen.getByTestId('finding-form-due'), addDays(today, -1));
    expect(screen.queryByTestId('finding-form-backdate')).toBeNull();
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    expect(await screen.findByText(`The due date is before today (${today} on this job's clock). Choose today or a later date.`)).toBeTruthy();
    expect(within(screen.getByTestId('finding-form-error')).getByText('Check 1 field: Due date.')).toBeTruthy();
    expect(api.sent()).toEqual([]);
  });

  it('lets a GC manager back-date on purpose, and says so in the body', async () => {
    const api = fakeApi([{ status: 201, body: { id: 'f1', label: '#1', catalogueItemId: HANGER.id } }]);
    const { onLogged } = renderForm('gc_manager');
    await chooseItem('MT-01 · Hanger on chain (Mounting and hanging)');
    expect(screen.queryByTestId('finding-form-backdate')).toBeNull(); // the policy's date is not in the past
    fireEvent.changeText(screen.getByTestId('finding-form-due'), addDays(today, -3));
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    expect(await screen.findByText(`The due date is before today (${today} on this job's clock). Choose today or a later date.`)).toBeTruthy();
    expect(api.sent()).toEqual([]);
    fireEvent.press(screen.getByTestId('finding-form-backdate-yes'));
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    await waitFor(() => expect(onLogged).toHaveBeenCalled());
    expect(api.sent()[0]!.body).toMatchObject({ dueOn: addDays(today, -3), backdated: true });
  });

  it('re-sends the same write after a lost answer, and a new one after a change', async () => {
    const api = fakeApi([new TypeError('Network request failed'), new TypeError('Network request failed'), { status: 201, body: { id: 'f1', label: '#1' } }]);
    renderForm();
    await chooseItem('MT-01 · Hanger on chain (Mounting and hanging)');
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    await waitFor(() => expect(api.sent()).toHaveLength(1));
    await screen.findByTestId('finding-form-error');
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    await waitFor(() => expect(api.sent()).toHaveLength(2));
    await screen.findByTestId('finding-form-error');
    expect(api.sent()[1]!.key).toBe(api.sent()[0]!.key);

    fireEvent.changeText(screen.getByTestId('finding-form-note'), 'Chain hanger.');
    fireEvent.press(screen.getByTestId('finding-form-submit'));
    await waitFor(() => expect(api.sent()).toHaveLength(3));
    expect(api.sent()[2]!.key).not.toBe(api.sent()[0]!.key);
    expect(api.sent()[2]!.body.note).toBe('Chain hanger.');
  });
});
