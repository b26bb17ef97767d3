/**
 * Reports in the app: the close-out button asks for the report (POST /reports with the screen's
 * scope, an Idempotency-Key) and opens the report's page; the page shows the progress in words
 * and a bar, then the download; a report of someone else (404) and a failed build say so.
 */
import { fireEvent, screen, waitFor } from '@testing-library/react-native';
import { ReportActions } from '../../components/reports/ReportActions';
import { ReportProgressScreen } from '../../components/reports/ReportProgressScreen';
import type { ReportRunDto } from '../../shared/schemas/reports';
import { renderWithQueries, SAMPLE_JOB_ID } from '../support/components';

jest.setTimeout(30_000);

const mockPush = jest.fn();
jest.mock('expo-router', () => ({
  ...jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter(),
  router: { push: (...args: unknown[]) => mockPush(...args) },
}));

const JOB = SAMPLE_JOB_ID;
const RUN = '00000000-0000-4000-8000-0000000000f1';
const LEVEL = '00000000-0000-4000-8000-0000000000b1';

function run(overrides: Partial<ReportRunDto>): ReportRunDto {
  return {
    id: RUN,
    jobId: JOB,
    kind: 'close-out',
    status: 'running',
    scopeLabel: 'Level 3',
    findingsTotal: 1200,
    findingsDone: 340,
    photosTotal: 500,
    createdAt: '2026-12-03T10:00:00.000Z',
    finishedAt: null,
    expiresAt: null,
    download: null,
    byteSize: null,
    message: null,
    ...overrides,
  };
}

type Answer = { status: number; body: unknown };

function fakeApi(answers: Answer[]) {
  const sent: { method: string; path: string; body: unknown; headers: Record<string, string> }[] = [];
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string, init?: RequestInit) => {
    const headers = (init?.headers ?? {}) as Record<string, string>;
    sent.push({ method: init?.method ?? 'GET', path, body: init?.body ? JSON.parse(String(init.body)) : null, headers });
    const answer = answers.length > 1 ? answers.shift()! : answers[0]!;
    return { ok: answer.status < 300, status: answer.status, json: async () => answer.body, headers: { get: () => null } };
  });
  return sent;
}

describe('reports in the app', () => {
  beforeEach(() => mockPush.mockReset());

  it('asks for the close-out report of the screen’s scope and opens its page', async () => {
    const sent = fakeApi([{ status: 202, body: run({ status: 'queued', findingsDone: 0 }) }]);
    renderWithQueries(<ReportActions jobId={JOB} place={{ levelId: LEVEL }} what="of this level" crewList={{ levelId: LEVEL }} testID="r" />);
    fireEvent.press(screen.getByTestId('r-close-out'));
    await waitFor(() => expect(mockPush).toHaveBeenCalledWith(`/jobs/${JOB}/reports/${RUN}`));
    expect(sent).toHaveLength(1);
    expect(sent[0]).toMatchObject({ method: 'POST', path: `/api/jobs/${JOB}/reports`, body: { kind: 'close-out', levelId: LEVEL } });
    expect(sent[0]!.headers['Idempotency-Key']).toBeTruthy();
    expect(screen.getByTestId('r-close-out')).toHaveTextContent('Close-out report of this level (PDF)');
    expect(screen.getByTestId('r-crew-list')).toBeTruthy();
  });

  it('says why the report could not be asked for', async () => {
    fakeApi([{ status: 404, body: { error: { id: 'not_found', message: 'That level is not on this job.' } } }]);
    renderWithQueries(<ReportActions jobId={JOB} place={{ levelId: LEVEL }} testID="r" />);
    fireEvent.press(screen.getByTestId('r-close-out'));
    expect(await screen.findByTestId('r-error')).toHaveTextContent('That level is not on this job.');
    expect(mockPush).not.toHaveBeenCalled();
  });

  it('shows the progress in words and a bar, then the download', async () => {
    const download = `/api/jobs/${JOB}/reports/${RUN}/report.pdf`;
    fakeApi([
      { status: 200, body: run({}) },
      { status: 200, body: run({ status: 'done', findingsDone: 1200, download, byteSize: 31_457_280, expiresAt: '2026-12-10T10:00:00.000Z' }) },
    ]);
    renderWithQueries(<ReportProgressScreen jobId={JOB} reportId={RUN} />);
    expect(await screen.findByTestId('report-progress')).toHaveTextContent('Building report: 340 of 1,200 findings');
    expect(screen.getByTestId('report-bar').props.accessibilityValue).toEqual({ min: 0, max: 1200, now: 340 });
    expect(await screen.findByTestId('report-download', {}, { timeout: 6000 })).toBeTruthy();
    expect(screen.getByTestId('report-progress')).toHaveTextContent('Report ready: 1,200 findings');
    expect(screen.queryByTestId('report-bar')).toBeNull();
  });

  it('says when a report is not the caller’s (404) or failed', async () => {
    fakeApi([{ status: 404, body: { error: { id: 'not_found', message: 'That report is not here.' } } }]);
    const first = renderWithQueries(<ReportProgressScreen jobId={JOB} reportId={RUN} />);
    expect(await screen.findByTestId('report-not-found')).toBeTruthy();
    first.unmount();
    fakeApi([{ status: 200, body: run({ status: 'failed', message: 'Something went wrong while building the report. Ask for it again.' }) }]);
    renderWithQueries(<ReportProgressScreen jobId={JOB} reportId={RUN} />);
    expect(await screen.findByTestId('report-failed')).toHaveTextContent('Something went wrong while building the report. Ask for it again.');
  });
});
