/**
 * Test record screens: the forms check what is typed with the shared schemas before anything is
 * sent (the parser's own words under the field), figures typed as the trade writes them (a bare
 * number takes the unit chosen beside it), the pressure form's figures as typed so far, the drain
 * test's answers about parts that are not fitted left out; the record page's computed figures side
 * by side with their sources; the witness's "changed meanwhile" on 412; and where each readiness
 * line leads.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, waitFor, within } from '@testing-library/react-native';
import { testBlockerGroups, testBlockerHref } from '../../components/board/Readiness';
import { localToInstant, instantToLocal } from '../../components/tests/format';
import { TestFigures } from '../../components/tests/TestFigures';
import { TestRecordForm, pressurePreview } from '../../components/tests/TestRecordForms';
import { TestRecordScreen } from '../../components/tests/TestRecordScreen';
import { SystemsScreen } from '../../components/setup/SystemsScreen';
import { TESTS_VIEW } from '../../components/tests/testParams';
import { TestSettingsCard } from '../../components/tests/TestSettingsCard';
import { links } from '../../components/links';
import { PA_PER_PSI, STANDARD_ATMOSPHERE_PA } from '../../shared/calc/testRecords';
import type { JobDetail, LevelDto, SystemDto, UnitDto } from '../../shared/schemas/setup';
import type { TestBlocker, TestRecordDto } from '../../shared/schemas/testRecords';
import { sampleJob } from '../support/components';

jest.setTimeout(30_000);
jest.mock('expo-router', () => jest.requireActual('../support/components').linkingRouter());

const JOB = '00000000-0000-4000-8000-0000000000a1';
const SYS = '00000000-0000-4000-8000-0000000000e1';
const L3 = '00000000-0000-4000-8000-0000000000b3';
const UNIT = '00000000-0000-4000-8000-0000000000c1';
const REC = '00000000-0000-4000-8000-0000000000f1';
const ME = '00000000-0000-4000-8000-0000000000d1';
const OTHER = '00000000-0000-4000-8000-0000000000d2';

const job = sampleJob({ id: JOB, role: 'subcontractor', unitSystem: 'imperial', timeZone: 'UTC', testSettings: {} } as Partial<JobDetail>);
const system = { id: SYS, name: 'VRF-3', refrigerant: 'R-410A', companyId: null, chargeBasis: null, unitCount: 1, version: 1 } as unknown as SystemDto;
const unit = { id: UNIT, tag: 'IU-3-07', kind: 'ducted_low', levelId: L3, levelName: 'Level 3', systemId: SYS, systemName: 'VRF-3', version: 1 } as unknown as UnitDto;
const level = { id: L3, name: 'Level 3', position: 3 } as unknown as LevelDto;

type Answer = { status: number; body?: unknown; etag?: string };

/** jsdom has no fetch: GETs answer from `gets` by path, each POST takes the next answer given. */
function fakeApi(posts: Answer[], gets: Record<string, unknown> = {}) {
  const fn = jest.fn(async (path: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    const key = Object.keys(gets).find((k) => path.split('?')[0]!.endsWith(k));
    const answer: Answer = method === 'GET' ? (key ? { status: 200, body: gets[key] } : { status: 404, body: { error: { id: 'not_found', message: 'Not found.' } } }) : (posts.shift() ?? { status: 500, body: {} });
    return { ok: answer.status >= 200 && answer.status < 300, status: answer.status, json: async () => answer.body, headers: { get: (h: string) => (h.toLowerCase() === 'etag' ? (answer.etag ?? null) : null) } };
  });
  (globalThis as { fetch: unknown }).fetch = fn;
  const sent = () =>
    fn.mock.calls
      .filter(([, init]) => init?.method === 'POST')
      .map(([path, init]) => {
        const headers = init!.headers as Record<string, string>;
        const body = init!.body;
        const json = body instanceof FormData ? JSON.parse(String(body.get('data'))) : JSON.parse(String(body));
        return { path, key: headers['Idempotency-Key'], ifMatch: headers['If-Match'], body: json as Record<string, unknown>, photos: body instanceof FormData ? body.getAll('photos').length : 0 };
      });
  return { sent };
}

function renderUi(ui: React.ReactElement) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false, gcTime: Infinity } } });
  return render(<QueryClientProvider client={client}>{ui}</QueryClientProvider>);
}

