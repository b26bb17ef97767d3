/**
 * The levels board in the browser, signed in as the demo GC manager: from the job's overview to
 * the board at 1280x800 (a grid) and at 390x844 (a card per level); a count opens the findings
 * list filtered to exactly the findings it counts (the list's total equals the cell, and both equal
 * a count of the seeded rows made here with the models, not with the board's SQL); the scorecards
 * sort by a header; readiness, a level's screen and the trend chart render. Screenshots go to
 * .artifacts/screenshots (board-*.png).
 */
import { Op, type WhereOptions } from 'sequelize';
import type { Page } from 'playwright-core';
import { Company, Finding, Level } from '../../server/models';
import { DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoJob } from '../support/demo';

jest.setTimeout(300_000);

let h: BrowserHarness;
let jobId = '';
let today = '';
let levels: Level[] = [];
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;
const mechanical = DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  const job = await demoJob();
  jobId = job.id;
  // Today in the job's time zone, as the board judges "overdue".
  today = new Intl.DateTimeFormat('en-CA', { timeZone: job.timeZone || 'UTC', year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date());
  levels = await Level.findAll({ where: { jobId }, order: [['position', 'ASC']] });
});
afterAll(async () => {
  await h?.close();
});

const signIn = (page: Page, email: string) => h.signIn(page, email, DEMO_PASSWORD);

async function text(page: Page, testID: string): Promise<string> {
  return ((await page.getByTestId(testID).first().textContent()) ?? '').trim();
}

/** Scrolls an element into view, lets the page settle (no half-painted screenshot), and takes a screenshot. */
async function shotAt(page: Page, testID: string, name: string) {
  await page.getByTestId(testID).first().scrollIntoViewIfNeeded();
  await page.waitForTimeout(400);
  await h.screenshot(page, name);
}

/** The number a board cell shows. */
async function cell(page: Page, testID: string): Promise<number> {
  return Number((await text(page, testID)).replace(/[^0-9]/g, ''));
}

/** "2 of 5 overdue" under Open: overdue as a share of the open findings; none shown when nothing is open. */
async function overdueShare(page: Page, testID: string): Promise<{ overdue: number; open: number } | null> {
  if ((await page.getByTestId(testID).count()) === 0) return null;
  const m = /^(\d+) of (\d+) overdue$/.exec(await text(page, testID));
  expect(m).not.toBeNull();
  return { overdue: Number(m![1]), open: Number(m![2]) };
}

/** The findings list's total ("3 findings match the filters"). */
async function listTotal(page: Page): Promise<number> {
  const total = page.getByTestId('findings-total');
  await total.waitFor();
  return Number(((await total.textContent()) ?? '').split(' ')[0]);
}

/** Counted straight from the seeded rows with the models (voided findings are never counted). */
function countFindings(where: WhereOptions): Promise<number> {
  return Finding.count({ where: { jobId, status: { [Op.ne]: 'voided' }, ...(where as object) } });
}

