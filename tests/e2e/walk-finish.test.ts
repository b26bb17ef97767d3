/**
 * The end of a walk on a phone (390×844, touch): "Something else" (a defect the catalogue lacks,
 * logged from the unit's checklist and from the new-finding screen), and "Finish walk", which shows
 * the walk's summary (units checked of the level, findings logged on this walk by severity, the
 * units left unchecked with a link each) and asks before ending. Screenshots go to
 * TRIMOUT_ARTIFACTS/screenshots.
 */
import { randomUUID } from 'node:crypto';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { Finding, Walk } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo';
import { PHONE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoLevel } from '../support/demo';
import { waitFor } from '../support/wait';

jest.setTimeout(240_000);

let h: BrowserHarness;
let browser: Browser;
const suffix = randomUUID().slice(0, 4).toUpperCase();
const tags = [`IU-F${suffix}-01`, `IU-F${suffix}-02`, `IU-F${suffix}-03`] as const;
const unitIds: Record<string, string> = {};
let jobId = '';
let levelId = '';
const levelName = `Finish ${suffix}`;
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  const made = await demoLevel(levelName, tags, { kind: 'wall_mounted' });
  ({ jobId, levelId } = made);
  tags.forEach((tag, i) => (unitIds[tag] = made.unitIds[i]!));
  browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu'] });
});
afterAll(async () => {
  await browser?.close();
  await h?.close();
});

