/**
 * The levels board's screens with a fake fetch answering like the API (shared/schemas/board.ts):
 * a grid on a wide screen and a card per level on a phone, each count a link to the findings list
 * filtered to exactly the findings it counts (and the list reads those filters back from the
 * address), the trend chart's text summary, and the scorecards' sortable headers.
 */
import { fireEvent, screen, waitFor, within } from '@testing-library/react-native';
import { useState } from 'react';
import { BoardScreen } from '../../components/board/BoardScreen';
import { LevelDetailScreen } from '../../components/board/LevelDetailScreen';
import { ReadinessScreen } from '../../components/board/ReadinessScreen';
import { ScorecardsScreen } from '../../components/board/ScorecardsScreen';
import { DEFAULT_SCORECARD_SORT, nextSort, sortScorecards, type ScorecardSort } from '../../components/board/scorecardSort';
import { niceTicks, trendSummary } from '../../components/board/TrendChart';
import { boardCellFilters } from '../../components/board/counts';
import { floorReadiness, floorSystemNotes, openBySeverity } from '../../components/board/floorWords';
import { links } from '../../components/links';
import { findingFiltersFromParams } from '../../components/findings/filterParams';
import type { BoardResponse, CompanyScorecard, FloorSystem, ReadinessResponse, RecurringResponse, TrendResponse } from '../../shared/schemas/board';
import type { Role } from '../../shared/words';
import { renderWithQueries } from '../support/components';

jest.setTimeout(30_000);

let mockWide = true;
jest.mock('../../components/ui/useWide', () => ({ useWide: () => mockWide, WIDE_BREAKPOINT: 760 }));

// Links render their href as a prop, so a test can read where each one goes.
jest.mock('expo-router', () => jest.requireActual<typeof import('../support/components')>('../support/components').linkingRouter());

const JOB = '00000000-0000-4000-8000-0000000000a1';
const L1 = '00000000-0000-4000-8000-000000000011';
const L2 = '00000000-0000-4000-8000-000000000012';
const L3 = '00000000-0000-4000-8000-000000000013';
const C1 = '00000000-0000-4000-8000-0000000000c1';
const C2 = '00000000-0000-4000-8000-0000000000c2';
const C3 = '00000000-0000-4000-8000-0000000000c3';

