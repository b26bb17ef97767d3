/**
 * What the browser benchmarks share: signing in through the form, polling a page expression
 * (the app's CSP forbids the evaluated polling of waitForFunction), counting the outbox's kept
 * writes in IndexedDB, and noise photos (a flat colour would compress to nothing).
 */
import type { Page } from 'playwright-core';
import sharp from 'sharp';

/** The number of writes kept in the outbox's IndexedDB store (-1 when it cannot be read). */
export const OUTBOX_COUNT = `new Promise((resolve) => {
  const open = indexedDB.open('trimout-outbox');
  open.onerror = () => resolve(-1);
  open.onsuccess = () => {
    const d = open.result;
    if (!d.objectStoreNames.contains('writes')) { d.close(); return resolve(0); }
    const req = d.transaction('writes').objectStore('writes').count();
    req.onsuccess = () => { d.close(); resolve(req.result); };
    req.onerror = () => { d.close(); resolve(-1); };
  };
})`;

/** The server's refusals of the outbox's writes that need attention: "400 Choose ... (Finding on unit X)". */
export const OUTBOX_REFUSALS = `new Promise((resolve) => {
  const open = indexedDB.open('trimout-outbox');
  open.onerror = () => resolve([]);
  open.onsuccess = () => {
    const d = open.result;
    if (!d.objectStoreNames.contains('writes')) { d.close(); return resolve([]); }
    const req = d.transaction('writes').objectStore('writes').getAll();
    req.onsuccess = () => {
      d.close();
      resolve(req.result.filter((i) => i.state === 'attention').map((i) => (i.refusal ? i.refusal.status + ' ' + i.refusal.message + (i.refusal.fields ? ' ' + JSON.stringify(i.refusal.fields) : '') : 'refused') + ' (' + i.label + ')'));
    };
    req.onerror = () => { d.close(); resolve([]); };
  };
})`;

/** A JPEG of noise: every `step`th byte random, so its size and decoding cost are a real photo's. */
export function noisePhoto(seed: number, size: { width: number; height: number; step: number; quality: number }): Promise<Buffer> {
  const { width, height, step, quality } = size;
  const raw = Buffer.alloc(width * height * 3);
  let x = seed * 2654435761;
  for (let i = 0; i < raw.length; i += step) {
    x = (x * 1103515245 + 12345) >>> 0;
    raw[i] = x & 0xff;
  }
  return sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality }).toBuffer();
}

/** Polls a page expression from here until it is true; false when the time runs out. */
export async function until(page: Page, expression: string, timeoutMs: number, everyMs = 50): Promise<boolean> {
  const end = Date.now() + timeoutMs;
  while (Date.now() < end) {
    if (await page.evaluate<boolean>(expression)) return true;
    await new Promise((r) => setTimeout(r, everyMs));
  }
  return false;
}

export async function signIn(page: Page, baseUrl: string, email: string, password: string) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('job-list').waitFor();
}
