/**
 * Photos whenever needed, on a phone (390×844, touch): the inspector adds a photo to an open
 * finding; the mechanical subcontractor submits a fix with the new measurement (judged against
 * the finding's limit as it is typed) and a photo; the inspector re-inspects with their own photo
 * and measurement and closes it; the finding screen shows the fix photo and the re-inspection
 * photo side by side, labelled. Every control used is at least 44 by 44 px with an accessible
 * name. Screenshots go to TRIMOUT_ARTIFACTS/screenshots.
 */
import type { Locator, Page } from 'playwright-core';
import { pageHolds } from '../support/browser';
import { pickFile } from '../support/filePick';
import { fullPageShot as shot, jpegFile, phoneOnFinding, photoInspector as inspector, photoMechanical as mechanical, startPhotoHarness, type PhotoHarness } from '../support/photoFinding';

jest.setTimeout(240_000);

let ph: PhotoHarness;

beforeAll(async () => {
  ph = await startPhotoHarness();
});
afterAll(async () => {
  await ph?.close();
});

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
    const { label } = ph.finding;
    const insp = await phoneOnFinding(ph, inspector.email);
    const add = insp.page.getByTestId('finding-add-photos');
    await add.waitFor();
    expect(await insp.page.getByTestId('finding-photos').count()).toBe(0);
    await pickFile(insp.page, 'finding-add-photos-files', await jpegFile('lift.jpg', 176, 132, 74), 'finding-add-photos-photos-thumb-0');
    await expectTarget(insp.page.getByTestId('finding-add-photos-files'));
    await expectTarget(insp.page.getByTestId('finding-add-photos-submit'));
    await shot(insp.page, 'finding-photos-01-add-photo-phone');
    await insp.page.getByTestId('finding-add-photos-submit').tap();
    await insp.page.getByTestId('finding-add-photos-done').waitFor();
    await imagesLoaded(insp.page, 'finding-photos');
    expect(await text(insp.page, 'finding-history')).toContain('Photo added');
    await shot(insp.page, 'finding-photos-02-photo-added-phone');

    // 2. The subcontractor submits a fix with the new measurement and a photo.
    const sub = await phoneOnFinding(ph, mechanical.email);
    await sub.page.getByTestId('fix-form').waitFor();
    expect(await sub.page.getByTestId('finding-add-photos').count()).toBe(0);
    await sub.page.getByTestId('fix-form-note').fill('Moved the condensate pump lower on the rod.');
    // Sending without the measurement is stopped on the spot.
    await pickFile(sub.page, 'fix-form-files', await jpegFile('fixed.jpg', 70, 140, 90), 'fix-form-photos-thumb-0');
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
    await pickFile(insp.page, 'reinspect-files', await jpegFile('checked.jpg', 60, 90, 170), 'reinspect-photos-thumb-0');
    const accept = insp.page.getByRole('button', { name: `Accept fix — ${label}` });
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
