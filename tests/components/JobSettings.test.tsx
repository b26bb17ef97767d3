/**
 * The job settings screen with a fake fetch answering like the API (GET/PATCH /api/jobs/:jobId):
 * the shared schema's rules and messages before anything is sent (critical ≤ major ≤ minor), the
 * recurring share typed as a percent and sent as a fraction, If-Match of the version loaded, a 412
 * that says someone else changed the job, reloads it and keeps what was typed, a 400's field
 * messages beside their fields, and the read-only view other roles get.
 */
import { fireEvent, screen, within } from '@testing-library/react-native';
import { setCsrfToken } from '../../components/api/client';
import { CODE_DOCUMENT_WORDS, JobSettingsScreen } from '../../components/setup/JobSettingsScreen';
import { percentToShare, shareToPercent } from '../../components/setup/jobSettingsForm';
import type { JobDetail } from '../../shared/schemas/setup';
import { renderWithQueries, SAMPLE_JOB_ID, sampleJob } from '../support/components';
import type { Role } from '../../shared/words';

jest.setTimeout(30_000);

jest.mock('../../components/ui/useWide', () => ({ useWide: () => true, WIDE_BREAKPOINT: 760 }));
jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());

const JOB = SAMPLE_JOB_ID;

const job = (overrides: Partial<JobDetail> = {}): JobDetail => sampleJob({ timeZone: 'America/Chicago', ...overrides });

type Answer = { status: number; body: unknown };
type Call = { method: string; path: string; headers: Record<string, string>; body: unknown };

/**
 * jsdom has no fetch: a fake that answers GET with the next of `gets` (the last one repeats) and
 * PATCH with the next of `patches`, and records every call.
 */
function fakeApi(gets: JobDetail[], patches: Answer[] = []) {
  const calls: Call[] = [];
  let g = 0;
  let p = 0;
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string, init: RequestInit & { headers: Record<string, string> }) => {
    const method = init.method ?? 'GET';
    calls.push({ method, path, headers: init.headers, body: init.body ? JSON.parse(String(init.body)) : undefined });
    let answer: Answer;
    if (method === 'GET') answer = { status: 200, body: gets[Math.min(g++, gets.length - 1)] };
    else answer = patches[p++] ?? { status: 500, body: { error: { id: 'x', message: 'unexpected write' } } };
    return {
      ok: answer.status >= 200 && answer.status < 300,
      status: answer.status,
      json: async () => answer.body,
      headers: { get: (h: string) => (h.toLowerCase() === 'etag' && answer.status < 300 ? `"v${(answer.body as JobDetail).version}"` : null) },
    };
  });
  return { calls, patches: () => calls.filter((c) => c.method === 'PATCH') };
}

function renderScreen() {
  renderWithQueries(<JobSettingsScreen jobId={JOB} />);
}

const value = (testID: string) => screen.getByTestId(testID).props.value as string;

describe('percent ↔ share', () => {
  it('a typed percent is a fraction of 1 and back (10 % = 0.1)', () => {
    expect(percentToShare('10')).toBe(0.1);
    expect(percentToShare(' 12.5 ')).toBe(0.125);
    expect(percentToShare('7')).toBe(0.07);
    expect(percentToShare('100')).toBe(1);
    expect(shareToPercent(0.1)).toBe('10');
    expect(shareToPercent(0.07)).toBe('7');
    expect(shareToPercent(0.125)).toBe('12.5');
    expect(shareToPercent(1)).toBe('100');
  });
});

describe('what each code document covers, as the screen says it', () => {
  // IMC 306 (appliance access and service space; from memory), IRC M1305 (residential: one- and
  // two-family dwellings and townhouses), NFPA 70 440.14 (disconnect within sight) and 110.26
  // (working space about electrical equipment), all from memory.
  it('names the section each covers, and does not give the NFPA 70 appliance working space or the IRC all work', async () => {
    expect(CODE_DOCUMENT_WORDS.IMC).toMatch(/working space \(306\)/);
    expect(CODE_DOCUMENT_WORDS.IRC).toMatch(/one- and two-family dwellings and townhouses/);
    expect(CODE_DOCUMENT_WORDS.IRC).toMatch(/M1305/);
    expect(CODE_DOCUMENT_WORDS.IRC).not.toMatch(/same checks/);
    expect(CODE_DOCUMENT_WORDS['NFPA 70']).toMatch(/440\.14/);
    expect(CODE_DOCUMENT_WORDS['NFPA 70']).toMatch(/110\.26\) is for electrical equipment, not appliance service/);
    fakeApi([job()]);
    renderScreen();
    await screen.findByTestId('settings-form');
    expect(screen.getByText(CODE_DOCUMENT_WORDS['NFPA 70'])).toBeTruthy();
  });
});