const zero = { open: 0, openCritical: 0, openMajor: 0, fixSubmitted: 0, closed: 0, total: 0, unresolved: 0, overdue: 0, unitsTotal: 0, unitsChecked: 0 };
// Sent out of building order on purpose: the board sorts by position.
const BOARD: BoardResponse = {
  levels: [
    { ...zero, levelId: L2, name: 'Level 2', position: 2, open: 5, openCritical: 1, openMajor: 3, fixSubmitted: 2, closed: 4, total: 11, unresolved: 7, overdue: 2, unitsTotal: 20, unitsChecked: 15, ceilingState: 'blocked', ceilingReady: false, ceilingBlockers: 2, ceilingTestBlockers: 3, ceilingUnits: 16, ceilingUnitsUnchecked: 3, ceilingUnitsExcluded: 0, longestWaitDays: 4 },
    { ...zero, levelId: L1, name: 'Level 1', position: 1, open: 2, openCritical: 0, openMajor: 1, fixSubmitted: 1, closed: 6, total: 9, unresolved: 3, overdue: 0, unitsTotal: 20, unitsChecked: 20, ceilingState: 'ready', ceilingReady: true, ceilingBlockers: 0, ceilingTestBlockers: 0, ceilingUnits: 16, ceilingUnitsUnchecked: 0, ceilingUnitsExcluded: 1, longestWaitDays: 0 },
    { ...zero, levelId: L3, name: 'Roof', position: 3, unitsTotal: 4, ceilingState: 'no_ceiling_units', ceilingReady: false, ceilingBlockers: 0, ceilingTestBlockers: 0, ceilingUnits: 0, ceilingUnitsUnchecked: 0, ceilingUnitsExcluded: 0, longestWaitDays: null },
  ],
  totals: { open: 7, openCritical: 1, openMajor: 4, fixSubmitted: 3, closed: 10, total: 20, unresolved: 10, overdue: 2, unitsTotal: 44, unitsChecked: 35 },
  longestWaitDays: 4,
  today: '2026-11-30',
  companyScope: null,
};
const TREND: TrendResponse = {
  levelId: null,
  points: [
    { date: '2026-11-27', open: 3, fixSubmitted: 0 },
    { date: '2026-11-28', open: 9, fixSubmitted: 1 },
    { date: '2026-11-29', open: 8, fixSubmitted: 2 },
    { date: '2026-11-30', open: 7, fixSubmitted: 3 },
  ],
  companyScope: null,
};
const RECURRING: RecurringResponse = {
  thresholds: { minUnits: 3, minShare: 0.1 },
  items: [
    {
      key: '00000000-0000-4000-8000-0000000000d1',
      catalogueItemId: '00000000-0000-4000-8000-0000000000d1',
      code: 'CD-02',
      title: 'Drain not sloped',
      unitCount: 6,
      checkedUnits: 30,
      share: 0.2,
      recurringSince: '2026-11-28T10:00:00.000Z',
      byLevel: [{ levelId: L2, name: 'Level 2', count: 6 }],
      byCompany: [{ companyId: C1, name: 'Mech Co', count: 6 }],
      byCrew: [
        { companyId: C1, companyName: 'Mech Co', crewId: '00000000-0000-4000-8000-0000000000e1', name: 'Blue crew', count: 5 },
        { companyId: C1, companyName: 'Mech Co', crewId: null, name: null, count: 1 },
      ],
    },
    {
      // "Something else": one other type, told apart by its title.
      key: 'other:return grille hanging loose',
      catalogueItemId: '00000000-0000-4000-8000-0000000000d9',
      code: 'OTHER',
      title: 'Return grille hanging loose',
      unitCount: 4,
      checkedUnits: 30,
      share: 0.13,
      recurringSince: '2026-11-29T10:00:00.000Z',
      byLevel: [{ levelId: L2, name: 'Level 2', count: 4 }],
      byCompany: [{ companyId: C1, name: 'Mech Co', count: 4 }],
      byCrew: [{ companyId: C1, companyName: 'Mech Co', crewId: null, name: null, count: 4 }],
    },
  ],
  companyScope: null,
};
function card(c: Partial<CompanyScorecard> & { companyId: string; name: string }): CompanyScorecard {
  return { trade: null, trades: [], open: 0, overdue: 0, fixesWaiting: 0, longestWaitDays: null, accepted: 0, acceptedFirstPass: 0, firstPassRate: null, medianDaysToAccept: null, returns: 0, ...c };
}
const CARDS: CompanyScorecard[] = [
  card({ companyId: C1, name: 'Mech Co', trade: 'mechanical', trades: ['mechanical', 'controls'], open: 6, overdue: 1, fixesWaiting: 2, longestWaitDays: 5, accepted: 4, acceptedFirstPass: 3, firstPassRate: 0.75, medianDaysToAccept: 3.5, returns: 1 }),
  card({ companyId: C2, name: 'Amp Electric', open: 3, overdue: 3, fixesWaiting: 0, accepted: 2, acceptedFirstPass: 2, firstPassRate: 1, medianDaysToAccept: 1, returns: 0 }),
  card({ companyId: C3, name: 'Ceil Co', open: 2, overdue: 0 }),
];
const READINESS: ReadinessResponse = {
  systems: [
    {
      systemId: '00000000-0000-4000-8000-0000000000e1',
      name: 'VRF-1',
      ready: false,
      unitsTotal: 2,
      unitsReady: 0,
      unitsUnchecked: 1,
      units: [
        { unitId: 'u1', tag: 'IU-2-01', kind: 'cassette_4way', levelId: L2, systemId: 'x', checked: false, ready: false, blockers: [] },
        {
          unitId: 'u2',
          tag: 'IU-2-02',
          kind: 'cassette_4way',
          levelId: L2,
          systemId: 'x',
          checked: true,
          ready: false,
          blockers: [{ findingId: 'f-12', number: 12, code: 'HG-01', title: 'Hanger rod without washers', severity: 'major', status: 'open', unitId: 'u2', unitTag: 'IU-2-02' }],
        },
      ],
    },
  ],
  levels: [
    {
      levelId: L2,
      name: 'Level 2',
      position: 2,
      ceilingState: 'blocked',
      ceilingReady: false,
      ceilingUnits: 2,
      ceilingUnitsUnchecked: 1,
      uncheckedCeilingUnits: [{ unitId: 'u1', tag: 'IU-2-01', version: 3 }],
      ceilingUnitsExcluded: 1,
      excludedCeilingUnits: [
        { unitId: 'u9', tag: 'IU-2-09', version: 2, reason: 'Owner furnished; tile stays removable.', by: { id: 'g1', name: 'Gail Manager' }, at: '2026-11-28T15:00:00.000Z' },
      ],
      unitsTotal: 2,
      unitsReady: 0,
      blockers: [{ findingId: 'f-14', number: 14, code: 'CD-02', title: 'Drain not sloped', severity: 'critical', status: 'fix_submitted', unitId: 'u2', unitTag: 'IU-2-02' }],
    },
  ],
  unitsWithoutSystem: [],
  companyScope: null,
};

/** The fake API: answers by path; anything else is a 404. */
function fakeApi(role: Role, over: Record<string, [number, unknown]> = {}) {
  const routes: Record<string, [number, unknown]> = {
    [`/api/jobs/${JOB}`]: [200, { id: JOB, name: 'Cinder Test', role, timeZone: 'UTC' }],
    [`/api/jobs/${JOB}/board`]: [200, BOARD],
    [`/api/jobs/${JOB}/board/systems`]: [200, { systems: SYSTEMS }],
    [`/api/jobs/${JOB}/trend`]: [200, TREND],
    [`/api/jobs/${JOB}/trend?levelId=${L2}`]: [200, { ...TREND, levelId: L2 }],
    [`/api/jobs/${JOB}/recurring`]: [200, RECURRING],
    [`/api/jobs/${JOB}/scorecards`]: role === 'subcontractor' ? [403, { error: { id: 'forbidden', message: 'Not allowed.' } }] : [200, { companies: CARDS }],
    [`/api/jobs/${JOB}/readiness`]: [200, READINESS],
    [`/api/jobs/${JOB}/readiness?levelId=${L2}`]: [200, READINESS],
    ...over,
  };
  const fn = jest.fn(async (path: string) => {
    const [status, body] = routes[path] ?? [404, { error: { id: 'not_found', message: `No route ${path}` } }];
    return { ok: status >= 200 && status < 300, status, json: async () => body, headers: { get: () => null } };
  });
  (globalThis as { fetch: unknown }).fetch = fn;
  return fn;
}

