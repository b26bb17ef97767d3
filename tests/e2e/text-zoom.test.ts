/**
 * Text at 200% on a phone: a 390 px wide phone zoomed to 200% lays pages out in 195 CSS pixels, so
 * key screens are opened at 195x422 and must fit that width (no sideways scrolling of the page,
 * WCAG 1.4.4 and 1.4.10) with their main controls still on the page. Screenshots:
 * text-zoom-*.png, to be looked at for words cut off inside their boxes.
 */
import type { Page } from 'playwright-core';
import { QueryTypes } from 'sequelize';
import { DEMO_ACCOUNTS, DEMO_JOBS, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, startBrowserHarness, type BrowserHarness } from '../support/browser';

jest.setTimeout(300_000);

/** 200% of a phone's width and height. */
const ZOOMED = { width: PHONE.width / 2, height: PHONE.height / 2 };

let h: BrowserHarness;
let jobId = '';
let unitId = '';
let findingId = '';
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  const [row] = await h.db.sequelize.query<{ jobId: string; unitId: string; findingId: string }>(
    `SELECT j.id AS "jobId", f.unit_id AS "unitId", f.id AS "findingId" FROM jobs j JOIN findings f ON f.job_id = j.id
      WHERE j.name = :name AND f.unit_id IS NOT NULL AND f.status = 'open' ORDER BY j.created_at, f.number LIMIT 1`,
    { type: QueryTypes.SELECT, replacements: { name: DEMO_JOBS[0]!.name } },
  );
  ({ jobId, unitId, findingId } = row!);
});
afterAll(async () => {
  await h?.close();
});

/** How far the page is wider than the window (0 when it fits), and what sticks out. */
async function overflow(page: Page): Promise<{ by: number; widest: string[] }> {
  return JSON.parse(
    (await page.evaluate(`(() => {
      const w = window.innerWidth;
      // A row that scrolls sideways by design (section chips, tabs) may hold more than the width.
      const inScroller = (e) => {
        for (let p = e.parentElement; p && p !== document.body; p = p.parentElement) {
          const s = getComputedStyle(p);
          if ((s.overflowX === 'auto' || s.overflowX === 'scroll') && s.overflowY === 'hidden') return true;
        }
        return false;
      };
      const widest = [...document.querySelectorAll('[data-testid]')]
        .filter((e) => e.getBoundingClientRect().right > w + 1 && !inScroller(e))
        .map((e) => e.getAttribute('data-testid') + ' ' + Math.round(e.getBoundingClientRect().right))
        .slice(0, 8);
      return JSON.stringify({ by: Math.max(0, document.documentElement.scrollWidth - w), widest });
    })()`)) as string,
  );
}

describe('text at 200% on a phone (195x422 CSS pixels)', () => {
  it.each([
    ['sign-in', (): string => '/sign-in', 'sign-in-submit', false],
    ['job-list', (): string => '/', 'job-list', true],
    ['unit-check', (): string => `/jobs/${jobId}/units/${unitId}/check`, 'unit-check-tag', true],
    ['finding', (): string => `/jobs/${jobId}/findings/${findingId}`, 'finding-title', true],
  ] as const)('%s fits the width with its main control on the page', async (name, address, key, signedIn) => {
    const { page } = await h.newPage(PHONE);
    if (signedIn) await h.signIn(page, inspector.email, DEMO_PASSWORD);
    await page.setViewportSize(ZOOMED);
    await page.goto(`${h.baseUrl}${address()}`);
    await page.getByTestId(key).first().waitFor();
    await h.screenshot(page, `text-zoom-${name}`);
    const box = await page.getByTestId(key).first().boundingBox();
    expect(box).not.toBeNull();
    expect(box!.x).toBeGreaterThanOrEqual(0);
    expect(box!.x + box!.width).toBeLessThanOrEqual(ZOOMED.width + 1);
    expect(await overflow(page)).toEqual({ by: 0, widest: [] });
    await page.close();
  });
});