function renderForm(kind: 'pressure' | 'drain', extra: { unitId?: string; systemId?: string } = {}) {
  const onRecorded = jest.fn();
  renderUi(<TestRecordForm job={job} kind={kind} systems={[system]} units={[unit]} levels={[level]} onRecorded={onRecorded} {...extra} />);
  return { onRecorded };
}

describe('pressure test form', () => {
  it('shows the schema’s and the parser’s words under the fields and sends nothing', async () => {
    const api = fakeApi([]);
    renderForm('pressure', { systemId: SYS });
    fireEvent.changeText(screen.getByTestId('test-form-start-pressure'), '600 psx');
    fireEvent.press(screen.getByTestId('test-form-submit'));
    // The first validation also loads the schemas: allow it more than the default second on a busy machine.
    expect(await screen.findByText('"psx" is not a gauge pressure unit: psig, kPa, bar or MPa.', {}, { timeout: 10_000 })).toBeTruthy();
    expect(screen.getByText('Enter the end gauge pressure.')).toBeTruthy();
    expect(screen.getByText('Say where the target test pressure came from (the manufacturer’s manual and page, or the code section the job follows).')).toBeTruthy();
    expect(within(screen.getByTestId('test-form-error')).getByTestId('test-form-error-fields')).toHaveTextContent(/Check \d+ fields: /);
    expect(api.sent()).toEqual([]);
  });

  it('takes a bare number with the unit chosen beside it, shows the change as read beside the corrected one, and sends the instants in UTC', async () => {
    const api = fakeApi([{ status: 201, body: { id: REC } }]);
    const { onRecorded } = renderForm('pressure', { systemId: SYS });
    // Imperial job: psi and °F by default; one field switched to °C.
    fireEvent.changeText(screen.getByTestId('test-form-target'), '600');
    fireEvent.changeText(screen.getByTestId('test-form-target-source'), 'Outdoor unit manual p. 31');
    fireEvent.changeText(screen.getByTestId('test-form-start-pressure'), '600');
    fireEvent.changeText(screen.getByTestId('test-form-end-pressure'), '579');
    fireEvent.press(screen.getByTestId('test-form-start-temperature-unit-°C'));
    fireEvent.changeText(screen.getByTestId('test-form-start-temperature'), '20');
    fireEvent.changeText(screen.getByTestId('test-form-end-temperature'), '10 °C');
    fireEvent.changeText(screen.getByTestId('test-form-start-at'), '2026-12-01 08:00');
    fireEvent.changeText(screen.getByTestId('test-form-end-at'), '2026-12-02 08:00');
    fireEvent.changeText(screen.getByTestId('test-form-gauge-id'), 'G-17');
    fireEvent.changeText(screen.getByTestId('test-form-gauge-calibrated'), '2026-06-01');
    fireEvent.changeText(screen.getByTestId('test-form-gauge-resolution'), '1');
    // Worked by hand: P1 = 600 psi + 101.325 kPa at 293.15 K carried to 283.15 K is 579.03 psi gauge;
    // 579 read is a 0.03 psi drop the temperature does not explain, within the 1 psi resolution.
    expect(screen.getByTestId('test-form-preview-changes')).toHaveTextContent('Change as read −21 psi · corrected for temperature −0.03 psi');
    expect(screen.getByTestId('test-form-preview-verdict')).toHaveTextContent('Would pass');
    fireEvent.press(screen.getByTestId('test-form-submit'));
    await waitFor(() => expect(onRecorded).toHaveBeenCalled());
    expect(api.sent()[0]!.body).toEqual({
      id: expect.stringMatching(/^[0-9a-f-]{36}$/),
      kind: 'pressure',
      systemId: SYS,
      medium: 'nitrogen',
      targetPressure: { value: '600 psi', source: 'Outdoor unit manual p. 31' },
      startPressure: '600 psi',
      endPressure: '579 psi',
      startTemperature: '20 °C',
      endTemperature: '10 °C',
      startAt: '2026-12-01T08:00:00.000Z',
      endAt: '2026-12-02T08:00:00.000Z',
      gauge: { identifier: 'G-17', calibratedOn: '2026-06-01', resolution: '1 psi' },
    });
    expect(api.sent()[0]!.key).toEqual(expect.any(String));
  });

  it('computes the preview the way the record page will: a drop the temperature does not explain fails', () => {
    const p = pressurePreview(
      { startPressure: '600 psi', endPressure: '590 psi', startTemperature: '68 °F', endTemperature: '68 °F', startAt: '2026-12-01 08:00', endAt: '2026-12-01 10:00', resolution: '1 psi' },
      { timeZone: 'UTC', testSettings: {} } as unknown as JobDetail,
    );
    expect(p).toMatchObject({ uncorrected: '−10 psi', corrected: '−10 psi', allowed: '1 psi', hold: '2\u00a0h', passed: false });
    // No times yet: no verdict.
    expect(pressurePreview({ startPressure: '600 psi', endPressure: '590 psi', startTemperature: '20 °C', endTemperature: '20 °C', resolution: '1 psi' }, { timeZone: 'UTC' } as unknown as JobDetail)?.passed).toBeNull();
  });
});

