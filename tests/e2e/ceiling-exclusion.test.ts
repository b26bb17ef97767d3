/**
 * Excluding a unit from the ceiling rule, in the browser, as a GC manager on a phone (390x844,
 * touch) and at 1280x800: the readiness screen of a level with one unchecked cassette says it
 * blocks; a too-short reason gets its field message before anything is sent; with a reason the
 * level can close "(1 excluded)" and the excluded unit shows the reason and who; "Count it again"
 * brings the block back. An inspector sees the same lists without the buttons. The board and the
 * finding page say how long a fix submitted 5 days ago (on the job's clock) has waited for the
 * inspector. Screenshots: ceiling-exclusion-*.png.
 */
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';
import { Finding, Job, Unit } from '../../server/models';
import { recordFindingEvent } from '../../server/services/findings';
import { daysWaiting } from '../../shared/rules/waiting';
import { CEILING_EXCLUSION_REASON_MIN } from '../../shared/schemas/setup';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { TEST_PASSWORD } from '../support/factories';
import { buildWalkJob, insertFinding, type WalkJob } from '../support/findings';
import { waitFor } from '../support/wait';

jest.setTimeout(300_000);

let h: BrowserHarness;
let browser: Browser;

beforeAll(async () => {
  h = await startBrowserHarness();
  browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu'] });
});
afterAll(async () => {
  await browser?.close();
  await h?.close();
});

const ZONE = 'America/Los_Angeles';
const DAY = 86_400_000;
const REASON = 'Owner furnished unit; its access panel stays removable for service.';

/**
 * A walk job on the job's clock in Los Angeles: Level 4 has one cassette (IU-4-01), unchecked;
 * Level 3 two unchecked cassettes and a finding whose fix was submitted 5 days ago.
 */
async function setUp() {
  const w = await buildWalkJob();
  await Job.update({ timeZone: ZONE }, { where: { id: w.job.id } });
  const finding = await insertFinding(w, { status: 'fix_submitted' });
  const submittedAt = new Date(Date.now() - 5 * DAY);
  await Finding.sequelize!.transaction((transaction) =>
    recordFindingEvent({ findingId: finding.id, jobId: w.job.id, actorId: w.subA.id, kind: 'fix_submitted', to: { status: 'fix_submitted' }, at: submittedAt }, transaction),
  );
  // December has no clock change in Los Angeles: 5 times 24 hours is 5 calendar days there.
  expect(daysWaiting(submittedAt, ZONE)).toBe(5);
  return { w, finding };
}

/** A page at a size, with touch on the phone; console errors and 5xx answers collected. */
async function open(viewport: typeof PHONE | typeof WIDE, email: string) {
  const touch = viewport === PHONE;
  const context = await browser.newContext({ viewport, hasTouch: touch, isMobile: touch, baseURL: h.baseUrl });
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error' && !/Failed to load resource: the server responded with a status of 40[14]/.test(msg.text())) problems.push(msg.text());
  });
  page.on('pageerror', (err) => problems.push(err.message));
  page.on('response', (res) => {
    if (res.status() >= 500) problems.push(`HTTP ${res.status()} ${res.url()}`);
  });
  const press = (l: Locator) => (touch ? l.tap() : l.click());
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(TEST_PASSWORD);
  await press(page.getByTestId('sign-in-submit'));
  await page.getByTestId('job-list').waitFor();
  return { context, page, problems, press };
}

async function text(page: Page, testID: string): Promise<string> {
  return ((await page.getByTestId(testID).first().textContent()) ?? '').trim();
}

/** Waits until an element's text is exactly `expected` (the page answers when it answers). */
async function textIs(page: Page, testID: string, expected: string) {
  await page.getByTestId(testID).first().waitFor();
  let last = '';
  await waitFor(async () => (last = await text(page, testID)) === expected, { timeout: 15_000, interval: 100, what: `${testID} to read "${expected}"` }).catch((err: Error) => {
    throw new Error(`${err.message} (it reads "${last}")`);
  });
}

/** Every button of a list is at least 44 px tall (a finger, not a pointer). */
async function targetsFit(locators: Locator[]) {
  for (const l of locators) {
    const box = await l.boundingBox();
    expect(box).not.toBeNull();
    expect(box!.height).toBeGreaterThanOrEqual(44);
  }
}

