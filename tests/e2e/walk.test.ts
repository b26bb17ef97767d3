/**
 * The walk, in the browser at phone size: the demo inspector walks a level, marks a unit all OK,
 * logs a defect with a photo (a JPEG made here with sharp, through the file input), logs a failed
 * measurement (pass/fail, limit, margin and source shown while typing), and sees both findings in
 * the list and the level's coverage go up. Screenshots go to .artifacts/screenshots.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { chromium, type Page } from 'playwright-core';
import { CatalogueItem, Company, JobCompany, Unit, UnitModel } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD } from '../../server/seed/demo';
import type { TradeKey } from '../../shared/words';
import { buildLevel, buildSpace, buildSystem, buildUnit, copyCatalogue } from '../support/factories';
import { PHONE, WIDE, screenshotsDir, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { startFakeS3, type FakeS3 } from '../support/storage';
import { demoJob } from '../support/demo';
import { until as waitUntil } from '../support/wait';

jest.setTimeout(240_000);

let h: BrowserHarness;
let s3: FakeS3;
const suffix = randomUUID().slice(0, 4).toUpperCase();
const levelName = `Walk test level ${suffix}`;
const tags = [`IU-W${suffix}-01`, `IU-W${suffix}-02`, `IU-W${suffix}-03`] as const;
let jobId = '';
let levelId = '';

/** The demo job, with a level of our own: three cassettes of a model whose pump lift is rated 30 in. */
async function setUpLevel() {
  const job = await demoJob();
  jobId = job.id;
  if ((await CatalogueItem.count({ where: { jobId } })) === 0) await copyCatalogue(jobId);
  // The companies the finding form suggests from a defect type's trade.
  const trades: Record<string, TradeKey[]> = {
    [DEMO_COMPANIES.mechanical]: ['mechanical', 'plumbing', 'insulation', 'controls'],
    [DEMO_COMPANIES.electrical]: ['electrical'],
    [DEMO_COMPANIES.ceilings]: ['ceilings', 'drywall'],
  };
  for (const [name, list] of Object.entries(trades)) {
    const company = await Company.findOne({ where: { name } });
    if (!company) continue;
    const linked = await JobCompany.findOne({ where: { jobId, companyId: company.id } });
    if (!linked) await JobCompany.create({ jobId, companyId: company.id, trades: list });
    else if (!list.every((t) => linked.trades.includes(t))) await linked.update({ trades: [...new Set([...linked.trades, ...list])] });
  }
  const level = await buildLevel(jobId, { name: levelName });
  levelId = level.id;
  const space = await buildSpace(jobId, level.id, { name: `Open office ${suffix}` });
  const system = await buildSystem(jobId, { name: `VRF-${suffix}` });
  const model = await UnitModel.create({
    jobId,
    name: `Cassette CX-${suffix}`,
    modelNumber: null,
    unitKind: 'cassette_4way',
    nominalCapacity: null,
  });
  await model.update({
    limits: {
      max_pump_lift: { value: 762, stated: 30, unit: 'in', text: '30 in', source: 'installation manual p. 14 (invented)' },
    },
  });
  for (const tag of tags) await buildUnit(jobId, level.id, { tag, kind: 'cassette_4way', modelId: model.id, spaceId: space.id, systemId: system.id });
}

beforeAll(async () => {
  // Photos go to the S3-compatible fake on loopback (the disk fallback if it cannot run).
  s3 = await startFakeS3();
  h = await startBrowserHarness({ objectStore: s3.store });
  await seedDemo(h.db);
  await setUpLevel();
});
afterAll(async () => {
  await h?.close();
  await s3?.close();
});

const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

