/**
 * Local save of a finding with 2 photos, on a phone-sized page in headless chromium with the CPU
 * slowed 4x through the DevTools protocol (Emulation.setCPUThrottlingRate), the network off so
 * the write stays queued on the device.
 *
 * Two figures per run, both measured inside the page (performance.now()):
 * - prepare: the 2 photos picked (4000×3000 JPEGs) until both are downscaled on the device and
 *   shown in the form (components/photos: decode, 2560 px, JPEG, room check);
 * - save: the tap on "Log finding" until the queued record is in IndexedDB (the outbox's database
 *   `trimout-outbox`, store `writes`): the outbox sets a User Timing mark (KEPT_MARK) the moment
 *   its write transaction completes, read from the page afterwards (no polling on the page while
 *   it saves: a poll opening IndexedDB every few ms on a slowed CPU held the save back itself).
 *   The record is then counted in IndexedDB to check it is there.
 * Each run opens the form online (its lists load), then cuts the network; between runs the
 * network comes back and the queue sends itself.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium } from 'playwright-core';
import { KEPT_MARK } from '../../components/outbox/marks';
import { stats, type Stats } from './benchHttp';
import { noisePhoto, OUTBOX_COUNT, signIn, until } from './benchPage';

export const CPU_SLOWDOWN = 4;

export interface LocalSaveResult {
  runs: number;
  cpuSlowdown: number;
  prepare: Stats;
  save: Stats;
}


function photo(seed: number): Promise<Buffer> {
  // Noise, not a flat colour: a real photo's JPEG is several MB and takes a phone real work to decode.
  return noisePhoto(seed, { width: 4000, height: 3000, step: 97, quality: 85 });
}



export async function localSaveBench(options: {
  baseUrl: string;
  email: string;
  password: string;
  jobId: string;
  unitId: string;
  runs?: number;
}): Promise<LocalSaveResult> {
  const runs = options.runs ?? 10;
  const photos = [await photo(1), await photo(2)];
  const userDataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-bench-save-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    viewport: { width: 390, height: 844 },
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  const prepare: number[] = [];
  const save: number[] = [];
  try {
    const page = await context.newPage();
    page.on('dialog', (d) => void d.accept());
    await signIn(page, options.baseUrl, options.email, options.password);
    const cdp = await context.newCDPSession(page);
    for (let run = 0; run < runs; run++) {
      await context.setOffline(false);
      await until(page, `${OUTBOX_COUNT}.then((n) => n === 0)`, 60_000, 250);
      await cdp.send('Emulation.setCPUThrottlingRate', { rate: 1 });
      await page.goto(`${options.baseUrl}/jobs/${options.jobId}/findings/new?unitId=${options.unitId}`);
      await page.getByTestId('finding-form').waitFor();
      const values = await page.getByTestId('finding-form-item').locator('option').evaluateAll((os) => os.map((o) => (o as unknown as { value: string }).value).filter(Boolean));
      await page.getByTestId('finding-form-item').selectOption(values[run % values.length]!);
      await page.getByTestId('finding-form-note').fill(`Bench local save ${run + 1}`);
      await context.setOffline(true);
      await cdp.send('Emulation.setCPUThrottlingRate', { rate: CPU_SLOWDOWN });

      // prepare: pick → both photos downscaled and shown
      await page.evaluate(`(() => {
        window.__benchPick = null;
        const input = document.querySelector('[data-testid="finding-form-files-input"]');
        input.addEventListener('change', () => { window.__benchPick = performance.now(); }, { capture: true, once: true });
      })()`);
      await page.getByTestId('finding-form-files-input').setInputFiles(photos.map((buffer, i) => ({ name: `bench-${i + 1}.jpg`, mimeType: 'image/jpeg', buffer })));
      await page.getByTestId('finding-form-photos-thumb-1').waitFor({ timeout: 120_000 });
      prepare.push(await page.evaluate<number>('performance.now() - window.__benchPick'));

      // save: tap → the queued record is on the device
      const before = await page.evaluate<number>(OUTBOX_COUNT);
      await page.evaluate(`(() => {
        window.__benchTapped = null;
        performance.clearMarks(${JSON.stringify(KEPT_MARK)});
        const button = document.querySelector('[data-testid="finding-form-submit"]');
        button.addEventListener('click', () => { window.__benchTapped = performance.now(); }, { capture: true, once: true });
      })()`);
      await page.getByTestId('finding-form-submit').tap().catch(() => page.getByTestId('finding-form-submit').click());
      const kept = `performance.getEntriesByName(${JSON.stringify(KEPT_MARK)}).filter((m) => window.__benchTapped !== null && m.startTime >= window.__benchTapped)`;
      if (!(await until(page, `${kept}.length > 0`, 120_000))) throw new Error('The finding was not kept on the device.');
      if ((await page.evaluate<number>(OUTBOX_COUNT)) !== before + 1) throw new Error('The kept finding is not in IndexedDB.');
      save.push(await page.evaluate<number>(`${kept}[0].startTime - window.__benchTapped`));
    }
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: 1 });
    await context.setOffline(false);
    await until(page, `${OUTBOX_COUNT}.then((n) => n === 0)`, 120_000, 250);
  } finally {
    await context.close();
    fs.rmSync(userDataDir, { recursive: true, force: true });
  }
  return { runs, cpuSlowdown: CPU_SLOWDOWN, prepare: stats(prepare), save: stats(save) };
}
