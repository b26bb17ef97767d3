/**
 * The markup editor on a phone (390x844, touch): the inspector adds a photo to an open finding,
 * enlarges it, opens "Mark up", drags a box and an arrow, places a label, undoes one mark and
 * saves; the server then holds the marks and the photo's address shows the flattened copy while
 * `?original=1` still gives the photo as taken. Screenshots go to TRIMOUT_ARTIFACTS/screenshots.
 */
import type { Locator, Page } from 'playwright-core';
import { pageHolds } from '../support/browser';
import { pickFile } from '../support/filePick';
import { fullPageShot as shot, jpegFile, phoneOnFinding, photoInspector, startPhotoHarness, type PhotoHarness } from '../support/photoFinding';

jest.setTimeout(240_000);

let ph: PhotoHarness;

beforeAll(async () => {
  ph = await startPhotoHarness();
});
afterAll(async () => {
  await ph?.close();
});

/** A drag with the pointer from one fraction of the element to another. */
async function drag(page: Page, el: Locator, from: [number, number], to: [number, number]) {
  const box = (await el.boundingBox())!;
  await page.mouse.move(box.x + from[0] * box.width, box.y + from[1] * box.height);
  await page.mouse.down();
  for (let i = 1; i <= 8; i++) {
    await page.mouse.move(box.x + (from[0] + ((to[0] - from[0]) * i) / 8) * box.width, box.y + (from[1] + ((to[1] - from[1]) * i) / 8) * box.height);
  }
  await page.mouse.up();
}

describe('marking up a photo on a phone', () => {
  it('draws marks over the photo, undoes one, saves them, and the photo then shows them', async () => {
    const { jobId, findingId } = ph.finding;
    const { page, problems } = await phoneOnFinding(ph, photoInspector.email);
    await pickFile(page, 'finding-add-photos-files', await jpegFile('lift.jpg', 176, 132, 74), 'finding-add-photos-photos-thumb-0');
    await page.getByTestId('finding-add-photos-submit').tap();
    await page.getByTestId('finding-add-photos-done').waitFor();

    await page.getByTestId('finding-photos-thumb-0').tap();
    await page.getByTestId('finding-photos-enlarged-markup').tap();
    const canvas = page.getByTestId('markup-canvas');
    await canvas.waitFor();
    await pageHolds(page, `(() => { const i = document.querySelector('[data-testid="markup-canvas"] img'); return !!i && i.complete && i.naturalWidth > 0; })()`, { timeout: 15_000 });

    await page.getByTestId('markup-tool-rect').tap();
    await page.getByTestId('markup-colour-yellow').tap();
    await drag(page, canvas, [0.2, 0.2], [0.5, 0.5]);
    await page.getByTestId('markup-tool-arrow').tap();
    await page.getByTestId('markup-colour-red').tap();
    await drag(page, canvas, [0.9, 0.9], [0.55, 0.55]);
    await page.getByTestId('markup-tool-freehand').tap();
    await drag(page, canvas, [0.1, 0.8], [0.4, 0.7]);
    await page.getByTestId('markup-undo').tap();
    await page.getByTestId('markup-tool-text').tap();
    await page.getByTestId('markup-colour-white').tap();
    await page.getByTestId('markup-label').fill('Lift too high');
    await drag(page, canvas, [0.1, 0.75], [0.1, 0.75]);
    await shot(page, 'photo-markup-01-editor-phone');

    await page.getByTestId('markup-save').tap();
    await page.getByTestId('markup').waitFor({ state: 'detached' });

    const finding = await (await page.request.get(`/api/jobs/${jobId}/findings/${findingId}`)).json();
    const saved = finding.photos.find((p: { stage: string }) => p.stage === 'finding');
    const marks = await (await page.request.get(`/api/photos/${saved.id}/marks`)).json();
    expect(marks.version).toBe(1);
    expect(marks.marks.map((m: { kind: string }) => m.kind)).toEqual(['rect', 'arrow', 'text']);
    expect(marks.marks[2]).toMatchObject({ text: 'Lift too high', colour: 'white' });
    const shown = await (await page.request.get(saved.url)).body();
    const original = await (await page.request.get(`${saved.url}?original=1`)).body();
    expect(shown.equals(original)).toBe(false);
    await page.getByTestId('finding-photos-thumb-0').tap();
    await page.getByTestId('finding-photos-enlarged').waitFor();
    await pageHolds(page, `(() => { const i = document.querySelector('[data-testid="finding-photos-enlarged"] img'); return !!i && i.complete && i.naturalWidth > 0 && i.src.includes('?m='); })()`, { timeout: 15_000 });
    await shot(page, 'photo-markup-02-flattened-phone');
    expect(problems).toEqual([]);
    await page.context().close();
  });
});
