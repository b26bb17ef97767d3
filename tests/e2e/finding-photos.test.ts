/**
 * Photos whenever needed, on a phone (390×844, touch): the inspector adds a photo to an open
 * finding; the mechanical subcontractor submits a fix with the new measurement (judged against
 * the finding's limit as it is typed) and a photo; the inspector re-inspects with their own photo
 * and measurement and closes it; the finding screen shows the fix photo and the re-inspection
 * photo side by side, labelled. Every control used is at least 44 by 44 px with an accessible
 * name. Screenshots go to TRIMOUT_ARTIFACTS/screenshots.
 */
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import sharp from 'sharp';
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';
import { CatalogueItem, Company, Finding, Job, JobCompany, UnitModel, User } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD } from '../../server/seed/demo';
import { limitResolverFor, measure, nextFindingNumber, recordFindingEvent } from '../../server/services/findings';
import { buildLevel, buildSpace, buildUnit, copyCatalogue } from '../support/factories';
import { pageHolds, PHONE, screenshotsDir, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { startFakeS3, type FakeS3 } from '../support/storage';

jest.setTimeout(240_000);

let h: BrowserHarness;
let s3: FakeS3;
let browser: Browser;
const suffix = randomUUID().slice(0, 4).toUpperCase();
let jobId = '';
let findingId = '';
let label = '';
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const mechanical = DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!;

/** A pump-lift finding (DR-03) logged at 34 in on a cassette whose model allows 30 in, with no photo yet. */
async function setUp() {
  const job = await Job.findOne({ where: { name: 'Cinder Lane Commons' } });
  if (!job) throw new Error('The demo job is missing.');
  jobId = job.id;
  if ((await CatalogueItem.count({ where: { jobId } })) === 0) await copyCatalogue(jobId);
  const company = await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } });
  if (!company) throw new Error('The demo mechanical company is missing.');
  if (!(await JobCompany.findOne({ where: { jobId, companyId: company.id } }))) await JobCompany.create({ jobId, companyId: company.id, trades: ['mechanical'] });
  const level = await buildLevel(jobId, { name: `Photo level ${suffix}` });
  const space = await buildSpace(jobId, level.id, { name: `Suite ${suffix}` });
  const model = await UnitModel.create({ jobId, name: `Cassette FX-${suffix}`, modelNumber: null, unitKind: 'cassette_4way', nominalCapacity: null });
  await model.update({ limits: { max_pump_lift: { value: 762, stated: 30, unit: 'in', text: '30 in', source: 'installation manual p. 14 (invented)' } } });
  const unit = await buildUnit(jobId, level.id, { tag: `IU-F${suffix}-01`, kind: 'cassette_4way', modelId: model.id, spaceId: space.id });
  const item = await CatalogueItem.findOne({ where: { jobId, code: 'DR-03' } });
  if (!item) throw new Error('DR-03 is missing.');
  const measured = measure(item, '34 in', limitResolverFor(job, model), job, 'measuredText');
  const logger = await User.findOne({ where: { email: inspector.email } });
  if (!logger) throw new Error('The demo inspector is missing.');
  const sequelize = Finding.sequelize!;
  const finding = await sequelize.transaction(async (transaction) => {
    const f = await Finding.create(
      {
        jobId,
        number: await nextFindingNumber(sequelize, jobId, transaction),
        unitId: unit.id,
        spaceId: space.id,
        levelId: level.id,
        catalogueItemId: item.id,
        walkId: null,
        unitCheckId: null,
        severity: 'major',
        companyId: company.id,
        dueOn: '2030-01-10',
        note: 'Pump lift measured from the unit base.',
        measuredText: measured.measuredText,
        measuredValue: measured.measuredValue,
        ruleResult: measured.result,
        loggedBy: logger.id,
        loggedAt: new Date(),
        pinX: null,
        pinY: null,
      },
      { transaction },
    );
    await recordFindingEvent({ findingId: f.id, jobId, actorId: f.loggedBy, kind: 'logged', to: { status: 'open', measuredText: '34 in', pass: false } }, transaction);
    return f;
  });
  findingId = finding.id;
  label = `#${finding.number}`;
}

