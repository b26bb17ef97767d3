/**
 * The installed shell, in the browser at phone size: once the app has been opened online, its
 * service worker serves the app itself with no network, while the API is never answered from a
 * cache (the app shows its own no-connection state). A new deploy waits behind a "Reload" prompt
 * and leaves what the app keeps on the device (localStorage, IndexedDB) as it was.
 *
 * Runs on a copy of the web build, so a test can change sw.js the way a deploy does.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo';
import { pageHolds, PHONE, serviceWorkerControls, startBrowserHarness, type BrowserHarness } from '../support/browser';

jest.setTimeout(180_000);

let h: BrowserHarness;
let dist: string;
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

beforeAll(async () => {
  const built = process.env.WEB_DIST ?? path.resolve(__dirname, '..', '..', 'dist');
  if (!fs.existsSync(path.join(built, 'sw.js'))) throw new Error(`No service worker in ${built}: build the web app first.`);
  dist = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-offline-dist-'));
  fs.cpSync(built, dist, { recursive: true });
  // The harness reads WEB_DIST once, at its start; other test files keep theirs.
  const before = process.env.WEB_DIST;
  process.env.WEB_DIST = dist;
  try {
    h = await startBrowserHarness();
  } finally {
    if (before === undefined) delete process.env.WEB_DIST;
    else process.env.WEB_DIST = before;
  }
  await seedDemo(h.db);
});
afterAll(async () => {
  await h?.close();
  if (dist) fs.rmSync(dist, { recursive: true, force: true });
});

/** Waits until a service worker controls the page (it has installed, precached the shell and claimed it). */
async function controlled(page: Page): Promise<string> {
  await serviceWorkerControls(page);
  return page.evaluate<string>('navigator.serviceWorker.controller.scriptURL');
}

/** Whether a new worker has installed and waits to take over. */
const UPDATE_WAITING = 'navigator.serviceWorker.getRegistration().then((r) => Boolean(r && r.waiting))';

// Browser-side code is written as strings: the test code is compiled without the DOM library.
const STORE_ON_DEVICE = `(async () => {
  localStorage.setItem('trimout-test-draft', 'kept');
  await new Promise((resolve, reject) => {
    const open = indexedDB.open('trimout-test', 1);
    open.onupgradeneeded = () => open.result.createObjectStore('queue');
    open.onerror = () => reject(open.error);
    open.onsuccess = () => {
      const tx = open.result.transaction('queue', 'readwrite');
      tx.objectStore('queue').put({ kind: 'finding' }, 'item-1');
      tx.oncomplete = () => { open.result.close(); resolve(); };
      tx.onerror = () => reject(tx.error);
    };
  });
})()`;
const READ_FROM_DEVICE = `(async () => {
  const draft = localStorage.getItem('trimout-test-draft');
  const item = await new Promise((resolve, reject) => {
    const open = indexedDB.open('trimout-test', 1);
    open.onerror = () => reject(open.error);
    open.onsuccess = () => {
      const get = open.result.transaction('queue').objectStore('queue').get('item-1');
      get.onsuccess = () => { open.result.close(); resolve(get.result); };
      get.onerror = () => reject(get.error);
    };
  });
  return { draft, item };
})()`;

async function openJob(page: Page): Promise<string> {
  await page.getByText('Cinder Lane Commons', { exact: true }).click();
  await page.getByTestId('job-name').waitFor();
  return page.url();
}