describe('times on the job’s clock', () => {
  it.each([
    ['UTC', '2026-12-01 08:00', '2026-12-01T08:00:00.000Z'],
    ['America/New_York', '2026-12-01 08:00', '2026-12-01T13:00:00.000Z'], // EST, UTC−5 in December
    ['America/New_York', '2026-07-01 08:00', '2026-07-01T12:00:00.000Z'], // EDT, UTC−4 in July
    ['Australia/Sydney', '2026-12-01 08:00', '2026-11-30T21:00:00.000Z'], // AEDT, UTC+11
  ])('%s %s is %s and back', (zone, local, iso) => {
    expect(localToInstant(local, zone)).toBe(iso);
    expect(instantToLocal(iso, zone)).toBe(local);
  });
  it('leaves text that is not a time as typed, for the schema to word', () => {
    expect(localToInstant('tomorrow', 'UTC')).toBe('tomorrow');
  });
});

describe('drain test form', () => {
  it('asks about the pump only when one is fitted, needs the answer then, and sends null for parts not fitted', async () => {
    const api = fakeApi([{ status: 201, body: { id: REC } }]);
    const { onRecorded } = renderForm('drain', { unitId: UNIT });
    expect(screen.getByTestId('test-form-caution')).toHaveTextContent(/Electrical/);
    fireEvent.press(screen.getByTestId('test-form-submit'));
    expect(await screen.findByText('Say yes or no: water poured.')).toBeTruthy();
    expect(screen.queryByTestId('test-form-pump-runs')).toBeNull();
    fireEvent.press(screen.getByTestId('test-form-poured-yes'));
    fireEvent.press(screen.getByTestId('test-form-termination-yes'));
    fireEvent.press(screen.getByTestId('test-form-pump-yes'));
    fireEvent.press(screen.getByTestId('test-form-float-no'));
    fireEvent.press(screen.getByTestId('test-form-no-leak-yes'));
    fireEvent.press(screen.getByTestId('test-form-submit'));
    expect(await screen.findByText('Say yes or no: pump runs and lifts.')).toBeTruthy();
    expect(api.sent()).toEqual([]);
    fireEvent.press(screen.getByTestId('test-form-pump-runs-yes'));
    fireEvent.press(screen.getByTestId('test-form-submit'));
    await waitFor(() => expect(onRecorded).toHaveBeenCalled());
    expect(api.sent()[0]!.body).toEqual({
      id: expect.any(String),
      kind: 'drain',
      unitId: UNIT,
      waterPoured: true,
      reachesTermination: true,
      pumpFitted: true,
      pumpRunsAndLifts: true,
      floatSwitchFitted: false,
      floatSwitchStopsUnit: null,
      noLeakAtJoints: true,
    });
  });

  it('puts the server’s field message under its field', async () => {
    fakeApi([{ status: 400, body: { error: { id: 'validation', message: 'unitId: Unit not on this job.', fields: { unitId: 'Unit not on this job.' } } } }]);
    renderForm('drain');
    fireEvent.press(screen.getByTestId('test-form-unit'));
    fireEvent.press(screen.getByText('IU-3-07 · Ducted, low static · Level 3'));
    for (const id of ['poured', 'termination', 'no-leak']) fireEvent.press(screen.getByTestId(`test-form-${id}-yes`));
    for (const id of ['pump', 'float']) fireEvent.press(screen.getByTestId(`test-form-${id}-no`));
    fireEvent.press(screen.getByTestId('test-form-submit'));
    expect(await screen.findByText('Unit not on this job.')).toBeTruthy();
    expect(within(screen.getByTestId('test-form-error')).getByText(/Check 1 field: Unit/)).toBeTruthy();
  });
});

