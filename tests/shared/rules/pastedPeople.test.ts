/**
 * People pasted to be invited (shared/rules/pastedPeople.ts): commas or a spreadsheet's tabs, roles
 * as people write them, companies by the name the job lists, each problem on its own line, and
 * the server's `people.N.x` refusals read back onto line N + 1.
 */
import { INVITATIONS_BULK_MAX } from '../../../shared/schemas/auth';
import { lineCells, parsePastedPeople, pastedPeopleForm, problemsByLine, readRole } from '../../../shared/rules/pastedPeople';

const COMPANIES = [
  { id: '11111111-1111-4111-8111-111111111111', name: 'Halvard Street Builders' },
  { id: '22222222-2222-4222-8222-222222222222', name: 'Pinecrest Mechanical, Inc.' },
  { id: '33333333-3333-4333-8333-333333333333', name: 'Ostrava  Ducting' },
];
const [GC, PINECREST, OSTRAVA] = COMPANIES.map((c) => c.id);

describe('readRole', () => {
  it.each([
    ['GC manager', 'gc_manager'],
    ['gc_manager', 'gc_manager'],
    ['GC-Manager', 'gc_manager'],
    ['gc', 'gc_manager'],
    ['Inspector', 'inspector'],
    ['  INSPECTOR ', 'inspector'],
    ['subcontractor', 'subcontractor'],
    ['Sub-contractor', 'subcontractor'],
    ['sub', 'subcontractor'],
    ['foreman', null],
    ['', null],
  ] as const)('%j is %s', (text, role) => {
    expect(readRole(text)).toBe(role);
  });
});

describe('lineCells', () => {
  it.each([
    ['a@x.co, inspector', ['a@x.co', 'inspector'], false],
    // a company name holding a comma stays whole
    ['a@x.co, sub, Pinecrest Mechanical, Inc.', ['a@x.co', 'sub', 'Pinecrest Mechanical, Inc.'], false],
    // a spreadsheet's cells: commas inside a cell are the cell's own
    ['a@x.co\tsub\tPinecrest Mechanical, Inc.', ['a@x.co', 'sub', 'Pinecrest Mechanical, Inc.'], true],
    // empty trailing cells (blank columns copied along) are dropped
    ['a@x.co\tinspector\t\t', ['a@x.co', 'inspector'], true],
    ['a@x.co,inspector,', ['a@x.co', 'inspector'], false],
  ] as const)('%j', (text, cells, tabbed) => {
    expect(lineCells(text)).toEqual({ cells, tabbed });
  });
});

