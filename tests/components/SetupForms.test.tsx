/**
 * Set-up forms checked by the shared schemas: a company added by name or picked from the known
 * ones (each branch's messages on its own fields), and a system's concentration limit typed as
 * text (value and source both empty mean no override; a nested server message lands under the
 * field it names), a defect type's measured rule (each of the rule's messages under its own
 * field), and a model's limits typed with their source (a limit left empty is not sent).
 */
import { fireEvent, screen, waitFor, within } from '@testing-library/react-native';
import { CatalogueScreen } from '../../components/setup/CatalogueScreen';
import { CompaniesScreen } from '../../components/setup/CompaniesScreen';
import { ModelsScreen } from '../../components/setup/ModelsScreen';
import { SystemsScreen } from '../../components/setup/SystemsScreen';
import { refused, renderWithQueries, SAMPLE_JOB_ID, sampleJob } from '../support/components';
import { CAUTION_REQUIRED } from '../../shared/catalogue';

const CAUTION_TEXT = "Lifting: take the unit's weight first. The manufacturer's installation manual, local codes and licensed practice govern.";

jest.setTimeout(30_000);

jest.mock('../../components/ui/useWide', () => ({ useWide: () => true, WIDE_BREAKPOINT: 760 }));
jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());

const JOB = SAMPLE_JOB_ID;
const job = sampleJob();

type Answer = { status: number; body: unknown };

/** jsdom has no fetch: the job and empty lists for reads; each write takes the next answer given. */
function fakeApi(writes: Answer[]) {
  const sent: { method: string; path: string; body: unknown }[] = [];
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    let answer: Answer;
    if (method === 'GET') answer = { status: 200, body: path.split('?')[0] === `/api/jobs/${JOB}` ? job : { items: [], nextCursor: null } };
    else {
      sent.push({ method, path, body: JSON.parse(String(init!.body)) });
      answer = writes.shift() ?? { status: 500, body: { error: { id: 'x', message: 'unexpected write' } } };
    }
    return { ok: answer.status < 300, status: answer.status, json: async () => answer.body, headers: { get: () => null } };
  });
  return sent;
}

describe('adding a company', () => {
  it('asks for a name, then puts the server’s message on the trades', async () => {
    const sent = fakeApi([refused({ trades: 'Choose at least one trade.' })]);
    renderWithQueries(<CompaniesScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('company-add'));
    fireEvent.press(screen.getByTestId('company-submit'));
    expect(within(await screen.findByTestId('company-name-input-error')).getByText('Enter a company name, or choose one you already work with.')).toBeTruthy();
    expect(sent).toEqual([]);

    fireEvent.changeText(screen.getByTestId('company-name-input'), 'Quarry Mechanical');
    fireEvent.press(screen.getByTestId('company-trades-input-mechanical'));
    fireEvent.press(screen.getByTestId('company-submit'));
    expect(await screen.findByText('Choose at least one trade.')).toBeTruthy();
    expect(within(screen.getByTestId('company-form-error')).getByText('Check 1 field: Trades it covers on this job.')).toBeTruthy();
    expect(sent[0]!.body).toEqual({ name: 'Quarry Mechanical', trades: ['mechanical'] });
  });
});

