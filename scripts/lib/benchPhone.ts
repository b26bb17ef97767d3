/**
 * The app on a phone: headless chromium at a phone viewport, the CPU slowed 4x
 * (Emulation.setCPUThrottlingRate) and the network slowed to a weak mobile signal (150 ms round
 * trip, 1.6 Mbit/s down and up: Network.emulateNetworkConditions), both through the DevTools
 * protocol on the page.
 *
 * 1. Time until a screen is usable, from the navigation's start (performance.now() in the page,
 *    recorded by a MutationObserver the bench injects before the app's own scripts run):
 *    - the level walk (/jobs/:jobId/levels/:levelId/walk): the first unit's row, the link the
 *      inspector taps first, is in the page and visible;
 *    - the finding form (/jobs/:jobId/findings/new?levelId=...): its first input, the defect type
 *      <select>, is visible and enabled.
 *    Cold: a new browser context (empty HTTP cache, no service worker, no kept query cache) with
 *    only the session cookie. Warm: a second page in the same context once the service worker
 *    controls it (the app shell precached, scripts/lib/pwa.ts), as when the app is opened again.
 * 2. The JavaScript each load needed until it was usable: the script responses' transfer over
 *    the network (encodedDataLength from Network.loadingFinished: gzip body plus headers; 0 for
 *    what the service worker or the HTTP cache answered), and their size uncompressed (each
 *    script address fetched once without gzip).
 * 3. Photo bytes: a 12-megapixel noise JPEG (4000×3000) picked through the finding form's file
 *    input with the network off, so the form's own downscale (components/photos) runs and the
 *    finding waits in the outbox; the photo's bytes are read from the queued record in IndexedDB
 *    (exactly what the upload carries), then the network comes back (still slowed) and the time
 *    until the outbox is empty is the upload of the finding with its photo over the weak link.
 *
 * The service worker's own fetches (precaching the shell after the first load) run in the worker,
 * which the page's network conditions do not slow: they compete with the page only for the CPU.
 */
import fs from 'node:fs';
import os from 'node:os';
import { chromium, type Browser, type BrowserContext, type CDPSession, type Page } from 'playwright-core';
import { noisePhoto, OUTBOX_COUNT, until } from './benchPage';

export const PHONE = {
  viewport: { width: 390, height: 844 },
  cpuSlowdown: 4,
  /** Round trip added to every request, ms. */
  latencyMs: 150,
  /** Down and up, kbit/s. */
  downKbps: 1600,
  upKbps: 1600,
} as const;

export const TARGETS = { coldMs: 3000, warmMs: 1000 } as const;

/** The first thing the user taps on each screen (a CSS selector on the web build's data-testid). */
export const USABLE = {
  walk: '[data-testid="level-walk-units"] a[href], [data-testid="level-walk-units"] [role="link"]',
  form: '[data-testid="finding-form-item"]',
} as const;

export interface Spread {
  runs: number[];
  median: number;
  max: number;
}

export interface ScriptBytes {
  /** Script responses the load used. */
  files: number;
  /** How many of them came over the network (not the service worker or the HTTP cache). */
  fromNetwork: number;
  /** Bytes over the network: gzip bodies plus headers. */
  transferBytes: number;
  /** The same scripts uncompressed. */
  rawBytes: number;
}

/** Where a load's time went, ms from the navigation's start (medians over the runs). */
export interface Phases {
  /** The last script in (downloaded, or answered by the service worker). */
  scriptsMs: number;
  /** The app's first API request: the scripts have run far enough to ask for data. */
  firstApiMs: number;
  /** The last API answer before the screen was usable. */
  apiDoneMs: number;
}

/** One resource timing entry: [address, initiator type, start, response end]. */
export type ResourceEntry = [string, string, number, number];

export interface ScreenFigures {
  screen: 'walk' | 'form';
  label: string;
  path: string;
  /** What "usable" waits for. */
  usableWhen: string;
  cold: Spread;
  warm: Spread;
  jsCold: ScriptBytes;
  jsWarm: ScriptBytes;
  coldPhases: Phases;
  warmPhases: Phases;
}