beforeAll(async () => {
  s3 = await startFakeS3();
  h = await startBrowserHarness({ objectStore: s3.store });
  await seedDemo(h.db);
  await setUp();
  browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu'] });
});
afterAll(async () => {
  await browser?.close();
  await h?.close();
  await s3?.close();
});

/** A phone (390×844, touch, mobile) signed in as `email`, on the finding's screen. */
async function phoneOnFinding(email: string): Promise<{ page: Page; problems: string[] }> {
  const context = await browser.newContext({ viewport: PHONE, hasTouch: true, isMobile: true, baseURL: h.baseUrl });
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('pageerror', (e) => problems.push(`page: ${e.message}`));
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').tap();
  await page.getByTestId('sign-in-submit').waitFor({ state: 'detached' });
  await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/${findingId}`);
  await page.getByTestId('finding-title').waitFor();
  return { page, problems };
}

function jpeg(r: number, g: number, b: number): Promise<Buffer> {
  return sharp({ create: { width: 640, height: 480, channels: 3, background: { r, g, b } } }).jpeg({ quality: 80 }).toBuffer();
}

async function shot(page: Page, name: string) {
  await page.screenshot({ path: path.join(screenshotsDir, `${name}.png`), fullPage: true });
}

async function text(page: Page, testID: string): Promise<string> {
  return (await page.getByTestId(testID).first().textContent()) ?? '';
}

/** Every image under the element loaded (photos come from the API with the session). */
async function imagesLoaded(page: Page, testID: string) {
  // Runs in the page (a string: this file is type-checked without the DOM's types).
  const selector = JSON.stringify(`[data-testid="${testID}"] img`);
  await pageHolds(page, `(() => { const imgs = [...document.querySelectorAll(${selector})]; return imgs.length > 0 && imgs.every((i) => i.complete && i.naturalWidth > 0); })()`, {
    timeout: 15_000,
  });
}

/** At least 44 by 44 px, and a name a screen reader says. */
async function expectTarget(control: Locator) {
  await control.scrollIntoViewIfNeeded();
  const box = await control.boundingBox();
  expect(box).not.toBeNull();
  expect(Math.round(box!.width)).toBeGreaterThanOrEqual(44);
  expect(Math.round(box!.height)).toBeGreaterThanOrEqual(44);
  const name = await control.evaluate((el) => el.getAttribute('aria-label') || (el.textContent ?? '').trim());
  expect(name.length).toBeGreaterThan(0);
}

describe('photos whenever needed, on a phone', () => {
  it('adds a photo to an open finding, fixes with a new measurement, re-inspects with a photo and a measurement, and shows both photos labelled', async () => {
    // 1. The inspector adds a photo of the defect to the open finding.
    const insp = await phoneOnFinding(inspector.email);
    const add = insp.page.getByTestId('finding-add-photos');
    await add.waitFor();
    expect(await insp.page.getByTestId('finding-photos').count()).toBe(0);
    await insp.page.getByTestId('finding-add-photos-files-input').setInputFiles({ name: 'lift.jpg', mimeType: 'image/jpeg', buffer: await jpeg(176, 132, 74) });
    await insp.page.getByTestId('finding-add-photos-photos-thumb-0').waitFor();
    await expectTarget(insp.page.getByTestId('finding-add-photos-files'));
    await expectTarget(insp.page.getByTestId('finding-add-photos-submit'));
    await shot(insp.page, 'finding-photos-01-add-photo-phone');
    await insp.page.getByTestId('finding-add-photos-submit').tap();
    await insp.page.getByTestId('finding-add-photos-done').waitFor();
    await imagesLoaded(insp.page, 'finding-photos');
    expect(await text(insp.page, 'finding-history')).toContain('Photo added');
    await shot(insp.page, 'finding-photos-02-photo-added-phone');

    // 2. The subcontractor submits a fix with the new measurement and a photo.
    const sub = await phoneOnFinding(mechanical.email);
    await sub.page.getByTestId('fix-form').waitFor();
    expect(await sub.page.getByTestId('finding-add-photos').count()).toBe(0);
    await sub.page.getByTestId('fix-form-note').fill('Moved the condensate pump lower on the rod.');
    // Sending without the measurement is stopped on the spot.
    await sub.page.getByTestId('fix-form-files-input').setInputFiles({ name: 'fixed.jpg', mimeType: 'image/jpeg', buffer: await jpeg(70, 140, 90) });
    await sub.page.getByTestId('fix-form-photos-thumb-0').waitFor();
    await sub.page.getByTestId('fix-form-submit').tap();
    expect(await text(sub.page, 'fix-form-measured-error')).toContain('again after the fix');
    await sub.page.getByTestId('fix-form-measured-input').fill('28 in');
    await sub.page.getByTestId('fix-form-measured-status').filter({ hasText: 'PASS' }).waitFor();
    expect(await text(sub.page, 'fix-form-measured-source')).toContain('installation manual p. 14');
    await expectTarget(sub.page.getByTestId('fix-form-submit'));
    await sub.page.getByTestId('fix-form').scrollIntoViewIfNeeded();
    await shot(sub.page, 'finding-photos-03-fix-with-measurement-phone');
    await sub.page.getByTestId('fix-form-submit').tap();
    await sub.page.getByTestId('finding-fix-waiting').waitFor();
    expect(await text(sub.page, 'finding-history')).toContain('Within the limit of');

    // 3. The inspector re-inspects with their own photo and measurement, and closes it.
    await insp.page.reload();
    await insp.page.getByTestId('finding-reinspect').waitFor();
    expect(await insp.page.getByTestId('finding-add-photos').count()).toBe(0); // a fix is waiting: its photos are the ones to judge
    await insp.page.getByTestId('reinspect-measured-input').fill('29 in');
    await insp.page.getByTestId('reinspect-measured-status').filter({ hasText: 'PASS' }).waitFor();
    await insp.page.getByTestId('reinspect-files-input').setInputFiles({ name: 'checked.jpg', mimeType: 'image/jpeg', buffer: await jpeg(60, 90, 170) });
    await insp.page.getByTestId('reinspect-photos-thumb-0').waitFor();
    const accept = insp.page.getByRole('button', { name: `Accept the fix of ${label}` });
    await expectTarget(accept);
    await expectTarget(insp.page.getByTestId('reinspect-files'));
    await insp.page.getByTestId('finding-reinspect').scrollIntoViewIfNeeded();
    await shot(insp.page, 'finding-photos-04-reinspect-phone');
    await accept.tap();
    await insp.page.getByTestId('finding-status').filter({ hasText: 'Closed' }).waitFor();

    // 4. The fix photo and the re-inspection photo side by side, labelled.
    const pair = insp.page.getByTestId('finding-fix-and-reinspection');
    await pair.waitFor();
    await imagesLoaded(insp.page, 'finding-fix-and-reinspection-fix-photos');
    await imagesLoaded(insp.page, 'finding-fix-and-reinspection-reinspection-photos');
    expect(await text(insp.page, 'finding-fix-and-reinspection-fix')).toContain('Fix (latest)');
    expect(await text(insp.page, 'finding-fix-and-reinspection-fix')).toContain('New measurement: 28 in');
    expect(await text(insp.page, 'finding-fix-and-reinspection-reinspection')).toContain('Re-inspection (latest)');
    expect(await text(insp.page, 'finding-fix-and-reinspection-reinspection')).toContain('New measurement: 29 in');
    await insp.page.getByRole('img', { name: `${label} fix photo 1` }).waitFor();
    await insp.page.getByRole('img', { name: `${label} re-inspection photo 1` }).waitFor();
    const fixBox = (await insp.page.getByTestId('finding-fix-and-reinspection-fix').boundingBox())!;
    const reBox = (await insp.page.getByTestId('finding-fix-and-reinspection-reinspection').boundingBox())!;
    expect(Math.abs(fixBox.y - reBox.y)).toBeLessThan(2); // one row: side by side
    expect(reBox.x).toBeGreaterThan(fixBox.x + fixBox.width - 1);
    // The defect's photos keep to their own count; the history says what the re-inspection found.
    expect(await text(insp.page, 'finding-history')).toMatch(/Re-inspected: accepted[\s\S]*Measured: 29 in/);
    await pair.scrollIntoViewIfNeeded();
    await shot(insp.page, 'finding-photos-05-fix-and-reinspection-phone');
    expect([...insp.problems, ...sub.problems]).toEqual([]);
  });
});