describe('a system’s concentration limit', () => {
  async function openForm() {
    fireEvent.press(await screen.findByTestId('system-add'));
    fireEvent.changeText(screen.getByTestId('system-name-input'), 'VRF-3 (north)');
  }

  it('sends no override while value and source are empty', async () => {
    const sent = fakeApi([{ status: 201, body: {} }]);
    renderWithQueries(<SystemsScreen jobId={JOB} />);
    await openForm();
    fireEvent.press(screen.getByTestId('system-submit'));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]!.body).toMatchObject({ name: 'VRF-3 (north)', refrigerant: 'R-410A', concentrationLimitOverride: null });
  });

  it('checks a typed limit against the shared schema and sends it as a number', async () => {
    const sent = fakeApi([refused({ 'concentrationLimitOverride.source': 'The limit’s source is at most 300 characters.' })]);
    renderWithQueries(<SystemsScreen jobId={JOB} />);
    await openForm();
    fireEvent.changeText(screen.getByTestId('system-limit-source'), 'ASHRAE 15-2019 Table 7-1');
    fireEvent.press(screen.getByTestId('system-submit'));
    expect(within(await screen.findByTestId('system-limit-value-error')).getByText('Limit: more than zero.')).toBeTruthy();
    expect(sent).toEqual([]);

    fireEvent.changeText(screen.getByTestId('system-limit-value'), '26');
    fireEvent.press(screen.getByTestId('system-submit'));
    expect(within(await screen.findByTestId('system-limit-source-error')).getByText('The limit’s source is at most 300 characters.')).toBeTruthy();
    expect(sent[0]!.body).toMatchObject({ concentrationLimitOverride: { value: 26, unit: 'lb/Mcf', source: 'ASHRAE 15-2019 Table 7-1' } });
  });
});

describe('a unit model’s limits', () => {
  it('asks for the source of a typed limit, then sends only the limits typed', async () => {
    const sent = fakeApi([{ status: 201, body: {} }]);
    renderWithQueries(<ModelsScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('model-add'));
    fireEvent.changeText(screen.getByTestId('model-name-input'), 'Cassette 24');
    fireEvent.changeText(screen.getByTestId('model-limit-max_pump_lift-value'), '27-1/2 in');
    fireEvent.press(screen.getByTestId('model-submit'));
    expect(await screen.findByTestId('model-limit-max_pump_lift-source-error')).toBeTruthy();
    expect(within(screen.getByTestId('model-form-error')).getByText('Check the limits marked below.')).toBeTruthy();
    expect(sent).toEqual([]);

    fireEvent.changeText(screen.getByTestId('model-limit-max_pump_lift-source'), 'Installation manual, p. 12');
    fireEvent.press(screen.getByTestId('model-submit'));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]!.body).toMatchObject({ name: 'Cassette 24', limits: { max_pump_lift: { value: '27-1/2 in', source: 'Installation manual, p. 12' } } });
    expect(Object.keys((sent[0]!.body as { limits: object }).limits)).toEqual(['max_pump_lift']);
  });

  it('names the manual once: each limit sends it with its page, and a page with no manual is refused where it was typed', async () => {
    const sent = fakeApi([{ status: 201, body: {} }]);
    renderWithQueries(<ModelsScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('model-add'));
    fireEvent.changeText(screen.getByTestId('model-name-input'), 'Cassette 24');
    fireEvent.changeText(screen.getByTestId('model-limit-max_pump_lift-value'), '27-1/2 in');
    fireEvent.changeText(screen.getByTestId('model-limit-max_pump_lift-source'), '12');
    fireEvent.changeText(screen.getByTestId('model-limit-max_level_deviation-value'), '1° across 840 mm');
    fireEvent.changeText(screen.getByTestId('model-limit-min_clearance_top-value'), '10 in');
    fireEvent.changeText(screen.getByTestId('model-limit-min_clearance_top-source'), 'Job specification 23 81 26, 2.4');
    fireEvent.press(screen.getByTestId('model-submit'));
    expect(within(await screen.findByTestId('model-limit-max_pump_lift-source-error')).getByText('Name the installation manual above: this page is in it.')).toBeTruthy();
    expect(within(screen.getByTestId('model-limit-max_level_deviation-source-error')).getByText('Name the installation manual above, or type where this value came from.')).toBeTruthy();
    expect(sent).toEqual([]);

    fireEvent.changeText(screen.getByTestId('model-manual-input'), 'Cassette 24 installation manual, 2nd edition');
    fireEvent.press(screen.getByTestId('model-submit'));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]!.body).toMatchObject({
      limits: {
        max_pump_lift: { value: '27-1/2 in', source: 'Cassette 24 installation manual, 2nd edition, p. 12' },
        max_level_deviation: { value: '1° across 840 mm', source: 'Cassette 24 installation manual, 2nd edition' },
        min_clearance_top: { value: '10 in', source: 'Job specification 23 81 26, 2.4' },
      },
    });
  });
});

