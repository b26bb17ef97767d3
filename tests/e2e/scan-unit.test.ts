/**
 * Scan a unit, on a phone (390×844): a unit label sheet is printed through the API, rendered with
 * pdftoppm, and its codes used two ways: the decoded address opened in the browser opens that
 * unit's check, and a photo of a label fed to the scanner's image input opens it too. A code of
 * another job, a removed unit's code and an image without a code each get one sentence and open
 * nothing; typing the tag still finds the unit. Screenshots go to TRIMOUT_ARTIFACTS/screenshots.
 */
import { execFile } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import jsQR from 'jsqr';
import QRCode from 'qrcode';
import sharp from 'sharp';
import type { Page } from 'playwright-core';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { LABEL_SHEET_DEFAULTS } from '../../shared/schemas/labels';
import { unitAddress } from '../../shared/rules/unitAddress';
import { PHONE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoLevel, type DemoLevel } from '../support/demo';

jest.setTimeout(240_000);

const run = promisify(execFile);
const DPI = 200;
const suffix = randomUUID().slice(0, 4).toUpperCase();
const tags = [`IU-S${suffix}-01`, `IU-S${suffix}-02`] as const;
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

let h: BrowserHarness;
let level: DemoLevel;
let tmp: string;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  level = await demoLevel(`Scan ${suffix}`, tags, { kind: 'cassette_4way' });
  tmp = await mkdtemp(path.join(os.tmpdir(), 'trimout-scan-'));
});
afterAll(async () => {
  await rm(tmp, { recursive: true, force: true });
  await h?.close();
});

/** The level's label sheet as the signed-in page's session prints it, each label cut out as a PNG file. */
async function printedLabels(page: Page): Promise<{ file: string; text: string | null }[]> {
  const res = await page.request.get(`${h.baseUrl}/api/jobs/${level.jobId}/labels.pdf?levelId=${level.levelId}`);
  expect(res.status()).toBe(200);
  await writeFile(path.join(tmp, 'sheet.pdf'), await res.body());
  await run('pdftoppm', ['-r', String(DPI), '-png', '-f', '1', '-l', '1', path.join(tmp, 'sheet.pdf'), path.join(tmp, 'sheet')]);
  const png = path.join(tmp, (await readdir(tmp)).find((f) => f.startsWith('sheet') && f.endsWith('.png'))!);
  const s = LABEL_SHEET_DEFAULTS.a4;
  const px = (mm: number) => Math.round((mm / 25.4) * DPI);
  const out: { file: string; text: string | null }[] = [];
  for (let i = 0; i < tags.length; i++) {
    const file = path.join(tmp, `label-${i}.png`);
    // A photo of the label: the cell with a white border around it, as a phone would frame it.
    await sharp(png)
      .extract({ left: px(s.left + i * (s.width + s.gapX)), top: px(s.top), width: px(s.width), height: px(s.height) })
      .extend({ top: 40, bottom: 40, left: 40, right: 40, background: '#ffffff' })
      .png()
      .toFile(file);
    const { data, info } = await sharp(file).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
    out.push({ file, text: jsQR(new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), info.width, info.height)?.data ?? null });
  }
  return out;
}

async function scanImage(page: Page, file: string) {
  await page.goto(`${h.baseUrl}/jobs/${level.jobId}/scan`);
  await page.getByTestId('scan-image').waitFor();
  await page.getByTestId('scan-image-input').setInputFiles(file);
}

describe('Scan a unit (phone)', () => {
  it('opens a unit by its printed address and by a photo of its label; refuses other codes with one sentence', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await h.signIn(page, inspector.email, DEMO_PASSWORD);
    const labels = await printedLabels(page);
    expect(labels.map((l) => l.text)).toEqual(level.unitIds.map((id) => unitAddress(h.baseUrl, level.jobId, id)));

    // The address from the label, opened as a phone's camera app would open it.
    await page.goto(labels[0]!.text!);
    await page.getByTestId('unit-check-tag').filter({ hasText: tags[0] }).first().waitFor();

    // The scanner: reached from the job's overview, fed a photo of the second label.
    await page.goto(`${h.baseUrl}/jobs/${level.jobId}`);
    await page.getByTestId('job-scan').click();
    await page.getByTestId('scan-screen').waitFor();
    await h.screenshot(page, 'scan-unit-01-phone');
    await page.getByTestId('scan-image-input').setInputFiles(labels[1]!.file);
    await page.getByTestId('unit-check-tag').filter({ hasText: tags[1] }).first().waitFor();
    expect(new URL(page.url()).pathname).toBe(`/jobs/${level.jobId}/units/${level.unitIds[1]}/check`);

    // Another job's label: a sentence, and the scan screen stays.
    const otherJob = path.join(tmp, 'other-job.png');
    await QRCode.toFile(otherJob, unitAddress(h.baseUrl, randomUUID(), randomUUID()), { margin: 4, width: 400 });
    await scanImage(page, otherJob);
    await page.getByTestId('scan-problem').filter({ hasText: 'another job' }).waitFor();
    expect(new URL(page.url()).pathname).toBe(`/jobs/${level.jobId}/scan`);

    // A code of this job naming a unit the server does not show (removed, or never there).
    const gone = path.join(tmp, 'gone.png');
    await QRCode.toFile(gone, unitAddress(h.baseUrl, level.jobId, randomUUID()), { margin: 4, width: 400 });
    await scanImage(page, gone);
    await page.getByTestId('scan-problem').filter({ hasText: 'not on this job' }).waitFor();
    await h.screenshot(page, 'scan-unit-02-not-on-job');
    expect(new URL(page.url()).pathname).toBe(`/jobs/${level.jobId}/scan`);

    // Some other QR code, and a photo with no code at all.
    const web = path.join(tmp, 'web.png');
    await QRCode.toFile(web, 'https://example.org/menu', { margin: 4, width: 400 });
    await scanImage(page, web);
    await page.getByTestId('scan-problem').filter({ hasText: 'not a Trimout unit label' }).waitFor();
    const blank = path.join(tmp, 'blank.png');
    await sharp({ create: { width: 300, height: 300, channels: 3, background: '#888888' } }).png().toFile(blank);
    await scanImage(page, blank);
    await page.getByTestId('scan-problem').filter({ hasText: 'No QR code' }).waitFor();

    // Typing the tag stays.
    await page.getByTestId('scan-tag-input').fill(tags[0].slice(-6));
    await page.getByTestId(`scan-tag-${tags[0]}`).click();
    await page.getByTestId('unit-check-tag').filter({ hasText: tags[0] }).first().waitFor();
    expect(problems).toEqual([]);
  });

  it('tells a subcontractor that unit checks are not theirs, and offers no scanner', async () => {
    const sub = DEMO_ACCOUNTS.find((a) => a.role === 'subcontractor')!;
    const { page } = await h.newPage(PHONE);
    await h.signIn(page, sub.email, DEMO_PASSWORD);
    await page.goto(`${h.baseUrl}/jobs/${level.jobId}/scan`);
    await page.getByTestId('scan-not-allowed').waitFor();
    expect(await page.getByTestId('scan-image').count()).toBe(0);
  });
});