describe('JobSettingsScreen (GC manager)', () => {
  it('shows the saved values, the share as a percent, and the rule in words', async () => {
    fakeApi([job()]);
    renderScreen();
    await screen.findByTestId('settings-form');
    expect(value('settings-due-critical')).toBe('2');
    expect(value('settings-due-major')).toBe('7');
    expect(value('settings-due-minor')).toBe('14');
    expect(value('settings-recurring-units')).toBe('3');
    expect(value('settings-recurring-share')).toBe('10');
    expect(screen.getByTestId('settings-recurring-words').props.children).toBe(
      'A defect type found on at least 3 units and on at least 10 % of the checked units of the kinds it applies to is flagged recurring.',
    );
    expect(screen.getByTestId('settings-timezone').props.children).toBe('America/Chicago');
    // The rule's words follow what is typed.
    fireEvent.changeText(screen.getByTestId('settings-recurring-share'), '25');
    expect(screen.getByTestId('settings-recurring-words').props.children).toMatch(/at least 3 units and on at least 25 % of the checked units/);
  });

  it('refuses critical days above major with the shared message, and sends nothing', async () => {
    const api = fakeApi([job()]);
    renderScreen();
    await screen.findByTestId('settings-form');
    fireEvent.changeText(screen.getByTestId('settings-due-critical'), '10');
    fireEvent.press(screen.getByTestId('settings-submit'));
    // The message of severityDueDaysSchema in shared/schemas/setup.ts.
    expect(await screen.findByText('Due days must not shrink with severity: critical ≤ major ≤ minor.')).toBeTruthy();
    expect(screen.getByTestId('settings-due-days-error')).toBeTruthy();
    // Beside the Save button too, since the field may be scrolled out of sight.
    expect(screen.getByTestId('settings-invalid')).toBeTruthy();
    // Not a whole number: the shared field message at the field.
    fireEvent.changeText(screen.getByTestId('settings-due-critical'), '1.5');
    fireEvent.press(screen.getByTestId('settings-submit'));
    expect(await screen.findByText('Critical: days to fix, a whole number.')).toBeTruthy();
    // A percent over 100, and one unit (the shared minimum is 2).
    fireEvent.changeText(screen.getByTestId('settings-due-critical'), '2');
    fireEvent.changeText(screen.getByTestId('settings-recurring-share'), '150');
    fireEvent.changeText(screen.getByTestId('settings-recurring-units'), '1');
    fireEvent.press(screen.getByTestId('settings-submit'));
    expect(await screen.findByText('Share: at most 100 %.')).toBeTruthy();
    fireEvent.changeText(screen.getByTestId('settings-recurring-share'), '15');
    fireEvent.press(screen.getByTestId('settings-submit'));
    expect(await screen.findByText('Minimum units: a whole number from 2 to 1000.')).toBeTruthy();
    expect(api.patches()).toHaveLength(0);
  });

  it('sends the typed percent as a fraction, with If-Match of the version loaded and only what changed', async () => {
    const saved = job({ recurringThresholds: { minUnits: 4, minShare: 0.125 }, severityDueDays: { critical: 1, major: 7, minor: 14 }, version: 4 });
    const api = fakeApi([job(), saved], [{ status: 200, body: saved }]);
    // The token GET /api/session handed out (the session query keeps it): the one the server accepts.
    setCsrfToken('csrf-token-of-this-session');
    renderScreen();
    await screen.findByTestId('settings-form');
    fireEvent.changeText(screen.getByTestId('settings-recurring-units'), '4');
    fireEvent.changeText(screen.getByTestId('settings-recurring-share'), '12.5');
    fireEvent.changeText(screen.getByTestId('settings-due-critical'), '1');
    fireEvent.press(screen.getByTestId('settings-submit'));
    await screen.findByTestId('settings-saved');
    const [patch] = api.patches();
    expect(patch!.path).toBe(`/api/jobs/${JOB}`);
    expect(patch!.headers['If-Match']).toBe('"v3"');
    expect(patch!.headers['X-CSRF-Token']).toBe('csrf-token-of-this-session');
    expect(patch!.body).toEqual({
      severityDueDays: { critical: 1, major: 7, minor: 14 },
      recurringThresholds: { minUnits: 4, minShare: 0.125 },
    });
    expect(value('settings-recurring-share')).toBe('12.5');
  });

  it('on 412 says someone else changed the job, loads their change, keeps what was typed, and saves over the new version', async () => {
    const theirs = job({ severityDueDays: { critical: 3, major: 7, minor: 14 }, version: 4 });
    const mine = job({ severityDueDays: { critical: 3, major: 7, minor: 14 }, recurringThresholds: { minUnits: 5, minShare: 0.2 }, version: 5 });
    const api = fakeApi(
      [job(), theirs, theirs, mine],
      [
        { status: 412, body: { error: { id: 'precondition_failed', message: 'This record changed since you loaded it.' }, current: theirs } },
        { status: 200, body: mine },
      ],
    );
    renderScreen();
    await screen.findByTestId('settings-form');
    fireEvent.changeText(screen.getByTestId('settings-recurring-units'), '5');
    fireEvent.changeText(screen.getByTestId('settings-recurring-share'), '20');
    fireEvent.press(screen.getByTestId('settings-submit'));

    const notice = await screen.findByTestId('settings-conflict');
    expect(within(notice).getByText(/Someone else changed this job while you were editing/)).toBeTruthy();
    // What they changed is named.
    expect(within(notice).getByTestId('settings-conflict-fields').props.children.join('')).toBe('Changed by them: Critical due days.');
    // The job was read again: their critical days show, and what I typed is still there.
    expect(api.calls.filter((c) => c.method === 'GET').length).toBeGreaterThanOrEqual(2);
    expect(value('settings-due-critical')).toBe('3');
    expect(value('settings-recurring-units')).toBe('5');
    expect(value('settings-recurring-share')).toBe('20');

    // Saving again goes with the version just loaded, and sends only my change.
    fireEvent.press(screen.getByTestId('settings-submit'));
    await screen.findByTestId('settings-saved');
    const second = api.patches()[1]!;
    expect(second.headers['If-Match']).toBe('"v4"');
    expect(second.body).toEqual({ recurringThresholds: { minUnits: 5, minShare: 0.2 } });
    expect(screen.queryByTestId('settings-conflict')).toBeNull();
  });

  it('sends a job limit with its source, refuses one without, and removes one emptied', async () => {
    const slope = { value: 1 / 96, stated: 0.125, unit: 'in/ft', text: '1/8 in/ft', source: 'Job spec 23 05 00' };
    const saved = job({ settings: { min_drain_slope: slope }, version: 4 });
    const api = fakeApi([job({ settings: { max_drain_support_spacing: { value: 1219.2, stated: 4, unit: 'ft', text: "4'", source: 'Spec' } } }), saved], [{ status: 200, body: saved }]);
    renderScreen();
    await screen.findByTestId('settings-form');
    expect(value('settings-limit-max_drain_support_spacing-value')).toBe("4'");
    fireEvent.changeText(screen.getByTestId('settings-limit-min_drain_slope-value'), '1/8 in/ft');
    fireEvent.press(screen.getByTestId('settings-submit'));
    // statedLimitInput's message (shared/schemas/setup.ts).
    expect(await screen.findByText('Enter where the value came from (e.g. installation manual, page).')).toBeTruthy();
    expect(api.patches()).toHaveLength(0);
    fireEvent.changeText(screen.getByTestId('settings-limit-min_drain_slope-source'), 'Job spec 23 05 00');
    fireEvent.changeText(screen.getByTestId('settings-limit-max_drain_support_spacing-value'), '');
    fireEvent.changeText(screen.getByTestId('settings-limit-max_drain_support_spacing-source'), '');
    fireEvent.press(screen.getByTestId('settings-submit'));
    await screen.findByTestId('settings-saved');
    expect(api.patches()[0]!.body).toEqual({
      settings: { min_drain_slope: { value: '1/8 in/ft', source: 'Job spec 23 05 00' }, max_drain_support_spacing: null },
    });
  });

  it('puts a 400’s field messages beside their fields', async () => {
    fakeApi(
      [job()],
      [
        {
          status: 400,
          body: {
            error: {
              id: 'invalid_request',
              message: 'settings.min_drain_slope.value: "steep" does not start with a number.',
              fields: { 'settings.min_drain_slope.value': '"steep" does not start with a number.', 'recurringThresholds.minUnits': 'minUnits: at most 1000.' },
            },
          },
        },
      ],
    );
    renderScreen();
    await screen.findByTestId('settings-form');
    // Passes the client's checks (the server is the one refusing here).
    fireEvent.changeText(screen.getByTestId('settings-recurring-units'), '999');
    fireEvent.press(screen.getByTestId('settings-submit'));
    expect((await screen.findByTestId('settings-recurring-units-error')).props.children).toBe('minUnits: at most 1000.');
    expect(screen.getByTestId('settings-limit-min_drain_slope-value-error').props.children).toBe('"steep" does not start with a number.');
    expect(screen.getByTestId('settings-error')).toBeTruthy();
    expect(screen.getByText('Check the fields marked above.')).toBeTruthy();
  });
});

describe('JobSettingsScreen (other roles)', () => {
  it.each<Role>(['inspector', 'subcontractor'])('%s: reads the values and gets no form', async (role) => {
    const api = fakeApi([job({ role, recurringThresholds: { minUnits: 4, minShare: 0.15 } })]);
    renderScreen();
    await screen.findByTestId('settings-read-only');
    expect(screen.queryByTestId('settings-form')).toBeNull();
    expect(screen.queryByTestId('settings-submit')).toBeNull();
    expect(within(screen.getByTestId('settings-recurring-value')).getByText('At least 4 units and 15 % of checked units')).toBeTruthy();
    expect(within(screen.getByTestId('settings-due-days-value')).getByText('Critical 2 days · Major 7 days · Minor 14 days')).toBeTruthy();
    expect(api.patches()).toHaveLength(0);
  });
});