describe('a unit model’s installation position', () => {
  it('sends the position chosen (it sets the A2L release height), and null when not recorded', async () => {
    const sent = fakeApi([{ status: 201, body: {} }, { status: 201, body: {} }]);
    renderWithQueries(<ModelsScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('model-add'));
    fireEvent.changeText(screen.getByTestId('model-name-input'), 'Air handler 36');
    fireEvent.press(screen.getByTestId('model-submit'));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]!.body).toMatchObject({ name: 'Air handler 36', mountPosition: null });

    fireEvent.press(await screen.findByTestId('model-add'));
    fireEvent.changeText(screen.getByTestId('model-name-input'), 'Air handler 48');
    fireEvent.press(screen.getByTestId('model-mount-input'));
    fireEvent.press(screen.getByText('Floor-standing (release height 0.6 m)'));
    fireEvent.press(screen.getByTestId('model-submit'));
    await waitFor(() => expect(sent).toHaveLength(2));
    expect(sent[1]!.body).toMatchObject({ name: 'Air handler 48', mountPosition: 'floor' });
  });
});

describe('a defect type’s measured rule', () => {
  it('puts the rule’s messages under its fields, then sends the rule with its limits', async () => {
    const sent = fakeApi([{ status: 201, body: {} }]);
    renderWithQueries(<CatalogueScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('catalogue-add'));
    fireEvent.changeText(screen.getByTestId('catalogue-code-input'), 'dr-90');
    fireEvent.changeText(screen.getByTestId('catalogue-title-input'), 'Pump lift too high');
    fireEvent.changeText(screen.getByTestId('catalogue-description-input'), 'The pump lifts further than its manual allows.');
    fireEvent.press(screen.getByTestId('catalogue-kinds-input-wall_mounted'));
    fireEvent.changeText(screen.getByTestId('catalogue-fix-input'), 'Lower the riser.');
    fireEvent.press(screen.getByTestId('catalogue-has-rule-yes'));
    fireEvent.changeText(screen.getByTestId('catalogue-measure-input'), 'Pump lift');
    fireEvent.press(screen.getByTestId('catalogue-comparison-input'));
    fireEvent.press(screen.getByText('Between two limits'));
    fireEvent.press(screen.getByTestId('catalogue-submit'));
    expect(await screen.findByText('Say where the limit comes from.')).toBeTruthy();
    expect(screen.getByText('A range needs an upper limit.')).toBeTruthy();
    // Mounting work is hazardous: the type needs a caution, as the server would say.
    expect(screen.getByText(CAUTION_REQUIRED)).toBeTruthy();
    expect(sent).toEqual([]);
    fireEvent.changeText(screen.getByTestId('catalogue-caution-input'), CAUTION_TEXT);

    fireEvent.press(screen.getByTestId('catalogue-limit-input'));
    fireEvent.press(screen.getAllByText('Unit model: Minimum clearance above the unit')[0]!);
    fireEvent.press(screen.getByTestId('catalogue-upper-input'));
    fireEvent.press(screen.getAllByText('Unit model: Maximum condensate pump lift')[0]!);
    fireEvent.press(screen.getByTestId('catalogue-submit'));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]!.body).toMatchObject({
      code: 'DR-90',
      unitKinds: ['wall_mounted'],
      measuredRule: {
        measure: 'Pump lift',
        quantity: 'length',
        comparison: 'between',
        limit: { from: 'model', key: 'min_clearance_top' },
        upper: { from: 'model', key: 'max_pump_lift' },
      },
      caution: CAUTION_TEXT,
      needsCeilingAccess: false,
    });
  });
});
