/**
 * The crews screen: crews grouped by company with the units each installed; a GC manager names a
 * crew for a company it picks, a subcontractor for their own company only (no company to pick,
 * other companies' crews not offered), an inspector only reads; a name the company already uses
 * is shown at the name field; loading, error and empty states.
 */
import { fireEvent, screen, waitFor, within } from '@testing-library/react-native';
import { CrewsScreen } from '../../components/setup/CrewsScreen';
import type { CrewDto, CrewListResponse, JobCompanyDto } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import { renderWithQueries, SAMPLE_JOB_ID, sampleJob } from '../support/components';

jest.setTimeout(30_000);

jest.mock('../../components/ui/useWide', () => ({ useWide: () => false, WIDE_BREAKPOINT: 760 }));
jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());

const JOB = SAMPLE_JOB_ID;
const MECH = '00000000-0000-4000-8000-0000000000c1';
const ELEC = '00000000-0000-4000-8000-0000000000c2';
const company = (id: string, name: string): JobCompanyDto => ({ id, name, trades: [], isOwner: false, memberCount: 1, version: 1 });
const COMPANIES = [company(ELEC, 'Arc Electric'), company(MECH, 'Mech Co')];
const crew = (id: string, companyId: string, name: string, unitCount: number): CrewDto => ({
  id: `00000000-0000-4000-8000-0000000000e${id}`,
  companyId,
  companyName: companyId === MECH ? 'Mech Co' : 'Arc Electric',
  name,
  unitCount,
  version: 1,
});
const BLUE = crew('1', MECH, 'Blue crew', 12);
const RED = crew('2', MECH, 'Red crew', 1);
const SPARKS = crew('3', ELEC, 'Sparks', 0);

type Answer = { status: number; body: unknown };

function fakeApi(role: Role, crews: Answer, writes: Answer[] = []) {
  const sent: { method: string; path: string; body: unknown; ifMatch: string | null }[] = [];
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    const bare = path.split('?')[0];
    let answer: Answer;
    if (method !== 'GET') {
      const headers = (init?.headers ?? {}) as Record<string, string>;
      sent.push({ method, path, body: init?.body ? JSON.parse(String(init.body)) : null, ifMatch: headers['If-Match'] ?? null });
      answer = writes.shift() ?? { status: 500, body: { error: { id: 'x', message: 'unexpected write' } } };
    } else if (bare === `/api/jobs/${JOB}`) answer = { status: 200, body: sampleJob({ role }) };
    else if (bare === `/api/jobs/${JOB}/crews`) answer = crews;
    else if (bare === `/api/jobs/${JOB}/companies`) answer = { status: 200, body: { items: COMPANIES, nextCursor: null } };
    else answer = { status: 200, body: { items: [], nextCursor: null } };
    return { ok: answer.status < 300, status: answer.status, json: async () => answer.body, headers: { get: () => null } };
  });
  return sent;
}

const list = (items: CrewDto[], companyScope: string | null = null): Answer => ({ status: 200, body: { items, nextCursor: null, companyScope } satisfies CrewListResponse });

describe('the crews screen', () => {
  it('groups the crews by company with the units each installed; an inspector reads them and names none', async () => {
    fakeApi('inspector', list([SPARKS, BLUE, RED]));
    renderWithQueries(<CrewsScreen jobId={JOB} />);
    const mech = await screen.findByTestId('crews-company-Mech Co');
    expect(within(mech).getByTestId('crew-units-Blue crew')).toHaveTextContent('Installed 12 units');
    expect(within(mech).getByTestId('crew-units-Red crew')).toHaveTextContent('Installed 1 unit');
    expect(within(screen.getByTestId('crews-company-Arc Electric')).getByTestId('crew-units-Sparks')).toHaveTextContent('No units recorded yet');
    expect(screen.queryByTestId('crew-add')).toBeNull();
    expect(screen.queryByTestId('crew-rename-Blue crew')).toBeNull();
    expect(screen.getByTestId('setup-read-only')).toBeTruthy();
  });

  it('lets a GC manager pick the company, and shows a name the company already uses at the name field', async () => {
    const sent = fakeApi('gc_manager', list([BLUE]), [
      { status: 409, body: { error: { id: 'duplicate', message: 'Mech Co already has a crew named "blue crew" on this job.' } } },
      { status: 201, body: crew('4', MECH, 'Green crew', 0) },
    ]);
    renderWithQueries(<CrewsScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('crew-add'));
    fireEvent.press(screen.getByTestId('crew-submit'));
    expect(await screen.findByTestId('crew-name-input-error')).toHaveTextContent('Enter a crew name.');
    expect(sent).toEqual([]);
    fireEvent.press(screen.getByTestId('crew-company-input'));
    fireEvent.press(await within(screen.getByTestId('crew-form')).findByText('Mech Co'));
    fireEvent.changeText(screen.getByTestId('crew-name-input'), 'blue crew');
    fireEvent.press(screen.getByTestId('crew-submit'));
    expect(await screen.findByText('Mech Co already has a crew named "blue crew" on this job.')).toBeTruthy();
    expect(sent[0]).toMatchObject({ method: 'POST', path: `/api/jobs/${JOB}/crews`, body: { companyId: MECH, name: 'blue crew' } });
    fireEvent.changeText(screen.getByTestId('crew-name-input'), 'Green crew');
    fireEvent.press(screen.getByTestId('crew-submit'));
    await waitFor(() => expect(sent).toHaveLength(2));
    expect(sent[1]!.body).toEqual({ companyId: MECH, name: 'Green crew' });
  });

  it('gives a subcontractor their own company only: no company to pick, rename with If-Match, removal refused while units name the crew', async () => {
    const sent = fakeApi('subcontractor', list([BLUE], MECH), [
      { status: 200, body: { ...BLUE, name: 'Navy crew', version: 2 } },
      { status: 409, body: { error: { id: 'referenced', message: 'The crew Blue crew still has 12 units it installed. Give those units another crew (or none) first.' } } },
    ]);
    renderWithQueries(<CrewsScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('crew-add'));
    expect(screen.getByTestId('crew-form-company')).toHaveTextContent('A crew of Mech Co');
    expect(screen.queryByTestId('crew-company-input')).toBeNull();
    expect(screen.queryByTestId('setup-read-only')).toBeNull();

    fireEvent.press(screen.getByTestId('crew-rename-Blue crew'));
    fireEvent.changeText(screen.getByTestId('crew-rename-input-Blue crew'), 'Navy crew');
    fireEvent.press(screen.getByTestId('crew-rename-save-Blue crew'));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]).toMatchObject({ method: 'PATCH', path: `/api/jobs/${JOB}/crews/${BLUE.id}`, body: { name: 'Navy crew' }, ifMatch: '"v1"' });

    fireEvent.press(await screen.findByTestId('crew-remove-Blue crew'));
    expect(await screen.findByText(/still has 12 units it installed/)).toBeTruthy();
    expect(sent[1]).toMatchObject({ method: 'DELETE', path: `/api/jobs/${JOB}/crews/${BLUE.id}` });
  });

  it('shows the empty and error states', async () => {
    fakeApi('gc_manager', list([]));
    const first = renderWithQueries(<CrewsScreen jobId={JOB} />);
    expect(await screen.findByTestId('crews-empty')).toHaveTextContent(/Name the crews that install the units/);
    first.unmount();
    fakeApi('gc_manager', { status: 500, body: { error: { id: 'server_error', message: 'Something went wrong on our side.' } } });
    renderWithQueries(<CrewsScreen jobId={JOB} />);
    expect(await screen.findByText(/Something went wrong on our side/)).toBeTruthy();
  });
});