export interface PhotoFigures {
  width: number;
  height: number;
  /** The picked JPEG. */
  pickedBytes: number;
  /** The photo in the queued upload, after the form's downscale. */
  uploadBytes: number;
  /** Pick until the thumbnail shows (decode, downscale, encode) at the slowed CPU. */
  prepareMs: number;
  /** Back online until the outbox is empty: the finding and its photo sent over the slow link. */
  uploadMs: number;
}

export interface PhoneFigures {
  conditions: typeof PHONE;
  targets: typeof TARGETS;
  runs: number;
  screens: ScreenFigures[];
  photo: PhotoFigures | null;
  /** Why the photo measure has no figures (it failed; the screens still count). */
  photoError?: string;
  /** How busy the machine was: the 1-minute load average at the start and the end, and its cores. */
  machine: { loadStart: number; loadEnd: number; cores: number };
}

// ---------------------------------------------------------------------------------------------
// Figures (pure)
// ---------------------------------------------------------------------------------------------

export function median(values: readonly number[]): number {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}

export function spread(values: readonly number[]): Spread {
  return { runs: [...values], median: median(values), max: values.length ? Math.max(...values) : NaN };
}

/** KiB with one decimal, as printed. */
export function kib(bytes: number): string {
  return Number.isFinite(bytes) ? (bytes / 1024).toFixed(1) : '-';
}

/** Met when every run was under the target; "median only" when the median was and the slowest run was not. */
export function verdict(s: Spread, targetMs: number): 'met' | 'median only' | 'not met' {
  if (s.runs.length === 0 || !(s.median < targetMs)) return 'not met';
  return s.max < targetMs ? 'met' : 'median only';
}

/** Seconds to move `bytes` at `kbps` kbit/s (no latency, no overhead). */
export function secondsAt(bytes: number, kbps: number): number {
  return (bytes * 8) / (kbps * 1000);
}

/** One response as the DevTools protocol reported it. */
export interface ScriptResponse {
  url: string;
  type: string;
  mimeType: string;
  fromServiceWorker: boolean;
  fromCache: boolean;
  /** From Network.loadingFinished; null while it has not finished. */
  encodedDataLength: number | null;
}

export function isScript(r: Pick<ScriptResponse, 'type' | 'mimeType'>): boolean {
  return r.type === 'Script' || /javascript|ecmascript/i.test(r.mimeType);
}

/** The scripts of one load: what came over the network, and their uncompressed size by address. */
export function tallyScripts(responses: readonly ScriptResponse[], rawSizeOf: (url: string) => number): ScriptBytes {
  const scripts = responses.filter((r) => isScript(r) && r.encodedDataLength !== null);
  const network = scripts.filter((r) => !r.fromServiceWorker && !r.fromCache);
  return {
    files: scripts.length,
    fromNetwork: network.length,
    transferBytes: network.reduce((sum, r) => sum + (r.encodedDataLength ?? 0), 0),
    rawBytes: scripts.reduce((sum, r) => sum + rawSizeOf(r.url), 0),
  };
}

/** The run whose transfer is the median's (the JS a load needs hardly varies between runs). */
export function medianScripts(loads: readonly ScriptBytes[]): ScriptBytes {
  if (loads.length === 0) return { files: 0, fromNetwork: 0, transferBytes: NaN, rawBytes: NaN };
  const sorted = [...loads].sort((a, b) => a.transferBytes - b.transferBytes);
  return sorted[(sorted.length - 1) >> 1]!;
}

/** The phases of one load from its resource timing entries, counting only what ended before it was usable. */
export function phasesOf(entries: readonly ResourceEntry[], usableMs: number): Phases {
  const done = entries.filter(([, , , end]) => end <= usableMs);
  const scripts = done.filter(([name, type]) => type === 'script' || /\.m?js(\?|$)/.test(new URL(name).pathname));
  const api = done.filter(([name]) => new URL(name).pathname.startsWith('/api/'));
  return {
    scriptsMs: scripts.length ? Math.max(...scripts.map((e) => e[3])) : NaN,
    firstApiMs: api.length ? Math.min(...api.map((e) => e[2])) : NaN,
    apiDoneMs: api.length ? Math.max(...api.map((e) => e[3])) : NaN,
  };
}

