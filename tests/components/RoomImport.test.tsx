/**
 * The room schedule import: the pasted file read into rows (header units on bare numbers), the
 * server's preview shown (new levels, new spaces, changes old → new, line problems with their
 * lines), and the apply button that says what it will do and sends the same rows.
 */
import { fireEvent, render, screen, waitFor, within } from '@testing-library/react-native';
import { applyLabel, RoomImport, RoomImportPreview } from '../../components/setup/RoomImport';
import type { SpaceImportReport } from '../../shared/schemas/setup';
import { renderWithQueries, SAMPLE_JOB_ID } from '../support/components';

const JOB = SAMPLE_JOB_ID;

function report(overrides: Partial<SpaceImportReport> = {}): SpaceImportReport {
  return {
    applied: false,
    newLevels: ['Level 3'],
    created: [
      { row: 1, line: 3, level: 'Level 1', space: 'Exam 102', newLevel: false, floorArea: 11.1483648, ceilingHeight: 2743.2 },
      { row: 2, line: 4, level: 'Level 3', space: 'Mech 301', newLevel: true, floorArea: null, ceilingHeight: null },
    ],
    changed: [{ row: 0, line: 2, level: 'Level 1', space: 'Lobby', spaceId: 's1', ceilingHeight: { from: 2438.4, to: 2743.2 } }],
    unchanged: [{ row: 3, line: 5, level: 'Level 1', space: 'Exam 101', spaceId: 's2' }],
    problems: [],
    ...overrides,
  };
}

type Answer = { status: number; body: unknown };

function fakeApi(writes: Answer[]) {
  const sent: Array<{ path: string; body: { rows: unknown[]; apply: boolean }; key: string | null }> = [];
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    let answer: Answer = { status: 200, body: { items: [], nextCursor: null } };
    if (method !== 'GET') {
      const headers = (init?.headers ?? {}) as Record<string, string>;
      sent.push({ path, body: JSON.parse(String(init?.body)), key: headers['Idempotency-Key'] ?? null });
      answer = writes.shift() ?? { status: 500, body: { error: { id: 'x', message: 'unexpected write' } } };
    }
    return { ok: answer.status < 300, status: answer.status, json: async () => answer.body, headers: { get: () => null } };
  });
  return sent;
}