describe('the levels board', () => {
  it('opens from the job overview as a grid at 1280x800; a cell opens its findings, as many as it says', async () => {
    const { page, problems } = await h.newPage(WIDE);
    await signIn(page, gc.email);
    await page.goto(`${h.baseUrl}/jobs/${jobId}`);
    await page.getByTestId('job-board').waitFor();
    await h.screenshot(page, 'board-00-job-overview-wide');
    await page.getByTestId('job-board').click();
    // The board opens as the building, roof on top; the table is one tap away.
    await page.getByTestId('board-building').waitFor();
    const floorIds = await page.locator('[data-testid^="floor-"][data-testid$="-readiness"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));
    expect(floorIds).toEqual([...levels].reverse().map((l) => `floor-${l.id}-readiness`));
    await h.screenshot(page, 'board-00b-building-wide');
    await page.getByTestId('board-view-table').click();
    await page.getByTestId('board-grid').waitFor();
    expect(await page.getByTestId('board-cards').count()).toBe(0);

    // Rows in building order, then the totals.
    const rowIds = await page.locator('[data-testid^="board-row-"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));
    expect(rowIds).toEqual([...levels.map((l) => `board-row-${l.id}`), 'board-row-total']);

    // Every count on every level equals the seeded rows, counted here.
    for (const l of levels) {
      expect(await cell(page, `board-cell-${l.id}-open`)).toBe(await countFindings({ levelId: l.id, status: 'open' }));
      expect(await cell(page, `board-cell-${l.id}-openCritical`)).toBe(await countFindings({ levelId: l.id, status: 'open', severity: 'critical' }));
      expect(await cell(page, `board-cell-${l.id}-openMajor`)).toBe(await countFindings({ levelId: l.id, status: 'open', severity: 'major' }));
      expect(await cell(page, `board-cell-${l.id}-fixSubmitted`)).toBe(await countFindings({ levelId: l.id, status: 'fix_submitted' }));
      expect(await cell(page, `board-cell-${l.id}-closed`)).toBe(await countFindings({ levelId: l.id, status: 'closed' }));
      // Open + fix submitted + closed = total, shown; the total is every finding but voided ones.
      const total = await cell(page, `board-cell-${l.id}-total`);
      expect(total).toBe(await countFindings({ levelId: l.id }));
      expect(
        (await cell(page, `board-cell-${l.id}-open`)) + (await cell(page, `board-cell-${l.id}-fixSubmitted`)) + (await cell(page, `board-cell-${l.id}-closed`)),
      ).toBe(total);
      // Overdue under Open, as a share of it: open and past due; a fix waiting for re-inspection is
      // not overdue against the company. A level with nothing open shows no share.
      const open = await countFindings({ levelId: l.id, status: 'open' });
      const overdue = await countFindings({ levelId: l.id, status: 'open', dueOn: { [Op.lt]: today } });
      expect(await overdueShare(page, `board-cell-${l.id}-overdue`)).toEqual(open === 0 ? null : { overdue, open });
    }
    expect(await cell(page, 'board-cell-total-open')).toBe(await countFindings({ status: 'open' }));
    expect(await cell(page, 'board-cell-total-total')).toBe(await countFindings({}));
    // No Overdue column beside the statuses.
    expect(await page.getByTestId('board-head-overdue').count()).toBe(0);
    await h.screenshot(page, 'board-01-grid-wide');
    await page.getByTestId('trend-chart').locator('svg').waitFor();
    expect(await page.getByTestId('trend-chart').locator('svg').count()).toBe(1);
    expect(await text(page, 'trend-summary')).toMatch(/^Open findings (went from \d+ on .+ to \d+ on .+|on .+: \d+)/);
    await shotAt(page, 'board-trend', 'board-02-trend-wide');
    await shotAt(page, 'recurring', 'board-03-recurring-wide');

    // A level with open critical findings: its cell opens exactly those.
    let level: Level | undefined;
    for (const l of levels) if ((await cell(page, `board-cell-${l.id}-openCritical`)) > 0 && !level) level = l;
    expect(level).toBeDefined();
    const critical = await cell(page, `board-cell-${level!.id}-openCritical`);
    await page.getByTestId(`board-cell-${level!.id}-openCritical`).click();
    await page.waitForURL(/\/findings\?/);
    expect(new URL(page.url()).searchParams.get('levelId')).toBe(level!.id);
    expect(await listTotal(page)).toBe(critical);
    expect(await page.getByTestId('findings-filters-status-open').getAttribute('aria-checked')).toBe('true');
    expect(await page.getByTestId('findings-filters-severity-critical').getAttribute('aria-checked')).toBe('true');
    await h.screenshot(page, 'board-04-critical-findings-wide');

    // The job's overdue total opens the overdue findings, as many.
    await page.goBack();
    await page.getByTestId('board-grid').waitFor();
    const share = await overdueShare(page, 'board-cell-total-overdue');
    expect(share!.overdue).toBeGreaterThan(0);
    await page.getByTestId('board-cell-total-overdue').click();
    await page.waitForURL(/overdue=true/);
    expect(await listTotal(page)).toBe(share!.overdue);
    expect(await page.getByTestId('findings-filters-overdue').getAttribute('aria-checked')).toBe('true');
    expect(problems).toEqual([]);
  });

  it('shows one card per level at 390x844; a card’s count opens as many findings', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page, gc.email);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/board?view=table`);
    await page.getByTestId('board-cards').waitFor();
    expect(await page.getByTestId('board-grid').count()).toBe(0);
    const cards = await page.locator('[data-testid^="board-card-"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));
    expect(cards).toEqual(['board-card-total', ...levels.map((l) => `board-card-${l.id}`)]);
    await h.screenshot(page, 'board-05-cards-phone');
    const level = levels[1]!;
    await shotAt(page, `board-card-${level.id}`, 'board-06-card-phone');
    const waiting = await cell(page, `board-cell-${level.id}-fixSubmitted`);
    expect(waiting).toBe(await countFindings({ levelId: level.id, status: 'fix_submitted' }));
    await page.getByTestId(`board-cell-${level.id}-fixSubmitted`).click();
    await page.waitForURL(/status=fix_submitted/);
    expect(await listTotal(page)).toBe(waiting);
    await h.screenshot(page, 'board-07-fix-submitted-findings-phone');

    // The total tile opens the level's findings in the three statuses it adds up: as many.
    await page.goBack();
    await page.getByTestId('board-cards').waitFor();
    const total = await cell(page, `board-cell-${level.id}-total`);
    expect(total).toBe(await countFindings({ levelId: level.id }));
    await page.getByTestId(`board-cell-${level.id}-total`).click();
    await page.waitForURL(/status=open%2Cfix_submitted%2Cclosed|status=open,fix_submitted,closed/);
    expect(await listTotal(page)).toBe(total);

    await page.goto(`${h.baseUrl}/jobs/${jobId}/board`);
    await page.getByTestId('trend-chart').locator('svg').waitFor();
    expect(await page.getByTestId('trend-chart').locator('svg').count()).toBe(1);
    await shotAt(page, 'trend', 'board-08-trend-phone');
    await shotAt(page, 'recurring', 'board-09-recurring-phone');
    expect(problems).toEqual([]);
  });

  it('shows the building on a phone: each floor’s open findings by severity are as many as the database holds, and each opens them', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page, gc.email);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/board`);
    await page.getByTestId('board-building').waitFor();
    for (const l of levels) {
      for (const severity of ['critical', 'major', 'minor'] as const) {
        const n = await countFindings({ levelId: l.id, status: 'open', severity });
        const shown = page.getByTestId(`floor-${l.id}-${severity}`);
        if (n === 0) expect(await shown.count()).toBe(0);
        else expect((await shown.innerText()).trim()).toBe(`${n} ${severity}`);
      }
      const waiting = await countFindings({ levelId: l.id, status: 'fix_submitted' });
      if (waiting > 0) expect((await page.getByTestId(`floor-${l.id}-waiting`).innerText()).trim()).toBe(`${waiting} fix${waiting === 1 ? '' : 'es'} waiting`);
    }
    await h.screenshot(page, 'board-00c-building-phone');
    // The first floor with open major findings: its count opens exactly those.
    let level: Level | undefined;
    let majors = 0;
    for (const l of levels) {
      const n = await countFindings({ levelId: l.id, status: 'open', severity: 'major' });
      if (n > 0 && !level) [level, majors] = [l, n];
    }
    expect(level).toBeDefined();
    await page.getByTestId(`floor-${level!.id}-major`).click();
    await page.waitForURL(/severity=major/);
    expect(await listTotal(page)).toBe(majors);
    expect(problems).toEqual([]);
  });

  it('sorts the company scorecards by a header, and shows readiness and a level', async () => {
    const { page, problems } = await h.newPage(WIDE);
    await signIn(page, gc.email);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/board`);
    await page.getByTestId('board-tabs-scorecards').click();
    await page.getByTestId('scorecards-table').waitFor();
    const column = async (i: number) =>
      page
        .locator('[data-testid^="scorecards-row-"]')
        .evaluateAll((rows, n) => rows.map((r) => (r.querySelectorAll('[role="cell"]')[n] as unknown as { innerText: string } | undefined)?.innerText.trim() ?? ''), i);
    // Most overdue first by default.
    expect(await page.getByTestId('scorecards-col-overdue').getAttribute('aria-sort')).toBe('descending');
    const overdue = (await column(2)).map(Number);
    expect(overdue).toEqual([...overdue].sort((a, b) => b - a));
    await page.getByTestId('scorecards-sort-returns').click();
    expect(await page.getByTestId('scorecards-col-returns').getAttribute('aria-sort')).toBe('descending');
    expect(await page.getByTestId('scorecards-col-overdue').getAttribute('aria-sort')).toBe('none');
    let returns = (await column(6)).map(Number);
    expect(returns).toEqual([...returns].sort((a, b) => b - a));
    await page.getByTestId('scorecards-sort-returns').click();
    expect(await page.getByTestId('scorecards-col-returns').getAttribute('aria-sort')).toBe('ascending');
    returns = (await column(6)).map(Number);
    expect(returns).toEqual([...returns].sort((a, b) => a - b));
    await page.getByTestId('scorecards-sort-name').click();
    const names = await column(0);
    expect(names).toEqual([...names].sort((a, b) => a.localeCompare(b)));
    await h.screenshot(page, 'board-10-scorecards-wide');

    await page.getByTestId('board-tabs-readiness').click();
    await page.getByTestId('readiness-systems').waitFor();
    await h.screenshot(page, 'board-11-readiness-wide');
    await shotAt(page, 'readiness-levels', 'board-12-readiness-levels-wide');

    const level = levels[0]!;
    await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${level.id}`);
    await page.getByTestId('level-name').waitFor();
    expect(await text(page, 'level-name')).toBe(level.name);
    expect(await page.getByTestId('level-plan').getAttribute('href')).toBe(`/jobs/${jobId}/levels/${level.id}/plan`);
    expect(await cell(page, 'level-cell-open')).toBe(await countFindings({ levelId: level.id, status: 'open' }));
    expect(await cell(page, 'level-cell-total')).toBe(await countFindings({ levelId: level.id }));
    await page.getByTestId('level-trend').waitFor();
    await h.screenshot(page, 'board-13-level-wide');
    expect(problems).toEqual([]);
  });

  it('shows a subcontractor only their company’s counts, and no scorecards', async () => {
    const company = await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } });
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page, mechanical.email);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/board?view=table`);
    await page.getByTestId('board-cards').waitFor();
    await page.getByTestId('board-company-scope').waitFor();
    expect(await page.getByTestId('board-tabs-scorecards').count()).toBe(0);
    expect(await cell(page, 'board-cell-total-open')).toBe(await countFindings({ companyId: company!.id, status: 'open' }));
    await h.screenshot(page, 'board-14-subcontractor-phone');
    await page.goto(`${h.baseUrl}/jobs/${jobId}/scorecards`);
    await page.getByTestId('scorecards-forbidden').waitFor();
    expect(problems).toEqual([]);
  });
});
