/**
 * The one CSV reader (unit import, the Units screen's header, the room schedule): files as
 * spreadsheets save them, quoted the RFC 4180 way (section 2 gives the rules; the quoted-field
 * examples below are section 2's own, rules 6 and 7), with the line each record starts on.
 */
import fc from 'fast-check';
import { csvDelimiter, csvProblemMessage, readCsv, readCsvHeader, type CsvDelimiter } from '../../../shared/rules/csvRead';

const cellsOf = (text: string) => readCsv(text).records.map((r) => r.cells);
const linesOf = (text: string) => readCsv(text).records.map((r) => r.line);

describe('csvDelimiter', () => {
  it.each([
    ['comma', 'Level,Room\r\nL1,101\r\n', ','],
    ['semicolon (a decimal-comma locale)', 'Level;Room;Area\nL1;101;12,5 m2\n', ';'],
    ['tab (cells copied from a spreadsheet)', 'Level\tRoom\nL1\t"101, east"\n', '\t'],
    ['a comma inside quotes does not count', '"Level, floor";Room\n', ';'],
    ['a semicolon inside quotes does not count', '"Tag;mark",Kind,Level\n', ','],
    ['a tab inside quotes does not count', '"Level\tone";Room\n', ';'],
    ['a header cell on two lines', '"Level\nname";Room;Area\nL1;101;12,5\n', ';'],
    ['after a byte-order mark', '\uFEFFTag\tKind\tLevel\n', '\t'],
    ['one column: a comma', 'Room\n101\n', ','],
    ['an empty text: a comma', '', ','],
    ['a tie: the comma', 'A,B;C\n', ','],
  ])('finds the separator: %s', (_, text, expected) => {
    expect(csvDelimiter(text)).toBe(expected);
  });
});

