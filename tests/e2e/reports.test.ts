/**
 * Reports in the browser, as the demo GC manager: the close-out report button on the job, a
 * level (with the crew punch lists) and the scorecards, at 390x844 and 1280x800; pressing it on a
 * level opens the report's page, which shows the progress and then the download, whose file is a
 * PDF. Screenshots go to the artifacts folder (reports-*.png).
 */
import type { Page } from 'playwright-core';
import { Level } from '../../server/models';
import { createReportQueue, type ReportQueue } from '../../server/reports/queue';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { testDatabaseUrl } from '../support/db';
import { demoJob } from '../support/demo';
import { startFakeS3, type FakeS3 } from '../support/storage';

jest.setTimeout(300_000);

let h: BrowserHarness;
let s3: FakeS3;
let queue: ReportQueue;
let jobId = '';
let levelId = '';
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;

beforeAll(async () => {
  s3 = await startFakeS3();
  queue = createReportQueue({ connectionString: testDatabaseUrl(), log: () => undefined });
  h = await startBrowserHarness({ objectStore: s3.store, reportQueue: queue });
  await queue.startWorker({ sequelize: h.db.sequelize, store: s3.store, log: () => undefined }, { pollingIntervalSeconds: 0.5 });
  await seedDemo(h.db);
  jobId = (await demoJob()).id;
  levelId = (await Level.findOne({ where: { jobId }, order: [['position', 'ASC']] }))!.id;
});
afterAll(async () => {
  await h?.close();
  await queue?.stop();
  await s3?.close();
});

async function shot(page: Page, testID: string, name: string) {
  await page.getByTestId(testID).first().scrollIntoViewIfNeeded();
  await page.waitForTimeout(300);
  await h.screenshot(page, name);
}

describe('reports in the browser', () => {
  for (const [size, viewport] of [
    ['phone', PHONE],
    ['wide', WIDE],
  ] as const) {
    it(`offers the reports on the job, a level and the scorecards (${size})`, async () => {
      const { page, problems } = await h.newPage(viewport);
      await h.signIn(page, gc.email, DEMO_PASSWORD);
      await page.goto(`${h.baseUrl}/jobs/${jobId}`);
      await page.getByTestId('job-reports-close-out').waitFor();
      await shot(page, 'job-reports', `reports-job-${size}`);
      await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}`);
      await page.getByTestId('level-reports-close-out').waitFor();
      await page.getByTestId('level-crew-lists').waitFor();
      const crewHref = await page.getByTestId('level-crew-lists').locator('a').first().getAttribute('href');
      expect(crewHref).toMatch(new RegExp(`^/api/jobs/${jobId}/reports/crew-list\\.pdf\\?companyId=[0-9a-f-]{36}&levelId=${levelId}$`));
      await shot(page, 'level-reports', `reports-level-${size}`);
      await page.goto(`${h.baseUrl}/jobs/${jobId}/scorecards`);
      await page.getByTestId('company-reports').waitFor();
      await shot(page, 'company-reports', `reports-scorecards-${size}`);
      expect(problems).toEqual([]);
      await page.context().close();
    });
  }

  it('builds a level’s close-out report with its progress, then downloads a PDF', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await h.signIn(page, gc.email, DEMO_PASSWORD);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}`);
    await page.getByTestId('level-reports-close-out').click();
    await page.getByTestId('report-progress').waitFor();
    await page.getByTestId('report-download').waitFor({ timeout: 120_000 });
    expect(await page.getByTestId('report-progress').textContent()).toMatch(/^Report ready: \d+ findings$/);
    await shot(page, 'report-card', 'reports-ready-phone');
    const href = (await page.getByTestId('report-download').getAttribute('href'))!;
    const res = await page.request.get(`${h.baseUrl}${href}`);
    expect(res.status()).toBe(200);
    expect(res.headers()['content-type']).toBe('application/pdf');
    expect((await res.body()).subarray(0, 5).toString()).toBe('%PDF-');
    expect(problems).toEqual([]);
  });
});