const pressureRecord = (over: Partial<TestRecordDto> = {}): TestRecordDto =>
  ({
    id: REC,
    jobId: JOB,
    kind: 'pressure',
    system: { id: SYS, name: 'VRF-3' },
    unit: null,
    company: { id: 'c1', name: 'Northside Mechanical' },
    result: 'passed',
    reasons: [],
    note: null,
    recordedBy: { id: OTHER, name: 'Sam Fitter' },
    recordedAt: '2026-12-02T08:05:00Z',
    witnessedBy: null,
    witnessedAt: null,
    witnessNote: null,
    locked: false,
    supersedesId: null,
    supersededById: null,
    current: true,
    photos: [],
    version: 1,
    caution: 'Caution text',
    data: {
      systemId: SYS,
      medium: 'nitrogen',
      targetPressure: { value: '600 psig', source: 'Outdoor unit manual p. 31' },
      startPressure: '600 psig',
      endPressure: '579 psig',
      startTemperature: '20 °C',
      endTemperature: '10 °C',
      startAt: '2026-12-01T08:00:00Z',
      endAt: '2026-12-02T08:00:00Z',
      gauge: { identifier: 'G-17', calibratedOn: '2026-06-01', resolution: '1 psi' },
    },
    figures: {
      unit: 'psi',
      atmospheric: { value: STANDARD_ATMOSPHERE_PA, source: 'Standard atmosphere', from: 'default' },
      target: { pa: 600 * PA_PER_PSI, value: 600, text: '600 psig', source: 'Outdoor unit manual p. 31' },
      start: { pa: 600 * PA_PER_PSI, value: 600, absolutePa: 0, kelvin: 293.15 },
      end: { pa: 579 * PA_PER_PSI, value: 579, absolutePa: 0, kelvin: 283.15 },
      uncorrectedChange: { pa: -21 * PA_PER_PSI, value: -21 },
      correctedChange: { pa: -0.0314 * PA_PER_PSI, value: -0.0314 },
      expectedEnd: { pa: 579.0314 * PA_PER_PSI, value: 579.0314 },
      allowedDrop: { value: PA_PER_PSI, source: 'No drop beyond the gauge’s resolution', from: 'default', valueInUnit: 1 },
      holdMinutes: 1440,
      minHold: null,
      reachedTarget: true,
      heldLongEnough: null,
      gaugeResolution: { pa: PA_PER_PSI, value: 1 },
    },
    ...over,
  }) as TestRecordDto;

describe('record page', () => {
  it('shows the change as read and the corrected change side by side, the limit with its source and the hold', () => {
    renderUi(<TestFigures record={pressureRecord()} />);
    expect(screen.getByTestId('test-figures-uncorrected')).toHaveTextContent(/Change as read.*−21 psi.*600 psig → 579 psig/);
    expect(screen.getByTestId('test-figures-corrected')).toHaveTextContent(/Corrected for temperature.*−0.03 psi.*20 °C → 10 °C; expected end 579.03 psi/);
    expect(screen.getByTestId('test-figures-allowed')).toHaveTextContent(/^Allowed drop1 psiNo drop beyond the gauge’s resolution$/);
    expect(screen.getByTestId('test-figures-hold')).toHaveTextContent(/24\sh.*The job sets no minimum hold/);
  });

  it('shows a charge record’s additional charge from the lengths, the amount weighed in and the difference', () => {
    const charge = {
      ...pressureRecord(),
      kind: 'charge',
      result: 'recorded',
      data: { systemId: SYS, liquidLines: [{ size: '3/8"', length: '30 m' }], weighedIn: '2.7 kg' },
      figures: {
        lines: [{ size: '3/8"', lengthMm: 30000, factor: { size: '3/8"', kgPerM: 0.054, text: '0.054 kg/m', source: 'Manual table 4' }, additionalKg: 1.62 }],
        missingFactors: [],
        additionalKg: 1.62,
        weighedInKg: 2.7,
        differenceKg: 1.08,
        totalChargeKg: 14.7,
        factoryCharge: { value: 12, source: 'Nameplate', from: 'record' },
      },
    } as unknown as TestRecordDto;
    renderUi(<TestFigures record={charge} unitSystem="metric" />);
    expect(screen.getByTestId('test-figures-line-0')).toHaveTextContent(/30 m × 0\.054 kg\/m = 1\.62 kg \(3\.57 lb\)Manual table 4/);
    expect(screen.getByTestId('test-figures-difference')).toHaveTextContent(/\+1\.08 kg \(2\.38 lb\)/);
    expect(screen.getByTestId('test-figures-total')).toHaveTextContent(/14\.7 kg \(32\.41 lb\) \(factory \+ weighed in\)/);
  });

  it('witnesses with If-Match, and says "changed meanwhile" with a reload on 412', async () => {
    const record = pressureRecord();
    const api = fakeApi(
      [{ status: 412, body: { error: { id: 'stale', message: 'The record changed since you loaded it.', current: record } } }],
      {
        [`/jobs/${JOB}`]: sampleJob({ id: JOB, role: 'inspector' }),
        [`/test-records/${REC}`]: record,
        '/test-records': { items: [record], nextCursor: null, caution: 'x' },
        '/session': { user: { id: ME, name: 'Ines Inspector' }, csrfToken: 't' },
      },
    );
    renderUi(<TestRecordScreen jobId={JOB} recordId={REC} />);
    expect(await screen.findByTestId('test-record-caution')).toHaveTextContent(/Nitrogen pressure · Brazing/);
    fireEvent.press(await screen.findByTestId('test-record-witness-submit'));
    expect(await screen.findByTestId('test-record-stale')).toHaveTextContent(/Someone changed this record while you were looking at it\. Reload/);
    expect(api.sent()[0]).toMatchObject({ path: `/api/jobs/${JOB}/test-records/${REC}/witness`, ifMatch: '"v1"', key: expect.any(String) });
    expect(screen.getByTestId('test-record-reload')).toBeTruthy();
  });

  it('offers no witness to the person who made the record, and a correction once it is locked', async () => {
    const locked = pressureRecord({ locked: true, witnessedBy: { id: ME, name: 'Ines Inspector' }, witnessedAt: '2026-12-02T09:00:00Z' });
    fakeApi([], {
      [`/jobs/${JOB}`]: sampleJob({ id: JOB, role: 'inspector' }),
      [`/test-records/${REC}`]: locked,
      '/test-records': { items: [locked], nextCursor: null, caution: 'x' },
      '/session': { user: { id: OTHER, name: 'Sam Fitter' }, csrfToken: 't' },
    });
    renderUi(<TestRecordScreen jobId={JOB} recordId={REC} />);
    expect(await screen.findByTestId('test-record-correct')).toBeTruthy();
    expect(String(screen.getByTestId('test-record-correct').props.href)).toBe(`/jobs/${JOB}/tests/new?kind=pressure&supersedesId=${REC}`);
    expect(screen.queryByTestId('test-record-witness')).toBeNull();
    expect(screen.getByTestId('test-record-witness-state')).toHaveTextContent('Witnessed · locked');
  });
});