const S1 = '00000000-0000-4000-8000-0000000000f1';
const S2 = '00000000-0000-4000-8000-0000000000f2';
const SYSTEMS: FloorSystem[] = [
  { systemId: S1, name: 'VRF-1', levelIds: [L1, L2], refrigerant: 'over_limit', startupReady: false, recordsWaiting: 2 },
  { systemId: S2, name: 'VRF-2', levelIds: [L2], refrigerant: 'within_limit', startupReady: true, recordsWaiting: 0 },
];

function hrefOf(testID: string): string {
  return String(screen.getByTestId(testID).props.href);
}

const F = `/jobs/${JOB}/findings`;

describe('the levels board as the building', () => {
  it('stacks the floors roof on top, each with its coverage, open findings by severity, fixes waiting and readiness in words', async () => {
    fakeApi('gc_manager');
    renderWithQueries(<BoardScreen jobId={JOB} />);
    const building = await screen.findByTestId('board-building');
    expect(screen.queryByTestId('board-grid')).toBeNull();
    const floors = within(building)
      .getAllByTestId(/^floor-[^-]+(-[^-]+){4}$/)
      .map((f) => f.props.testID);
    expect(floors).toEqual([`floor-${L3}`, `floor-${L2}`, `floor-${L1}`]);
    expect(screen.getByTestId(`floor-${L2}-coverage-bar`).props.accessibilityLabel).toBe('15 of 20 units checked (75%)');
    expect(within(screen.getByTestId(`floor-${L2}-readiness`)).getByText(/2 blocking · 3 test records · 3 units to check/)).toBeTruthy();
    expect(within(screen.getByTestId(`floor-${L1}-readiness`)).getByText(/ready to close ceilings/)).toBeTruthy();
    expect(within(screen.getByTestId(`floor-${L3}-readiness`)).getByText(/not inspected yet/)).toBeTruthy();
    // Open findings by severity, each a link to exactly those findings; fixes waiting for re-inspection beside them.
    expect(hrefOf(`floor-${L2}-critical`)).toBe(`${F}?levelId=${L2}&status=open&severity=critical`);
    expect(within(screen.getByTestId(`floor-${L2}-minor`)).getByText('1 minor')).toBeTruthy();
    expect(within(screen.getByTestId(`floor-${L2}-waiting`)).getByText('2 fixes waiting')).toBeTruthy();
    // A system over its refrigerant limit is named on every floor it serves, and links to its readiness.
    expect(within(screen.getByTestId(`floor-${L1}-systems`)).getByText(/VRF-1: over its refrigerant limit/)).toBeTruthy();
    expect(within(screen.getByTestId(`floor-${L2}-systems`)).getByText(/VRF-1: start-up waits for 2 test records/)).toBeTruthy();
    expect(hrefOf(`floor-${L2}-system-${S1}-refrigerant`)).toBe(`/jobs/${JOB}/readiness?systemId=${S1}`);
    expect(screen.queryByTestId(`floor-${L3}-systems`)).toBeNull();
    // The table is one tap away.
    expect(hrefOf('board-view-table')).toBe(`/jobs/${JOB}/board?view=table`);
  });

  it('words a floor from its counts (shared with the screen)', () => {
    const row = BOARD.levels[0]!;
    expect(floorReadiness(row)).toEqual({ words: '2 blocking · 3 test records · 3 units to check', tone: 'blocked' });
    expect(floorReadiness({ ...row, ceilingBlockers: 0, ceilingTestBlockers: 0, ceilingUnitsUnchecked: 1 })).toEqual({ words: '1 unit to check', tone: 'waiting' });
    expect(floorReadiness({ ...row, unitsTotal: 0 })).toEqual({ words: 'no units yet', tone: 'none' });
    expect(floorReadiness(BOARD.levels[1]!)).toEqual({ words: 'ready to close ceilings', tone: 'ready' });
    expect(openBySeverity({ open: 5, openCritical: 1, openMajor: 3 })).toEqual([
      { severity: 'critical', count: 1 },
      { severity: 'major', count: 3 },
      { severity: 'minor', count: 1 },
    ]);
    expect(openBySeverity({ open: 0, openCritical: 0, openMajor: 0 })).toEqual([]);
    expect(floorSystemNotes(SYSTEMS).map((n) => n.words)).toEqual(['VRF-1: over its refrigerant limit', 'VRF-1: start-up waits for 2 test records']);
  });
});

