/**
 * Photos whenever needed, on the screens: a fix of a measured defect asks for the new measurement
 * and judges it against the finding's own limit as it is typed; the re-inspection sends the
 * inspector's measurement and shows why closing was refused; adding photos asks for one and stops
 * at the finding's limit; the finding screen puts the fix and the re-inspection side by side.
 */
import { fireEvent, render, screen, waitFor, within } from '@testing-library/react-native';
import { AddPhotosForm } from '../../components/correction/AddPhotosForm';
import { FixAndReinspection } from '../../components/correction/FixAndReinspection';
import { FixForm } from '../../components/correction/FixForm';
import { ReinspectControls } from '../../components/correction/ReinspectControls';
import type { RuleResult } from '../../shared/calc/rules';
import type { MeasuredRule } from '../../shared/catalogue/types';
import type { FindingDetail, FindingEventDto, PhotoDto } from '../../shared/schemas/findings';
import { renderWithQueries } from '../support/components';

jest.setTimeout(30_000);

const JOB = '00000000-0000-4000-8000-0000000000a1';
const FINDING = '00000000-0000-4000-8000-0000000000f1';

/** DR-03's rule: pump lift at most the model's limit. */
const RULE: MeasuredRule = { measure: 'Pump lift from the unit base', quantity: 'length', comparison: 'at_most', limit: { from: 'model', key: 'max_pump_lift' } };
/** As logged: 34 in against 30 in (762 mm) from the model's manual. */
const ORIGINAL: RuleResult = {
  status: 'fail',
  pass: false,
  margin: -101.6,
  limit: 762,
  upper: null,
  tolerance: null,
  expected: null,
  measured: 863.6,
  limitSource: 'Model CX-24 installation manual, p. 12',
  message: 'Pump lift: 34 in is 4 in above the maximum 30 in.',
};

const measuredFinding = {
  id: FINDING,
  version: 2,
  label: '#12',
  status: 'open',
  returnCount: 0,
  photoCount: 1,
  measuredText: '34 in',
  ruleResult: ORIGINAL,
  catalogue: { rule: RULE },
} as unknown as FindingDetail;

type Answer = { status: number; body?: unknown };
function fakeApi(writes: Answer[]) {
  const fn = jest.fn(async (_path: string, init?: RequestInit) => {
    const { status, body } = (init?.method ?? 'GET') === 'GET' ? { status: 200, body: {} } : (writes.shift() ?? { status: 500, body: {} });
    return { ok: status >= 200 && status < 300, status, json: async () => body, headers: { get: () => null } };
  });
  (globalThis as { fetch: unknown }).fetch = fn;
  return { writes: () => fn.mock.calls.filter(([, init]) => (init?.method ?? 'GET') !== 'GET') };
}

describe('FixForm on a measured defect', () => {
  it('asks for the new measurement with the server’s words, and judges it against the 30 in the finding was logged against', async () => {
    const api = fakeApi([]);
    renderWithQueries(<FixForm jobId={JOB} finding={measuredFinding} system="imperial" onStale={jest.fn()} />);
    expect(screen.getByText('New measurement after the fix (needed)')).toBeTruthy();
    fireEvent.changeText(screen.getByTestId('fix-form-note'), 'Lowered the pump.');
    fireEvent.press(screen.getByTestId('fix-form-submit'));
    expect(
      within(await screen.findByTestId('fix-form-measured-error')).getByText('Measure pump lift from the unit base again after the fix and type the new value.'),
    ).toBeTruthy();
    expect(api.writes()).toEqual([]);

    fireEvent.changeText(screen.getByTestId('fix-form-measured-input'), '28 in');
    await waitFor(() => expect(screen.getByTestId('fix-form-measured-status')).toBeTruthy());
    expect(String(screen.getByTestId('fix-form-measured-status').props.children)).toMatch(/PASS/);
    expect(JSON.stringify(screen.getByTestId('fix-form-measured-source').props.children)).toContain('Model CX-24 installation manual, p. 12');
    fireEvent.changeText(screen.getByTestId('fix-form-measured-input'), '31 in');
    await waitFor(() => expect(String(screen.getByTestId('fix-form-measured-status').props.children)).toMatch(/FAIL/));
  });

  it('leaves the measurement optional on a finding logged without one', () => {
    fakeApi([]);
    renderWithQueries(<FixForm jobId={JOB} finding={{ ...measuredFinding, measuredText: null, ruleResult: null }} system="imperial" onStale={jest.fn()} />);
    expect(screen.getByText('New measurement after the fix (optional)')).toBeTruthy();
  });
});