describe('RoomImportPreview', () => {
  it('shows the new levels, the new spaces with their sizes, each change old → new and how many stay', () => {
    render(<RoomImportPreview report={report()} unitSystem="imperial" />);
    expect(within(screen.getByTestId('room-import-new-levels')).getByText(/^Level 3 \(added after/)).toBeTruthy();
    const created = screen.getByTestId('room-import-created');
    expect(within(created).getByText('2 new spaces')).toBeTruthy();
    expect(within(created).getByText("Level 1 · Exam 102: area 120 ft², ceiling 9' 0\"")).toBeTruthy();
    expect(within(created).getByText('Level 3 · Mech 301: area not set, ceiling not set')).toBeTruthy();
    expect(within(screen.getByTestId('room-import-changed')).getByText("Level 1 · Lobby: ceiling 8' 0\" → 9' 0\"")).toBeTruthy();
    expect(screen.getByTestId('room-import-unchanged')).toHaveTextContent('1 space is already as the file gives it.');
    expect(screen.queryByTestId('room-import-problems')).toBeNull();
    expect(applyLabel(report())).toBe('Create 1 level and 2 spaces, update 1');
    expect(applyLabel(report({ newLevels: [], created: [], changed: report().changed }))).toBe('Update 1');
  });

  it('lists each line problem with its line and column, problems first', () => {
    const problems = [
      { row: 1, line: 3, field: 'rows.1.area', message: '"12,5 m2" has a comma or point that cannot be read.' },
      { row: 3, line: 5, field: 'rows.3.space', message: '"exam 103" on Level 1 is also on line 3.' },
      { row: 4, line: null, field: 'rows.4.level', message: 'Give the level.' },
    ];
    render(<RoomImportPreview report={report({ problems })} unitSystem="metric" />);
    const box = screen.getByTestId('room-import-problems');
    expect(within(box).getByText('3 lines have problems: fix the file and preview again')).toBeTruthy();
    expect(screen.getByTestId('room-import-problem-rows.1.area')).toHaveTextContent('Line 3, Floor area: "12,5 m2" has a comma or point that cannot be read.');
    expect(screen.getByTestId('room-import-problem-rows.3.space')).toHaveTextContent('Line 5, Room: "exam 103" on Level 1 is also on line 3.');
    expect(screen.getByTestId('room-import-problem-rows.4.level')).toHaveTextContent('Row 5, Level: Give the level.');
  });
});

describe('RoomImport', () => {
  it('reads a pasted schedule with a byte-order mark and CRLF, previews it, and applies the same rows', async () => {
    const sent = fakeApi([
      { status: 200, body: report() },
      { status: 200, body: report({ applied: true }) },
    ]);
    renderWithQueries(<RoomImport jobId={JOB} unitSystem="imperial" />);
    fireEvent.changeText(
      screen.getByTestId('room-import-csv'),
      '\uFEFFFloor,Room No.,Area (ft²),Clg ht\r\nLevel 1,Lobby,,9\' 0"\r\nLevel 1,Exam 102,120,9\' 0"\r\nLevel 3,Mech 301,,\r\nLevel 1,Exam 101,,\r\n',
    );
    expect(screen.getByTestId('room-import-columns-read')).toHaveTextContent(
      '4 rooms; columns read from the headers: Floor → level, Room No. → room (number or name), Area (ft²) → floor area, Clg ht → ceiling height.',
    );
    expect(screen.queryByTestId('room-import-map-0')).toBeNull();
    fireEvent.press(screen.getByTestId('room-import-preview'));
    await screen.findByTestId('room-import-preview-result');
    expect(sent[0]!.path).toBe(`/api/jobs/${JOB}/spaces/import`);
    expect(sent[0]!.body).toEqual({
      apply: false,
      rows: [
        { level: 'Level 1', space: 'Lobby', height: '9\' 0"', line: 2 },
        { level: 'Level 1', space: 'Exam 102', area: '120 ft²', height: '9\' 0"', line: 3 },
        { level: 'Level 3', space: 'Mech 301', line: 4 },
        { level: 'Level 1', space: 'Exam 101', line: 5 },
      ],
    });
    const apply = screen.getByTestId('room-import-apply');
    expect(apply).toHaveTextContent('Create 1 level and 2 spaces, update 1');
    fireEvent.press(apply);
    await waitFor(() => expect(screen.getByTestId('room-import-done')).toHaveTextContent('Created 1 level and 2 spaces, updated 1.'));
    expect(sent[1]!.body).toEqual({ ...sent[0]!.body, apply: true });
    expect(sent[1]!.key).not.toBe(sent[0]!.key);
  });

  it('asks for the columns it cannot read from the headers, and cannot preview until they are chosen', async () => {
    fakeApi([]);
    renderWithQueries(<RoomImport jobId={JOB} unitSystem="metric" />);
    fireEvent.changeText(screen.getByTestId('room-import-csv'), 'A;B;C\nL1;101;12 m2\n');
    expect(screen.getByTestId('room-import-missing')).toHaveTextContent('Choose the column that holds the level and the room number or name.');
    expect(screen.getByTestId('room-import-preview')).toBeDisabled();
    expect(screen.getByTestId('room-import-map-0')).toBeTruthy();
    expect(screen.queryByTestId('room-import-columns-read')).toBeNull();
  });

  it('shows no apply button while a line has a problem', async () => {
    fakeApi([{ status: 200, body: report({ problems: [{ row: 0, line: 2, field: 'rows.0.area', message: 'Bad.' }] }) }]);
    renderWithQueries(<RoomImport jobId={JOB} unitSystem="metric" />);
    fireEvent.changeText(screen.getByTestId('room-import-csv'), 'Level,Room,Area\nL1,101,12,5\n');
    fireEvent.press(screen.getByTestId('room-import-preview'));
    await screen.findByTestId('room-import-problems');
    expect(screen.queryByTestId('room-import-apply')).toBeNull();
  });
});