describe('the levels board', () => {
  beforeEach(() => {
    mockWide = true;
  });

  it('shows a grid on a wide screen: levels in building order, then the totals', async () => {
    fakeApi('gc_manager');
    renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    const grid = await screen.findByTestId('board-grid');
    expect(screen.queryByTestId('board-cards')).toBeNull();
    const rows = within(grid)
      .getAllByTestId(/^board-row-/)
      .map((r) => r.props.testID);
    expect(rows).toEqual([`board-row-${L1}`, `board-row-${L2}`, `board-row-${L3}`, 'board-row-total']);
    expect(within(screen.getByTestId(`board-cell-${L2}-openCritical`)).getByText('1')).toBeTruthy();
    expect(within(screen.getByTestId(`board-cell-${L2}-openMajor`)).getByText('3')).toBeTruthy();
    expect(within(screen.getByTestId('board-cell-total-closed')).getByText('10')).toBeTruthy();
    expect(within(screen.getByTestId(`board-coverage-${L2}`)).getByText(/15 of 20/)).toBeTruthy();
    expect(within(screen.getByTestId(`board-ceiling-${L2}`)).getByText('✕ 2 blocking · 3 unchecked · 3 tests')).toBeTruthy();
    // Level 1 can close with one unit excluded by a GC manager: the verdict says what it rests on.
    expect(within(screen.getByTestId(`board-ceiling-${L1}`)).getByText('✓ Can close (1 excluded)')).toBeTruthy();
    // Fixes submitted wait for the inspector: the count and the longest wait.
    expect(within(screen.getByTestId(`board-waiting-${L2}`)).getByText('longest 4 days')).toBeTruthy();
    expect(screen.getByTestId(`board-waiting-${L2}`).props.accessibilityLabel).toBe('2 waiting for the inspector, longest 4 days');
    expect(within(screen.getByTestId(`board-waiting-${L1}`)).getByText('since today')).toBeTruthy();
    expect(within(screen.getByTestId('board-waiting-total')).getByText('longest 4 days')).toBeTruthy();
    // A level without units in the ceiling says so: it is not "can close".
    expect(within(screen.getByTestId(`board-ceiling-${L3}`)).getByText('No ceiling units')).toBeTruthy();
  });

  it('shows the partition on the grid: open + fix submitted + closed = total, overdue as a share of open', async () => {
    fakeApi('gc_manager');
    renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    const grid = await screen.findByTestId('board-grid');
    // No Overdue column beside the statuses; critical and major are captioned as parts of open.
    const heads = within(grid)
      .getAllByTestId(/^board-head-/)
      .map((h) => String(h.props.testID).replace('board-head-', ''));
    expect(heads).toEqual(['level', 'open', 'openCritical', 'openMajor', 'fixSubmitted', 'closed', 'total', 'coverage', 'ceilings']);
    expect(screen.getByTestId('board-head-open')).toHaveTextContent('Opennew or returned');
    expect(screen.getByTestId('board-head-openCritical')).toHaveTextContent('Criticalof open');
    expect(screen.getByTestId('board-head-openMajor')).toHaveTextContent('Majorof open');
    expect(screen.getByTestId('board-head-total')).toHaveTextContent('Total= open + fix submitted + closed');
    for (const [id, total] of [
      [L1, '9'],
      [L2, '11'],
      [L3, '0'],
      ['total', '20'],
    ] as const) {
      expect(within(screen.getByTestId(`board-cell-${id}-total`)).getByText(total)).toBeTruthy();
    }
    // Overdue under Open, as a share of the open findings, linked to the overdue list.
    expect(screen.getByTestId(`board-cell-${L2}-overdue`)).toHaveTextContent('2 of 5 overdue');
    expect(screen.getByTestId(`board-cell-${L2}-overdue`).props.accessibilityLabel).toBe('2 of 5 overdue — open findings on Level 2. Show the overdue findings.');
    expect(hrefOf(`board-cell-${L2}-overdue`)).toBe(`${F}?levelId=${L2}&overdue=true`);
    expect(screen.getByTestId(`board-cell-${L1}-overdue`)).toHaveTextContent('0 of 2 overdue');
    expect(screen.getByTestId('board-cell-total-overdue')).toHaveTextContent('2 of 7 overdue');
    expect(hrefOf('board-cell-total-overdue')).toBe(`${F}?overdue=true`);
    // Nothing open on the roof: nothing can be overdue there.
    expect(screen.queryByTestId(`board-cell-${L3}-overdue`)).toBeNull();
    // The note says what adds up and what is left out.
    expect(screen.getByTestId('board-today')).toHaveTextContent(/Open, fix submitted and closed add up to the total on each level; voided findings are not counted/);
  });

  it('shows one card per level on a phone, totals first, with the same numbers', async () => {
    mockWide = false;
    fakeApi('gc_manager');
    renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    await screen.findByTestId('board-cards');
    expect(screen.queryByTestId('board-grid')).toBeNull();
    const cards = screen.getAllByTestId(/^board-card-/).map((c) => c.props.testID);
    expect(cards).toEqual(['board-card-total', `board-card-${L1}`, `board-card-${L2}`, `board-card-${L3}`]);
    expect(screen.getByTestId(`board-waiting-${L2}`)).toHaveTextContent('2 waiting for the inspector, longest 4 days');
    expect(screen.getByTestId('board-waiting-total')).toHaveTextContent('3 waiting for the inspector, longest 4 days');
    expect(screen.queryByTestId(`board-waiting-${L3}`)).toBeNull();
    // The statuses and the total they add up to; overdue, critical and major as parts of open.
    const tiles = within(screen.getByTestId(`board-card-${L2}`))
      .getAllByTestId(/^board-cell-/)
      .map((c) => String(c.props.testID).replace(`board-cell-${L2}-`, ''));
    expect(tiles).toEqual(['open', 'fixSubmitted', 'closed', 'total', 'overdue', 'openCritical', 'openMajor']);
    expect(within(screen.getByTestId(`board-cell-${L2}-total`)).getByText('11')).toBeTruthy();
    expect(screen.getByTestId(`board-of-open-${L2}`)).toHaveTextContent('Of the 5 open:2 of 5 overdue1 critical3 major');
    expect(screen.getByTestId(`board-cell-${L2}-overdue`).props.accessibilityLabel).toBe('2 of 5 overdue — open findings on Level 2. Show the overdue findings.');
    expect(hrefOf(`board-cell-${L2}-overdue`)).toBe(`${F}?levelId=${L2}&overdue=true`);
    expect(within(screen.getByTestId('board-card-total')).getByTestId('board-cell-total-total')).toHaveTextContent('20');
    expect(screen.queryByTestId(`board-of-open-${L3}`)).toBeNull();
  });

  it('links each count to the findings list filtered to what it counts', async () => {
    fakeApi('gc_manager');
    renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    await screen.findByTestId('board-grid');
    expect(hrefOf(`board-cell-${L2}-open`)).toBe(`${F}?levelId=${L2}&status=open`);
    expect(hrefOf(`board-cell-${L2}-openCritical`)).toBe(`${F}?levelId=${L2}&status=open&severity=critical`);
    expect(hrefOf(`board-cell-${L2}-openMajor`)).toBe(`${F}?levelId=${L2}&status=open&severity=major`);
    expect(hrefOf(`board-cell-${L2}-fixSubmitted`)).toBe(`${F}?levelId=${L2}&status=fix_submitted`);
    expect(hrefOf(`board-cell-${L2}-closed`)).toBe(`${F}?levelId=${L2}&status=closed`);
    // The total is the three statuses (without a status filter the list would add voided findings).
    expect(Object.fromEntries(new URLSearchParams(hrefOf(`board-cell-${L2}-total`).split('?')[1]))).toEqual({ levelId: L2, status: 'open,fix_submitted,closed' });
    expect(hrefOf(`board-cell-${L2}-overdue`)).toBe(`${F}?levelId=${L2}&overdue=true`);
    expect(hrefOf('board-cell-total-open')).toBe(`${F}?status=open`);
    expect(hrefOf(`board-level-${L2}`)).toBe(`/jobs/${JOB}/levels/${L2}`);
    expect(hrefOf(`recurring-link-CD-02`)).toBe(`${F}?catalogueItemId=00000000-0000-4000-8000-0000000000d1`);
    expect(hrefOf(`recurring-link-OTHER`)).toBe(`${F}?catalogueItemId=00000000-0000-4000-8000-0000000000d9&q=Return%20grille%20hanging%20loose`);
    // A recurring defect by the crew that installed the units, with the units whose crew is not recorded.
    // One company: its crews by name alone (on a phone every word counts).
    expect(screen.getByTestId('recurring-crews-CD-02')).toHaveTextContent('Blue crew 5Crew not recorded 1');
    expect(screen.getByTestId('recurring-crews-OTHER')).toHaveTextContent('Crew not recorded 4');
    // Scorecards and readiness are one tap away for the GC.
    expect(hrefOf('board-tabs-scorecards')).toBe(`/jobs/${JOB}/scorecards`);
    expect(hrefOf('board-tabs-readiness')).toBe(`/jobs/${JOB}/readiness`);
  });

  it('the findings list reads those links back as the same filters', () => {
    const read = (href: string) => findingFiltersFromParams(Object.fromEntries(new URLSearchParams(href.split('?')[1] ?? '')));
    expect(read(String(links.findings(JOB, boardCellFilters('openCritical', L2))))).toEqual({ levelId: L2, status: 'open', severity: 'critical' });
    expect(read(String(links.findings(JOB, boardCellFilters('overdue', L2))))).toEqual({ levelId: L2, overdue: 'true' });
    expect(read(String(links.findings(JOB, boardCellFilters('fixSubmitted'))))).toEqual({ status: 'fix_submitted' });
    // Junk in the address is left out rather than sent to the API.
    expect(findingFiltersFromParams({ levelId: 'nope', status: 'open,bogus', severity: 'huge', overdue: 'yes', sort: 'dueOn' })).toEqual({ status: 'open', sort: 'dueOn' });
  });

  it('gives a subcontractor no link to the scorecards', async () => {
    fakeApi('subcontractor');
    renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    await screen.findByTestId('board-grid');
    await screen.findByTestId('board-tabs-readiness');
    expect(screen.queryByTestId('board-tabs-scorecards')).toBeNull();
  });

  it('says "no levels yet" for a job without levels, and shows the error with a retry', async () => {
    fakeApi('gc_manager', { [`/api/jobs/${JOB}/board`]: [200, { levels: [], totals: zero, today: '2026-11-30', companyScope: null }] });
    const first = renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    expect(await screen.findByTestId('board-empty')).toBeTruthy();
    first.unmount();
    fakeApi('gc_manager', { [`/api/jobs/${JOB}/board`]: [500, { error: { id: 'internal', message: 'Something went wrong.' } }] });
    renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    expect(await screen.findByText('Something went wrong.')).toBeTruthy();
  });
});

