/**
 * One place for in-app addresses and one way to write: what components/links.ts builds (every
 * piece encoded, query keys in a fixed order, the findings list reading its filters back), a scan
 * of app/ and components/ for addresses or requests built anywhere else, and the one sentence for
 * a refused write (components/api/writeErrors.ts) with both screens' needs.
 */
import { ApiError } from '../../components/api/client';
import { FIELDS_MARKED, NOT_SAVED, writeErrorMessage } from '../../components/api/writeErrors';
import { boardCellFilters } from '../../components/board/counts';
import { FINDING_WRITE_WORDS, STALE_MESSAGE } from '../../components/correction/rules';
import { findingFiltersFromParams } from '../../components/findings/filterParams';
import { links } from '../../components/links';

const JOB = '00000000-0000-4000-8000-0000000000a1';
const LEVEL = '00000000-0000-4000-8000-0000000000b1';
// The client's TypeScript program has no Node types; the scan below needs only these three calls.
declare const __dirname: string;
const fs = jest.requireActual<{
  readdirSync(path: string): string[];
  readFileSync(path: string, encoding: 'utf8'): string;
  statSync(path: string): { isDirectory(): boolean };
}>('fs');
const ROOT = `${__dirname}/../..`;

/** The query of an address as a plain object. */
function queryOf(href: unknown): Record<string, string> {
  const s = String(href);
  return Object.fromEntries(new URLSearchParams(s.includes('?') ? s.slice(s.indexOf('?') + 1) : ''));
}

describe('links', () => {
  it('builds the job map with every piece encoded', () => {
    expect(links.job(JOB)).toBe(`/jobs/${JOB}`);
    expect(links.finding('a/b', 'c?d')).toBe('/jobs/a%2Fb/findings/c%3Fd');
    expect(links.unitCheck(JOB, 'u 1')).toBe(`/jobs/${JOB}/units/u%201/check`);
    expect(links.setup(JOB, 'levels')).toBe(`/jobs/${JOB}/setup/levels`);
    expect(links.level(JOB, LEVEL)).toBe(`/jobs/${JOB}/levels/${LEVEL}`);
    expect(links.levelWalk(JOB, LEVEL)).toBe(`/jobs/${JOB}/levels/${LEVEL}/walk`);
    expect(links.levelWalk(JOB, LEVEL, 'IU-3 & 4')).toBe(`/jobs/${JOB}/levels/${LEVEL}/walk?saved=IU-3%20%26%204`);
    expect(links.plan(JOB, LEVEL)).toBe(`/jobs/${JOB}/levels/${LEVEL}/plan`);
    expect(links.plan(JOB, LEVEL, { kind: 'unit', id: 'x&y' })).toBe(`/jobs/${JOB}/levels/${LEVEL}/plan?place=unit&id=x%26y`);
    expect(links.readiness(JOB)).toBe(`/jobs/${JOB}/readiness`);
    expect(links.readiness(JOB, LEVEL)).toBe(`/jobs/${JOB}/readiness?systemId=${LEVEL}`);
    expect(links.newFinding(JOB, { levelId: LEVEL })).toBe(`/jobs/${JOB}/findings/new?levelId=${LEVEL}`);
    expect([links.home(), links.signIn(), links.inbox(), links.newJob(), links.sync()]).toEqual(['/', '/sign-in', '/inbox', '/jobs/new', '/sync']);
  });

  it('writes the findings filters in one order, leaving out empty ones', () => {
    const a = links.findings(JOB, { severity: 'critical', status: 'open', levelId: LEVEL, overdue: false, unitId: '' });
    const b = links.findings(JOB, { levelId: LEVEL, status: 'open', severity: 'critical' });
    expect(a).toBe(`/jobs/${JOB}/findings?levelId=${LEVEL}&status=open&severity=critical`);
    expect(b).toBe(a);
    expect(links.findings(JOB)).toBe(`/jobs/${JOB}/findings`);
  });

  it('gives the findings list back the filters a board cell stands for', () => {
    expect(findingFiltersFromParams(queryOf(links.findings(JOB, boardCellFilters('openCritical', LEVEL))))).toEqual({
      levelId: LEVEL,
      status: 'open',
      severity: 'critical',
    });
    expect(findingFiltersFromParams(queryOf(links.findings(JOB, boardCellFilters('overdue'))))).toEqual({ overdue: 'true' });
  });
});

