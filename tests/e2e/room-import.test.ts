/**
 * A GC manager on a phone imports the architect's room schedule on the Spaces screen: UTF-8 with a
 * byte-order mark, CRLF line ends, a "Floor area (ft²)" header over bare numbers, a level the job
 * does not have yet and a room it has (its height changes). The preview says what will happen; the
 * apply button says it again; the spaces then show their areas. On a wide screen the same screen
 * with a file whose lines have problems: listed with their lines, and nothing is saved.
 */
import type { Page } from 'playwright-core';
import { QueryTypes } from 'sequelize';
import { Space } from '../../server/models';
import { addMember, buildCompany, buildJob, buildLevel, buildSpace, buildUser, TEST_PASSWORD } from '../support/factories';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { csvFile, pickFile } from '../support/filePick';

jest.setTimeout(240_000);

let h: BrowserHarness;
let gcEmail: string;
let gcId: string;
let gcCompanyId: string;

beforeAll(async () => {
  h = await startBrowserHarness();
  const gc = await buildCompany({ name: 'Larchmont Builders (test)' });
  const manager = await buildUser({ companyId: gc.id, name: 'Priya Castellanos' });
  gcEmail = manager.email;
  gcId = manager.id;
  gcCompanyId = gc.id;
});
afterAll(async () => {
  await h?.close();
});

/** A job with Level 1 and its Lobby (8 ft ceiling); the schedule adds Level 2. */
async function clinicJob() {
  const job = await buildJob({ name: 'Alder Creek Clinic (test)', ownerCompanyId: gcCompanyId });
  await addMember(job.id, gcId, 'gc_manager');
  const l1 = await buildLevel(job.id, { name: 'Level 1' });
  await buildSpace(job.id, l1.id, { name: 'Lobby', floorArea: 40, ceilingHeight: 2438.4 });
  return job;
}

const ROOMS = [
  'Floor,Room No.,Floor area (ft²),Clg ht',
  'Level 1,Lobby,,9\' 0"',
  'Level 1,Exam 101,120,9\' 0"',
  'Level 1,Exam 102,"1,050",9\' 0"',
  'Level 2,Office 201,180,2700 mm',
  'Level 2,Store 202,64,',
];