describe('the trend chart', () => {
  it('says in words what the chart shows', async () => {
    // Counted by hand from TREND: 3 → 7 (up 4), highest 9 on the 28th, 3 fixes waiting at the end.
    expect(trendSummary(TREND.points)).toBe(
      'Open findings went from 3 on Fri, 27 Nov 2026 to 7 on Mon, 30 Nov 2026 (up 4); highest 9 on Sat, 28 Nov 2026. 3 with a fix submitted at the end.',
    );
    expect(trendSummary([])).toBe('Open findings: no days to show yet.');
    fakeApi('gc_manager');
    renderWithQueries(<BoardScreen jobId={JOB} view="table" />);
    const summary = await screen.findByTestId('trend-summary');
    expect(summary.props.children).toBe(trendSummary(TREND.points));
    expect(screen.getByTestId('trend-chart').props['aria-label']).toBe(trendSummary(TREND.points));
  });

  it('puts round numbers on the y axis, covering the highest count', () => {
    expect(niceTicks(9)).toEqual([0, 5, 10]);
    expect(niceTicks(7)).toEqual([0, 2, 4, 6, 8]);
    expect(niceTicks(0)).toEqual([0, 1]);
    expect(niceTicks(120)).toEqual([0, 50, 100, 150]);
  });
});

