/**
 * Copying a job in the browser, as the demo GC manager at phone size: from the job's details, a new
 * name, "Copy to a new job", and the new job opens on its own details. What was copied is counted
 * in SQL against the demo job (levels, spaces, models, catalogue items, companies), and what was
 * not (units, systems, findings, other people). A refused copy (no name) says why and makes
 * nothing. The copy's home shows its setup checklist. Screenshots: .artifacts/screenshots/copy-job-*.png.
 */
import type { Page } from 'playwright-core';
import { CatalogueItem, Finding, Job, JobCompany, JobMember, Level, Space, System, Unit, UnitModel } from '../../server/models';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoJob } from '../support/demo';

jest.setTimeout(300_000);

let h: BrowserHarness;
let jobId = '';
let copiedId: string | null = null;
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  jobId = (await demoJob()).id;
});
afterAll(async () => {
  // The copy leaves the shared demo database as it found it: other tests read the GC manager's jobs and digests.
  if (copiedId) await Job.destroy({ where: { id: copiedId } });
  await h?.close();
});

const signIn = (page: Page, email: string) => h.signIn(page, email, DEMO_PASSWORD);

it('copies the demo job to a new one with its structure, catalogue and companies, and none of its units, findings or people', async () => {
  const { page, problems } = await h.newPage(PHONE);
  await signIn(page, gc.email);
  await page.goto(`${h.baseUrl}/jobs/${jobId}/setup/job`);
  await page.getByTestId('copy-job').waitFor();
  const jobsBefore = await Job.count();

  // No name: the form says so and nothing is made.
  await page.getByTestId('copy-job-submit').click();
  await page.getByTestId('copy-job').getByText(/name/i).first().waitFor();
  expect(await Job.count()).toBe(jobsBefore);

  const name = `Second building ${Date.now()}`;
  await page.getByTestId('copy-job-name').fill(name);
  await page.getByTestId('copy-job-submit').click();
  await page.waitForURL((url) => url.pathname.endsWith('/setup/job') && !url.pathname.includes(jobId));
  const copy = await Job.findOne({ where: { name } });
  expect(copy).not.toBeNull();
  copiedId = copy!.id;
  expect(new URL(page.url()).pathname).toBe(`/jobs/${copy!.id}/setup/job`);
  await page.getByTestId('job-details-form').waitFor();
  expect(await page.getByTestId('job-name-input').inputValue()).toBe(name);
  await h.screenshot(page, 'copy-job-01-new-job-phone');

  const count = (Model: { count: (o: object) => Promise<number> }, id: string) => Model.count({ where: { jobId: id } });
  for (const Model of [Level, Space, UnitModel, CatalogueItem, JobCompany]) {
    expect(await count(Model, copy!.id)).toBe(await count(Model, jobId));
  }
  expect(await count(Level, copy!.id)).toBeGreaterThan(0);
  for (const Model of [Unit, System, Finding]) expect(await count(Model, copy!.id)).toBe(0);
  const members = await JobMember.findAll({ where: { jobId: copy!.id } });
  expect(members.map((m) => m.role)).toEqual(['gc_manager']);

  // The copy's home lists what it still misses before a walk (no units yet, as nothing was copied); a line opens its set-up page.
  await page.goto(`${h.baseUrl}/jobs/${copy!.id}`);
  await page.getByTestId('setup-checklist').waitFor();
  expect((await page.getByTestId('setup-checklist-no_units').innerText()).trim()).toContain('No units yet');
  await h.screenshot(page, 'copy-job-02-checklist-phone');
  await page.getByTestId('setup-checklist-no_units').click();
  await page.waitForURL((url) => url.pathname === `/jobs/${copy!.id}/setup/units`);
  expect(problems).toEqual([]);
});
