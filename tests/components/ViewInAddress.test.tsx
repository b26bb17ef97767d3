/**
 * Views in the address: the findings list's filters and sort, a level walk's unit filters and the
 * scorecards' order are read back from an address through their zod schemas (a missing, unknown or
 * bad value falls back to the default and never throws), written by components/links.ts with the
 * defaults left out, and useAddressView writes the whole view with router.setParams (a cleared
 * filter leaves the address). A search typed in the filters follows the address when it changes
 * (Back, a link) without losing what is being typed.
 */
import { act, fireEvent, render, screen } from '@testing-library/react-native';
import { renderHook } from '@testing-library/react-native';
import { SCORECARDS_VIEW, scorecardSortFromParams } from '../../components/board/scorecardParams';
import { DEFAULT_SCORECARD_SORT, SCORECARD_KEYS } from '../../components/board/scorecardSort';
import { FINDINGS_VIEW, findingFiltersFromParams } from '../../components/findings/filterParams';
import { FINDING_SEARCH_DELAY_MS, FindingsFilters } from '../../components/findings/FindingsFilters';
import { findingParams, links, scorecardParams, walkParams } from '../../components/links';
import type { FindingFilters } from '../../components/queries/findings';
import { useAddressView } from '../../components/useAddressView';
import { WALK_VIEW, walkFiltersFromParams } from '../../components/walk/walkParams';
import { TAG_SEARCH_DELAY_MS, WalkFilters } from '../../components/walk/WalkFilters';
import type { AddressParams } from '../../components/viewParams';

const mockParams: { current: AddressParams } = { current: {} };
const mockSetParams = jest.fn();
jest.mock('expo-router', () => ({
  useLocalSearchParams: () => mockParams.current,
  router: { setParams: (p: object) => mockSetParams(p) },
}));

const JOB = '00000000-0000-4000-8000-0000000000a1';
const LEVEL = '00000000-0000-4000-8000-0000000000b1';
const SPACE = '00000000-0000-4000-8000-0000000000c1';
const COMPANY = '00000000-0000-4000-8000-0000000000d1';

/** The query of an address as a plain object. */
function queryOf(href: unknown): Record<string, string> {
  const s = String(href);
  return Object.fromEntries(new URLSearchParams(s.includes('?') ? s.slice(s.indexOf('?') + 1) : ''));
}

describe('the findings list in the address', () => {
  it('reads every filter and the sort back from the address links.findings writes', () => {
    const view: FindingFilters = {
      levelId: LEVEL,
      spaceId: SPACE,
      companyId: COMPANY,
      kind: 'wall_mounted',
      status: 'open,fix_submitted',
      severity: 'critical',
      overdue: 'true',
      q: 'drain & trap',
      sort: 'dueOn',
    };
    const href = links.findings(JOB, view);
    expect(href).toBe(
      `/jobs/${JOB}/findings?levelId=${LEVEL}&spaceId=${SPACE}&companyId=${COMPANY}&kind=wall_mounted&status=open%2Cfix_submitted&severity=critical&overdue=true&q=drain%20%26%20trap&sort=dueOn`,
    );
    expect(findingFiltersFromParams(queryOf(href))).toEqual(view);
  });

  it('leaves the defaults out: newest first, no filter, overdue off', () => {
    expect(links.findings(JOB, { sort: '-number', overdue: 'false', q: '' })).toBe(`/jobs/${JOB}/findings`);
    expect(findingParams({ sort: '-number', status: 'open' })).toEqual({ status: 'open' });
    // newest first named in an address reads as no sort, so it is written out again as nothing
    expect(findingFiltersFromParams({ sort: '-number' })).toEqual({});
  });

  it('falls back to no filter for each bad value, keeping the good ones, and never throws', () => {
    expect(
      findingFiltersFromParams({
        levelId: 'nope',
        spaceId: `${SPACE}x`,
        kind: 'chandelier',
        status: 'open,bogus,open',
        severity: 'huge',
        overdue: 'yes',
        sort: 'price',
        q: '   ',
        unknown: 'x',
      }),
    ).toEqual({ status: 'open' });
    // a repeated key counts once (the first); a search longer than the API takes is cut
    expect(findingFiltersFromParams({ severity: ['major', 'critical'], q: `  ${'a'.repeat(150)} ` })).toEqual({ severity: 'major', q: 'a'.repeat(100) });
    expect(findingFiltersFromParams({})).toEqual({});
    expect(() => findingFiltersFromParams(undefined as unknown as AddressParams)).not.toThrow();
  });
});

describe('a level walk in the address', () => {
  it('reads its unit filters back, and keeps `saved` beside them', () => {
    const view = { q: 'IU-3', state: 'not_checked' as const, spaceId: SPACE, kind: 'cassette_4way' as const };
    const href = links.levelWalk(JOB, LEVEL, undefined, view);
    expect(href).toBe(`/jobs/${JOB}/levels/${LEVEL}/walk?q=IU-3&state=not_checked&spaceId=${SPACE}&kind=cassette_4way`);
    expect(walkFiltersFromParams(queryOf(href))).toEqual(view);
    expect(links.levelWalk(JOB, LEVEL, 'IU-3', { state: 'open_findings' })).toBe(`/jobs/${JOB}/levels/${LEVEL}/walk?state=open_findings&saved=IU-3`);
    expect(links.levelWalk(JOB, LEVEL, undefined, {})).toBe(`/jobs/${JOB}/levels/${LEVEL}/walk`);
    expect(walkParams({ q: '', state: undefined })).toEqual({});
  });

  it('falls back to all units for bad values', () => {
    expect(walkFiltersFromParams({ state: 'done', systemId: '12', kind: 'x', q: 'x'.repeat(60), saved: 'IU-1', levelId: LEVEL })).toEqual({ q: 'x'.repeat(40) });
  });
});

