/**
 * The import preview: every bad row with its line number and reason, the all-or-nothing
 * message, and the column guess the screen starts from.
 */
import { render, screen, within } from '@testing-library/react-native';
import { guessMapping, readHeader } from '../../components/setup/csvHeader';
import { ImportReportView, PREVIEW_ROWS_SHOWN } from '../../components/setup/ImportReportView';
import type { UnitImportReport } from '../../shared/schemas/setup';

function report(overrides: Partial<UnitImportReport> = {}): UnitImportReport {
  const preview = Array.from({ length: 47 }, (_, i) => ({
    line: i + 2,
    tag: `IU-${100 + i}`,
    kind: 'cassette_4way' as const,
    modelName: null,
    capacity: 7033.7, // 24,000 Btu/h in W
    levelName: 'Level 1',
    spaceName: 'Lobby',
    systemName: 'VRF-1',
    mountPosition: null,
    crewName: null,
  }));
  return {
    dryRun: true,
    committed: false,
    mapping: { Tag: 'tag', Kind: 'kind', Level: 'level' },
    totalRows: 50,
    goodRows: 47,
    badRows: 3,
    errors: [
      { line: 11, field: 'level', reason: 'Unknown level "Level 9".' },
      { line: 26, field: 'tag', reason: 'Duplicate tag "IU-103" in the file (also on line 5).' },
      { line: 41, field: 'capacity', reason: 'Capacity: "three tons" does not start with a number.' },
    ],
    preview,
    created: 0,
    ...overrides,
  };
}

describe('ImportReportView', () => {
  it('lists every bad row with its line number, field and reason, and says nothing was imported', () => {
    render(<ImportReportView report={report()} unitSystem="imperial" />);
    const list = screen.getByTestId('import-bad-rows');
    expect(within(list).getAllByText(/^Line \d+$/).map((n) => n.props.children.join(''))).toEqual(['Line 11', 'Line 26', 'Line 41']);
    expect(within(screen.getByTestId('import-bad-row-11')).getByText('Level: Unknown level "Level 9".')).toBeTruthy();
    expect(within(screen.getByTestId('import-bad-row-26')).getByText(/Tag: Duplicate tag "IU-103"/)).toBeTruthy();
    // the reason already names its field: not said twice
    expect(within(screen.getByTestId('import-bad-row-41')).getByText('Capacity: "three tons" does not start with a number.')).toBeTruthy();
    expect(screen.getByTestId('import-refused')).toBeTruthy();
    expect(screen.getByText('Nothing was imported: 3 rows need fixing')).toBeTruthy();
    expect(screen.queryByTestId('import-ready')).toBeNull();
    expect(screen.getByText('50 rows read')).toBeTruthy();
    expect(screen.getByText('47 good')).toBeTruthy();
    expect(screen.getByText('3 bad')).toBeTruthy();
  });

  it('shows only the first rows of a long preview, with the job’s units', () => {
    render(<ImportReportView report={report()} unitSystem="imperial" />);
    const preview = screen.getByTestId('import-preview');
    expect(within(preview).getAllByText(/^Line \d+$/)).toHaveLength(PREVIEW_ROWS_SHOWN);
    expect(within(preview).getByText(/first 10 of 47/)).toBeTruthy();
    expect(within(preview).getAllByText(/Ceiling cassette, four-way · 24,000 Btu\/h/).length).toBe(PREVIEW_ROWS_SHOWN);
  });

  it('a clean dry run is ready to import; a committed one says how many were added', () => {
    const clean = report({ goodRows: 50, badRows: 0, errors: [] });
    const { rerender } = render(<ImportReportView report={clean} unitSystem="imperial" />);
    expect(screen.getByTestId('import-ready')).toBeTruthy();
    expect(screen.queryByTestId('import-bad-rows')).toBeNull();
    rerender(<ImportReportView report={{ ...clean, dryRun: false, committed: true, created: 50 }} unitSystem="imperial" />);
    expect(screen.getByText('50 units were added to the register.')).toBeTruthy();
    expect(screen.queryByTestId('import-preview')).toBeNull();
  });
});

describe('column guess', () => {
  it('reads a quoted header and maps common names, each field once', () => {
    const headers = readHeader('\uFEFF"Unit Tag",Type,"Floor",Room,"System, ODU",Model,Size\r\nIU-1,Wall-mounted,Level 1,,,,\r\n');
    expect(headers).toEqual(['Unit Tag', 'Type', 'Floor', 'Room', 'System, ODU', 'Model', 'Size']);
    expect(guessMapping(headers)).toEqual({ 'Unit Tag': 'tag', Type: 'kind', Floor: 'level', Room: 'space', Model: 'model', Size: 'capacity' });
    expect(guessMapping(['Tag', 'Tag', 'Level'])).toEqual({ Tag: 'tag', Level: 'level' });
    expect(readHeader('')).toEqual([]);
  });
});
