/**
 * The preferences screen's schedule sentence, with a fake fetch answering like the API
 * (GET/PATCH /api/me/preferences): it says what is saved, in the digest mail's own words
 * (shared/digestSchedule.ts): daily says every day; after choosing weekly on Thursday and saving,
 * once a week, every Thursday, and never "every day".
 */
import { fireEvent, screen, waitFor } from '@testing-library/react-native';
import { PreferencesScreen } from '../../components/preferences/PreferencesScreen';
import type { PreferencesDto } from '../../shared/schemas/preferences';
import { renderWithQueries } from '../support/components';

jest.setTimeout(30_000);

jest.mock('../../components/ui/useWide', () => ({ useWide: () => true, WIDE_BREAKPOINT: 760 }));
jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());

const prefs = (overrides: Partial<PreferencesDto> = {}): PreferencesDto => ({
  digestFrequency: 'daily',
  digestWeekday: 1,
  digestHour: 7,
  timeZone: 'America/Chicago',
  timeZoneIsDefault: true,
  criticalAssignmentMail: true,
  isDefault: true,
  mailboxPath: null,
  version: 1,
  ...overrides,
});

/** GET answers `current`; PATCH saves the body onto it with the next version and answers that. */
function fakeApi(initial: PreferencesDto) {
  let current = initial;
  const patches: unknown[] = [];
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (_path: string, init: RequestInit) => {
    if ((init.method ?? 'GET') === 'PATCH') {
      const body = JSON.parse(String(init.body)) as Partial<PreferencesDto>;
      patches.push(body);
      current = { ...current, ...body, timeZone: body.timeZone ?? current.timeZone, isDefault: false, version: current.version + 1 };
    }
    const answer = current;
    return { ok: true, status: 200, json: async () => answer, headers: { get: (h: string) => (h.toLowerCase() === 'etag' ? `"v${answer.version}"` : null) } };
  });
  return { patches };
}

const schedule = () => String(screen.getByTestId('preferences-schedule').props.children);

it('daily: the schedule sentence says every day at the hour, in the time zone', async () => {
  fakeApi(prefs());
  renderWithQueries(<PreferencesScreen />);
  await screen.findByTestId('preferences-form');
  expect(schedule()).toBe('Your digest comes every day at 07:00 (America/Chicago).');
});

it('after choosing weekly on Thursday and saving, it says once a week, every Thursday, and never every day', async () => {
  const api = fakeApi(prefs());
  renderWithQueries(<PreferencesScreen />);
  await screen.findByTestId('preferences-form');

  fireEvent.press(screen.getByTestId('preferences-frequency-weekly'));
  fireEvent.press(await screen.findByTestId('preferences-weekday'));
  fireEvent.press(screen.getAllByText('Thursday').at(-1)!);
  fireEvent.press(screen.getByTestId('preferences-save'));

  await screen.findByTestId('preferences-saved');
  expect(api.patches).toEqual([expect.objectContaining({ digestFrequency: 'weekly', digestWeekday: 4 })]);
  await waitFor(() => expect(schedule()).toBe('Your digest comes once a week, every Thursday at 07:00 (America/Chicago).'));
  expect(schedule()).not.toMatch(/every day|daily/i);
  // The "Try it" card follows the saved choice too.
  expect(String(screen.getByTestId('digest-now-period').props.children)).toMatch(/this week's digest/);
});

it('off: says no digest is sent on a schedule', async () => {
  fakeApi(prefs({ digestFrequency: 'off', isDefault: false }));
  renderWithQueries(<PreferencesScreen />);
  await screen.findByTestId('preferences-form');
  expect(schedule()).toBe('No digest is sent on a schedule.');
});
