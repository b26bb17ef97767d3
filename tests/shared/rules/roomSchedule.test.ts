/**
 * Reading a room schedule: the CSV as spreadsheets save it (byte-order mark, CRLF, comma, semicolon
 * or tab; the reader itself is tested in csvRead.test.ts), its headers the common ways, and a
 * header's unit given to the bare numbers below it.
 */
import {
  guessRoomColumns,
  missingRoomFields,
  readRoomSchedule,
  roomFieldOfHeader,
  roomHeaderUnit,
  roomRows,
  withHeaderUnit,
} from '../../../shared/rules/roomSchedule';

describe('room schedule headers', () => {
  it.each([
    ['Level', 'level'],
    ['Floor', 'level'],
    ['Storey', 'level'],
    ['Story', 'level'],
    ['Floor name', 'level'],
    ['Room', 'space'],
    ['Room No.', 'space'],
    ['Room number', 'space'],
    ['Room name', 'space'],
    ['Space', 'space'],
    ['ROOM_NAME', 'space'],
    ['Area', 'area'],
    ['Floor area (ft²)', 'area'],
    ['Area m2', 'area'],
    ['Area sq ft', 'area'],
    ['Net area [m²]', 'area'],
    ['Ceiling height', 'height'],
    ['Clg ht', 'height'],
    ['Clg. ht. (mm)', 'height'],
    ['Ceiling height ft', 'height'],
    ['Height (m)', 'height'],
    ['Area (mm)', null],
    ['Ceiling height (m²)', null],
    ['Notes', null],
    ['Occupancy', null],
  ])('%s → %s', (header, field) => {
    expect(roomFieldOfHeader(header)).toBe(field);
  });

  it.each([
    ['Floor area (ft²)', 'area', 'ft²'],
    ['Area m2', 'area', 'm2'],
    ['Area sq ft', 'area', 'sq ft'],
    ['Clg ht [mm]', 'height', 'mm'],
    ['Ceiling height ft', 'height', 'ft'],
    ['Area', 'area', undefined],
    ['Ceiling height (ft²)', 'height', undefined],
  ] as const)('the unit %s gives its numbers: %s', (header, field, unit) => {
    expect(roomHeaderUnit(header, field)).toBe(unit);
  });

  it('gives each field to the first column that names it, and says which needed fields are left', () => {
    const columns = guessRoomColumns(['Floor', 'Room No.', 'Room name', 'Area (ft²)', 'Notes']);
    expect(columns).toEqual(['level', 'space', null, 'area', null]);
    expect(missingRoomFields(columns)).toEqual([]);
    expect(missingRoomFields(guessRoomColumns(['Name', 'Area']))).toEqual(['level', 'space']);
  });
});

describe('rows of a room schedule', () => {
  it.each([
    ['12.5', 'm2', '12.5 m2'],
    ['1,250', 'ft²', '1,250 ft²'],
    ['.5', 'm', '.5 m'],
    ['120 sq ft', 'm2', '120 sq ft'],
    ["9' 6\"", 'mm', "9' 6\""],
    ['12.5', undefined, '12.5'],
  ])('"%s" under a header in %s is sent as "%s"', (cell, unit, sent) => {
    expect(withHeaderUnit(cell, unit)).toBe(sent);
  });

  it('reads a schedule saved with a byte-order mark and CRLF: a row per room, units from the headers, empty cells left out', () => {
    const text = '\uFEFFLevel;Room No.;Area m2;Clg ht (mm)\r\nLevel 1;101;12.5;2700\r\nLevel 1;102;;\r\nRoof;Plant;40 m²;3.2 m\r\n';
    const schedule = readRoomSchedule(text);
    expect(schedule.delimiter).toBe(';');
    expect(schedule.headers).toEqual(['Level', 'Room No.', 'Area m2', 'Clg ht (mm)']);
    const columns = guessRoomColumns(schedule.headers);
    expect(roomRows(schedule.records, schedule.headers, columns)).toEqual([
      { level: 'Level 1', space: '101', area: '12.5 m2', height: '2700 mm', line: 2 },
      { level: 'Level 1', space: '102', line: 3 },
      { level: 'Roof', space: 'Plant', area: '40 m²', height: '3.2 m', line: 4 },
    ]);
  });

  it('says where a quote is never closed, keeping the rows before it', () => {
    const schedule = readRoomSchedule('Level,Room\nL1,101\nL2,"201\nL3,301\n');
    expect(schedule.error).toBe('A quoted cell opened on line 3 is never closed.');
    expect(schedule.records).toEqual([{ cells: ['L1', '101'], line: 2 }]);
  });

  it('reads a tab-separated schedule with a room name holding a comma and a line break', () => {
    const schedule = readRoomSchedule('Level\tRoom\tClg ht [mm]\nLevel 2\t"Exam 201,\r\nnorth"\t2700\nLevel 2\tStore\t\n');
    expect(schedule.delimiter).toBe('\t');
    expect(roomRows(schedule.records, schedule.headers, guessRoomColumns(schedule.headers))).toEqual([
      { level: 'Level 2', space: 'Exam 201,\r\nnorth', height: '2700 mm', line: 2 },
      { level: 'Level 2', space: 'Store', line: 4 },
    ]);
  });

  it('follows columns chosen by hand when the headers say nothing', () => {
    const schedule = readRoomSchedule('A,B,C\nL1,Exam 1,100 sq ft\n');
    expect(guessRoomColumns(schedule.headers)).toEqual([null, null, null]);
    expect(roomRows(schedule.records, schedule.headers, ['level', 'space', 'area'])).toEqual([{ level: 'L1', space: 'Exam 1', area: '100 sq ft', line: 2 }]);
  });
});
