/**
 * The import preview: every bad row with its line number and reason, the all-or-nothing
 * message, and the column guess the screen starts from.
 */
import { render, screen, within } from '@testing-library/react-native';
import { guessMapping, ignoredButNamed, readHeader } from '../../components/setup/csvHeader';
import { KindValues, MissingPlaces, RevisionView } from '../../components/setup/ImportChoices';
import { fireEvent } from '@testing-library/react-native';
import { ImportReportView, PREVIEW_ROWS_SHOWN } from '../../components/setup/ImportReportView';
import type { UnitImportReport } from '../../shared/schemas/setup';

function report(overrides: Partial<UnitImportReport> = {}): UnitImportReport {
  const preview = Array.from({ length: 47 }, (_, i) => ({
    line: i + 2,
    action: 'add' as const,
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
    kindValues: [],
    missingPlaces: { levels: [], spaces: [] },
    placesCreated: false,
    revision: { added: 47, changed: [], untouched: 0, notInFile: [], removed: 0 },
    importId: null,
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

  it('reads the header of a semicolon- or tab-separated file the way the server reads the file', () => {
    expect(readHeader('\uFEFFTag;Type;"Capacity; nominal (kW)";Level\r\nIU-1;Wall;2,5;Level 1\r\n')).toEqual(['Tag', 'Type', 'Capacity; nominal (kW)', 'Level']);
    expect(readHeader('Tag\tType\tLevel\nIU-1\tWall\tLevel 1\n')).toEqual(['Tag', 'Type', 'Level']);
  });
});

describe('schedules as they come', () => {
  it('maps every header naming a capacity to capacity, and says so when such a column is ignored', () => {
    const headers = ['Tag', 'Unit type', 'Capacity (Btu/h)', 'Floor', 'Room'];
    const guess = guessMapping(headers);
    expect(guess['Capacity (Btu/h)']).toBe('capacity');
    expect(guessMapping(['Tag', 'Nominal cooling [MBH]'])).toEqual({ Tag: 'tag', 'Nominal cooling [MBH]': 'capacity' });
    const { ['Capacity (Btu/h)']: _capacity, ...withoutCapacity } = guess;
    expect(ignoredButNamed(headers, withoutCapacity)).toEqual([{ header: 'Capacity (Btu/h)', field: 'capacity' }]);
    expect(ignoredButNamed(headers, guess)).toEqual([]);
  });

  it('lists the kinds in the file, the kinds Trimout knows, and asks for the ones it cannot read', () => {
    const chosen: Array<[string, string | null]> = [];
    render(
      <KindValues
        values={[
          { value: '4-WAY CASSETTE', rows: 3, kind: 'cassette_4way', from: 'read' },
          { value: 'Cassette', rows: 2, kind: null, from: null },
        ]}
        chosen={{}}
        onChoose={(v, k) => chosen.push([v, k])}
      />,
    );
    expect(screen.getByText(/Trimout's unit kinds: Ceiling cassette, four-way; .*Air-handler coil kit\./)).toBeTruthy();
    expect(screen.getByText('Choose a unit kind for 1 value, then preview again.')).toBeTruthy();
    expect(screen.getByText('3 rows · read from the words')).toBeTruthy();
    expect(screen.getByText('2 rows · not sure what this is')).toBeTruthy();
  });

  it('lists the missing places with the tick that creates them, and the revision field by field', () => {
    const ticks: boolean[] = [];
    const r = report({
      missingPlaces: { levels: ['Level 2'], spaces: [{ level: 'Level 2', space: 'Exam 201' }] },
      revision: {
        added: 1,
        changed: [{ line: 2, tag: 'IU-1', fields: [{ field: 'capacity', from: 0.75 * 3516.8528420667, to: 3516.8528420667 }, { field: 'space', from: null, to: 'Office 101' }] }],
        untouched: 3,
        notInFile: [
          { id: 'a', tag: 'IU-8', removable: true },
          { id: 'b', tag: 'IU-9', removable: false },
        ],
        removed: 0,
      },
    });
    render(<MissingPlaces report={r} create={false} onCreate={(on) => ticks.push(on)} />);
    expect(screen.getByText('The file names 1 level and 1 space this job does not have yet')).toBeTruthy();
    expect(screen.getByText('Spaces: Exam 201 (Level 2)')).toBeTruthy();
    fireEvent.press(screen.getByTestId('import-create-places'));
    expect(ticks).toEqual([true]);
    render(<RevisionView report={r} unitSystem="imperial" removeMissing={false} onRemoveMissing={() => undefined} />);
    expect(screen.getByText('Capacity: 9,000 Btu/h → 12,000 Btu/h')).toBeTruthy();
    expect(screen.getByText('Space: — → Office 101')).toBeTruthy();
    expect(screen.getByText('IU-9 has a unit check or a finding and always stays.')).toBeTruthy();
    expect(screen.getByTestId('import-remove-missing')).toBeTruthy();
  });
});
