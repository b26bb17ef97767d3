/**
 * What the browser tests of a finding's photos start from (finding-photos, photo-markup): the
 * demo seeded into the harness's database, a fake object store for the photos, a touch-capable
 * browser, and an open pump-lift finding on the demo job with no photo yet. Each call makes its
 * own level, space, model, unit and finding, so the files do not see each other's photos.
 */
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import sharp from 'sharp';
import { chromium, type Browser, type Page } from 'playwright-core';
import { CatalogueItem, Company, Finding, Job, JobCompany, UnitModel, User } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD } from '../../server/seed/demo';
import { limitResolverFor, measure, nextFindingNumber, recordFindingEvent } from '../../server/services/findings';
import { buildLevel, buildSpace, buildUnit, copyCatalogue } from './factories';
import { PHONE, screenshotsDir, startBrowserHarness, type BrowserHarness } from './browser';
import type { PickedFile } from './filePick';
import { startFakeS3, type FakeS3 } from './storage';

export const photoInspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
export const photoMechanical = DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!;

export interface PhotoFinding {
  jobId: string;
  findingId: string;
  /** "#12": how the screens name the finding. */
  label: string;
}

/** A pump-lift finding (DR-03) logged at 34 in on a cassette whose model allows 30 in, with no photo yet. */
async function pumpLiftFinding(): Promise<PhotoFinding> {
  const suffix = randomUUID().slice(0, 4).toUpperCase();
  const job = await Job.findOne({ where: { name: 'Cinder Lane Commons' } });
  if (!job) throw new Error('The demo job is missing.');
  const jobId = job.id;
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
  const logger = await User.findOne({ where: { email: photoInspector.email } });
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
  return { jobId, findingId: finding.id, label: `#${finding.number}` };
}

export interface PhotoHarness {
  h: BrowserHarness;
  browser: Browser;
  finding: PhotoFinding;
  close(): Promise<void>;
}

/** The harness with a fake object store, the demo, the finding and a browser (for beforeAll). */
export async function startPhotoHarness(): Promise<PhotoHarness> {
  const s3: FakeS3 = await startFakeS3();
  let h: BrowserHarness | undefined;
  let browser: Browser | undefined;
  const close = async () => {
    await browser?.close();
    await h?.close();
    await s3.close();
  };
  try {
    h = await startBrowserHarness({ objectStore: s3.store });
    await seedDemo(h.db);
    const finding = await pumpLiftFinding();
    browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu'] });
    return { h, browser, finding, close };
  } catch (err) {
    await close();
    throw err;
  }
}

/** A phone (390×844, touch, mobile) signed in as `email`, on the finding's screen. */
export async function phoneOnFinding({ h, browser, finding }: PhotoHarness, email: string): Promise<{ page: Page; problems: string[] }> {
  const context = await browser.newContext({ viewport: PHONE, hasTouch: true, isMobile: true, baseURL: h.baseUrl });
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('pageerror', (e) => problems.push(`page: ${e.message}`));
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').tap();
  await page.getByTestId('sign-in-submit').waitFor({ state: 'detached' });
  await page.goto(`${h.baseUrl}/jobs/${finding.jobId}/findings/${finding.findingId}`);
  await page.getByTestId('finding-title').waitFor();
  return { page, problems };
}

/** A 640×480 JPEG of one colour named `name`, to pick as a phone's photo. */
export async function jpegFile(name: string, r: number, g: number, b: number): Promise<PickedFile> {
  const buffer = await sharp({ create: { width: 640, height: 480, channels: 3, background: { r, g, b } } }).jpeg({ quality: 80 }).toBuffer();
  return { name, mimeType: 'image/jpeg', buffer };
}

/** The whole page into TRIMOUT_ARTIFACTS/screenshots/<name>.png. */
export async function fullPageShot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: path.join(screenshotsDir, `${name}.png`), fullPage: true });
}
