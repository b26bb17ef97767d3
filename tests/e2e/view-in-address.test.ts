/**
 * Views live in the address, in the browser at 1280x800 and at 390x844, signed in as the demo GC
 * manager: the findings list's filters and sort, a level walk's unit filters and the company
 * scorecards' order (the board's one sort; the levels board itself has no filter of its own, its
 * counts link to the filtered findings list) are set on screen, the address changes, a reload shows
 * the same rows, and the copied address opened by the demo inspector in a fresh browser shows them
 * too. The rows expected are counted here from the seeded rows with the models. Screenshots go to
 * the artifacts folder (view-address-*.png).
 */
import { Op } from 'sequelize';
import type { Page } from 'playwright-core';
import { Finding, Level, Unit } from '../../server/models';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoJob } from '../support/demo';
import { waitFor } from '../support/wait';

jest.setTimeout(300_000);

let h: BrowserHarness;
let jobId = '';
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const FINDINGS_PAGE = 25;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  jobId = (await demoJob()).id;
});
afterAll(async () => {
  await h?.close();
});

type Size = { width: number; height: number };
const SIZES: [string, Size][] = [
  ['wide', WIDE],
  ['phone', PHONE],
];

/** The address's query as a plain object. */
function queryOf(page: Page): Record<string, string> {
  return Object.fromEntries(new URL(page.url()).searchParams);
}

/** Waits until the address's query is exactly `expected` (a filter set on screen has reached it). */
async function addressIs(page: Page, expected: Record<string, string>) {
  await waitFor(() => JSON.stringify(Object.entries(queryOf(page)).sort()) === JSON.stringify(Object.entries(expected).sort()), {
    what: `the address to read ${JSON.stringify(expected)} (it reads ${page.url()})`,
  });
}

/** The test ids' numbers of the rows shown, in order (`finding-card-12` → 12). */
async function shown(page: Page, prefix: string): Promise<string[]> {
  return page.locator(`[data-testid^="${prefix}"]`).evaluateAll((els, p) => els.map((e) => (e.getAttribute('data-testid') ?? '').slice(p.length)), prefix);
}

/** A second person, in a browser of their own, opens an address they were sent. */
async function openAsInspector(size: Size, address: string): Promise<Page> {
  const { page } = await h.newPage(size);
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  await page.goto(address);
  return page;
}

