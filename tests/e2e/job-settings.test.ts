/**
 * Job settings in the browser, signed in as the demo GC manager: from the job's set-up links to
 * the settings screen, the shared rule refusing critical days above major, a change of the days
 * to fix and of the recurring threshold (typed as a percent) saved and still there after a
 * reload, both at 1280x800 and at 390x844; what was stored is read back with the model (the share
 * as the fraction 0..1 the API keeps). A change made by someone else meanwhile (the row's version
 * raised here) gives the "changed by someone else" message, loads their change and keeps what was typed. The demo
 * inspector sees the values read-only. Screenshots: .artifacts/screenshots/job-settings-*.png.
 */
import type { Page } from 'playwright-core';
import { Job } from '../../server/models';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoJob } from '../support/demo';

jest.setTimeout(300_000);

let h: BrowserHarness;
let jobId = '';
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  const job = await demoJob();
  jobId = job.id;
  // Start from the defaults whatever an earlier run left (2/7/14 days; 3 units and 10 %).
  await job.update({ severityDueDays: { critical: 2, major: 7, minor: 14 }, recurringThresholds: { minUnits: 3, minShare: 0.1 }, version: job.version + 1 });
});
afterAll(async () => {
  await h?.close();
});

const signIn = (page: Page, email: string) => h.signIn(page, email, DEMO_PASSWORD);

/** The screens scroll inside the app: grow the viewport to the content for the picture, then put it back. */
async function shot(page: Page, name: string) {
  await page.waitForLoadState('networkidle');
  await page.waitForTimeout(300);
  const size = page.viewportSize()!;
  const content = await page.evaluate<number>(
    `Math.max(...Array.from(document.querySelectorAll('div')).filter((d) => d.scrollHeight > d.clientHeight + 1 && getComputedStyle(d).overflowY !== 'visible').map((d) => d.scrollHeight - d.clientHeight), 0)`,
  );
  if (content > 0) await page.setViewportSize({ width: size.width, height: Math.min(size.height + content, 6000) });
  await h.screenshot(page, name);
  if (content > 0) await page.setViewportSize(size);
}

async function explainFailure<T>(page: Page, name: string, problems: string[], work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    await shot(page, `job-settings-FAILED-${name}`).catch(() => undefined);
    throw new Error(`${(err as Error).message}\npage problems: ${JSON.stringify(problems)}`);
  }
}

async function fill(page: Page, testID: string, value: string) {
  await page.getByTestId(testID).fill(value);
}
const inputValue = (page: Page, testID: string) => page.getByTestId(testID).inputValue();

async function stored() {
  const job = await Job.findByPk(jobId);
  return { due: job!.severityDueDays, recurring: job!.recurringThresholds, version: job!.version };
}