describe('ReinspectControls with a measurement', () => {
  it('sends the inspector’s measurement as JSON with If-Match, and shows why closing was refused', async () => {
    const message = 'Your new measurement (31 in) is outside the limit, so this finding cannot be closed: return the fix, or measure again.';
    const api = fakeApi([{ status: 409, body: { error: { id: 'measurement_fails', message } } }]);
    const onStale = jest.fn();
    renderWithQueries(
      <ReinspectControls jobId={JOB} finding={{ id: FINDING, version: 4, label: '#12' }} measured={{ rule: RULE, original: ORIGINAL, system: 'imperial' }} onStale={onStale} />,
    );
    fireEvent.changeText(screen.getByTestId('reinspect-measured-input'), '31 in');
    fireEvent.press(screen.getByTestId('reinspect-accept'));
    expect(within(await screen.findByTestId('reinspect-error')).getByText(message)).toBeTruthy();
    const [path, init] = api.writes()[0]!;
    expect(path).toBe(`/api/jobs/${JOB}/findings/${FINDING}/reinspections`);
    expect(init!.headers).toMatchObject({ 'If-Match': '"v4"' });
    expect(JSON.parse(String(init!.body))).toEqual({ verdict: 'accept', measuredText: '31 in' });
    expect(screen.getByRole('button', { name: 'Accept fix — #12' })).toBeTruthy();
  });

  it('needs a reason to return, and offers no measurement for a defect type without a rule', async () => {
    const api = fakeApi([]);
    renderWithQueries(<ReinspectControls jobId={JOB} finding={{ id: FINDING, version: 4, label: '#12' }} onStale={jest.fn()} />);
    expect(screen.queryByTestId('reinspect-measured-input')).toBeNull();
    fireEvent.press(screen.getByTestId('reinspect-return'));
    expect(within(await screen.findByTestId('reinspect-reason-error')).getByText('Say why the fix is returned.')).toBeTruthy();
    expect(api.writes()).toEqual([]);
  });
});

describe('AddPhotosForm', () => {
  it('asks for a photo before sending anything', async () => {
    const api = fakeApi([]);
    renderWithQueries(<AddPhotosForm jobId={JOB} finding={measuredFinding} onStale={jest.fn()} />);
    expect(screen.getByText('New photos (0 of at most 9)')).toBeTruthy();
    fireEvent.press(screen.getByTestId('add-photos-submit'));
    expect(within(await screen.findByTestId('add-photos-photos-error')).getByText('Add at least one photo.')).toBeTruthy();
    expect(api.writes()).toEqual([]);
  });

  it('says so when the finding holds all the photos it takes', () => {
    fakeApi([]);
    renderWithQueries(<AddPhotosForm jobId={JOB} finding={{ ...measuredFinding, photoCount: 10 }} onStale={jest.fn()} />);
    expect(screen.getByTestId('add-photos-full')).toBeTruthy();
    expect(screen.queryByTestId('add-photos-submit')).toBeNull();
  });
});

describe('FixAndReinspection', () => {
  const photo = (id: string, stage: PhotoDto['stage'], fixId: string | null, at: string): PhotoDto => ({
    id,
    url: `/api/jobs/${JOB}/photos/${id}`,
    thumbUrl: `/api/jobs/${JOB}/photos/${id}/thumb`,
    contentType: 'image/jpeg',
    width: 10,
    height: 10,
    bytes: 100,
    fixId,
    stage,
    uploadedBy: null,
    createdAt: at,
  });
  const event = (kind: FindingEventDto['kind'], at: string, to: Record<string, unknown>, photoIds: string[]): FindingEventDto => ({
    id: `${kind}-${at}`,
    kind,
    actor: { id: 'u', name: kind === 'fix_submitted' ? 'Sam Sub' : 'Ines Inspector' },
    at,
    from: null,
    to,
    reason: null,
    photoIds,
  });

  it('shows the fix photo and the re-inspection photo side by side, labelled, each with its measurement', () => {
    const photos = [photo('p1', 'finding', null, '2026-12-01T10:00:00Z'), photo('p2', 'fix', 'x1', '2026-12-02T10:00:00Z'), photo('p3', 'reinspection', null, '2026-12-03T10:00:00Z')];
    const events = [
      event('logged', '2026-12-01T10:00:00Z', { status: 'open' }, ['p1']),
      event('fix_submitted', '2026-12-02T10:00:00Z', { status: 'fix_submitted', measuredText: '28 in', pass: true, verdict: 'Within the limit of 2\' 6"' }, ['p2']),
      event('accepted', '2026-12-03T10:00:00Z', { status: 'closed', measuredText: '29 in', pass: true, verdict: 'Within the limit of 2\' 6"' }, ['p3']),
    ];
    render(<FixAndReinspection photos={photos} events={events} label="#12" timeZone="UTC" />);
    const fix = screen.getByTestId('fix-and-reinspection-fix');
    const re = screen.getByTestId('fix-and-reinspection-reinspection');
    expect(within(fix).getByText('Fix (latest)')).toBeTruthy();
    expect(within(re).getByText('Re-inspection (latest)')).toBeTruthy();
    expect(within(fix).getByLabelText('#12 fix photo 1')).toBeTruthy();
    expect(within(re).getByLabelText('#12 re-inspection photo 1')).toBeTruthy();
    expect(within(fix).getByText(/New measurement: 28 in/)).toBeTruthy();
    expect(within(re).getByText(/New measurement: 29 in/)).toBeTruthy();
  });

  it('shows nothing before a re-inspection follows the fix', () => {
    render(<FixAndReinspection photos={[]} events={[event('fix_submitted', '2026-12-02T10:00:00Z', {}, [])]} label="#12" timeZone="UTC" />);
    expect(screen.queryByTestId('fix-and-reinspection')).toBeNull();
  });
});