async function shot(page: Page, name: string) {
  await page.waitForLoadState('networkidle');
  const size = page.viewportSize()!;
  const content = await page.evaluate<number>(
    `Math.max(...Array.from(document.querySelectorAll('div')).filter((d) => d.scrollHeight > d.clientHeight + 1 && getComputedStyle(d).overflowY !== 'visible').map((d) => d.scrollHeight - d.clientHeight), 0)`,
  );
  if (content > 0) await page.setViewportSize({ width: size.width, height: Math.min(size.height + content, 8000) });
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

async function spacesOf(jobId: string) {
  return Space.sequelize!.query<{ level: string; position: number; space: string; area: number | null; height: number | null }>(
    `SELECT l.name AS level, l.position, s.name AS space, round(s.floor_area::numeric, 3)::float AS area, s.ceiling_height AS height
       FROM spaces s JOIN levels l ON l.id = s.level_id WHERE s.job_id = $1 ORDER BY l.position, s.name`,
    { bind: [jobId], type: QueryTypes.SELECT },
  );
}

describe('importing a room schedule', () => {
  it('on a phone: the preview of a new level, new spaces and a changed height, then applied; the spaces show their areas', async () => {
    const job = await clinicJob();
    const { page, problems } = await h.newPage(PHONE);
    await explainFailure(page, 'room-import-phone', problems, async () => {
      await h.signIn(page, gcEmail, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${job.id}/setup/spaces`);
      await page.getByTestId('room-import').waitFor();
      await pickFile(page, 'room-import-file', csvFile(ROOMS, 'alder-creek-rooms.csv'), 'room-import-file-name');
      await seeText(page, 'room-import-file-name', 'alder-creek-rooms.csv');
      // Every column is read from its header: said in one line, no choices on the phone's screen.
      await seeText(page, 'room-import-columns-read', '5 rooms; columns read from the headers: Floor → level, Room No. → room (number or name), Floor area (ft²) → floor area, Clg ht → ceiling height.');
      expect(await page.getByTestId('room-import-map-0').count()).toBe(0);
      await page.getByTestId('room-import-preview').click();
      await page.getByTestId('room-import-preview-result').waitFor();
      await seeText(page, 'room-import-new-levels', 'Level 2 (added after the job');
      await seeText(page, 'room-import-created', '4 new spaces');
      await seeText(page, 'room-import-created', `Level 1 · Exam 101: area 120 ft², ceiling 9' 0"`);
      await seeText(page, 'room-import-created', 'Level 1 · Exam 102: area 1,050 ft²');
      await seeText(page, 'room-import-changed', `Level 1 · Lobby: ceiling 8' 0" → 9' 0"`);
      await seeText(page, 'room-import-apply', 'Create 1 level and 4 spaces, update 1');
      expect(await spacesOf(job.id)).toHaveLength(1);
      await shot(page, 'room-import-preview-phone');

      await page.getByTestId('room-import-apply').click();
      await seeText(page, 'room-import-done', 'Created 1 level and 4 spaces, updated 1.');
      expect(await spacesOf(job.id)).toEqual([
        { level: 'Level 1', position: 1, space: 'Exam 101', area: 11.148, height: 2743.2 },
        { level: 'Level 1', position: 1, space: 'Exam 102', area: 97.548, height: 2743.2 },
        { level: 'Level 1', position: 1, space: 'Lobby', area: 40, height: 2743.2 },
        { level: 'Level 2', position: 2, space: 'Office 201', area: 16.723, height: 2700 },
        { level: 'Level 2', position: 2, space: 'Store 202', area: 5.946, height: null },
      ]);
      // The list refreshes: Level 1's rooms with their areas, then Level 2's.
      await seeText(page, 'space-row-Exam 101', 'Floor area 120 ft²');
      await page.getByTestId('spaces-level').selectOption({ label: '2. Level 2' });
      await seeText(page, 'space-row-Office 201', 'Floor area 180 ft²');
      await seeText(page, 'space-row-Store 202', 'Ceiling not set');
      await shot(page, 'room-import-done-phone');
    });
    expect(problems).toEqual([]);
  });

  it('on a wide screen: lines with problems are listed with their lines, there is no apply, and nothing is saved', async () => {
    const job = await clinicJob();
    const { page, problems } = await h.newPage(WIDE);
    await explainFailure(page, 'room-import-wide', problems, async () => {
      await h.signIn(page, gcEmail, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${job.id}/setup/spaces`);
      await page.getByTestId('room-import').waitFor();
      const bad = [...ROOMS, 'Level 2,office 201,90,', 'Level 3,Plant 301,lots,'];
      await pickFile(page, 'room-import-file', csvFile(bad, 'alder-creek-rooms-draft.csv'));
      await page.getByTestId('room-import-change-columns').click();
      expect(await page.getByTestId('room-import-map-2').inputValue()).toBe('area');
      expect(await page.getByTestId('room-import-map-3').inputValue()).toBe('height');
      await page.getByTestId('room-import-preview').click();
      await page.getByTestId('room-import-problems').waitFor();
      await seeText(page, 'room-import-problems', '2 lines have problems: fix the file and preview again');
      await seeText(page, 'room-import-problem-rows.5.space', 'Line 7, Room: "office 201" on Level 2 is also on line 5.');
      await seeText(page, 'room-import-problem-rows.6.area', 'Line 8, Floor area:');
      expect(await page.getByTestId('room-import-apply').count()).toBe(0);
      await shot(page, 'room-import-problems-wide');
      expect(await spacesOf(job.id)).toHaveLength(1);
    });
    expect(problems).toEqual([]);
  });
});