describe('the scorecards’ order in the address', () => {
  it('writes every order but the default, and reads each back', () => {
    expect(links.scorecards(JOB)).toBe(`/jobs/${JOB}/scorecards`);
    expect(scorecardParams(DEFAULT_SCORECARD_SORT)).toEqual({});
    expect(links.scorecards(JOB, { key: 'name', dir: 'asc' })).toBe(`/jobs/${JOB}/scorecards?sort=name`);
    for (const key of SCORECARD_KEYS)
      for (const dir of ['asc', 'desc'] as const) expect(scorecardSortFromParams(queryOf(links.scorecards(JOB, { key, dir })))).toEqual({ key, dir });
  });

  it('falls back to most overdue first', () => {
    for (const sort of ['', '-', 'price', '--open', 'open;drop', ['x', 'name']]) expect(scorecardSortFromParams({ sort })).toEqual(DEFAULT_SCORECARD_SORT);
    expect(scorecardSortFromParams({})).toEqual(DEFAULT_SCORECARD_SORT);
  });
});

describe('useAddressView', () => {
  beforeEach(() => {
    mockSetParams.mockClear();
  });

  it('reads the view from the route’s address and writes every key of it, clearing the ones left out', () => {
    mockParams.current = { jobId: JOB, status: 'open', severity: 'critical', sort: 'dueOn' };
    const { result } = renderHook(() => useAddressView(FINDINGS_VIEW));
    expect(result.current[0]).toEqual({ status: 'open', severity: 'critical', sort: 'dueOn' });
    act(() => result.current[1]({ severity: 'critical', sort: '-number' }));
    expect(mockSetParams).toHaveBeenCalledTimes(1);
    const written = mockSetParams.mock.calls[0][0] as Record<string, string | undefined>;
    expect(Object.keys(written).sort()).toEqual([...FINDINGS_VIEW.keys].sort());
    expect(Object.fromEntries(Object.entries(written).filter(([, v]) => v !== undefined))).toEqual({ severity: 'critical' });
    expect(written).not.toHaveProperty('jobId');
  });

  it('gives the same object for the same address (a query key and effects do not churn)', () => {
    mockParams.current = { levelId: LEVEL, state: 'checked_ok' };
    const { result, rerender } = renderHook(() => useAddressView(WALK_VIEW));
    const first = result.current[0];
    mockParams.current = { levelId: LEVEL, state: 'checked_ok', saved: 'IU-2' };
    rerender({});
    expect(result.current[0]).toBe(first);
    mockParams.current = { levelId: LEVEL, state: 'not_checked' };
    rerender({});
    expect(result.current[0]).toEqual({ state: 'not_checked' });
    act(() => result.current[1]({}));
    expect(mockSetParams).toHaveBeenLastCalledWith({ q: undefined, state: undefined, spaceId: undefined, systemId: undefined, kind: undefined });
    expect(SCORECARDS_VIEW.keys).toEqual(['sort']);
  });
});

describe('a typed search and the address', () => {
  beforeEach(() => jest.useFakeTimers());
  afterEach(() => jest.useRealTimers());

  const findings = (value: FindingFilters, onChange = jest.fn()) => (
    <FindingsFilters value={value} onChange={onChange} counts={undefined} levels={[]} spaces={[]} units={[]} companies={[]} catalogue={[]} showSort={false} />
  );

  it('shows the search of a new address (Back, a link), and sends what is typed once typing stops', () => {
    const onChange = jest.fn();
    const { rerender } = render(findings({ q: 'drain' }, onChange));
    expect(screen.getByTestId('findings-filters-q').props.value).toBe('drain');
    rerender(findings({ q: 'pump' }, onChange));
    expect(screen.getByTestId('findings-filters-q').props.value).toBe('pump');
    fireEvent.changeText(screen.getByTestId('findings-filters-q'), 'pump lift');
    act(() => jest.advanceTimersByTime(FINDING_SEARCH_DELAY_MS));
    expect(onChange).toHaveBeenLastCalledWith({ q: 'pump lift' });
    // typing goes on before the address catches up: the address's older words do not replace it
    fireEvent.changeText(screen.getByTestId('findings-filters-q'), 'pump lift 3');
    rerender(findings({ q: 'pump lift' }, onChange));
    expect(screen.getByTestId('findings-filters-q').props.value).toBe('pump lift 3');
    rerender(findings({}, onChange));
    expect(screen.getByTestId('findings-filters-q').props.value).toBe('');
  });

  it('does the same for a level walk’s tag search', () => {
    const onChange = jest.fn();
    const walk = (value: { q?: string }) => <WalkFilters value={value} onChange={onChange} spaces={[]} systems={[]} />;
    const { rerender } = render(walk({ q: '07' }));
    expect(screen.getByTestId('walk-filters-q').props.value).toBe('07');
    rerender(walk({}));
    expect(screen.getByTestId('walk-filters-q').props.value).toBe('');
    fireEvent.changeText(screen.getByTestId('walk-filters-q'), 'IU-1');
    act(() => jest.advanceTimersByTime(TAG_SEARCH_DELAY_MS));
    expect(onChange).toHaveBeenLastCalledWith({ q: 'IU-1' });
  });
});
