/**
 * The GC manager's setup checklist on the job's home: each line in words with its count and first
 * names, a link to the set-up page that fixes it, and nothing at all once the job is complete.
 */
import { act, screen, waitFor } from '@testing-library/react-native';
import { SetupChecklist, checklistWords } from '../../components/jobs/SetupChecklist';
import type { SetupChecklist as Checklist } from '../../shared/schemas/setup';
import { SAMPLE_JOB_ID, renderWithQueries } from '../support/components';

jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());

function answer(body: Checklist) {
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string): Promise<unknown> => {
    if (path !== `/api/jobs/${SAMPLE_JOB_ID}/setup/checklist`) return { ok: false, status: 404, json: async () => ({ error: { id: 'not_found', message: path } }), headers: { get: () => null } };
    return { ok: true, status: 200, json: async () => body, headers: { get: () => null } };
  });
}

describe('the setup checklist', () => {
  it('says what is missing, names the first few, and links each line to its set-up page', async () => {
    answer({
      complete: false,
      lines: [
        { key: 'levels_without_spaces', count: 4, examples: ['Ground', 'First', 'Second'], section: 'spaces' },
        { key: 'systems_without_charge', count: 1, examples: ['VRF-1'], section: 'systems' },
        { key: 'pending_invitations', count: 2, examples: ['a@example.com', 'b@example.com'], section: 'members' },
      ],
    });
    renderWithQueries(<SetupChecklist jobId={SAMPLE_JOB_ID} />);
    await screen.findByTestId('setup-checklist');
    expect(screen.getByText('4 levels have no spaces: Ground, First, Second, … →')).toBeTruthy();
    expect(screen.getByText('1 system has no refrigerant charge: VRF-1 →')).toBeTruthy();
    expect(screen.getByText('2 invitations are not accepted yet: a@example.com, b@example.com →')).toBeTruthy();
    expect(screen.getByTestId('setup-checklist-systems_without_charge').props.href).toBe(`/jobs/${SAMPLE_JOB_ID}/setup/systems`);
    expect(screen.getByTestId('setup-checklist-pending_invitations').props.href).toBe(`/jobs/${SAMPLE_JOB_ID}/setup/members`);
  });

  it('is hidden once the job is complete', async () => {
    answer({ complete: true, lines: [] });
    renderWithQueries(<SetupChecklist jobId={SAMPLE_JOB_ID} />);
    await waitFor(() => expect((globalThis as unknown as { fetch: jest.Mock }).fetch).toHaveBeenCalled());
    // Let the answer land (one macrotask flushes the fake fetch's promises), then nothing is shown.
    await act(() => new Promise((resolve) => setTimeout(resolve, 0)));
    expect(screen.queryByTestId('setup-checklist')).toBeNull();
  });

  it('words a job with nothing yet as a first step', () => {
    expect(checklistWords({ key: 'no_levels', count: 1, examples: ['the job'], section: 'levels' })).toBe('No levels yet: add the building’s floors');
    expect(checklistWords({ key: 'units_without_system', count: 1, examples: ['IU-2'], section: 'units' })).toBe('1 unit is on no system: IU-2');
  });
});