/** The scorecards with their order held here, as the route holds it in the address. */
function Scorecards() {
  const [sort, setSort] = useState<ScorecardSort>(DEFAULT_SCORECARD_SORT);
  return <ScorecardsScreen jobId={JOB} sort={sort} onSortChange={setSort} />;
}

describe('company scorecards', () => {
  beforeEach(() => {
    mockWide = true;
  });

  const nameText = () => screen.getAllByTestId(/^scorecards-row-/).map((r) => within(r).getByTestId('scorecard-name').props.children);

  it('sorts by a header and turns the order round on a second press (aria-sort follows)', async () => {
    fakeApi('gc_manager');
    renderWithQueries(<Scorecards />);
    await screen.findByTestId('scorecards-table');
    // Most overdue first by default.
    expect(nameText()).toEqual(['Amp Electric', 'Mech Co', 'Ceil Co']);
    expect(screen.getByTestId('scorecards-col-overdue').props['aria-sort']).toBe('descending');
    // Overdue is a share of the open findings, never a figure beside them: "1 of 6".
    expect(screen.getByText('1 of 6')).toBeTruthy();
    expect(screen.getByText('3 of 3')).toBeTruthy();
    fireEvent.press(screen.getByTestId('scorecards-sort-open'));
    expect(nameText()).toEqual(['Mech Co', 'Amp Electric', 'Ceil Co']);
    expect(screen.getByTestId('scorecards-col-open').props['aria-sort']).toBe('descending');
    expect(screen.getByTestId('scorecards-col-overdue').props['aria-sort']).toBe('none');
    fireEvent.press(screen.getByTestId('scorecards-sort-open'));
    expect(nameText()).toEqual(['Ceil Co', 'Amp Electric', 'Mech Co']);
    expect(screen.getByTestId('scorecards-col-open').props['aria-sort']).toBe('ascending');
    fireEvent.press(screen.getByTestId('scorecards-sort-name'));
    expect(nameText()).toEqual(['Amp Electric', 'Ceil Co', 'Mech Co']);
    expect(screen.getByTestId('scorecards-col-name').props['aria-sort']).toBe('ascending');
    expect(screen.getByText('75% (3 of 4)')).toBeTruthy();
    // Mech Co's two fixes wait for the inspector, the oldest 5 days.
    expect(screen.getByText('2 · longest 5 days')).toBeTruthy();
  });

  it('says in one line what each figure measures, one line per column', async () => {
    fakeApi('gc_manager');
    renderWithQueries(<Scorecards />);
    await screen.findByTestId('scorecards-table');
    const columns = screen.getAllByTestId(/^scorecards-col-/).map((c) => String(c.props.testID).replace('scorecards-col-', '')).filter((k) => k !== 'name');
    expect(screen.getAllByTestId(/^scorecards-meaning-/).map((m) => String(m.props.testID).replace('scorecards-meaning-', ''))).toEqual(columns);
    expect(screen.getByTestId('scorecards-meaning-overdue')).toHaveTextContent(/a fix waiting for re-inspection is not counted/);
  });

  it('keeps a company with nothing accepted last, whichever way the rate is sorted', () => {
    const desc = sortScorecards(CARDS, { key: 'firstPassRate', dir: 'desc' }).map((c) => c.name);
    const asc = sortScorecards(CARDS, nextSort({ key: 'firstPassRate', dir: 'desc' }, 'firstPassRate')).map((c) => c.name);
    expect(desc).toEqual(['Amp Electric', 'Mech Co', 'Ceil Co']);
    expect(asc).toEqual(['Mech Co', 'Amp Electric', 'Ceil Co']);
  });

  it('shows cards on a phone', async () => {
    mockWide = false;
    fakeApi('inspector');
    renderWithQueries(<Scorecards />);
    await screen.findByTestId('scorecards-cards');
    expect(screen.queryByTestId('scorecards-table')).toBeNull();
    expect(within(screen.getByTestId('scorecards-card-0')).getByText('Amp Electric')).toBeTruthy();
  });

  it('does not ask for them as a subcontractor and says who sees them', async () => {
    const fetchSpy = fakeApi('subcontractor');
    renderWithQueries(<Scorecards />);
    expect(await screen.findByTestId('scorecards-forbidden')).toBeTruthy();
    expect(fetchSpy.mock.calls.map((c) => c[0])).not.toContain(`/api/jobs/${JOB}/scorecards`);
  });
});