export function medianPhases(loads: readonly Phases[]): Phases {
  return {
    scriptsMs: median(loads.map((p) => p.scriptsMs)),
    firstApiMs: median(loads.map((p) => p.firstApiMs)),
    apiDoneMs: median(loads.map((p) => p.apiDoneMs)),
  };
}

const ms = (n: number) => (Number.isFinite(n) ? `${Math.round(n).toLocaleString('en-US')} ms` : '-');
const VERDICT = { met: 'met', 'median only': 'met at the median, NOT by the slowest run', 'not met': 'NOT met' } as const;
const said = (s: Spread, target: number) => `${VERDICT[verdict(s, target)]} (target < ${target.toLocaleString('en-US')} ms)`;

export function formatPhone(f: PhoneFigures): string {
  const c = f.conditions;
  const lines = [
    `Phone (${c.viewport.width}×${c.viewport.height}, CPU ${c.cpuSlowdown}x slower, ${c.latencyMs} ms round trip, ${(c.downKbps / 1000).toFixed(1)} Mbit/s down and up, through the DevTools protocol; ${f.runs} runs; ` +
      `load average ${f.machine.loadStart.toFixed(1)} at the start, ${f.machine.loadEnd.toFixed(1)} at the end, on ${f.machine.cores} cores):`,
  ];
  for (const s of f.screens) {
    lines.push(`  ${s.label} usable (${s.usableWhen}):`);
    lines.push(`    cold: median ${ms(s.cold.median)}, max ${ms(s.cold.max)} [${s.cold.runs.map((n) => Math.round(n)).join(', ')}] ${said(s.cold, f.targets.coldMs)}`);
    lines.push(`    warm: median ${ms(s.warm.median)}, max ${ms(s.warm.max)} [${s.warm.runs.map((n) => Math.round(n)).join(', ')}] ${said(s.warm, f.targets.warmMs)}`);
    const phases = (p: Phases) => `scripts in at ${ms(p.scriptsMs)}, first API request at ${ms(p.firstApiMs)}, last API answer at ${ms(p.apiDoneMs)}`;
    lines.push(`    where the time went (medians): cold ${phases(s.coldPhases)}; warm ${phases(s.warmPhases)}`);
    lines.push(
      `    JavaScript: cold ${s.jsCold.files} file(s), ${kib(s.jsCold.transferBytes)} KiB compressed over the network (brotli or gzip), ${kib(s.jsCold.rawBytes)} KiB raw; ` +
        `warm ${kib(s.jsWarm.transferBytes)} KiB over the network (${s.jsWarm.fromNetwork} of ${s.jsWarm.files} file(s))`,
    );
  }
  if (f.photo) {
    const p = f.photo;
    lines.push(
      `  Photo ${p.width}×${p.height} (${((p.width * p.height) / 1e6).toFixed(0)} MP noise JPEG): picked ${kib(p.pickedBytes)} KiB, uploaded ${kib(p.uploadBytes)} KiB after the form's downscale ` +
        `(${((p.uploadBytes / p.pickedBytes) * 100).toFixed(0)} %); at ${(c.upKbps / 1000).toFixed(1)} Mbit/s that is ${secondsAt(p.uploadBytes, c.upKbps).toFixed(1)} s instead of ${secondsAt(p.pickedBytes, c.upKbps).toFixed(1)} s`,
    );
    lines.push(`    downscale on the phone ${ms(p.prepareMs)}; the finding with its photo sent from the outbox over the slow link in ${ms(p.uploadMs)}`);
  } else if (f.photoError) {
    lines.push(`  Photo: not measured (${f.photoError})`);
  }
  return lines.join('\n');
}

// ---------------------------------------------------------------------------------------------
// The browser side
// ---------------------------------------------------------------------------------------------

/**
 * Injected before the app's scripts (a string: the page never runs code compiled here): records
 * performance.now() when the selector's element is first in the page, visible and enabled.
 */