describe('parsePastedPeople', () => {
  it('reads commas and tabs, skips empty lines and the header row, and names companies by their listed name', () => {
    const text = [
      'E-mail\tRole\tCompany',
      'ana@pinecrest.example\tSubcontractor\tpinecrest mechanical, inc.',
      '',
      '  Lio@Halvard.example, GC manager ',
      'ines@ostrava.example, sub, OSTRAVA DUCTING',
      'tomas@halvard.example, inspector, Halvard Street Builders',
    ].join('\r\n');
    const result = parsePastedPeople(text, COMPANIES);
    expect(result.headerSkipped).toBe(true);
    expect(result.listProblems).toEqual([]);
    expect(result.lines.map((l) => [l.line, l.role, l.companyListed, l.problems])).toEqual([
      [1, 'subcontractor', 'Pinecrest Mechanical, Inc.', []],
      [2, 'gc_manager', null, []],
      [3, 'subcontractor', 'Ostrava  Ducting', []],
      [4, 'inspector', 'Halvard Street Builders', []],
    ]);
    expect(result.people).toEqual([
      { email: 'ana@pinecrest.example', role: 'subcontractor', companyId: PINECREST },
      { email: 'Lio@Halvard.example', role: 'gc_manager' },
      { email: 'ines@ostrava.example', role: 'subcontractor', companyId: OSTRAVA },
      { email: 'tomas@halvard.example', role: 'inspector', companyId: GC },
    ]);
  });

  it('puts each problem on its own line, in the schema words where the schema says it, and sends nothing', () => {
    const text = [
      'ana@pinecrest.example, sub, Pinecrest Mech', // company not on the job
      'lio@halvard, inspector', // not an address
      'ines@ostrava.example, foreman, Ostrava Ducting', // not a role
      'tomas@halvard.example', // no role
      'ruth@ostrava.example, subcontractor', // subcontractor without a company
      'ANA@pinecrest.example, inspector', // the same address as line 1
      'kai@x.example\tinspector\tHalvard Street Builders\textra', // a fourth column
    ].join('\n');
    const result = parsePastedPeople(text, COMPANIES);
    expect(result.people).toBeNull();
    expect(result.lines.map((l) => l.problems)).toEqual([
      [{ field: 'companyId', message: 'No company named "Pinecrest Mech" on this job. Check the spelling, or add it on the Companies page first.' }],
      [{ field: 'email', message: 'Enter a valid e-mail address.' }],
      [{ field: 'role', message: '"foreman" is not a role: write GC manager, inspector or subcontractor.' }],
      [{ field: 'role', message: 'Add the role after the e-mail: GC manager, inspector or subcontractor.' }],
      [{ field: 'companyId', message: 'A subcontractor invitation needs the company they work for.' }],
      [{ field: 'email', message: 'ANA@pinecrest.example is on lines 1 and 6.' }],
      [{ field: 'line', message: 'Too many columns: keep e-mail, role and company only.' }],
    ]);
  });

  it('a fixed line clears its problem', () => {
    const wrong = parsePastedPeople('a@x.example, inspector\nb@x.example, sub, Pinecrest Mech', COMPANIES);
    expect(wrong.lines[1]!.problems).toHaveLength(1);
    const fixed = parsePastedPeople('a@x.example, inspector\nb@x.example, sub, Pinecrest Mechanical, Inc.', COMPANIES);
    expect(fixed.lines[1]!.problems).toEqual([]);
    expect(fixed.people).toHaveLength(2);
  });

  it(`refuses more than ${INVITATIONS_BULK_MAX} people as a whole`, () => {
    const text = Array.from({ length: INVITATIONS_BULK_MAX + 1 }, (_, i) => `p${i}@x.example, inspector`).join('\n');
    const result = parsePastedPeople(text, COMPANIES);
    expect(result.listProblems).toEqual([`At most ${INVITATIONS_BULK_MAX} people at once.`]);
    expect(result.people).toBeNull();
  });

  it('an empty box has no lines and no problems', () => {
    expect(parsePastedPeople(' \n\n', COMPANIES)).toEqual({ lines: [], listProblems: [], headerSkipped: false, people: null });
  });
});

describe('problemsByLine', () => {
  it("reads the server's people.N.x keys as line N + 1, and leaves other keys", () => {
    const byLine = problemsByLine({
      'people.2.email': 'That person is already a member of this job.',
      'people.0.companyId': 'That company is not on this job.',
      'people.4': 'Send a person.',
      email: 'not a line',
    });
    expect([...byLine.entries()].sort(([a], [b]) => a - b)).toEqual([
      [1, [{ field: 'companyId', message: 'That company is not on this job.' }]],
      [3, [{ field: 'email', message: 'That person is already a member of this job.' }]],
      [5, [{ field: 'line', message: 'Send a person.' }]],
    ]);
  });
});

describe('pastedPeopleForm', () => {
  const form = pastedPeopleForm(COMPANIES);
  const message = (text: string) => {
    const r = form.safeParse({ text });
    return r.success ? null : r.error.issues.map((i) => i.message);
  };
  it.each([
    ['a@x.example, inspector', null],
    ['', ['Paste at least one person: e-mail, role and company, one per line.']],
    ['a@x.example, inspector\nb@x.example, boss', ['Line 2: "boss" is not a role: write GC manager, inspector or subcontractor.']],
    ['a@x, inspector\nb@x.example, inspector\nc@x.example, sub', ['Lines 1 and 3 need a change: each says what below.']],
    ['a@x, inspector\nb@x, inspector\nc@x.example, sub', ['Lines 1, 2 and 3 need a change: each says what below.']],
  ] as const)('%j', (text, expected) => {
    expect(message(text)).toEqual(expected);
  });
});