describe.each(SIZES)('views in the address at %s', (name, size) => {
  const wide = name === 'wide';

  it('the findings list: status, severity and order survive a reload and open the same for someone else', async () => {
    // Open or fix submitted, major: counted from the seeded rows (voided are never listed).
    const expected = await Finding.findAll({ where: { jobId, status: ['open', 'fix_submitted'], severity: 'major' }, attributes: ['number', 'dueOn'] });
    expect(expected.length).toBeGreaterThan(1);
    const dueOf = new Map(expected.map((f) => [String(f.number), f.dueOn]));
    const rowPrefix = wide ? 'finding-row-' : 'finding-card-';

    const { page, problems } = await h.newPage(size);
    await h.signIn(page, gc.email, DEMO_PASSWORD);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings`);
    await page.getByTestId('findings-list').waitFor();
    expect(queryOf(page)).toEqual({});
    const all = Number(((await page.getByTestId('findings-total').textContent()) ?? '').split(' ')[0]);

    await page.getByTestId('findings-filters-status-open').click();
    await addressIs(page, { status: 'open' });
    await page.getByTestId('findings-filters-status-fix_submitted').click();
    await page.getByTestId('findings-filters-severity-major').click();
    if (wide) {
      await page.getByTestId('findings-sort-dueOn').click();
    } else {
      await page.getByTestId('findings-filters-more').click();
      await page.getByTestId('findings-filters-sort').selectOption('dueOn');
    }
    await addressIs(page, { status: 'open,fix_submitted', severity: 'major', sort: 'dueOn' });

    /** The rows the list shows once it has loaded this view: as many as counted, due soonest first. */
    const rowsOf = async (p: Page) => {
      await waitFor(async () => (await shown(p, rowPrefix)).length === Math.min(expected.length, FINDINGS_PAGE) && (await p.getByTestId('findings-total').textContent())?.startsWith(`${expected.length} finding`), {
        what: `the list to show the ${expected.length} findings counted`,
        timeout: 20_000,
      });
      const rows = await shown(p, rowPrefix);
      for (const n of rows) expect(dueOf.has(n)).toBe(true);
      const dues = rows.map((n) => dueOf.get(n)!);
      expect([...dues].sort()).toEqual(dues);
      return rows;
    };
    const rows = await rowsOf(page);
    expect(expected.length).toBeLessThan(all);
    await page.getByTestId('findings-list').scrollIntoViewIfNeeded();
    await h.screenshot(page, `view-address-01-findings-${name}`);

    const address = page.url();
    await page.reload();
    await page.getByTestId('findings-list').waitFor();
    expect(await rowsOf(page)).toEqual(rows);
    expect(await page.getByTestId('findings-filters-status-open').getAttribute('aria-checked')).toBe('true');
    expect(await page.getByTestId('findings-filters-status-fix_submitted').getAttribute('aria-checked')).toBe('true');
    expect(await page.getByTestId('findings-filters-severity-major').getAttribute('aria-checked')).toBe('true');
    expect(await page.getByTestId('findings-filters-status-closed').getAttribute('aria-checked')).toBe('false');
    await h.screenshot(page, `view-address-02-findings-reloaded-${name}`);

    const other = await openAsInspector(size, address);
    await other.getByTestId('findings-list').waitFor();
    expect(await rowsOf(other)).toEqual(rows);
    await h.screenshot(other, `view-address-03-findings-sent-${name}`);

    // Cleared filters and the default order leave the address.
    await page.getByTestId('findings-filters-severity-major').click();
    await page.getByTestId('findings-filters-status-open').click();
    await page.getByTestId('findings-filters-status-fix_submitted').click();
    await addressIs(page, { sort: 'dueOn' });
    if (wide) {
      await page.getByTestId('findings-sort-number').click();
      await addressIs(page, { sort: 'number' });
      await page.getByTestId('findings-sort-number').click();
    } else {
      // The reload closed "More filters" (on a phone the findings come first).
      await page.getByTestId('findings-filters-more').click();
      expect(await page.getByTestId('findings-filters-sort').inputValue()).toBe('dueOn');
      await page.getByTestId('findings-filters-sort').selectOption('-number');
    }
    await addressIs(page, {});
    expect(problems).toEqual([]);
  });

  it('a level walk: tag search and unit state survive a reload and open the same for someone else', async () => {
    // The level with the most units tagged -0x that have an open or fix-submitted finding.
    const open = await Finding.findAll({ where: { jobId, status: ['open', 'fix_submitted'], unitId: { [Op.ne]: null } }, attributes: ['unitId', 'levelId'] });
    const units = await Unit.findAll({ where: { jobId, id: [...new Set(open.map((f) => f.unitId!))], tag: { [Op.iLike]: '%-0%' } }, attributes: ['id', 'tag', 'levelId'] });
    const byLevel = new Map<string, string[]>();
    for (const u of units) if (open.some((f) => f.unitId === u.id && f.levelId === u.levelId)) byLevel.set(u.levelId, [...(byLevel.get(u.levelId) ?? []), u.tag]);
    const [levelId, tags] = [...byLevel.entries()].sort((a, b) => b[1].length - a[1].length)[0]!;
    const level = (await Level.findByPk(levelId))!;
    const onLevel = await Unit.count({ where: { jobId, levelId, tag: { [Op.iLike]: '%-0%' } } });
    expect(tags.length).toBeLessThan(onLevel);

    const { page, problems } = await h.newPage(size);
    await h.signIn(page, gc.email, DEMO_PASSWORD);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
    await page.getByTestId('level-walk-units').waitFor();
    expect(await page.getByTestId('level-walk-name').textContent()).toBe(level.name);

    await page.getByTestId('walk-filters-q').fill('-0');
    await addressIs(page, { q: '-0' });
    await page.getByTestId('walk-filters-state-open_findings').click();
    await addressIs(page, { q: '-0', state: 'open_findings' });

    const rowsOf = async (p: Page) => {
      await waitFor(async () => JSON.stringify([...(await shown(p, 'walk-unit-'))].filter((t) => !/-(state|waiting|audit)$/.test(t)).sort()) === JSON.stringify([...tags].sort()), {
        what: `the walk to show ${tags.join(', ')}`,
        timeout: 20_000,
      });
      return (await shown(p, 'walk-unit-')).filter((t) => !/-(state|waiting|audit)$/.test(t));
    };
    const rows = await rowsOf(page);
    expect(await page.getByTestId('walk-filters-state-open_findings').getAttribute('aria-checked')).toBe('true');
    await page.getByTestId('level-walk-units').scrollIntoViewIfNeeded();
    await h.screenshot(page, `view-address-04-walk-${name}`);

    const address = page.url();
    await page.reload();
    await page.getByTestId('level-walk-units').waitFor();
    expect(await rowsOf(page)).toEqual(rows);
    expect(await page.getByTestId('walk-filters-q').inputValue()).toBe('-0');
    expect(await page.getByTestId('walk-filters-state-open_findings').getAttribute('aria-checked')).toBe('true');
    await h.screenshot(page, `view-address-05-walk-reloaded-${name}`);

    const other = await openAsInspector(size, address);
    await other.getByTestId('level-walk-units').waitFor();
    expect(await rowsOf(other)).toEqual(rows);
    expect(await other.getByTestId('walk-filters-q').inputValue()).toBe('-0');

    // "All" and an emptied search leave the address.
    await page.getByTestId('walk-filters-state-all').click();
    await page.getByTestId('walk-filters-q').fill('');
    await addressIs(page, {});
    // Filters replace the page's history entry instead of adding one each: Back leaves the walk.
    await page.goBack();
    await waitFor(() => !page.url().includes('/walk'), { what: `Back to leave the walk (at ${page.url()})` });
    expect(problems).toEqual([]);
  });

  it('the company scorecards: the order survives a reload and opens the same for someone else; a bad order falls back', async () => {
    const { page, problems } = await h.newPage(size);
    await h.signIn(page, gc.email, DEMO_PASSWORD);
    const base = `${h.baseUrl}/jobs/${jobId}/scorecards`;
    await page.goto(base);
    const names = async (p: Page) => {
      await p.getByTestId(wide ? 'scorecards-table' : 'scorecards-cards').waitFor();
      return p.getByTestId('scorecard-name').allTextContents();
    };
    const byOverdue = await names(page);
    expect(byOverdue.length).toBeGreaterThan(1);
    const byName = [...byOverdue].sort((a, b) => a.localeCompare(b));
    expect(byName).not.toEqual(byOverdue);

    if (wide) {
      // The header sorts; the address follows.
      await page.getByTestId('scorecards-sort-name').click();
      await addressIs(page, { sort: 'name' });
    } else {
      // A phone has no headers to press: an address sent from a wide screen still shows its order.
      await page.goto(`${base}?sort=name`);
    }
    expect(await names(page)).toEqual(byName);
    await h.screenshot(page, `view-address-06-scorecards-${name}`);

    const address = page.url();
    await page.reload();
    expect(await names(page)).toEqual(byName);
    const other = await openAsInspector(size, address);
    expect(await names(other)).toEqual(byName);
    await other.getByTestId(wide ? 'scorecards-table' : 'scorecards-cards').scrollIntoViewIfNeeded();
    await h.screenshot(other, `view-address-07-scorecards-sent-${name}`);

    if (wide) {
      // Back to most overdue first: the default leaves the address.
      await page.getByTestId('scorecards-sort-overdue').click();
      await addressIs(page, {});
      expect(await names(page)).toEqual(byOverdue);
    }
    // An order that is not one falls back to the default instead of breaking the screen.
    await page.goto(`${base}?sort=price%3Bdrop`);
    expect(await names(page)).toEqual(byOverdue);
    expect(problems).toEqual([]);
  });
});