export function usableProbe(selector: string): string {
  return `(() => {
  if (window.top !== window) return;
  window.__benchUsable = null;
  const selector = ${JSON.stringify(selector)};
  const usable = (el) => {
    if (!el || el.disabled || el.getAttribute('aria-disabled') === 'true') return false;
    const visible = el.checkVisibility ? el.checkVisibility() : el.getClientRects().length > 0;
    const box = el.getBoundingClientRect();
    return visible && box.width > 0 && box.height > 0;
  };
  const observer = new MutationObserver(() => {
    if (window.__benchUsable !== null) return;
    if (usable(document.querySelector(selector))) {
      window.__benchUsable = performance.now();
      observer.disconnect();
    }
  });
  observer.observe(document, { childList: true, subtree: true, attributes: true, attributeFilter: ['disabled', 'aria-disabled', 'hidden', 'style', 'class'] });
})();`;
}

/** Network responses of one page, from the DevTools protocol: a snapshot on each call. */
function watchResponses(cdp: CDPSession): () => ScriptResponse[] {
  const byId = new Map<string, ScriptResponse>();
  const cached = new Set<string>();
  cdp.on('Network.requestServedFromCache', (e: { requestId: string }) => {
    cached.add(e.requestId);
    const r = byId.get(e.requestId);
    if (r) r.fromCache = true;
  });
  cdp.on(
    'Network.responseReceived',
    (e: { requestId: string; type: string; response: { url: string; mimeType: string; fromServiceWorker?: boolean; fromDiskCache?: boolean; fromPrefetchCache?: boolean } }) => {
      byId.set(e.requestId, {
        url: e.response.url,
        type: e.type,
        mimeType: e.response.mimeType,
        fromServiceWorker: Boolean(e.response.fromServiceWorker),
        fromCache: Boolean(e.response.fromDiskCache || e.response.fromPrefetchCache) || cached.has(e.requestId),
        encodedDataLength: null,
      });
    },
  );
  cdp.on('Network.loadingFinished', (e: { requestId: string; encodedDataLength: number }) => {
    const r = byId.get(e.requestId);
    if (r) r.encodedDataLength = e.encodedDataLength;
  });
  return () => [...byId.values()].map((r) => ({ ...r }));
}

function networkConditions(offline: boolean) {
  return { offline, latency: PHONE.latencyMs, downloadThroughput: (PHONE.downKbps * 1000) / 8, uploadThroughput: (PHONE.upKbps * 1000) / 8 };
}

/** The page slowed as a phone on a weak signal, before it navigates anywhere. */
async function slowPhone(page: Page): Promise<CDPSession> {
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Network.enable');
  await cdp.send('Network.emulateNetworkConditions', networkConditions(false));
  await cdp.send('Emulation.setCPUThrottlingRate', { rate: PHONE.cpuSlowdown });
  return cdp;
}

const CONTROLLED = `Boolean(navigator.serviceWorker && navigator.serviceWorker.controller && navigator.serviceWorker.controller.state === 'activated')`;

/** Uncompressed size of each script address, fetched once without gzip. */
class RawSizes {
  private readonly sizes = new Map<string, number>();
  async fill(urls: readonly string[]): Promise<void> {
    for (const url of new Set(urls)) {
      if (this.sizes.has(url)) continue;
      const res = await fetch(url, { headers: { 'accept-encoding': 'identity' } });
      this.sizes.set(url, (await res.arrayBuffer()).byteLength);
    }
  }
  sizeOf = (url: string): number => this.sizes.get(url) ?? NaN;
}

/** One load of `url` on a new, slowed page: ms from the navigation's start until usable, and the scripts it took. */
const RESOURCES = `performance.getEntriesByType('resource').map((e) => [e.name, e.initiatorType, e.startTime, e.responseEnd])`;

async function load(context: BrowserContext, url: string, raw: RawSizes): Promise<{ usableMs: number; scripts: ScriptBytes; phases: Phases; page: Page }> {
  const page = await context.newPage();
  const cdp = await slowPhone(page);
  const responses = watchResponses(cdp);
  await page.goto(url, { waitUntil: 'commit', timeout: 120_000 });
  if (!(await until(page, 'window.__benchUsable !== null', 120_000, 100))) throw new Error(`${url} was not usable within 120 s.`);
  const usableMs = await page.evaluate<number>('window.__benchUsable');
  const used = responses();
  const phases = phasesOf(await page.evaluate<ResourceEntry[]>(RESOURCES), usableMs);
  await raw.fill(used.filter(isScript).map((r) => r.url));
  return { usableMs, scripts: tallyScripts(used, raw.sizeOf), phases, page };
}