describe('readCsv', () => {
  it('drops the byte-order mark, reads CRLF, LF and CR alike (even mixed), trims cells and skips empty rows, keeping each record\'s line', () => {
    const { records, problem } = readCsv('\uFEFFLevel,Room\r\n L1 , 101 \r\n\r\n,\nL2,201\rL3,301');
    expect(problem).toBeUndefined();
    expect(records).toEqual([
      { cells: ['Level', 'Room'], line: 1 },
      { cells: ['L1', '101'], line: 2 },
      { cells: ['L2', '201'], line: 5 },
      { cells: ['L3', '301'], line: 6 },
    ]);
  });

  it('reads the byte-order mark of a tab-separated file, the first header cell without it', () => {
    const { records, delimiter } = readCsv('\uFEFFTag\tKind\r\nIU-1\tWall\r\n');
    expect(delimiter).toBe('\t');
    expect(records.map((r) => r.cells)).toEqual([['Tag', 'Kind'], ['IU-1', 'Wall']]);
  });

  it('reads semicolon-separated cells, a decimal comma staying in its cell', () => {
    const { records, delimiter } = readCsv('Level;Room;Area\nL1;101;12,5 m2\nL1;"102; east";8,25\n');
    expect(delimiter).toBe(';');
    expect(records.map((r) => r.cells)).toEqual([
      ['Level', 'Room', 'Area'],
      ['L1', '101', '12,5 m2'],
      ['L1', '102; east', '8,25'],
    ]);
  });

  // RFC 4180 section 2, rule 6: a field holding line breaks, double quotes or the separator is quoted
  // (the rule's own example: "aaa","b CRLF bb","ccc" CRLF zzz,yyy,xxx).
  it('keeps a line break inside a quoted cell (RFC 4180 section 2, rule 6 example)', () => {
    expect(readCsv('"aaa","b\r\nbb","ccc"\r\nzzz,yyy,xxx').records).toEqual([
      { cells: ['aaa', 'b\r\nbb', 'ccc'], line: 1 },
      { cells: ['zzz', 'yyy', 'xxx'], line: 3 },
    ]);
  });

  // RFC 4180 section 2, rule 7: a double quote inside a quoted field is written twice
  // (the rule's own example: "aaa","b""bb","ccc").
  it('reads a doubled quote inside a quoted cell as one quote (RFC 4180 section 2, rule 7 example)', () => {
    expect(cellsOf('"aaa","b""bb","ccc"')).toEqual([['aaa', 'b"bb', 'ccc']]);
  });

  // RFC 4180 section 2, rule 6: the separator inside a quoted field is text, whichever separator the file uses.
  it.each([
    ['comma', 'Room,Notes\n"Exam 1, east","a,b"\n', ['Exam 1, east', 'a,b']],
    ['semicolon', 'Room;Notes\n"Exam 1; east";"a;b"\n', ['Exam 1; east', 'a;b']],
    ['tab', 'Room\tNotes\n"Exam 1\teast"\t"a\tb"\n', ['Exam 1\teast', 'a\tb']],
  ])('keeps the separator inside a quoted cell (RFC 4180 section 2, rule 6): %s', (_, text, row) => {
    expect(cellsOf(text)[1]).toEqual(row);
  });

  it('keeps quoted separators, doubled quotes and line breaks in one cell, and counts the lines they take', () => {
    const text = 'Level,Room\n"Level 1","Exam ""A"", east"\n"Level\r\n2",Store\n"Roof\n""top""\nside",Plant\nL9,999\n';
    expect(readCsv(text).records.map((r) => [r.cells, r.line])).toEqual([
      [['Level', 'Room'], 1],
      [['Level 1', 'Exam "A", east'], 2],
      [['Level\r\n2', 'Store'], 3],
      [['Roof\n"top"\nside', 'Plant'], 5],
      [['L9', '999'], 8],
    ]);
  });

  // RFC 4180 section 2, rule 2: the last record may end without a line break.
  it('reads a last record with no line break after it (RFC 4180 section 2, rule 2)', () => {
    expect(cellsOf('Tag,Kind\nIU-1,Wall')).toEqual([['Tag', 'Kind'], ['IU-1', 'Wall']]);
  });

  // RFC 4180 section 2, rule 5 says an unquoted field holds no quotes; field quantities are written
  // with them (9' 6"), so such a quote is read as a plain character.
  it('reads a quote inside an unquoted cell as itself (feet and inches)', () => {
    expect(cellsOf('Room,Height\n101,9\' 6"\n102, 10\'\n')).toEqual([['Room', 'Height'], ['101', '9\' 6"'], ['102', '10\'']]);
  });

  it('lets a row have fewer or more cells than the header', () => {
    expect(cellsOf('A,B,C\n1\n1,2,3,4\n')).toEqual([['A', 'B', 'C'], ['1'], ['1', '2', '3', '4']]);
  });

  it('counts the lines of skipped empty rows and of quoted line breaks before a record', () => {
    expect(linesOf('A,B\n\n\n"x\n\ny",1\n  \n,\n2,3\n\n "4",5\n')).toEqual([1, 4, 9, 11]);
  });

  it('reads an empty text, or only empty rows, as no records', () => {
    expect(readCsv('')).toEqual({ delimiter: ',', records: [] });
    expect(readCsv('\uFEFF\r\n,,\r\n').records).toEqual([]);
  });
});