async function signIn(page: Page) {
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(inspector.email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('job-list').waitFor();
}

async function text(page: Page, testID: string): Promise<string> {
  return (await page.getByTestId(testID).first().textContent()) ?? '';
}

/** Polls a check in the page (no string evaluation: the page's CSP forbids it) until it holds; a check that throws (the page mid-navigation) counts as not yet. */
const until = (check: () => Promise<boolean>) => waitUntil(() => check().catch(() => false), 'the page', 15_000);

/** Waits until the element's whole text is `expected`. */
async function exactText(page: Page, testID: string, expected: string) {
  const escaped = expected.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  await page.getByTestId(testID).filter({ hasText: new RegExp(`^${escaped}$`) }).waitFor();
}

/** Presses "Log finding" and waits for the check screen again; a refusal fails with its message. */
async function submitFinding(page: Page, code: string) {
  await page.getByTestId('finding-form-submit').click();
  const logged = page.getByTestId(`check-item-${code}-logged`);
  const refused = page.getByTestId('finding-form-error');
  await logged.or(refused).first().waitFor();
  if (await refused.count()) throw new Error(`The finding was refused: ${await refused.textContent()}`);
}

async function openUnit(page: Page, tag: string) {
  await page.getByTestId(`walk-unit-${tag}`).click();
  await page.getByTestId('unit-check-tag').waitFor();
  expect(await text(page, 'unit-check-tag')).toBe(tag);
}

/**
 * Taps OK on every item still not marked: what "All OK for the rest" leaves to the inspector
 * (measured and yes/no items, items with an open finding).
 */
async function okTheRest(page: Page) {
  const unmarked = page.locator('[data-testid^="check-item-"][data-testid$="-state"]', { hasText: /^Not marked$/ });
  for (const id of await unmarked.evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')!))) {
    await page.getByTestId(id.replace(/-state$/, '-mark-ok')).click();
  }
}

async function saveCheck(page: Page, tag: string) {
  await page.getByTestId('unit-check-save').click();
  await page.getByTestId('level-walk-saved').waitFor();
  expect(await text(page, 'level-walk-saved')).toContain(tag);
}

describe('walking a level on a phone', () => {
  it('checks a unit all OK, logs a defect with a photo and a failed measurement, and sees them in the list and the coverage', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page);

    // Job → walk → level
    await page.goto(`${h.baseUrl}/jobs/${jobId}`);
    await page.getByTestId('job-walk').click();
    await page.getByTestId('walk-levels').waitFor();
    await page.locator('[data-testid$="-coverage"]', { hasText: 'checked' }).first().waitFor();
    await h.screenshot(page, 'walk-01-levels-phone');
    await page.getByText(levelName).click();
    await page.getByTestId('level-walk-units').waitFor();
    await page.getByTestId('level-coverage-count').waitFor();
    expect(await text(page, 'level-coverage-count')).toBe('0 of 3 checked');
    expect(await text(page, `walk-unit-${tags[0]}-state`)).toContain('Not checked yet');
    await h.screenshot(page, 'walk-02-level-units-phone');

    // Find by typing part of a tag
    await page.getByTestId('walk-filters-q').fill(`${suffix}-02`);
    await page.getByTestId(`walk-unit-${tags[0]}`).waitFor({ state: 'detached' });
    await page.getByTestId(`walk-unit-${tags[1]}`).waitFor();
    expect(await page.locator('[data-testid^="walk-unit-"][data-testid$="-state"]').count()).toBe(1);
    await page.getByTestId('walk-filters-q').fill('');
    await page.getByTestId(`walk-unit-${tags[0]}`).waitFor();

    // 1. A unit all OK: one tap marks every item, one tap saves.
    await openUnit(page, tags[0]);
    await page.getByTestId('unit-check-progress').waitFor();
    expect(await text(page, 'unit-check-progress')).toMatch(/^0 of \d+ marked$/);
    // The unit's sheet (its history on paper) is one tap from its check, a PDF in the caller's session.
    const sheet = await page.getByTestId('unit-sheet').getAttribute('href');
    expect(sheet).toMatch(/^\/api\/jobs\/[0-9a-f-]+\/units\/[0-9a-f-]+\/sheet\.pdf$/);
    const pdf = await page.request.get(`${h.baseUrl}${sheet}`);
    expect(pdf.status()).toBe(200);
    expect(pdf.headers()['content-type']).toContain('application/pdf');
    // guidance and the caution are one tap away: the caution names its hazards and defers to the manual, codes and licensed practice
    await page.getByTestId('check-item-MT-01-expand').click();
    expect(await text(page, 'check-item-MT-01-caution-toggle')).toContain('Caution: Lifting · Overhead work');
    expect(await text(page, 'check-item-MT-01-caution-text')).toContain('installation manual, local codes and licensed practice govern');
    await h.screenshot(page, 'walk-03-unit-check-phone');
    // A defect marked with no finding behind it is named before the check saves.
    await page.getByTestId('check-item-MT-01-mark-defect').click();
    await page.getByTestId('unit-check-save').click();
    expect(await text(page, 'unit-check-error')).toContain('marked Defect with no finding logged: MT-01');
    await page.getByTestId('check-item-MT-01-mark-ok').click();
    // "All OK for the rest" leaves measured and yes/no items to the inspector, and says how many
    await page.getByTestId('unit-check-all-ok').click();
    expect(await text(page, 'unit-check-all-ok-left')).toMatch(/^Marked \d+ OK\. Left for you: \d+ measured or yes\/no items\.$/);
    expect(await text(page, 'unit-check-progress')).not.toMatch(/^(\d+) of \1 marked$/);
    await okTheRest(page);
    expect(await text(page, 'unit-check-progress')).toMatch(/^(\d+) of \1 marked$/);
    await saveCheck(page, tags[0]);
    await exactText(page, 'level-coverage-count', '1 of 3 checked');
    // The units list refreshes on its own after the save (the coverage above may come first).
    await page.getByTestId(`walk-unit-${tags[0]}-state`).filter({ hasText: 'Checked OK' }).waitFor();
    // The walk's banner counts what it recorded in the level's words (never "0 unit checks" after work).
    await page.getByTestId('walk-open').filter({ hasText: '· 1 unit checked' }).waitFor();
    await h.screenshot(page, 'walk-04-first-unit-ok-phone');

    // 2. A defect with a photo: Defect → Log finding → photo → Log finding.
    await openUnit(page, tags[1]);
    await page.getByTestId('check-item-MT-01-mark-defect').click();
    await page.getByTestId('check-item-MT-01-log').click();
    await page.getByTestId('finding-form').waitFor();
    expect(await text(page, 'finding-form-item')).toContain('MT-01');
    // prefilled: the item's default severity, the company whose trade fits, the due date from the job's policy
    expect(await page.getByTestId('finding-form-severity-critical').getAttribute('aria-checked')).toBe('true');
    const company = await page.getByTestId('finding-form-company').locator('option:checked').textContent();
    expect(company).toBe(`${DEMO_COMPANIES.mechanical} (suggested)`);
    expect(await page.getByTestId('finding-form-due').inputValue()).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    const jpeg = await sharp({ create: { width: 800, height: 600, channels: 3, background: { r: 176, g: 132, b: 74 } } })
      .jpeg({ quality: 80 })
      .toBuffer();
    await page.getByTestId('finding-form-files-input').setInputFiles({ name: 'hanger.jpg', mimeType: 'image/jpeg', buffer: jpeg });
    await page.getByTestId('finding-form-photos-thumb-0').waitFor();
    // The camera in the page: headless chromium has none, so the form says so and keeps the file path.
    await page.getByTestId('finding-form-camera-open').click();
    await page.getByTestId('finding-form-camera-unavailable').waitFor();
    await page.getByTestId('finding-form-note').fill('Chain hanger at the north-east corner.');
    await h.screenshot(page, 'walk-05-finding-form-phone');
    await page.getByTestId('finding-form-item').scrollIntoViewIfNeeded();
    await h.screenshot(page, 'walk-05a-finding-form-top-phone');
    await submitFinding(page, 'MT-01');
    const photoLabel = (await text(page, 'check-item-MT-01-logged')).replace(/^✓ Logged /, '');
    expect(photoLabel).toMatch(/^#\d+$/);
    await page.getByTestId('unit-check-all-ok').click();
    await okTheRest(page);
    await saveCheck(page, tags[1]);
    await exactText(page, 'level-coverage-count', '2 of 3 checked');

    // 3. A failed measurement: the verdict, limit, margin and source show while typing.
    await openUnit(page, tags[2]);
    const field = page.getByTestId('check-item-DR-03-measured-input');
    await field.scrollIntoViewIfNeeded();
    expect(await text(page, 'check-item-DR-03-measured-limit')).toContain(`at most 2' 6"`);
    await field.fill(`4''`);
    await page.getByTestId('check-item-DR-03-measured-input-error').waitFor();
    expect(await text(page, 'check-item-DR-03-measured-input-error')).toContain('two apostrophes');
    await field.fill('28 in');
    expect(await text(page, 'check-item-DR-03-measured-status')).toBe('✓ PASS');
    await field.fill('34 in');
    expect(await text(page, 'check-item-DR-03-measured-status')).toBe('✗ FAIL');
    expect(await text(page, 'check-item-DR-03-measured-margin')).toBe('Margin: 4" outside the limit');
    expect(await text(page, 'check-item-DR-03-measured-source')).toContain(`Model Cassette CX-${suffix} installation manual p. 14 (invented)`);
    // the failed measurement proposes the defect
    expect(await page.getByTestId('check-item-DR-03-mark-defect').getAttribute('aria-checked')).toBe('true');
    await page.getByTestId('check-item-DR-03').screenshot({ path: `${screenshotsDir}/walk-06-failed-measurement-item-phone.png` });
    await h.screenshot(page, 'walk-06-failed-measurement-phone');
    await page.getByTestId('check-item-DR-03-log').click();
    await page.getByTestId('finding-form').waitFor();
    expect(await page.getByTestId('finding-form-measured-input').inputValue()).toBe('34 in');
    expect(await text(page, 'finding-form-measured-status')).toBe('✗ FAIL');
    await submitFinding(page, 'DR-03');
    const measuredLabel = (await text(page, 'check-item-DR-03-logged')).replace(/^✓ Logged /, '');
    await page.getByTestId('unit-check-all-ok').click();
    await okTheRest(page);
    await saveCheck(page, tags[2]);

    // 4. The level's coverage: all three checked, two with open findings, their worst severity shown.
    await exactText(page, 'level-coverage-count', '3 of 3 checked');
    expect(await text(page, 'level-coverage-detail')).toContain('2 with open findings');
    await exactText(page, `walk-unit-${tags[1]}-state`, '1 open · Critical');
    await exactText(page, `walk-unit-${tags[2]}-state`, '1 open · Major');
    await h.screenshot(page, 'walk-07-level-coverage-phone');

    // 5. Both in the findings list (cards on a phone).
    await page.getByTestId('level-walk-findings').click();
    await page.getByTestId('findings-list').waitFor();
    expect(await text(page, 'findings-total')).toBe('2 findings match the filters');
    const photoNo = photoLabel.slice(1);
    const measuredNo = measuredLabel.slice(1);
    await page.getByTestId(`finding-card-${photoNo}`).waitFor();
    await page.getByTestId(`finding-card-${measuredNo}`).waitFor();
    await h.screenshot(page, 'walk-08-findings-list-phone');

    // Detail of the failed measurement: measured value, limit, source, history.
    await page.getByTestId(`finding-card-${measuredNo}`).click();
    await page.getByTestId('finding-measured').waitFor();
    expect(await text(page, 'finding-measured-status')).toBe('✗ FAIL');
    expect(await text(page, 'finding-measured-source')).toContain(`Model Cassette CX-${suffix}`);
    await page.getByTestId('finding-event-logged').waitFor();
    expect(await text(page, 'finding-event-logged')).toContain(inspector.name);
    await h.screenshot(page, 'walk-09-finding-measured-phone');

    // Detail of the defect with its photo; tap the thumbnail to enlarge it.
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings?levelId=${levelId}`);
    await page.getByTestId(`finding-card-${photoNo}`).click();
    await page.getByTestId('finding-photos-thumb-0').waitFor();
    // the thumbnail is served by the API to the signed-in member, and it loads
    await until(() =>
      page
        .getByTestId('finding-photos-thumb-0')
        .locator('img')
        .first()
        .evaluate((img: { complete: boolean; naturalWidth: number }) => img.complete && img.naturalWidth > 0),
    );
    await h.screenshot(page, 'walk-10-finding-photo-phone');
    await page.getByTestId('finding-photos-thumb-0').click();
    await page.getByTestId('finding-photos-enlarged').waitFor();
    await h.screenshot(page, 'walk-11-photo-enlarged-phone');
    await page.getByTestId('finding-photos-enlarged-close').click();

    // 6. A finding that is not about one unit: attached to the level.
    await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
    await page.getByTestId('level-walk-level-finding').click();
    await page.getByTestId('finding-form').waitFor();
    const options = await page.getByTestId('finding-form-item').locator('option').allTextContents();
    const sleeve = options.find((o) => o.startsWith('PN-03'));
    expect(sleeve).toBeDefined();
    await page.getByTestId('finding-form-item').selectOption({ label: sleeve! });
    await page.getByTestId('finding-form-note').fill('Corridor wall by the east stair: pipes through the wall without a sleeve.');
    await h.screenshot(page, 'walk-13-level-finding-phone');
    await page.getByTestId('finding-form-submit').click();
    await page.getByTestId('finding-title').waitFor();
    expect(await text(page, 'finding-title')).toBe('No sleeve through wall or floor');
    expect(await text(page, 'finding-where')).toContain(levelName);
    expect(await text(page, 'finding-where')).not.toContain('Unit');
    await h.screenshot(page, 'walk-14-level-finding-detail-phone');

    expect(problems).toEqual([]);
    await page.context().close();
  });

  it('shows the findings as a sortable table on a wide screen', async () => {
    const { page, problems } = await h.newPage(WIDE);
    await signIn(page);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings?levelId=${levelId}`);
    await page.getByTestId('findings-table').waitFor().catch(async (err: unknown) => {
      await h.screenshot(page, 'walk-12-findings-table-wide-FAILED');
      throw new Error(`${String(err)}\n${problems.join('\n')}`);
    });
    const numbers = async () =>
      page.$$eval('[data-testid^="finding-row-"]', (rows) => rows.map((r) => Number(r.getAttribute('data-testid')!.replace('finding-row-', ''))));
    const before = await numbers();
    expect(before).toHaveLength(3);
    expect(before).toEqual([...before].sort((a, b) => b - a));
    await page.getByTestId('findings-sort-number').click();
    await page.locator('[data-testid="findings-sort-number"]', { hasText: '▲' }).waitFor();
    await until(async () => (await page.locator('[data-testid^="finding-row-"]').first().getAttribute('data-testid')) === `finding-row-${Math.min(...before)}`);
    await h.screenshot(page, 'walk-12-findings-table-wide');
    expect(problems).toEqual([]);
    await page.context().close();
  });
});