export async function sessionCookies(baseUrl: string, email: string, password: string): Promise<{ name: string; value: string }[]> {
  const jar = (res: Response) => res.headers.getSetCookie().map((c) => c.split(';')[0]!);
  const anon = await fetch(`${baseUrl}/api/session`);
  const { csrfToken } = (await anon.json()) as { csrfToken: string };
  const res = await fetch(`${baseUrl}/api/session`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie: jar(anon).join('; ') },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`Sign-in of ${email} answered ${res.status}: ${await res.text()}`);
  return jar(res).map((c) => {
    const at = c.indexOf('=');
    return { name: c.slice(0, at), value: c.slice(at + 1) };
  });
}

/** A fresh context (empty cache, no service worker, no kept data) signed in by cookie only. */
async function phoneContext(browser: Browser, baseUrl: string, cookies: { name: string; value: string }[], selector: string): Promise<BrowserContext> {
  const context = await browser.newContext({ viewport: PHONE.viewport, isMobile: true, hasTouch: true, deviceScaleFactor: 3, serviceWorkers: 'allow' });
  await context.addCookies(cookies.map((c) => ({ ...c, url: baseUrl })));
  await context.addInitScript({ content: usableProbe(selector) });
  return context;
}

/** The photo blobs' sizes of every finding queued in the outbox. */
const QUEUED_PHOTO_BYTES = `new Promise((resolve, reject) => {
  const open = indexedDB.open('trimout-outbox');
  open.onerror = () => reject(open.error);
  open.onsuccess = () => {
    const d = open.result;
    const get = d.transaction('writes').objectStore('writes').getAll();
    get.onsuccess = () => {
      d.close();
      resolve(get.result.filter((item) => item.kind === 'finding').flatMap((item) => item.write.body.files.map((f) => f.blob.size)));
    };
    get.onerror = () => reject(get.error);
  };
})`;

export const PHOTO = { width: 4000, height: 3000 } as const;

async function photoBytes(browser: Browser, baseUrl: string, cookies: { name: string; value: string }[], formPath: string): Promise<PhotoFigures> {
  // Noise in every other byte: about 3.3 MB, a 12-megapixel phone photo's size and decoding work.
  const picked = await noisePhoto(12, { ...PHOTO, step: 2, quality: 85 });
  const context = await phoneContext(browser, baseUrl, cookies, USABLE.form);
  try {
    const page = await context.newPage();
    page.on('dialog', (d) => void d.accept());
    const cdp = await slowPhone(page);
    await page.goto(baseUrl + formPath, { waitUntil: 'commit', timeout: 120_000 });
    if (!(await until(page, 'window.__benchUsable !== null', 120_000, 100))) throw new Error('The finding form was not usable within 120 s.');
    const item = page.getByTestId('finding-form-item');
    const values = await item.locator('option').evaluateAll((os) => os.map((o) => (o as unknown as { value: string }).value).filter(Boolean));
    if (values.length === 0) throw new Error('The finding form lists no defect type.');
    await item.selectOption(values[0]!);
    await page.getByTestId('finding-form-note').fill('Bench phone photo');
    // Offline: the finding waits in the outbox with its downscaled photo, where its bytes can be read.
    await cdp.send('Network.emulateNetworkConditions', networkConditions(true));
    const pickedAt = Date.now();
    await page.getByTestId('finding-form-files-input').setInputFiles([{ name: 'bench-12mp.jpg', mimeType: 'image/jpeg', buffer: picked }]);
    await page.getByTestId('finding-form-photos-thumb-0').waitFor({ timeout: 120_000 });
    const prepareMs = Date.now() - pickedAt;
    await page.getByTestId('finding-form-submit').tap();
    if (!(await until(page, `${OUTBOX_COUNT}.then((n) => n === 1)`, 60_000, 100))) throw new Error('The finding was not queued on the device.');
    const sizes = (await page.evaluate(QUEUED_PHOTO_BYTES)) as number[];
    if (sizes.length !== 1) throw new Error(`${sizes.length} photos queued, 1 expected.`);
    const backOnline = Date.now();
    await cdp.send('Network.emulateNetworkConditions', networkConditions(false));
    if (!(await until(page, `${OUTBOX_COUNT}.then((n) => n === 0)`, 300_000, 100))) throw new Error('The queued finding was not sent within 300 s.');
    const uploadMs = Date.now() - backOnline;
    return { ...PHOTO, pickedBytes: picked.length, uploadBytes: sizes[0]!, prepareMs, uploadMs };
  } finally {
    await context.close();
  }
}

