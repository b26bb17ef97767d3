/**
 * A GC manager brings in the mechanical schedule as it came from the engineer: UTF-8 with a
 * byte-order mark, CRLF line ends, kinds in capitals ("4-WAY CASSETTE", "WALL MOUNT", "DUCTED HSP",
 * and a bare "CASSETTE" Trimout cannot tell), a "Capacity (Btu/h)" header, a level and rooms the job
 * does not have yet. One pass after mapping the one kind and ticking "create them"; then the
 * revised schedule (two units changed, one added), then the last import undone. Screenshots of
 * the preview with created places and of the revision diff, at phone and wide sizes.
 */
import type { Page } from 'playwright-core';
import { Level, Space, Unit } from '../../server/models';
import { WATTS_PER_TON } from '../../shared/calc/quantity';
import { addMember, buildCompany, buildJob, buildLevel, buildSystem, buildUser, TEST_PASSWORD } from '../support/factories';
import { PHONE, WIDE, pageHolds, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { csvFile, pickFile } from '../support/filePick';

jest.setTimeout(240_000);

let h: BrowserHarness;
let gcEmail: string;
let gcId: string;
let gcCompanyId: string;

beforeAll(async () => {
  h = await startBrowserHarness();
  const gc = await buildCompany({ name: 'Tallgrass Builders (test)' });
  const manager = await buildUser({ companyId: gc.id, name: 'Ines Okafor' });
  gcEmail = manager.email;
  gcId = manager.id;
  gcCompanyId = gc.id;
});
afterAll(async () => {
  await h?.close();
});

/** A job with one level and one system: the schedule names a second level and rooms it lacks. */
async function clinicJob() {
  const job = await buildJob({ name: 'Birchfield Clinic (test)', ownerCompanyId: gcCompanyId });
  await addMember(job.id, gcId, 'gc_manager');
  await buildLevel(job.id, { name: 'Level 1' });
  await buildSystem(job.id, { name: 'VRF-1' });
  return job;
}

/** The schedule as exported from the engineer's spreadsheet: BOM, CRLF, capitals. */
const SCHEDULE = [
  'TAG,TYPE,Capacity (Btu/h),LEVEL,ROOM,SYSTEM',
  'FC-101,4-WAY CASSETTE,24000,Level 1,Waiting 101,VRF-1',
  'FC-102,WALL MOUNT,9000,Level 1,Exam 102,VRF-1',
  'FC-103,WALL MOUNT,9000,Level 1,Exam 103,VRF-1',
  'FC-104,CASSETTE,12000,Level 1,Office 104,VRF-1',
  'FC-201,DUCTED HSP,36000,Level 2,Imaging 201,VRF-1',
  'FC-202,CASSETTE,12000,Level 2,Staff 202,VRF-1',
];
/** Rev B: FC-102 is upsized, FC-201 moves room, FC-203 is new. */
const REVISED = [
  ...SCHEDULE.slice(0, 2),
  'FC-102,WALL MOUNT,12000,Level 1,Exam 102,VRF-1',
  ...SCHEDULE.slice(3, 5),
  'FC-201,DUCTED HSP,36000,Level 2,Imaging 203,VRF-1',
  SCHEDULE[6]!,
  'FC-203,WALL MOUNT,9000,Level 2,Staff 202,VRF-1',
];

async function shot(page: Page, name: string) {
  await page.waitForLoadState('networkidle');
  const size = page.viewportSize()!;
  const content = await page.evaluate<number>(
    `Math.max(...Array.from(document.querySelectorAll('div')).filter((d) => d.scrollHeight > d.clientHeight + 1 && getComputedStyle(d).overflowY !== 'visible').map((d) => d.scrollHeight - d.clientHeight), 0)`,
  );
  if (content > 0) await page.setViewportSize({ width: size.width, height: Math.min(size.height + content, 6000) });
  await h.screenshot(page, name);
  if (content > 0) await page.setViewportSize(size);
}

async function seeText(page: Page, testId: string, text: string | RegExp) {
  await page.getByTestId(testId).filter({ hasText: text }).first().waitFor();
}

async function explainFailure<T>(page: Page, name: string, problems: string[], work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    await shot(page, `FAILED-${name}`).catch(() => undefined);
    throw new Error(`${(err as Error).message}\npage problems: ${JSON.stringify(problems)}`);
  }
}

/** Picks the file, maps the bare "CASSETTE" once and ticks "create them": the preview is ready. */
async function previewFirstSchedule(page: Page) {
  await pickFile(page, 'import-file', csvFile(SCHEDULE, 'birchfield-mech-schedule.csv'), 'import-mapping');
  // The capacity column is matched by its header, unit and all; nothing is left on Ignore.
  expect(await page.getByTestId('import-map-2').inputValue()).toBe('capacity');
  expect(await page.getByTestId('import-ignored').count()).toBe(0);
  await page.getByTestId('import-preview-button').click();
  await page.getByTestId('import-kinds').waitFor();
  await seeText(page, 'import-kinds-open', 'Choose a unit kind for 1 value');
  await seeText(page, 'import-places', 'The file names 1 level and 6 spaces this job does not have yet');
  const cassette = page.getByTestId('import-kind-select-2');
  expect(await page.getByTestId('import-kind-2').textContent()).toContain('"CASSETTE"');
  await cassette.selectOption('cassette_2way');
  await pageHolds(page, `document.querySelector('[data-testid="import-kinds-open"]') === null`, { what: 'the kind to be mapped' });
  await page.getByTestId('import-create-places').click();
  await page.getByTestId('import-ready').waitFor();
  await seeText(page, 'import-good', '6 good');
  await seeText(page, 'import-bad', '0 bad');
}