describe('readiness lines', () => {
  const b = (over: Partial<TestBlocker>): TestBlocker => ({ kind: 'pressure', state: 'missing', systemId: SYS, systemName: 'VRF-3', unitId: null, unitTag: null, levelId: L3, recordId: null, ...over });
  it('lead to the form for a missing record, to the record when it failed or waits for a witness, to the level’s units when several are missing', () => {
    const lines = testBlockerGroups([
      b({}),
      b({ kind: 'evacuation', state: 'failed', recordId: REC }),
      b({ kind: 'drain', unitId: UNIT, unitTag: 'IU-3-07', levelId: null }),
      b({ kind: 'drain', state: 'awaiting_witness', unitId: 'u2', unitTag: 'IU-3-08', recordId: 'r2', levelId: null }),
      b({ kind: 'drain', state: 'awaiting_witness', unitId: 'u3', unitTag: 'IU-3-09', recordId: 'r3', levelId: null }),
    ]);
    expect(lines.map((l) => [l.text, testBlockerHref(JOB, l, L3)])).toEqual([
      ['Pressure test of VRF-3: not on record', `/jobs/${JOB}/tests/new?kind=pressure&systemId=${SYS}`],
      ['Evacuation of VRF-3: failed', `/jobs/${JOB}/tests/${REC}`],
      ['Drain test of unit IU-3-07: not on record', `/jobs/${JOB}/tests/new?kind=drain&unitId=${UNIT}`],
      ['Drain test, passed, waiting for a witness: 2 units, IU-3-08, IU-3-09', `/jobs/${JOB}/tests?kind=drain&witnessed=false&current=true`],
    ]);
    const many = testBlockerGroups([b({ kind: 'drain', unitId: 'a', unitTag: 'A', levelId: null }), b({ kind: 'drain', unitId: 'c', unitTag: 'C', levelId: null })]);
    expect(testBlockerHref(JOB, many[0]!, L3)).toBe(`/jobs/${JOB}/tests/new?kind=drain&levelId=${L3}`);
  });
});

