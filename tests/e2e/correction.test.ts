/**
 * The correction loop in the browser at phone size, three signed-in roles in turn: the inspector
 * logs a finding with a photo; the mechanical subcontractor finds it in their inbox and submits a
 * fix with a photo; the inspector returns it from the re-inspection queue with a reason; the
 * subcontractor sees why and fixes again; the inspector accepts; the GC manager reads the
 * timeline of all five events. Then the GC's bulk change on the wide table refuses, all or
 * nothing, a finding that is closed. Screenshots go to .artifacts/screenshots.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import type { Page } from 'playwright-core';
import { CatalogueItem, Company, JobCompany } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD } from '../../server/seed/demo';
import { buildLevel, buildSpace, buildUnit, copyCatalogue } from '../support/factories';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { startFakeS3, type FakeS3 } from '../support/storage';
import { demoJob } from '../support/demo';

jest.setTimeout(300_000);

let h: BrowserHarness;
let s3: FakeS3;
const suffix = randomUUID().slice(0, 4).toUpperCase();
const levelName = `Loop level ${suffix}`;
const spaceName = `Plant room ${suffix}`;
const tag = `IU-C${suffix}-01`;
let jobId = '';
let levelId = '';
let unitId = '';

const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const mechanical = DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!;
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;

async function setUp() {
  const job = await demoJob();
  jobId = job.id;
  if ((await CatalogueItem.count({ where: { jobId } })) === 0) await copyCatalogue(jobId);
  // The mechanical subcontractor covers the mechanical trade (the finding form suggests it).
  const company = await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } });
  if (!company) throw new Error('The demo mechanical company is missing.');
  const linked = await JobCompany.findOne({ where: { jobId, companyId: company.id } });
  if (!linked) await JobCompany.create({ jobId, companyId: company.id, trades: ['mechanical'] });
  else if (!linked.trades.includes('mechanical')) await linked.update({ trades: [...linked.trades, 'mechanical'] });
  const level = await buildLevel(jobId, { name: levelName });
  levelId = level.id;
  const space = await buildSpace(jobId, level.id, { name: spaceName });
  const unit = await buildUnit(jobId, level.id, { tag, kind: 'cassette_4way', spaceId: space.id });
  unitId = unit.id;
}

beforeAll(async () => {
  s3 = await startFakeS3();
  h = await startBrowserHarness({ objectStore: s3.store });
  await seedDemo(h.db);
  await setUp();
});
afterAll(async () => {
  await h?.close();
  await s3?.close();
});

const signIn = (page: Page, email: string) => h.signIn(page, email, DEMO_PASSWORD);

async function text(page: Page, testID: string): Promise<string> {
  return (await page.getByTestId(testID).first().textContent()) ?? '';
}

/** A photo made here: a plain JPEG of the given colour. */
function jpeg(r: number, g: number, b: number): Promise<Buffer> {
  return sharp({ create: { width: 640, height: 480, channels: 3, background: { r, g, b } } })
    .jpeg({ quality: 80 })
    .toBuffer();
}