describe('readiness and the level screen', () => {
  it('names what blocks a system and a level, each finding a link', async () => {
    mockWide = false;
    fakeApi('gc_manager');
    renderWithQueries(<ReadinessScreen jobId={JOB} />);
    const sys = await screen.findByTestId('system-readiness-00000000-0000-4000-8000-0000000000e1');
    expect(within(sys).getByText('✕ Not ready')).toBeTruthy();
    expect(within(sys).getByText('No complete unit check yet (1 unit)')).toBeTruthy();
    expect(within(sys).getByText('IU-2-01')).toBeTruthy();
    expect(within(sys).getByText(/0 of 2 units ready · 1 not checked · 1 blocking finding$/)).toBeTruthy();
    expect(hrefOf('blocker-12')).toBe(`/jobs/${JOB}/findings/f-12`);
    const level = screen.getByTestId(`level-readiness-${L2}`);
    expect(within(level).getByText('✕ 1 blocking · 1 unchecked')).toBeTruthy();
    // Each blocker sits under the rule it breaks.
    expect(within(level).getByText('Rule: every unit in or above the ceiling is checked first (or excluded by a GC manager, with a reason)')).toBeTruthy();
    expect(within(level).getByText('Not checked yet:')).toBeTruthy();
    expect(within(level).getByTestId('ceiling-unchecked-IU-2-01')).toHaveTextContent(/IU-2-01/);
    // The excluded unit: why, who and when (on the job's clock, UTC here).
    const excluded = within(level).getByTestId('ceiling-excluded-IU-2-09');
    expect(excluded).toHaveTextContent(/Owner furnished; tile stays removable\./);
    expect(excluded).toHaveTextContent(/Excluded by Gail Manager · 28 Nov 2026, 15:00/);
    expect(within(level).getByText('Rule: no unresolved finding needs access above the ceiling')).toBeTruthy();
    expect(hrefOf('blocker-14')).toBe(`/jobs/${JOB}/findings/f-14`);
    expect(screen.getByTestId('readiness-systems-count').props.children).toEqual([0, ' of ', 1, ' systems ready for startup.']);
  });

  it('names the test records a level and a system wait for, and counts a system ready only with them', async () => {
    mockWide = false;
    const L3 = '00000000-0000-4000-8000-0000000000a3';
    const sysId = '00000000-0000-4000-8000-0000000000e2';
    const missingPressure = { kind: 'pressure', state: 'missing', systemId: sysId, systemName: 'VRF-2', unitId: null, unitTag: null, levelId: L3, recordId: null };
    const unwitnessed = { ...missingPressure, state: 'awaiting_witness', recordId: 'r-1' };
    const failedDrain = { kind: 'drain', state: 'failed', systemId: sysId, systemName: 'VRF-2', unitId: 'u5', unitTag: 'IU-3-05', levelId: L3, recordId: 'r-2' };
    const withTests = {
      ...READINESS,
      systems: [
        {
          ...READINESS.systems[0]!,
          systemId: sysId,
          name: 'VRF-2',
          ready: true,
          unitsReady: 2,
          unitsUnchecked: 0,
          units: [],
          startupReady: false,
          startupBlockers: [unwitnessed, { ...missingPressure, kind: 'evacuation', levelId: null }],
          accepted: false,
          acceptanceBlockers: [{ ...missingPressure, kind: 'startup', levelId: null }],
        },
      ],
      levels: [
        {
          ...READINESS.levels[0]!,
          levelId: L3,
          name: 'Level 3',
          ceilingUnitsUnchecked: 0,
          uncheckedCeilingUnits: [],
          ceilingUnitsExcluded: 0,
          excludedCeilingUnits: [],
          blockers: [],
          testsReady: false,
          testBlockers: [
            unwitnessed,
            failedDrain,
            ...Array.from({ length: 8 }, (_, i) => ({ ...failedDrain, state: 'missing', unitId: `m${i}`, unitTag: `IU-3-1${i}`, recordId: null })),
          ],
        },
      ],
    };
    fakeApi('gc_manager', { [`/api/jobs/${JOB}/readiness`]: [200, withTests] });
    renderWithQueries(<ReadinessScreen jobId={JOB} />);
    const sys = await screen.findByTestId(`system-readiness-${sysId}`);
    // Every unit is ready, but the system waits for its tests.
    expect(within(sys).getByText('✕ Not ready')).toBeTruthy();
    expect(screen.getByTestId('readiness-systems-count').props.children).toEqual([0, ' of ', 1, ' systems ready for startup.']);
    expect(within(sys).getByTestId(`system-tests-${sysId}-0`)).toHaveTextContent('• Pressure test of VRF-2: passed, waiting for a witness');
    expect(within(sys).getByTestId(`system-tests-${sysId}-1`)).toHaveTextContent('• Evacuation of VRF-2: not on record');
    expect(within(sys).getByTestId(`system-acceptance-${sysId}-0`)).toHaveTextContent('• Start-up record of VRF-2: not on record');
    const level = screen.getByTestId(`level-readiness-${L3}`);
    expect(within(level).getByText('✕ 10 tests to pass')).toBeTruthy();
    expect(within(level).getByTestId(`level-tests-${L3}-1`)).toHaveTextContent('• Drain test of unit IU-3-05: failed');
    // Many units missing the same record make one line.
    expect(within(level).getByTestId(`level-tests-${L3}-2`)).toHaveTextContent(
      '• Drain test, not on record: 8 units, IU-3-10, IU-3-11, IU-3-12, IU-3-13, IU-3-14, IU-3-15 and 2 more',
    );
    expect(within(level).queryByTestId(`level-tests-${L3}-3`)).toBeNull();
  });

  it('shows a level’s numbers, readiness and trend, and links to walk it and to its plan', async () => {
    mockWide = false;
    fakeApi('gc_manager');
    renderWithQueries(<LevelDetailScreen jobId={JOB} levelId={L2} />);
    expect(await screen.findByTestId('level-name')).toBeTruthy();
    expect(hrefOf('level-walk')).toBe(`/jobs/${JOB}/levels/${L2}/walk`);
    expect(hrefOf('level-plan')).toBe(`/jobs/${JOB}/levels/${L2}/plan`);
    expect(hrefOf('level-cell-openCritical')).toBe(`${F}?levelId=${L2}&status=open&severity=critical`);
    // The same partition as the board: the statuses, their total, and overdue as a share of open.
    expect(within(screen.getByTestId('level-cell-total')).getByText('11')).toBeTruthy();
    expect(screen.getByTestId('level-of-open')).toHaveTextContent('Of the 5 open:2 of 5 overdue1 critical3 major');
    expect(hrefOf('level-cell-overdue')).toBe(`${F}?levelId=${L2}&overdue=true`);
    expect(await screen.findByTestId(`level-readiness-${L2}`)).toBeTruthy();
    expect(await screen.findByTestId('trend-summary')).toBeTruthy();
  });
});