describe('a schedule as it comes, then its revision, then undo', () => {
  it('imports in one pass after mapping, applies the revised schedule, and undoes it (wide)', async () => {
    const job = await clinicJob();
    const { page, problems } = await h.newPage(WIDE);
    await explainFailure(page, 'schedule-import-wide', problems, async () => {
      await h.signIn(page, gcEmail, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${job.id}/setup/import`);
      await page.getByTestId('import-source').waitFor();

      await previewFirstSchedule(page);
      await shot(page, 'schedule-import-places-wide');
      await page.getByTestId('import-commit').click();
      await seeText(page, 'import-done', '6 units were added to the register.');
      expect(await Unit.count({ where: { jobId: job.id } })).toBe(6);
      expect((await Level.findAll({ where: { jobId: job.id }, order: [['position', 'ASC']] })).map((l) => l.name)).toEqual(['Level 1', 'Level 2']);
      expect(await Space.count({ where: { jobId: job.id } })).toBe(6);
      expect((await Unit.findOne({ where: { jobId: job.id, tag: 'FC-202' } }))!.kind).toBe('cassette_2way');

      // Rev B: "CASSETTE" is read as chosen last time; two units change, one is added, one room is new.
      await pickFile(page, 'import-file', csvFile(REVISED, 'birchfield-mech-schedule-rev-b.csv'));
      await page.getByTestId('import-preview-button').click();
      await page.getByTestId('import-revision').waitFor();
      // The one room the revision adds is listed, and refused until it is ticked.
      await seeText(page, 'import-places', 'The file names 1 space this job does not have yet');
      await seeText(page, 'import-bad-row-6', 'Unknown space "Imaging 203" on Level 2.');
      await page.getByTestId('import-create-places').click();
      await page.getByTestId('import-ready').waitFor();
      await seeText(page, 'import-rev-added', '1 new');
      await seeText(page, 'import-rev-changed', '2 changed');
      await seeText(page, 'import-rev-untouched', '4 unchanged');
      await seeText(page, 'import-change-FC-102', 'Capacity: 9,000 Btu/h → 12,000 Btu/h');
      await seeText(page, 'import-change-FC-201', 'Space: Imaging 201 → Imaging 203');
      await seeText(page, 'import-kind-2', 'as chosen for an earlier import of this job');
      await shot(page, 'schedule-import-revision-wide');
      await seeText(page, 'import-commit', 'Import: add 1, change 2 units');
      await page.getByTestId('import-commit').click();
      await page.getByTestId('import-done').waitFor();
      expect(await Unit.count({ where: { jobId: job.id } })).toBe(7);
      expect((await Unit.findOne({ where: { jobId: job.id, tag: 'FC-102' } }))!.capacity).toBeCloseTo(WATTS_PER_TON, 6);

      // Undo the last import: FC-203 goes, FC-102 and FC-201 are as they were, the new room goes.
      await page.getByTestId('import-history-0').filter({ hasText: 'birchfield-mech-schedule-rev-b.csv' }).waitFor();
      await page.getByTestId('import-undo-0').click();
      await seeText(page, 'import-undo-result', 'Import undone: 1 unit removed, 2 put back as they were.');
      await seeText(page, 'import-history-0', 'undone');
      expect((await Unit.findAll({ where: { jobId: job.id }, order: [['tag', 'ASC']] })).map((u) => u.tag)).toEqual([
        'FC-101',
        'FC-102',
        'FC-103',
        'FC-104',
        'FC-201',
        'FC-202',
      ]);
      expect((await Unit.findOne({ where: { jobId: job.id, tag: 'FC-102' } }))!.capacity).toBeCloseTo(0.75 * WATTS_PER_TON, 6);
      expect(await Space.count({ where: { jobId: job.id } })).toBe(6);
      expect(problems).toEqual([]);
    });
  });

  it('shows the created places and the revision diff on a phone', async () => {
    const job = await clinicJob();
    const { page, problems } = await h.newPage(PHONE);
    await explainFailure(page, 'schedule-import-phone', problems, async () => {
      await h.signIn(page, gcEmail, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${job.id}/setup/import`);
      await page.getByTestId('import-source').waitFor();
      await previewFirstSchedule(page);
      await shot(page, 'schedule-import-places-phone');
      await page.getByTestId('import-commit').click();
      await page.getByTestId('import-done').waitFor();
      await pickFile(page, 'import-file', csvFile(REVISED, 'rev-b.csv'));
      await page.getByTestId('import-preview-button').click();
      await page.getByTestId('import-places').waitFor();
      await page.getByTestId('import-create-places').click();
      await page.getByTestId('import-ready').waitFor();
      await seeText(page, 'import-rev-changed', '2 changed');
      await shot(page, 'schedule-import-revision-phone');
      expect(problems).toEqual([]);
    });
  });
});