describe('a subcontractor', () => {
  it('is sent to their own findings instead of the walk, and sees the findings assigned to their company', async () => {
    const mechanical = DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!;
    const { page, problems } = await h.newPage(PHONE);
    await page.goto(`${h.baseUrl}/sign-in`);
    await page.getByTestId('sign-in-email').fill(mechanical.email);
    await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
    await page.getByTestId('sign-in-submit').click();
    await page.getByTestId('job-list').waitFor();
    await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
    await page.getByTestId('walk-inspectors-only').waitFor();
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings?levelId=${levelId}`);
    await page.getByTestId('findings-list').waitFor();
    // every finding on the test level went to the mechanical subcontractor
    expect(await text(page, 'findings-total')).toBe('3 findings match the filters');
    await h.screenshot(page, 'walk-15-subcontractor-findings-phone');
    expect(problems).toEqual([]);
    await page.context().close();
  });
});

describe('the camera in the page', () => {
  it('takes a photo with the browser camera (a fake camera device) and logs it with the finding', async () => {
    // Our own chromium with a fake camera: the shared harness's browser has none.
    const browser = await chromium.launch({
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      headless: true,
      args: ['--no-sandbox', '--disable-gpu', '--use-fake-device-for-media-stream', '--use-fake-ui-for-media-stream'],
    });
    try {
      const context = await browser.newContext({ viewport: PHONE, baseURL: h.baseUrl });
      await context.grantPermissions(['camera'], { origin: h.baseUrl });
      const page = await context.newPage();
      const problems: string[] = [];
      page.on('pageerror', (err) => problems.push(`page error: ${err.message}`));
      await signIn(page);
      const unit = await Unit.findOne({ where: { jobId, tag: tags[0] } });
      await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/new?unitId=${unit!.id}`);
      await page.getByTestId('finding-form').waitFor();
      const options = await page.getByTestId('finding-form-item').locator('option').allTextContents();
      await page.getByTestId('finding-form-item').selectOption({ label: options.find((o) => o.startsWith('PG-01'))! });
      await page.getByTestId('finding-form-camera-open').click();
      await page.getByTestId('finding-form-camera-view').waitFor();
      // the fake camera's picture is playing in the page
      await until(() => page.locator('video').first().evaluate((v: { readyState: number; videoWidth: number }) => v.readyState >= 2 && v.videoWidth > 0));
      // the preview fills its frame
      const box = await page.locator('video').first().boundingBox();
      expect(box?.height).toBe(300);
      await page.getByTestId('finding-form-camera-view').scrollIntoViewIfNeeded();
      await h.screenshot(page, 'walk-16-camera-phone');
      await page.getByTestId('finding-form-camera-shoot').click();
      await page.getByTestId('finding-form-photos-thumb-0').waitFor();
      await page.getByTestId('finding-form-submit').click();
      await page.getByTestId('finding-title').waitFor();
      await until(() =>
        page
          .getByTestId('finding-photos-thumb-0')
          .locator('img')
          .first()
          .evaluate((img: { complete: boolean; naturalWidth: number }) => img.complete && img.naturalWidth > 0),
      );
      await h.screenshot(page, 'walk-17-camera-finding-phone');
      expect(problems).toEqual([]);
    } finally {
      await browser.close();
    }
  });
});