describe('job settings, as the demo GC manager', () => {
  it('at 1280x800: opens from the set-up links, refuses critical > major, saves days and the recurring threshold, keeps them after a reload', async () => {
    const { page, problems } = await h.newPage(WIDE);
    await explainFailure(page, 'wide', problems, async () => {
      await signIn(page, gc.email);
      await page.goto(`${h.baseUrl}/jobs/${jobId}`);
      await page.getByTestId('setup-link-settings').click();
      await page.waitForURL('**/setup/settings');
      await page.getByTestId('settings-form').waitFor();
      expect(await inputValue(page, 'settings-recurring-share')).toBe('10');
      expect(await inputValue(page, 'settings-recurring-units')).toBe('3');
      await shot(page, 'job-settings-01-loaded-wide');

      // The shared rule, before anything is sent.
      await fill(page, 'settings-due-critical', '9');
      await page.getByTestId('settings-submit').click();
      await page.getByTestId('settings-due-days-error').filter({ hasText: 'Due days must not shrink with severity: critical ≤ major ≤ minor.' }).waitFor();
      await shot(page, 'job-settings-02-refused-wide');
      expect((await stored()).due).toEqual({ critical: 2, major: 7, minor: 14 });

      await fill(page, 'settings-due-critical', '1');
      await fill(page, 'settings-due-major', '5');
      await fill(page, 'settings-due-minor', '21');
      await fill(page, 'settings-recurring-units', '4');
      await fill(page, 'settings-recurring-share', '15');
      await page.getByTestId('settings-recurring-words').filter({ hasText: 'at least 4 units and on at least 15 % of the checked units' }).waitFor();
      await page.getByTestId('settings-submit').click();
      await page.getByTestId('settings-saved').waitFor();
      await shot(page, 'job-settings-03-saved-wide');
      const after = await stored();
      expect(after.due).toEqual({ critical: 1, major: 5, minor: 21 });
      // 15 % typed = 0.15 stored (the API keeps the share as a fraction of 1).
      expect(after.recurring).toEqual({ minUnits: 4, minShare: 0.15 });

      await page.reload();
      await page.getByTestId('settings-form').waitFor();
      expect(await inputValue(page, 'settings-due-critical')).toBe('1');
      expect(await inputValue(page, 'settings-due-major')).toBe('5');
      expect(await inputValue(page, 'settings-due-minor')).toBe('21');
      expect(await inputValue(page, 'settings-recurring-units')).toBe('4');
      expect(await inputValue(page, 'settings-recurring-share')).toBe('15');

      // Someone else changes the job meanwhile (its version goes up): the save is refused with a
      // clear message, the job is read again, and what was typed stays.
      const job = await Job.findByPk(jobId);
      await job!.update({ severityDueDays: { critical: 2, major: 5, minor: 21 }, version: job!.version + 1 });
      await fill(page, 'settings-recurring-share', '20');
      await page.getByTestId('settings-submit').click();
      await page.getByTestId('settings-conflict').filter({ hasText: 'Someone else changed this job' }).waitFor();
      await page.getByTestId('settings-conflict-fields').filter({ hasText: 'Changed by them: Critical due days.' }).waitFor();
      // Their change is loaded; the field changed here keeps what was typed.
      expect(await inputValue(page, 'settings-due-critical')).toBe('2');
      expect(await inputValue(page, 'settings-recurring-share')).toBe('20');
      await shot(page, 'job-settings-04-conflict-wide');
      expect((await stored()).recurring).toEqual({ minUnits: 4, minShare: 0.15 });
      // Saving again keeps theirs and adds mine.
      await page.getByTestId('settings-submit').click();
      await page.getByTestId('settings-saved').waitFor();
      const final = await stored();
      expect(final.due).toEqual({ critical: 2, major: 5, minor: 21 });
      expect(final.recurring).toEqual({ minUnits: 4, minShare: 0.2 });
      // The browser logs the refused save (412) it was made to get; nothing else.
      expect(problems.filter((p) => !/status of 412/.test(p))).toEqual([]);
    });
  });

  it('at 390x844: changes the recurring threshold and the days to fix, and sees them after a reload', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await explainFailure(page, 'phone', problems, async () => {
      await signIn(page, gc.email);
      await page.goto(`${h.baseUrl}/jobs/${jobId}/setup/settings`);
      await page.getByTestId('settings-form').waitFor();
      await shot(page, 'job-settings-05-loaded-phone');
      await fill(page, 'settings-due-critical', '3');
      await fill(page, 'settings-due-major', '10');
      await fill(page, 'settings-due-minor', '30');
      await fill(page, 'settings-recurring-units', '5');
      await fill(page, 'settings-recurring-share', '12.5');
      await page.getByTestId('settings-submit').click();
      await page.getByTestId('settings-saved').waitFor();
      await shot(page, 'job-settings-06-saved-phone');
      const after = await stored();
      expect(after.due).toEqual({ critical: 3, major: 10, minor: 30 });
      expect(after.recurring).toEqual({ minUnits: 5, minShare: 0.125 });

      await page.reload();
      await page.getByTestId('settings-form').waitFor();
      expect(await inputValue(page, 'settings-due-critical')).toBe('3');
      expect(await inputValue(page, 'settings-due-major')).toBe('10');
      expect(await inputValue(page, 'settings-due-minor')).toBe('30');
      expect(await inputValue(page, 'settings-recurring-units')).toBe('5');
      expect(await inputValue(page, 'settings-recurring-share')).toBe('12.5');
      await page.getByTestId('settings-recurring-words').filter({ hasText: 'at least 5 units and on at least 12.5 %' }).waitFor();
      expect(problems).toEqual([]);
    });
  });
});

describe('job settings, as the demo inspector', () => {
  it('reads the values at 390x844 with no form', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await explainFailure(page, 'inspector', problems, async () => {
      await signIn(page, inspector.email);
      await page.goto(`${h.baseUrl}/jobs/${jobId}/setup/settings`);
      await page.getByTestId('settings-read-only').waitFor();
      expect(await page.getByTestId('settings-form').count()).toBe(0);
      await page.getByTestId('settings-recurring-value').filter({ hasText: 'At least 5 units and 12.5 % of checked units' }).waitFor();
      await shot(page, 'job-settings-07-read-only-phone');
    });
  });
});