async function phone(): Promise<{ context: BrowserContext; page: Page; problems: string[] }> {
  const context = await browser.newContext({ viewport: PHONE, hasTouch: true, isMobile: true, baseURL: h.baseUrl });
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('pageerror', (err) => problems.push(`page error: ${err.message}`));
  page.on('console', (msg) => {
    if (msg.type() === 'error' && !/status of 40[14]/.test(msg.text())) problems.push(`console: ${msg.text()}`);
  });
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(inspector.email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').tap();
  await page.getByTestId('job-list').waitFor();
  return { context, page, problems };
}

/** Controls under `testID` (itself included) smaller than 44×44 px, named with their size. */
async function tooSmall(page: Page, testID: string): Promise<string[]> {
  const sel = '[role="button"], [role="radio"], [role="link"], button, a, input, select';
  return page.getByTestId(testID).evaluate((el, s) => {
    const all = [...(el.matches(s) ? [el] : []), ...el.querySelectorAll(s)];
    return all
      .map((e) => ({ e, r: e.getBoundingClientRect() }))
      .filter(({ e, r }) => r.width > 0 && r.height > 0 && (e as { type?: string }).type !== 'file' && (r.width < 44 || r.height < 44))
      .map(({ e, r }) => `${e.getAttribute('data-testid') ?? e.textContent} ${Math.round(r.width)}×${Math.round(r.height)}`);
  }, sel);
}

describe('something else and finishing a walk, on a phone', () => {
  it('logs Something else from the checklist and from the new-finding screen; refuses a missing title on its field', async () => {
    const { context, page, problems } = await phone();
    await page.goto(`${h.baseUrl}/jobs/${jobId}/units/${unitIds[tags[0]]}/check`);
    await page.getByTestId('unit-check-tag').filter({ hasText: tags[0] }).waitFor();

    // A search that finds nothing offers it at once, no scrolling to the end of the checklist.
    await page.getByTestId('unit-check-search').fill('grille tabs');
    await page.getByTestId('unit-check-search-other').tap();
    await page.getByTestId('finding-form-something-else').waitFor();
    await page.getByTestId('finding-form-submit').scrollIntoViewIfNeeded();
    await page.getByTestId('finding-form-submit').tap();
    // Nothing typed: the field says what is missing, nothing is sent.
    await page.getByTestId('finding-form-title-error').waitFor();
    expect(await page.getByTestId('finding-form-title-error').textContent()).toBe('Say what is wrong, in a few words.');

    await page.getByTestId('finding-form-title').fill('Return grille hanging loose');
    await page.getByTestId('finding-form-trade').selectOption('general');
    await page.getByTestId('finding-form-severity-minor').tap();
    expect(await tooSmall(page, 'finding-form')).toEqual([]);
    await page.getByTestId('finding-form-something-else').evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await h.screenshot(page, 'walk-finish-01-something-else-form');
    await page.getByTestId('finding-form-submit').tap();
    await page.getByTestId('unit-check-confirmation').waitFor();
    expect(await page.getByTestId('unit-check-confirmation').textContent()).toContain('“Return grille hanging loose” logged');

    const logged = await Finding.findOne({ where: { jobId, unitId: unitIds[tags[0]], title: 'Return grille hanging loose' } });
    expect(logged).not.toBeNull();
    expect(logged!.severity).toBe('minor');
    expect(logged!.walkId).not.toBeNull();

    // From the new-finding screen: the catalogue's chooser gives way to a title and a trade.
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/new?unitId=${unitIds[tags[1]]}`);
    await page.getByTestId('finding-form-other').tap();
    await page.getByTestId('finding-form-title').fill('Condensate stain on the ceiling tile');
    await page.getByTestId('finding-form-trade').selectOption('general');
    await page.getByTestId('finding-form-severity-major').tap();
    await page.getByTestId('finding-form-submit').scrollIntoViewIfNeeded();
    await page.getByTestId('finding-form-submit').tap();
    await page.getByTestId('finding-title').waitFor();
    expect(await page.getByTestId('finding-title').textContent()).toBe('Condensate stain on the ceiling tile');
    // The label names the kind in words, never the internal code.
    expect(await page.getByTestId('finding-label').textContent()).toMatch(/ · Something else$/);
    expect(problems).toEqual([]);
    await context.close();
  });

  it('"Finish walk" shows the summary with a link to each unit left, and ends the walk only when asked', async () => {
    const { context, page, problems } = await phone();
    // Check one unit completely: its items all OK, saved.
    await page.goto(`${h.baseUrl}/jobs/${jobId}/units/${unitIds[tags[2]]}/check`);
    await page.getByTestId('unit-check-tag').filter({ hasText: tags[2] }).waitFor();
    page.on('dialog', (d) => void d.accept());
    await page.getByTestId('unit-check-all-ok').tap();
    // "All OK" leaves the measured and yes/no items: answered OK one by one.
    const unanswered = page.locator('[data-testid^="check-item-"][data-testid$="-mark-ok"][aria-checked="false"]');
    while ((await unanswered.count()) > 0) await unanswered.first().tap();
    await page.getByTestId('unit-check-save').scrollIntoViewIfNeeded();
    await page.getByTestId('unit-check-save').tap();
    await page.getByTestId('level-walk-screen').waitFor();

    await page.getByTestId('walk-finish').tap();
    await page.getByTestId('walk-summary-unchecked').waitFor();
    const walk = await Walk.findOne({ where: { jobId, levelId, finishedAt: null } });
    expect(walk).not.toBeNull();
    expect(await page.getByTestId('walk-summary-checked').textContent()).toBe(`Units checked: 1 of 3 on ${levelName} (1 unit on this walk).`);
    // The finding logged from the new-finding screen (opened with no walk) is not one of this walk's.
    expect(await page.getByTestId('walk-summary-findings').textContent()).toBe('Findings logged on this walk: 1 minor.');
    const left = page.getByTestId('walk-summary-unchecked');
    expect(await left.getByRole('link').evaluateAll((els) => els.map((e) => e.getAttribute('aria-label')))).toEqual([
      `Check unit ${tags[0]}`,
      `Check unit ${tags[1]}`,
    ]);
    expect(await tooSmall(page, 'walk-summary')).toEqual([]);
    await page.getByTestId('walk-summary').scrollIntoViewIfNeeded();
    await h.screenshot(page, 'walk-finish-02-summary');

    // A unit's link opens its check; coming back, the walk is still open.
    await page.getByTestId(`walk-summary-unit-${tags[1]}`).tap();
    await page.getByTestId('unit-check-tag').filter({ hasText: tags[1] }).waitFor();
    await page.goBack();
    await page.getByTestId('walk-finish').tap();
    await page.getByTestId('walk-summary-keep').waitFor();
    await page.getByTestId('walk-summary-keep').tap();
    await page.getByTestId('walk-finish').waitFor();
    expect((await walk!.reload()).finishedAt).toBeNull();

    await page.getByTestId('walk-finish').tap();
    await page.getByTestId('walk-summary-end').tap();
    await page.getByTestId('walk-none').waitFor();
    await waitFor(async () => (await walk!.reload()).finishedAt !== null);
    expect(problems).toEqual([]);
    await context.close();
  });
});