describe('a system’s responsible company', () => {
  it('is chosen on the system form and sent as companyId; left empty, the job’s mechanical companies answer', async () => {
    const MECH = { id: '00000000-0000-4000-8000-0000000000d9', name: 'Northside Mechanical', trades: ['mechanical'], isOwner: false, memberCount: 1, version: 1 };
    const api = fakeApi([{ status: 201, body: {} }], {
      [`/jobs/${JOB}`]: sampleJob({ id: JOB, role: 'gc_manager' }),
      '/companies': { items: [MECH], nextCursor: null },
      '/systems': { items: [], nextCursor: null },
    });
    renderUi(<SystemsScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('system-add'));
    fireEvent.changeText(screen.getByTestId('system-name-input'), 'VRF-5');
    expect(screen.getByText(/left empty, every mechanical company on the job does/)).toBeTruthy();
    fireEvent.press(screen.getByTestId('system-company-input'));
    fireEvent.press(await screen.findByText('Northside Mechanical'));
    fireEvent.press(screen.getByTestId('system-submit'));
    await waitFor(() => expect(api.sent()).toHaveLength(1));
    expect(api.sent()[0]!.body).toMatchObject({ name: 'VRF-5', companyId: MECH.id });
  });
});

describe('the list’s filters in the address', () => {
  const queryOf = (href: string) => Object.fromEntries(new URLSearchParams(String(href).split('?')[1] ?? ''));
  it('reads back every filter links.tests writes, and drops a bad value rather than sending it', () => {
    const view = { systemId: SYS, unitId: UNIT, kind: 'drain', result: 'failed', witnessed: 'false', current: 'true' } as const;
    const href = links.tests(JOB, view);
    expect(href).toBe(`/jobs/${JOB}/tests?systemId=${SYS}&unitId=${UNIT}&kind=drain&result=failed&witnessed=false&current=true`);
    expect(TESTS_VIEW.parse(queryOf(String(href)))).toEqual(view);
    expect(TESTS_VIEW.parse({ kind: 'vacuum', result: 'maybe', witnessed: 'yes', systemId: 'VRF-1' })).toEqual({});
    expect(links.tests(JOB)).toBe(`/jobs/${JOB}/tests`);
    expect(Object.keys(TESTS_VIEW.toParams(view)).sort()).toEqual([...TESTS_VIEW.keys].sort());
  });
});

describe('the limits the tests are judged by', () => {
  function patches(fn: jest.Mock) {
    return fn.mock.calls.filter(([, init]) => init?.method === 'PATCH').map(([, init]) => ({ ifMatch: (init!.headers as Record<string, string>)['If-Match'], body: JSON.parse(String(init!.body)) }));
  }
  it('shows the stated defaults, asks a GC manager for the source, and sends only the setting changed with If-Match', async () => {
    const gcJob = sampleJob({ id: JOB, role: 'gc_manager', version: 7, testSettings: { minDecayHold: { value: 15, text: '15 min', source: 'Outdoor unit manual p. 40' } } } as Partial<JobDetail>);
    // Every request answers the job: the PATCH's answer is all this card reads.
    const fn = jest.fn(async (_path: string, _init?: RequestInit) => ({ ok: true, status: 200, json: async () => gcJob, headers: { get: () => null } }));
    (globalThis as { fetch: unknown }).fetch = fn;
    renderUi(<TestSettingsCard job={gcJob} />);
    expect(screen.getByTestId('test-settings-targetVacuum')).toHaveTextContent(/500 microns: common practice, not a code value/);
    expect(screen.getByTestId('test-settings-minDecayHold')).toHaveTextContent('Decay test: minimum hold15 min · job setting: Outdoor unit manual p. 40');
    fireEvent.press(screen.getByTestId('test-settings-edit'));
    fireEvent.changeText(screen.getByTestId('test-settings-allowedPressureDrop-value'), '2 psi');
    fireEvent.press(screen.getByTestId('test-settings-save'));
    expect(await screen.findByText('Say where the allowed pressure drop came from (the manufacturer’s manual and page, or the code section the job follows).')).toBeTruthy();
    expect(patches(fn)).toEqual([]);
    fireEvent.changeText(screen.getByTestId('test-settings-allowedPressureDrop-source'), 'Specification 23 05 00, 3.4');
    fireEvent.press(screen.getByTestId('test-settings-save'));
    await waitFor(() => expect(patches(fn)).toHaveLength(1));
    expect(patches(fn)[0]).toEqual({ ifMatch: '"v7"', body: { testSettings: { allowedPressureDrop: { value: '2 psi', source: 'Specification 23 05 00, 3.4' } } } });
  });
});