export async function measurePhone(opts: {
  baseUrl: string;
  chromiumPath: string;
  signIn: { email: string; password: string };
  jobId: string;
  levelId: string;
  runs?: number;
  log?: (message: string) => void;
}): Promise<PhoneFigures> {
  const runs = opts.runs ?? 3;
  const loadStart = os.loadavg()[0]!;
  const log = opts.log ?? (() => undefined);
  const base = opts.baseUrl.replace(/\/$/, '');
  if (!fs.existsSync(opts.chromiumPath)) throw new Error(`No chromium at ${opts.chromiumPath}.`);
  const cookies = await sessionCookies(base, opts.signIn.email, opts.signIn.password);
  const formPath = `/jobs/${opts.jobId}/findings/new?levelId=${opts.levelId}`;
  const screens = [
    { screen: 'walk' as const, label: 'Level walk', path: `/jobs/${opts.jobId}/levels/${opts.levelId}/walk`, usableWhen: 'first unit row visible', selector: USABLE.walk },
    { screen: 'form' as const, label: 'Finding form', path: formPath, usableWhen: 'defect type select visible and enabled', selector: USABLE.form },
  ];
  const browser = await chromium.launch({
    executablePath: opts.chromiumPath,
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  const raw = new RawSizes();
  try {
    const out: ScreenFigures[] = [];
    for (const s of screens) {
      const cold: number[] = [];
      const warm: number[] = [];
      const coldScripts: ScriptBytes[] = [];
      const warmScripts: ScriptBytes[] = [];
      const coldPhases: Phases[] = [];
      const warmPhases: Phases[] = [];
      for (let run = 0; run < runs; run++) {
        const context = await phoneContext(browser, base, cookies, s.selector);
        try {
          const first = await load(context, base + s.path, raw);
          cold.push(first.usableMs);
          coldScripts.push(first.scripts);
          coldPhases.push(first.phases);
          // The shell precached and the worker in control, as when the app is opened again.
          if (!(await until(first.page, CONTROLLED, 120_000, 250))) throw new Error('The service worker did not take control within 120 s.');
          await first.page.close();
          const second = await load(context, base + s.path, raw);
          warm.push(second.usableMs);
          warmScripts.push(second.scripts);
          warmPhases.push(second.phases);
          log(`  ${s.label}, run ${run + 1} of ${runs}: cold ${Math.round(first.usableMs)} ms, warm ${Math.round(second.usableMs)} ms`);
        } finally {
          await context.close();
        }
      }
      out.push({
        screen: s.screen,
        label: s.label,
        path: s.path,
        usableWhen: s.usableWhen,
        cold: spread(cold),
        warm: spread(warm),
        jsCold: medianScripts(coldScripts),
        jsWarm: medianScripts(warmScripts),
        coldPhases: medianPhases(coldPhases),
        warmPhases: medianPhases(warmPhases),
      });
    }
    let photo: PhotoFigures | null = null;
    let photoError: string | undefined;
    try {
      photo = await photoBytes(browser, base, cookies, formPath);
      log(`  photo: ${kib(photo.pickedBytes)} KiB picked, ${kib(photo.uploadBytes)} KiB queued for upload`);
    } catch (err) {
      photoError = err instanceof Error ? err.message : String(err);
    }
    const machine = { loadStart, loadEnd: os.loadavg()[0]!, cores: os.cpus().length };
    return { conditions: PHONE, targets: TARGETS, runs, screens: out, photo, ...(photoError ? { photoError } : {}), machine };
  } finally {
    await browser.close();
  }
}