describe('problems and their lines', () => {
  it.each([
    ['in the second record', 'Level,Room\nL1,"101\nL2,201\n', 2],
    ['after a multi-line quoted cell', 'Level,Room\n"L\n1",101\nL2,"201\nL3,301\n', 4],
    ['after CRLF line breaks inside quotes', 'A,B\r\n"x\r\ny",1\r\n2,"open\r\n', 4],
    ['after a closed quoted cell in the same record', 'A,B,C\n1,"two",3\n4,"five","six\n7,8,9\n', 3],
    ['with doubled quotes after it', 'A,B\n1,"a ""quoted"" word\n2,3\n', 2],
    ['in the header', '"Tag,Kind\nIU-1,Wall\n', 1],
    ['after a quote inside an unquoted cell', 'Room,Height\n101,9\' 6"\n102,"10\n', 3],
  ])('says where a quote that is never closed opens: %s', (_, text, line) => {
    expect(readCsv(text).problem).toEqual({ kind: 'quote_not_closed', line });
  });

  it('keeps the records before a quote that is never closed', () => {
    expect(readCsv('Level,Room\nL1,101\nL2,"201\nL3,301\n').records.map((r) => r.cells)).toEqual([['Level', 'Room'], ['L1', '101']]);
  });

  // RFC 4180 section 2, rule 7: inside a quoted cell a quote is doubled; one followed by text ends the cell too early.
  it.each([
    ['text after the closing quote', 'Tag,Kind\nIU-1,"Wall" mounted\n', 2],
    ['a single quote inside a quoted cell', 'Tag,Kind\nIU-1,Wall\nIU-2,"Cassette "4-way""\n', 3],
  ])('says where a quoted cell is malformed: %s', (_, text, line) => {
    expect(readCsv(text).problem).toEqual({ kind: 'malformed', line });
  });

  it('says a problem the way the import screens say it', () => {
    expect(csvProblemMessage({ kind: 'quote_not_closed', line: 2 })).toBe('A quoted cell opened on line 2 is never closed.');
    expect(csvProblemMessage({ kind: 'malformed', line: 7 })).toMatch(/^The row on line 7 has text after a quoted cell's closing quote/);
  });
});

describe('readCsvHeader', () => {
  it.each([
    ['comma, with a byte-order mark and quoted cells', '\uFEFF"Unit Tag",Type,"System, ODU"\r\nIU-1,Wall,\r\n', ['Unit Tag', 'Type', 'System, ODU']],
    ['semicolon', 'Tag;Kind;Capacity (kW)\nIU-1;Wall;2,5\n', ['Tag', 'Kind', 'Capacity (kW)']],
    ['tab', 'Tag\tKind\tLevel\n', ['Tag', 'Kind', 'Level']],
    ['a header cell on two lines', '"Nominal\ncapacity";Tag\n', ['Nominal\ncapacity', 'Tag']],
    ['a later row that cannot be read', 'Tag,Kind\nIU-1,"Wall\n', ['Tag', 'Kind']],
    ['an empty text', '', []],
  ])('reads the header row: %s', (_, text, header) => {
    expect(readCsvHeader(text)).toEqual(header);
  });
});

describe('any text', () => {
  const piece = fc.constantFrom('a', 'B1', ' ', ',', ';', '\t', '"', '""', '\r', '\n', '\r\n', '\uFEFF', "9' 6\"");
  const cell = fc.array(fc.constantFrom('x', 'Y 2', ',', ';', '\t', '"', '\r\n', '\n', ' m²'), { maxLength: 4 }).map((p) => p.join('').trim());

  it('is read without throwing, its records in order of their lines', () => {
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 40 }), (pieces) => {
        const { records, problem } = readCsv(pieces.join(''));
        const lines = records.map((r) => r.line);
        expect(lines.every((l, i) => l >= 1 && (i === 0 || l > lines[i - 1]!))).toBe(true);
        if (problem) expect(problem.line).toBeGreaterThanOrEqual(lines.at(-1) ?? 1);
      }),
      { numRuns: 400 },
    );
  });

  // RFC 4180 section 2, rules 6 and 7: every field quoted, quotes inside doubled, records ended by CRLF.
  it('gives back the cells of records written with every cell quoted, each on the line it starts', () => {
    fc.assert(
      fc.property(fc.constantFrom<CsvDelimiter>(',', ';', '\t'), fc.array(fc.array(cell, { minLength: 2, maxLength: 4 }), { minLength: 1, maxLength: 6 }), (delimiter, rows) => {
        const text = rows.map((r) => r.map((c) => `"${c.replace(/"/g, '""')}"`).join(delimiter)).join('\r\n');
        let line = 1;
        const expected: Array<{ cells: string[]; line: number }> = [];
        for (const r of rows) {
          if (r.some((c) => c !== '')) expected.push({ cells: r, line });
          line += 1 + r.join('').split(/\r\n|\r|\n/).length - 1;
        }
        expect(readCsv(text, delimiter)).toEqual({ delimiter, records: expected });
      }),
      { numRuns: 300 },
    );
  });
});