it('opens with no network once opened online; API requests fail instead of coming from a cache', async () => {
  const { page, context, problems } = await h.newPage(PHONE);
  await page.goto(`${h.baseUrl}/sign-in`);
  // the head links what makes the app installable
  await expect(page.locator('link[rel="manifest"]').getAttribute('href')).resolves.toBe('/manifest.webmanifest');
  await expect(page.locator('link[rel="apple-touch-icon"]').getAttribute('href')).resolves.toBe('/apple-touch-icon.png');
  await expect(page.locator('meta[name="theme-color"]').getAttribute('content')).resolves.toBe('#1E3B34');

  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  const jobUrl = await openJob(page);
  expect(await controlled(page)).toBe(`${h.baseUrl}/sw.js`);
  // chromium's own verdict: the manifest parses and the app can be installed
  const cdp = await context.newCDPSession(page);
  const { errors: manifestErrors } = await cdp.send('Page.getAppManifest');
  expect(manifestErrors).toEqual([]);
  const { installabilityErrors } = await cdp.send('Page.getInstallabilityErrors');
  // A headless test profile counts as off the record; that is the browser's, not the app's.
  expect(installabilityErrors.filter((e) => e.errorId !== 'in-incognito')).toEqual([]);
  await cdp.detach();
  expect(problems).toEqual([]);

  // Offline. Every /api answer the page gets from here on is recorded with where it came from.
  await context.setOffline(true);
  const apiResponses: { path: string; fromServiceWorker: boolean }[] = [];
  const apiFailures: string[] = [];
  page.on('response', (res) => {
    const url = new URL(res.url());
    if (url.pathname.startsWith('/api/')) apiResponses.push({ path: url.pathname, fromServiceWorker: res.fromServiceWorker() });
  });
  page.on('requestfailed', (req) => {
    const url = new URL(req.url());
    if (url.pathname.startsWith('/api/')) apiFailures.push(url.pathname);
  });

  const navigation = await page.reload();
  // the page is the app, from the worker's cache, not chromium's offline error page
  expect(navigation?.fromServiceWorker()).toBe(true);
  expect(navigation?.status()).toBe(200);
  expect(new URL(page.url()).pathname).toBe(new URL(jobUrl).pathname);
  // no session kept on this phone: the app says there is no signal and that it opens by itself when it is back
  const offline = page.getByTestId('offline-start');
  await offline.waitFor();
  await expect(offline.textContent()).resolves.toMatch(/No signal.*No connection to Trimout.*opens by itself/s);
  // the session was asked of the network and failed; nothing of the API came from a cache
  expect(apiFailures).toContain('/api/session');
  expect(apiResponses).toEqual([]);
  // the fonts came from the cache too: the text is set in the app's own typeface
  await pageHolds(page, `[...document.fonts].some((f) => f.family.includes('AtkinsonHyperlegible_400Regular') && f.status === 'loaded')`);
  await h.screenshot(page, 'offline-shell-reloaded-phone');

  // An API address opened as a page is not answered with the app either: it fails like any request.
  await expect(page.goto(`${h.baseUrl}/api/session`)).rejects.toThrow(/ERR_INTERNET_DISCONNECTED/);

  // Back online, the job opens as before.
  await context.setOffline(false);
  await page.goto(jobUrl);
  await page.getByTestId('job-name').waitFor();
  await page.close();
});

it('a new deploy waits behind "A new version is ready — Reload", and reloading keeps what the app stored on the device', async () => {
  const { page, problems } = await h.newPage(PHONE);
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  await openJob(page);
  await controlled(page);
  // What later work keeps on the device: a draft in localStorage, a queued item in IndexedDB.
  await page.evaluate(STORE_ON_DEVICE);

  // A deploy: the worker script changes on the server; the app looks for it when it comes back to the front.
  fs.appendFileSync(path.join(dist, 'sw.js'), `\n// deploy ${Date.now()}\n`);
  await page.evaluate(`document.dispatchEvent(new Event('visibilitychange'))`);
  const prompt = page.getByTestId('update-prompt');
  await prompt.waitFor();
  await expect(prompt.textContent()).resolves.toContain('A new version is ready.');
  await expect(page.evaluate(UPDATE_WAITING)).resolves.toBe(true);
  await h.screenshot(page, 'offline-shell-update-prompt-phone');

  // Reload: the waiting worker takes over and the page loads once under it.
  const reloaded = page.waitForEvent('load');
  await page.getByTestId('update-reload').click();
  await reloaded;
  await page.getByTestId('job-name').waitFor();
  await expect(page.getByTestId('update-prompt').count()).resolves.toBe(0);
  await expect(page.evaluate(UPDATE_WAITING)).resolves.toBe(false);

  // Nothing the app kept on the device was cleared by the update.
  const kept = await page.evaluate(READ_FROM_DEVICE);
  expect(kept).toEqual({ draft: 'kept', item: { kind: 'finding' } });
  expect(problems).toEqual([]);
  await page.close();
});
