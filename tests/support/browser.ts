/**
 * Browser tests: the real server (API + exported web app from dist/) on a free port, and
 * Debian's chromium driven by playwright-core. Screenshots go to .artifacts/screenshots
 * (git-ignored) to be looked at.
 */
import fs from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import type { AppOptions, TrimoutApp } from '../../server/app';
import type { Database } from '../../server/db';
import { buildTestApp, testEnv } from './app';
import { connectTestDb } from './db';
import { testMailService, type FakeSmtp } from './mail';
import { waitFor, type WaitOptions } from './wait';
import { startFakeS3 } from './storage';

export const PHONE = { width: 390, height: 844 } as const;
export const WIDE = { width: 1280, height: 800 } as const;

export const artifactsDir = process.env.TRIMOUT_ARTIFACTS ?? path.resolve(__dirname, '..', '..', '.artifacts');
export const screenshotsDir = path.join(artifactsDir, 'screenshots');

export interface BrowserHarness {
  db: Database;
  trimout: TrimoutApp;
  baseUrl: string;
  newPage(viewport: { width: number; height: number }): Promise<{ page: Page; context: BrowserContext; problems: string[] }>;
  screenshot(page: Page, name: string): Promise<void>;
  /** Signs in through the sign-in form and waits for `landing` (a testID; the job list by default). */
  signIn(page: Page, email: string, password: string, landing?: string): Promise<void>;
  close(): Promise<void>;
}

/**
 * `appOptions` go to the test app; `smtp`: a test's own fake SMTP server, which the app's mail
 * goes to (its links are built on this harness's address, as PUBLIC_URL would in production);
 * `bypassCSP`: the browser ignores the app's Content Security Policy, so a test can inject a script
 * of its own (the accessibility engine). Tests only; every other test keeps the real policy.
 */
export async function startBrowserHarness(options: Partial<AppOptions> & { smtp?: FakeSmtp; bypassCSP?: boolean } = {}): Promise<BrowserHarness> {
  const { smtp, bypassCSP = false, ...appOptions } = options;
  const dist = process.env.WEB_DIST ?? path.resolve(__dirname, '..', '..', 'dist');
  if (!fs.existsSync(path.join(dist, 'index.html'))) throw new Error(`No web build in ${dist}: run \`npm test\`, which builds it.`);
  const db = await connectTestDb();
  // Server errors are printed (with the request's failure in the page's `problems`), so a 500 in
  // a browser test says what failed instead of only "status of 500" in the console.
  const serverErrors: string[] = [];
  const log = (message: string, err?: unknown) => {
    const line = `server: ${message}${err ? `: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}` : ''}`;
    serverErrors.push(line);
    console.error(line);
  };
  // Photos always have a store: the test's own, or a local S3 fake for this harness (a demo
  // finding may carry a photo another test stored elsewhere: that answers 404, not an outage).
  const ownS3 = appOptions.objectStore ? null : await startFakeS3();
  // Listen first: the app's public URL (links in mails) is this server's address.
  const server: Server = await new Promise((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => resolve(s));
  });
  const baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const env = testEnv({ WEB_DIST: dist, PUBLIC_URL: baseUrl });
  const trimout = buildTestApp(db, {
    env,
    log,
    ...(ownS3 ? { objectStore: ownS3.store } : {}),
    ...(smtp ? { mail: testMailService(smtp, { env }) } : {}),
    ...appOptions,
  });
  server.on('request', trimout.app);
  const userDataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-chromium-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    bypassCSP,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const browser = context.browser();
  fs.mkdirSync(screenshotsDir, { recursive: true });
  const contexts: BrowserContext[] = [];

  return {
    db,
    trimout,
    baseUrl,
    async newPage(viewport) {
      // A fresh, isolated context per page: its own cookies. Persistent contexts cannot
      // spawn siblings, so pages share `context` only when no browser object exists.
      const ctx = browser ? await browser.newContext({ viewport, baseURL: baseUrl, bypassCSP }) : context;
      if (browser) contexts.push(ctx);
      else await ctx.clearCookies();
      const page = await ctx.newPage();
      if (!browser) await page.setViewportSize(viewport);
      const problems: string[] = [];
      page.on('console', (msg) => {
        const text = msg.text();
        if (msg.type() === 'error' && !/Failed to load resource: the server responded with a status of 40[14]/.test(text)) {
          problems.push(`console: ${text}`);
        }
      });
      page.on('pageerror', (err) => problems.push(`page error: ${err.message}`));
      page.on('response', (res) => {
        if (res.status() >= 500) problems.push(`HTTP ${res.status()} ${res.request().method()} ${new URL(res.url()).pathname}${serverErrors.length ? ` (${serverErrors.at(-1)})` : ''}`);
      });
      return { page, context: ctx, problems };
    },
    async signIn(page, email, password, landing = 'job-list') {
      await page.goto(`${baseUrl}/sign-in`);
      await page.getByTestId('sign-in-email').fill(email);
      await page.getByTestId('sign-in-password').fill(password);
      await page.getByTestId('sign-in-submit').click();
      await page.getByTestId(landing).waitFor();
    },
    async screenshot(page, name) {
      await page.screenshot({ path: path.join(screenshotsDir, `${name}.png`), fullPage: true });
    },
    async close() {
      for (const ctx of contexts) await ctx.close().catch(() => undefined);
      await context.close();
      fs.rmSync(userDataDir, { recursive: true, force: true });
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      await trimout.close();
      await db.close();
      await ownS3?.close();
    },
  };
}

/**
 * Waits until a browser-side expression (a string: the test code is compiled without the DOM
 * library) is truthy, polling with `page.evaluate`. Not `page.waitForFunction`: that evaluates its
 * predicate with the page's own `eval`, which the app's Content Security Policy (script-src 'self')
 * refuses. A page that is navigating between two polls is polled again, not failed.
 */
export async function pageHolds(page: Page, expression: string, options: WaitOptions = {}): Promise<void> {
  await waitFor(
    async () => {
      try {
        return Boolean(await page.evaluate(expression));
      } catch (error) {
        if (/Execution context was destroyed|navigat/i.test(String(error))) return false;
        throw error;
      }
    },
    { timeout: 30_000, interval: 100, ...options, what: options.what ?? expression.slice(0, 120) },
  );
}

/**
 * Waits until a service worker controls the page (the shell is then served with no network).
 *
 * `ready` resolves once the worker is active (it has precached the whole shell, about 3 MB: slow
 * on a busy 2-core machine). Its `clients.claim()` then takes every open page, except a page whose
 * document was still loading at that moment: the Service Workers spec's Clients.claim() skips a
 * client whose execution ready flag is unset, and nothing claims it later. A page loaded while the
 * worker activated can stay uncontrolled for good; its next load is controlled (the worker is
 * active), so such a page is reloaded once, as a person reopening the app would.
 */
export async function serviceWorkerControls(page: Page): Promise<void> {
  await page.evaluate('navigator.serviceWorker.ready.then(() => undefined)');
  const controlled = 'navigator.serviceWorker.controller !== null';
  try {
    await pageHolds(page, controlled, { what: 'a service worker to control the page', timeout: 15_000 });
  } catch {
    await page.reload();
    await pageHolds(page, controlled, { what: 'a service worker to control the page after a reload', timeout: 30_000 });
  }
}