describe('excluding a unit from the ceiling rule', () => {
  it('a GC manager excludes with a reason (checked before sending) and counts it again, each with the version seen', async () => {
    mockWide = true;
    const fetchSpy = fakeApi('gc_manager', {
      [`/api/jobs/${JOB}/units/u1/ceiling-exclusion`]: [200, { unitId: 'u1', tag: 'IU-2-01', version: 4, ceilingExclusion: null }],
      [`/api/jobs/${JOB}/units/u9/ceiling-exclusion`]: [200, { unitId: 'u9', tag: 'IU-2-09', version: 3, ceilingExclusion: null }],
    });
    renderWithQueries(<ReadinessScreen jobId={JOB} />);
    fireEvent.press(await screen.findByTestId('ceiling-exclude-IU-2-01'));
    fireEvent.changeText(screen.getByTestId('ceiling-exclude-reason-IU-2-01'), ' x ');
    fireEvent.press(screen.getByTestId('ceiling-exclude-send-IU-2-01'));
    expect(await screen.findByText(/at least 3 characters/)).toBeTruthy();
    const calls = () => fetchSpy.mock.calls as unknown as [string, RequestInit | undefined][];
    const writes = () => calls().filter(([, init]) => init?.method !== undefined && init.method !== 'GET');
    expect(writes()).toHaveLength(0);
    fireEvent.changeText(screen.getByTestId('ceiling-exclude-reason-IU-2-01'), 'Abandoned in place, capped.');
    fireEvent.press(screen.getByTestId('ceiling-exclude-send-IU-2-01'));
    await screen.findByTestId('ceiling-exclude-IU-2-01');
    fireEvent.press(screen.getByTestId('ceiling-count-again-IU-2-09'));
    await waitFor(() => expect(writes()).toHaveLength(2));
    const [put, del] = writes() as [string, RequestInit][] as [[string, RequestInit], [string, RequestInit]];
    expect(put[0]).toBe(`/api/jobs/${JOB}/units/u1/ceiling-exclusion`);
    expect(put[1].method).toBe('PUT');
    expect(JSON.parse(String(put[1].body))).toEqual({ reason: 'Abandoned in place, capped.' });
    expect((put[1].headers as Record<string, string>)['If-Match']).toBe('"v3"');
    expect(del[1].method).toBe('DELETE');
    expect((del[1].headers as Record<string, string>)['If-Match']).toBe('"v2"');
  });

  it('an inspector sees the unchecked and excluded units but is offered neither action', async () => {
    mockWide = false;
    fakeApi('inspector');
    renderWithQueries(<ReadinessScreen jobId={JOB} />);
    const level = await screen.findByTestId(`level-readiness-${L2}`);
    expect(within(level).getByText('Not checked yet: IU-2-01')).toBeTruthy();
    expect(within(level).getByTestId('ceiling-excluded-IU-2-09')).toBeTruthy();
    expect(screen.queryByTestId('ceiling-exclude-IU-2-01')).toBeNull();
    expect(screen.queryByTestId('ceiling-count-again-IU-2-09')).toBeNull();
  });
});