/** Every .ts/.tsx file under a folder of the repository, as [repository path, text]. */
function sources(folder: string): [string, string][] {
  const out: [string, string][] = [];
  const walk = (dir: string) => {
    for (const name of fs.readdirSync(`${ROOT}/${dir}`)) {
      const p = `${dir}/${name}`;
      if (fs.statSync(`${ROOT}/${p}`).isDirectory()) walk(p);
      else if (/\.tsx?$/.test(name)) out.push([p, fs.readFileSync(`${ROOT}/${p}`, 'utf8')]);
    }
  };
  walk(folder);
  return out;
}

/** Lines of a file that match, as "path:line: text". */
function hits(path: string, text: string, pattern: RegExp): string[] {
  return text
    .split('\n')
    // Comments may name an address or a function; code may not.
    .map((line, i) => (!/^\s*(\*|\/\*|\/\/)/.test(line) && pattern.test(line) ? `${path}:${i + 1}: ${line.trim()}` : null))
    .filter((x): x is string => x !== null);
}

describe('one place, one way', () => {
  const files = [...sources('app'), ...sources('components')];

  it('builds no in-app address outside components/links.ts', () => {
    const inline = /['"`]\/(jobs|sign-in|sign-up|forgot-password|preferences|inbox|sync|mailbox)\b|href="\/|pathname:\s*['"]\/|router\.(push|replace|navigate)\(\s*['"`]/;
    const found = files.filter(([p]) => p !== 'components/links.ts').flatMap(([p, t]) => hits(p, t, inline));
    expect(found).toEqual([]);
  });

  it('sends nothing except through components/api (writes through sendWrite only)', () => {
    const found = files
      .filter(([p]) => p !== 'components/api/client.ts')
      .flatMap(([p, t]) => [
        ...hits(p, t, /(^|[^\w.])fetch\s*\(|XMLHttpRequest|sendBeacon/),
        // The method-taking request() is for sendWrite alone; reads use apiGet.
        ...(p === 'components/api/mutations.ts' ? [] : hits(p, t, /import\s*{[^}]*\b(request|requestWithMeta)\b[^}]*}\s*from\s*['"][./]*(components\/)?api\/client['"]/)),
      ]);
    expect(found).toEqual([]);
  });
});

describe('writeErrorMessage', () => {
  const err = (status: number, message = 'Server words.', fields: Record<string, string> = {}) => new ApiError(status, 'x', message, fields);

  it('says the current version is shown after a 412 and a 409', () => {
    expect(writeErrorMessage(err(412, 'Someone else changed this.'))).toBe('Someone else changed this. The current version is shown now.');
    expect(writeErrorMessage(err(409, 'That tag is taken.'))).toBe('That tag is taken. What you see now is the current state.');
  });

  it('points at the fields when the form already shows them, and says the server’s words otherwise', () => {
    expect(writeErrorMessage(err(400, 'Enter a name.', { name: 'Enter a name.' }), { fieldsShown: true })).toBe(FIELDS_MARKED);
    expect(writeErrorMessage(err(400, 'Enter a name.'))).toBe('Enter a name.');
    expect(writeErrorMessage(err(403, 'Only a GC manager can do that.'))).toBe('Only a GC manager can do that.');
  });

  it('says a screen’s own sentence for a 412 when given one (a finding reloaded in place)', () => {
    expect(writeErrorMessage(err(412), { stale: STALE_MESSAGE })).toBe(STALE_MESSAGE);
    expect(writeErrorMessage(err(412), FINDING_WRITE_WORDS)).toBe(STALE_MESSAGE);
    expect(writeErrorMessage(err(409, 'This finding is closed; it cannot be accepted.'), FINDING_WRITE_WORDS)).toBe('This finding is closed; it cannot be accepted.');
    expect(writeErrorMessage(err(400, 'Say why.'), FINDING_WRITE_WORDS)).toBe('Say why.');
  });

  it('shows no JavaScript message for something that is not an API answer', () => {
    expect(writeErrorMessage(new SyntaxError('Unexpected token < in JSON'))).toBe(NOT_SAVED);
    expect(writeErrorMessage(new TypeError('x is undefined'), FINDING_WRITE_WORDS)).toBe(NOT_SAVED);
  });
});