async function shot(page: Page, testID: string, name: string) {
  await page.getByTestId(testID).first().scrollIntoViewIfNeeded();
  await h.screenshot(page, name);
}

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
] as const)('ceiling exclusion at the %s size', (size, viewport) => {
  let w: WalkJob;
  let findingId = '';

  beforeAll(async () => {
    const s = await setUp();
    w = s.w;
    findingId = s.finding.id;
  });

  it('a GC manager excludes the unchecked unit with a reason, sees the level can close, and counts it again', async () => {
    const { context, page, problems, press } = await open(viewport, w.gcManager.email);
    const level = w.otherLevel.id;
    const tag = 'IU-4-01';
    await page.goto(`${h.baseUrl}/jobs/${w.job.id}/readiness`);
    await textIs(page, `level-ceiling-${level}`, '✕ 1 unchecked');
    await shot(page, `level-unchecked-${level}`, `ceiling-exclusion-01-blocked-${size}`);

    await press(page.getByTestId(`ceiling-exclude-${tag}`));
    await targetsFit([page.getByTestId(`ceiling-exclude-send-${tag}`), page.getByTestId(`ceiling-exclude-cancel-${tag}`)]);
    // Too short: the field says so, and nothing is sent.
    await page.getByTestId(`ceiling-exclude-reason-${tag}`).fill('ok');
    await press(page.getByTestId(`ceiling-exclude-send-${tag}`));
    await textIs(
      page,
      `ceiling-exclude-reason-${tag}-error`,
      `Say why this unit need not be checked before the ceiling closes (at least ${CEILING_EXCLUSION_REASON_MIN} characters).`,
    );
    await shot(page, `ceiling-unchecked-${tag}`, `ceiling-exclusion-02-reason-too-short-${size}`);
    expect((await Unit.findByPk(w.upstairs.id))!.ceilingExcludedReason).toBeNull();

    await page.getByTestId(`ceiling-exclude-reason-${tag}`).fill(REASON);
    await press(page.getByTestId(`ceiling-exclude-send-${tag}`));
    await textIs(page, `level-ceiling-${level}`, '✓ Ceilings can close (1 excluded)');
    const excluded = page.getByTestId(`ceiling-excluded-${tag}`);
    await excluded.waitFor();
    expect(await excluded.textContent()).toContain(REASON);
    expect(await excluded.textContent()).toContain(`Excluded by ${w.gcManager.name}`);
    expect((await Unit.findByPk(w.upstairs.id))!.ceilingExcludedReason).toBe(REASON);
    await targetsFit([page.getByTestId(`ceiling-count-again-${tag}`)]);
    await shot(page, `level-excluded-${level}`, `ceiling-exclusion-03-excluded-${size}`);

    // Count it again: the block is back, and the unit can be excluded again.
    await press(page.getByTestId(`ceiling-count-again-${tag}`));
    await textIs(page, `level-ceiling-${level}`, '✕ 1 unchecked');
    await page.getByTestId(`ceiling-exclude-${tag}`).waitFor();
    expect(await page.getByTestId(`ceiling-excluded-${tag}`).count()).toBe(0);

    // Excluded again, for the inspector's look below.
    await press(page.getByTestId(`ceiling-exclude-${tag}`));
    await page.getByTestId(`ceiling-exclude-reason-${tag}`).fill(REASON);
    await press(page.getByTestId(`ceiling-exclude-send-${tag}`));
    await textIs(page, `level-ceiling-${level}`, '✓ Ceilings can close (1 excluded)');
    expect(problems).toEqual([]);
    await context.close();
  });

  it('an inspector sees the unchecked and excluded units, without the buttons', async () => {
    const { context, page, problems } = await open(viewport, w.inspector.email);
    await page.goto(`${h.baseUrl}/jobs/${w.job.id}/readiness`);
    await textIs(page, `level-ceiling-${w.otherLevel.id}`, '✓ Ceilings can close (1 excluded)');
    const excluded = page.getByTestId('ceiling-excluded-IU-4-01');
    expect(await excluded.textContent()).toContain(REASON);
    expect(await excluded.textContent()).toContain(`Excluded by ${w.gcManager.name}`);
    expect(await text(page, `level-unchecked-${w.level.id}`)).toContain('Not checked yet: IU-3-01, IU-3-02');
    expect(await page.locator('[data-testid^="ceiling-exclude-"]').count()).toBe(0);
    expect(await page.locator('[data-testid^="ceiling-count-again-"]').count()).toBe(0);
    await shot(page, `level-excluded-${w.otherLevel.id}`, `ceiling-exclusion-04-inspector-${size}`);
    expect(problems).toEqual([]);
    await context.close();
  });

  it('the board and the finding page say how long the fix has waited for the inspector', async () => {
    const { context, page, problems } = await open(viewport, w.gcManager.email);
    await page.goto(`${h.baseUrl}/jobs/${w.job.id}/board?view=table`);
    const waiting = page.getByTestId(`board-waiting-${w.level.id}`);
    await waiting.waitFor();
    if (size === 'wide') {
      // Under the count in the grid's column: the longest wait shows, the whole sentence is read out.
      expect(await text(page, `board-waiting-${w.level.id}`)).toBe('longest 5 days');
      expect(await waiting.getAttribute('aria-label')).toBe('1 waiting for the inspector, longest 5 days');
    } else {
      expect(await text(page, `board-waiting-${w.level.id}`)).toBe('1 waiting for the inspector, longest 5 days');
    }
    await shot(page, `board-waiting-${w.level.id}`, `ceiling-exclusion-05-board-waiting-${size}`);

    await page.goto(`${h.baseUrl}/jobs/${w.job.id}/findings/${findingId}`);
    await textIs(page, 'finding-waiting', 'Waiting for the inspector 5 days');
    await shot(page, 'finding-waiting', `ceiling-exclusion-06-finding-waiting-${size}`);
    expect(problems).toEqual([]);
    await context.close();
  });
});