/** Waits until every image under the element has loaded (photos come from the API with the session). */
async function imagesLoaded(page: Page, testID: string) {
  const end = Date.now() + 15_000;
  for (;;) {
    const ok = await page
      .getByTestId(testID)
      .locator('img')
      .evaluateAll((imgs) => imgs.length > 0 && imgs.every((i) => (i as unknown as { complete: boolean }).complete && (i as unknown as { naturalWidth: number }).naturalWidth > 0))
      .catch(() => false);
    if (ok) return;
    if (Date.now() > end) throw new Error(`The photos in ${testID} did not load.`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

/** The subcontractor opens the finding from the inbox and submits a fix with one photo. */
async function submitFix(page: Page, no: string, note: string, colour: [number, number, number], shot: string) {
  await page.getByTestId(`inbox-card-${no}`).click();
  await page.getByTestId('fix-form').waitFor();
  await page.getByTestId('fix-form-note').fill(note);
  await page.getByTestId('fix-form-files-input').setInputFiles({ name: 'fixed.jpg', mimeType: 'image/jpeg', buffer: await jpeg(...colour) });
  await page.getByTestId('fix-form-photos-thumb-0').waitFor();
  await page.getByTestId('fix-form').scrollIntoViewIfNeeded();
  await h.screenshot(page, shot);
  await page.getByTestId('fix-form-submit').click();
  const sent = page.getByTestId('finding-fix-waiting');
  const refused = page.getByTestId('fix-form-error');
  await sent.or(refused).first().waitFor();
  if (await refused.count()) throw new Error(`The fix was refused: ${await refused.textContent()}`);
  expect(await text(page, 'finding-status')).toContain('Fix submitted');
}

describe('the correction loop', () => {
  it('logs, fixes, returns with a reason, fixes again, accepts, and shows the GC all five events', async () => {
    // 1. The inspector logs a finding with a photo.
    const insp = await h.newPage(PHONE);
    await signIn(insp.page, inspector.email);
    await insp.page.goto(`${h.baseUrl}/jobs/${jobId}/findings/new?unitId=${unitId}`);
    await insp.page.getByTestId('finding-form').waitFor();
    const options = await insp.page.getByTestId('finding-form-item').locator('option').allTextContents();
    await insp.page.getByTestId('finding-form-item').selectOption({ label: options.find((o) => o.startsWith('MT-01'))! });
    await insp.page.getByTestId('finding-form-files-input').setInputFiles({ name: 'hanger.jpg', mimeType: 'image/jpeg', buffer: await jpeg(176, 132, 74) });
    await insp.page.getByTestId('finding-form-photos-thumb-0').waitFor();
    await insp.page.getByTestId('finding-form-note').fill('Hung on chain at the north-east corner.');
    await insp.page.getByTestId('finding-form-submit').click();
    await insp.page.getByTestId('finding-title').waitFor();
    const label = (await text(insp.page, 'finding-label')).split(' · ')[0]!;
    expect(label).toMatch(/^#\d+$/);
    const no = label.slice(1);
    expect(await text(insp.page, 'finding-company')).toContain(DEMO_COMPANIES.mechanical);
    // an open finding: the inspector may close it on a walk or change it, not re-inspect it
    await insp.page.getByTestId('finding-close').waitFor();
    expect(await insp.page.getByTestId('finding-reinspect').count()).toBe(0);
    await h.screenshot(insp.page, 'correction-01-logged-inspector-phone');

    // 2. The subcontractor: home → inbox → the finding → fix with a photo.
    const sub = await h.newPage(PHONE);
    await signIn(sub.page, mechanical.email);
    await sub.page.getByTestId('job-list').waitFor();
    // Jobs are set up by GC managers: a subcontractor is not offered "New job".
    expect(await sub.page.getByTestId('new-job').count()).toBe(0);
    await sub.page.getByTestId('home-inbox').click();
    await sub.page.getByTestId('inbox-list').waitFor();
    await sub.page.getByTestId(`inbox-card-${no}`).waitFor();
    expect(await text(sub.page, `inbox-card-${no}`)).toContain(tag);
    expect(await text(sub.page, `inbox-card-${no}`)).toContain('Not hung on threaded rod');
    expect(await text(sub.page, `inbox-card-${no}`)).toContain('Critical');
    await h.screenshot(sub.page, 'correction-02-inbox-phone');
    await sub.page.getByTestId('inbox-grouping-area').click();
    await sub.page.getByTestId('inbox-groups').waitFor();
    expect(await sub.page.locator(`[data-testid^="inbox-group-${levelId}-"]`).first().textContent()).toContain(`${levelName} · ${spaceName}`);
    await h.screenshot(sub.page, 'correction-03-inbox-by-area-phone');
    await sub.page.getByTestId('inbox-grouping-none').click();
    await sub.page.getByTestId('inbox-list').waitFor();
    // the detail shows the photos, the guidance and the caution to the subcontractor; no inspector controls
    await sub.page.getByTestId(`inbox-card-${no}`).click();
    await sub.page.getByTestId('finding-photos').waitFor();
    await imagesLoaded(sub.page, 'finding-photos');
    expect(await text(sub.page, 'finding-caution-text')).toContain('licensed practice govern');
    expect(await sub.page.getByTestId('finding-actions').count()).toBe(0);
    await h.screenshot(sub.page, 'correction-04-detail-subcontractor-phone');
    await sub.page.goto(`${h.baseUrl}/inbox`);
    await submitFix(sub.page, no, 'Replaced the chain with threaded rod, nuts and washers above and below.', [90, 120, 150], 'correction-05-fix-form-phone');
    await h.screenshot(sub.page, 'correction-06-fix-sent-phone');

    // 3. The inspector returns it from the re-inspection queue, with a reason.
    await insp.page.goto(`${h.baseUrl}/jobs/${jobId}`);
    await insp.page.getByTestId('job-reinspections').click();
    await insp.page.getByTestId(`reinspection-${no}`).waitFor();
    await imagesLoaded(insp.page, `reinspection-${no}-photos-before`);
    await imagesLoaded(insp.page, `reinspection-${no}-photos-after`);
    expect(await text(insp.page, `reinspection-${no}-fix`)).toContain('threaded rod');
    await h.screenshot(insp.page, 'correction-07-queue-phone');
    // Return without a reason is refused on the spot
    await insp.page.getByTestId(`reinspection-${no}-verdict-return`).click();
    await insp.page.getByTestId(`reinspection-${no}-verdict-reason-error`).waitFor();
    const reason = 'Washers missing above the nuts on two rods.';
    await insp.page.getByTestId(`reinspection-${no}-verdict-reason`).fill(reason);
    await insp.page.getByTestId(`reinspection-${no}-verdict-return`).click();
    await insp.page.getByTestId('reinspections-done').waitFor();
    expect(await text(insp.page, 'reinspections-done')).toContain(`${label} returned`);
    // A return gives the company the job's days for the severity again, and says so.
    expect(await text(insp.page, 'reinspections-done')).toMatch(/Due again on \w{3},? \d{1,2} \w{3} \d{4} \(\d+ days? for a (critical|major|minor) finding\)/);
    await insp.page.getByTestId(`reinspection-${no}`).waitFor({ state: 'detached' });
    await h.screenshot(insp.page, 'correction-08-returned-phone');

    // 4. The subcontractor sees why, and fixes again.
    await sub.page.goto(`${h.baseUrl}/inbox`);
    await sub.page.getByTestId(`inbox-card-${no}-returned`).waitFor();
    expect(await text(sub.page, `inbox-card-${no}-returned`)).toContain(`Returned: ${reason}`);
    await h.screenshot(sub.page, 'correction-09-inbox-returned-phone');
    await sub.page.getByTestId(`inbox-card-${no}`).click();
    await sub.page.getByTestId('finding-returned').waitFor();
    expect(await text(sub.page, 'finding-returned')).toContain(reason);
    expect(await text(sub.page, 'finding-returned')).toMatch(/Due again on \w{3},? \d{1,2} \w{3} \d{4} \(\d+ days? for a (critical|major|minor) finding\)/);
    await h.screenshot(sub.page, 'correction-10-detail-returned-phone');
    await sub.page.goto(`${h.baseUrl}/inbox`);
    await submitFix(sub.page, no, 'Added the missing washers above the nuts.', [70, 140, 90], 'correction-11-fix-again-phone');

    // 5. The inspector accepts from the finding's detail (before and after side by side).
    await insp.page.goto(`${h.baseUrl}/jobs/${jobId}/findings`);
    await insp.page.getByTestId(`finding-card-${no}`).click();
    await insp.page.getByTestId('finding-reinspect').waitFor();
    await imagesLoaded(insp.page, 'finding-before-after-after');
    await insp.page.getByTestId('finding-reinspect').scrollIntoViewIfNeeded();
    await h.screenshot(insp.page, 'correction-12-detail-reinspect-phone');
    await insp.page.getByTestId('reinspect-accept').click();
    await insp.page.getByTestId('finding-status').filter({ hasText: 'Closed' }).waitFor();
    expect(await insp.page.getByTestId('finding-reinspect').count()).toBe(0);

    // 6. The GC manager reads the timeline: five events, oldest first, with the reason.
    const gcm = await h.newPage(PHONE);
    await signIn(gcm.page, gc.email);
    await gcm.page.goto(`${h.baseUrl}/jobs/${jobId}/findings`);
    await gcm.page.getByTestId(`finding-card-${no}`).click();
    await gcm.page.getByTestId('finding-history').waitFor();
    const kinds = await gcm.page.locator('[data-testid^="finding-event-"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));
    expect(kinds).toEqual(['finding-event-logged', 'finding-event-fix_submitted', 'finding-event-returned', 'finding-event-fix_submitted', 'finding-event-accepted']);
    expect(await text(gcm.page, 'finding-event-returned')).toContain(reason);
    expect(await text(gcm.page, 'finding-event-returned')).toContain(inspector.name);
    expect(await text(gcm.page, 'finding-event-fix_submitted')).toContain(mechanical.name);
    // the GC manager may reopen a closed finding
    await gcm.page.getByTestId('finding-change-kind-reopen').waitFor();
    // a comment, seen by everyone who can see the finding
    await gcm.page.getByTestId('finding-comment-text').fill('Accepted: the level above can be closed up.');
    await gcm.page.getByTestId('finding-comment-send').click();
    await gcm.page.getByText('Accepted: the level above can be closed up.').waitFor();
    await gcm.page.getByTestId('finding-history').scrollIntoViewIfNeeded();
    await h.screenshot(gcm.page, 'correction-13-timeline-gc-phone');

    for (const p of [insp, sub, gcm]) expect(p.problems).toEqual([]);
    for (const p of [insp, sub, gcm]) await p.context.close();
  });

  it('changes many findings at once on the wide table, all or nothing, and says when someone changed a finding first', async () => {
    const { page, problems, context } = await h.newPage(WIDE);
    await signIn(page, gc.email);
    // A second finding on the loop's unit, logged through the API by the GC manager (still open).
    const session = (await (await page.request.get(`${h.baseUrl}/api/session`)).json()) as { csrfToken: string };
    const item = await CatalogueItem.findOne({ where: { jobId, code: 'DR-01' } });
    const created = await page.request.post(`${h.baseUrl}/api/jobs/${jobId}/findings`, {
      headers: { 'X-CSRF-Token': session.csrfToken, 'Idempotency-Key': randomUUID() },
      data: { catalogueItemId: item!.id, unitId, note: 'Logged for the bulk change.' },
    });
    expect(created.status()).toBe(201);
    const open = (await created.json()) as { id: string; number: number; version: number };

    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings?levelId=${levelId}`);
    await page.getByTestId('findings-table').waitFor();
    await page.getByTestId(`finding-row-${open.number}`).waitFor();
    await page.getByTestId('bulk-hint').waitFor();
    // 1. Both selected: the loop's finding (closed by the test above) refuses, so nothing changes and the refusal names it.
    await page.getByTestId('findings-select-all').click();
    await page.getByTestId('bulk').waitFor();
    expect(await text(page, 'bulk-count')).toBe('2 selected');
    await page.getByTestId('bulk-kind-due').click();
    await page.getByTestId('bulk-due').fill('2030-01-15');
    await page.getByTestId('bulk-apply').click();
    await page.getByTestId('bulk-refused').waitFor();
    expect(await text(page, 'bulk-refused')).toContain('Nothing was changed');
    const refused = await text(page, 'bulk-refused-list');
    expect(refused).toMatch(/^Refused: #\d+$/);
    expect(refused).not.toContain(`#${open.number}`);
    await h.screenshot(page, 'correction-14-bulk-refused-wide');
    // 2. Only the open one: it changes.
    const closedNo = refused.replace('Refused: #', '');
    await page.getByTestId(`finding-select-${closedNo}`).click();
    expect(await text(page, 'bulk-count')).toBe('1 selected');
    await page.getByTestId('bulk-apply').click();
    await page.getByTestId('bulk-done').waitFor();
    expect(await text(page, 'bulk-done')).toBe('1 finding given the new due date.');
    await page.getByTestId(`finding-row-${open.number}`).filter({ hasText: '15 Jan 2030' }).waitFor();
    await h.screenshot(page, 'correction-15-bulk-done-wide');

    // 3. Two people on one finding: the second save is refused and the finding is shown as it is now.
    await page.getByTestId(`finding-row-${open.number}`).click();
    await page.getByTestId('finding-change').waitFor();
    const now = (await (await page.request.get(`${h.baseUrl}/api/jobs/${jobId}/findings/${open.id}`)).json()) as { version: number };
    const other = await page.request.patch(`${h.baseUrl}/api/jobs/${jobId}/findings/${open.id}`, {
      headers: { 'X-CSRF-Token': session.csrfToken, 'If-Match': `"v${now.version}"` },
      data: { severity: { to: 'minor', reason: 'Changed in another window.' } },
    });
    expect(other.status()).toBe(200);
    await page.getByTestId('finding-change-kind-due').click();
    await page.getByTestId('finding-change-due').fill('2030-02-01');
    await page.getByTestId('finding-change-submit').click();
    await page.getByTestId('finding-change-error').waitFor();
    expect(await text(page, 'finding-change-error')).toContain('Someone changed this finding');
    await page.getByTestId('finding-severity').filter({ hasText: 'Minor' }).waitFor();
    await page.getByTestId('finding-change').scrollIntoViewIfNeeded();
    await h.screenshot(page, 'correction-16-stale-change-wide');
    // saving again, on the finding as it is now, goes through
    await page.getByTestId('finding-change-submit').click();
    await page.getByTestId('finding-change-saved').waitFor();
    await page.getByTestId('finding-due').filter({ hasText: '1 Feb 2030' }).waitFor();
    // the GC manager voids it with a reason: it leaves the loop, and the history says why
    await page.getByTestId('finding-change-kind-void').click();
    await page.getByTestId('finding-change-submit').click();
    await page.getByTestId('finding-change-reason-error').waitFor();
    await page.getByTestId('finding-change-reason').fill('Logged twice: the same drain as another finding.');
    await page.getByTestId('finding-change-submit').click();
    await page.getByTestId('finding-status').filter({ hasText: 'Voided' }).waitFor();
    expect(await text(page, 'finding-event-voided')).toContain('Logged twice');
    expect(await page.getByTestId('finding-change').count()).toBe(0);
    // the refusals themselves are the 409 and 412 the browser logs
    expect(problems.filter((p) => !/status of 4(09|12)/.test(p))).toEqual([]);
    await context.close();
  });

  it('reads comfortably at 1280 px: the inbox by area and the re-inspection queue', async () => {
    const sub = await h.newPage(WIDE);
    await signIn(sub.page, mechanical.email);
    await sub.page.goto(`${h.baseUrl}/inbox`);
    await sub.page.getByTestId('inbox-grouping-area').click();
    await sub.page.getByTestId('inbox-groups').waitFor();
    expect(await text(sub.page, 'inbox-counts')).toMatch(/^\d+ findings?/);
    await h.screenshot(sub.page, 'correction-17-inbox-by-area-wide');
    // the subcontractor's job overview leads to the inbox, not to the re-inspections
    await sub.page.goto(`${h.baseUrl}/jobs/${jobId}`);
    await sub.page.getByTestId('job-inbox').waitFor();
    expect(await sub.page.getByTestId('job-reinspections').count()).toBe(0);
    expect(sub.problems).toEqual([]);
    await sub.context.close();

    const insp = await h.newPage(WIDE);
    await signIn(insp.page, inspector.email);
    // not a subcontractor on any job: no inbox on the home screen
    expect(await insp.page.getByTestId('home-inbox').count()).toBe(0);
    await insp.page.goto(`${h.baseUrl}/jobs/${jobId}/reinspections`);
    // empty unless the demo data holds fixes waiting on this job
    await insp.page.getByTestId('reinspections-empty').or(insp.page.getByTestId('reinspections-levels')).first().waitFor();
    await h.screenshot(insp.page, 'correction-18-queue-wide');
    expect(insp.problems).toEqual([]);
    await insp.context.close();
  });
});
