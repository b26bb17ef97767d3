/**
 * Sync rate of queued findings with photos, on a phone-sized page in headless chromium.
 *
 * 1. Queue: `count` findings (BENCH_SYNC_COUNT, 50), one per unit, each with 1 or 2 small photos
 *    (640×480 JPEGs), logged through the real finding form and the real outbox: each form is opened
 *    online (its lists load), the network is cut (context offline) for the pick and the tap, and the
 *    queued record is waited for in IndexedDB (`trimout-outbox` / `writes`). While the next form loads
 *    the network is back, but the API's writes are refused at the network level (route abort), so
 *    the queue stays on the device (the outbox backs off as it would with a bad signal).
 * 2. Sync: writes allowed again, the 'online' event (offline → online), timed until the outbox is
 *    empty; items/s = count / seconds. Checked in SQL: exactly `count` findings with the ids made on
 *    the phone, and their photos.
 * 3. Online one by one: the same findings (the same `data` fields and photo bytes read back from the
 *    queue, without the phone's id, each with a fresh Idempotency-Key) posted from the same page with
 *    fetch, each waiting for its answer before the next; items/s = count / seconds.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { chromium, type BrowserContext, type Route } from 'playwright-core';
import { noisePhoto, OUTBOX_COUNT, OUTBOX_REFUSALS, signIn, until } from './benchPage';

export interface SyncRateResult {
  findings: number;
  photos: number;
  /** Queued on the device, sent when the network came back: seconds and items/s. */
  queued: { seconds: number; itemsPerSecond: number; findingsStored: number; photosStored: number };
  /** The same findings posted online one by one from the page. */
  online: { seconds: number; itemsPerSecond: number; refused: number };
}


/** Copies every queued finding (its `data` and photo Blobs) into window.__benchQueued, for the online run. */
const COPY_QUEUE = `new Promise((resolve, reject) => {
  const open = indexedDB.open('trimout-outbox');
  open.onerror = () => reject(open.error);
  open.onsuccess = () => {
    const d = open.result;
    const get = d.transaction('writes').objectStore('writes').getAll();
    get.onsuccess = () => {
      d.close();
      window.__benchQueued = get.result.filter((item) => item.kind === 'finding').map((item) => ({
        path: item.write.path,
        data: item.write.body.fields.find((f) => f.name === 'data').value,
        files: item.write.body.files.map((f) => ({ field: f.name, fileName: f.fileName, blob: f.blob })),
      }));
      resolve(window.__benchQueued.map((q) => JSON.parse(q.data).id));
    };
    get.onerror = () => reject(get.error);
  };
})`;

/** Posts window.__benchQueued one by one (no phone id, fresh key); answers [milliseconds, refused]. */
const POST_ONE_BY_ONE = `(async () => {
  const session = await (await fetch('/api/session', { credentials: 'same-origin' })).json();
  const started = performance.now();
  let refused = 0;
  for (const q of window.__benchQueued) {
    const data = JSON.parse(q.data);
    delete data.id;
    data.note = 'Online ' + (data.note || '');
    const form = new FormData();
    form.append('data', JSON.stringify(data));
    for (const f of q.files) form.append(f.field, f.blob, f.fileName);
    const res = await fetch(q.path, { method: 'POST', credentials: 'same-origin', headers: { 'X-CSRF-Token': session.csrfToken, 'Idempotency-Key': crypto.randomUUID() }, body: form });
    await res.arrayBuffer();
    if (res.status !== 201) refused += 1;
  }
  return [performance.now() - started, refused];
})()`;

/** A small photo: noise, so each JPEG is a real few tens of KB and not a flat colour. */
function photo(seed: number): Promise<Buffer> {
  return noisePhoto(seed + 1, { width: 640, height: 480, step: 7, quality: 80 });
}



/** API writes fail as with no signal; reads go through (the next form loads). */
const refuseWrites = (route: Route) => (route.request().method() === 'GET' ? route.continue() : route.abort('internetdisconnected'));

export async function syncRateBench(options: {
  baseUrl: string;
  databaseUrl: string;
  email: string;
  password: string;
  jobId: string;
  /** One finding per unit: at least `count` units. */
  unitIds: string[];
  count?: number;
  log?: (message: string) => void;
}): Promise<SyncRateResult> {
  const count = options.count ?? 50;
  if (options.unitIds.length < count) throw new Error(`${count} units are needed, ${options.unitIds.length} given.`);
  const log = options.log ?? (() => undefined);
  const userDataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-bench-sync-'));
  let context: BrowserContext | undefined;
  const db = new pg.Client({ connectionString: options.databaseUrl });
  await db.connect();
  try {
    context = await chromium.launchPersistentContext(userDataDir, {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      headless: true,
      viewport: { width: 390, height: 844 },
      hasTouch: true,
      isMobile: true,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    const page = await context.newPage();
    page.on('dialog', (d) => void d.accept());
    await signIn(page, options.baseUrl, options.email, options.password);
    if (!(await until(page, `${OUTBOX_COUNT}.then((n) => n <= 0)`, 120_000, 250))) throw new Error('The outbox was not empty at the start.');
    await page.route('**/api/**', refuseWrites);

    // 1. Queue through the form and the outbox.
    let photos = 0;
    for (let i = 0; i < count; i++) {
      await context.setOffline(false);
      await page.goto(`${options.baseUrl}/jobs/${options.jobId}/findings/new?unitId=${options.unitIds[i]}`);
      await page.getByTestId('finding-form').waitFor();
      const values = await page
        .getByTestId('finding-form-item')
        .locator('option')
        .evaluateAll((os) => os.map((o) => (o as unknown as { value: string }).value).filter(Boolean));
      await page.getByTestId('finding-form-item').selectOption(values[i % values.length]!);
      // A defect type whose trade no company on the job covers suggests none: the form then asks for one.
      const company = page.getByTestId('finding-form-company');
      if (!(await company.inputValue())) {
        const firstCompany = await company.locator('option').evaluateAll((os) => os.map((o) => (o as unknown as { value: string }).value).find(Boolean));
        if (firstCompany) await company.selectOption(firstCompany);
      }
      await page.getByTestId('finding-form-note').fill(`Bench sync ${i + 1}`);
      await context.setOffline(true);
      const picked = await Promise.all(Array.from({ length: 1 + (i % 2) }, (_, n) => photo(i * 2 + n)));
      photos += picked.length;
      await page.getByTestId('finding-form-files-input').setInputFiles(picked.map((buffer, n) => ({ name: `sync-${i + 1}-${n + 1}.jpg`, mimeType: 'image/jpeg', buffer })));
      await page.getByTestId(`finding-form-photos-thumb-${picked.length - 1}`).waitFor({ timeout: 60_000 });
      await page.getByTestId('finding-form-submit').tap();
      if (!(await until(page, `${OUTBOX_COUNT}.then((n) => n === ${i + 1})`, 60_000))) throw new Error(`Finding ${i + 1} was not queued on the device.`);
      if ((i + 1) % 10 === 0) log(`  ${i + 1} of ${count} findings queued on the device`);
    }
    const ids = (await page.evaluate(COPY_QUEUE)) as string[];
    if (ids.length !== count) throw new Error(`${ids.length} findings queued, ${count} expected.`);

    // 2. Back online: the queue sends itself.
    await page.unroute('**/api/**', refuseWrites);
    const started = Date.now();
    await context.setOffline(false);
    // Sent, or stopped by a refusal (a write needing attention stays in the queue for good): the
    // refusal is the answer, not a 10-minute wait.
    const refusedNow = `${OUTBOX_REFUSALS}.then((r) => r.length > 0)`;
    if (!(await until(page, `Promise.all([${OUTBOX_COUNT}, ${refusedNow}]).then(([n, refused]) => n === 0 || refused)`, 600_000, 20))) {
      throw new Error('The queue was not sent within 10 minutes.');
    }
    const refusals = (await page.evaluate(OUTBOX_REFUSALS)) as string[];
    if (refusals.length) throw new Error(`The server refused ${refusals.length} queued finding(s): ${refusals.join('; ')}`);
    const syncSeconds = (Date.now() - started) / 1000;
    const stored = await db.query<{ findings: string; photos: string }>(
      `SELECT count(DISTINCT f.id) AS findings, count(p.id) AS photos FROM findings f LEFT JOIN photos p ON p.finding_id = f.id AND p.stage = 'finding' WHERE f.id = ANY($1::uuid[])`,
      [ids],
    );

    // 3. The same findings, posted online one by one.
    const [onlineMs, refused] = (await page.evaluate(POST_ONE_BY_ONE)) as [number, number];
    const onlineSeconds = onlineMs / 1000;
    return {
      findings: count,
      photos,
      queued: { seconds: syncSeconds, itemsPerSecond: count / syncSeconds, findingsStored: Number(stored.rows[0]!.findings), photosStored: Number(stored.rows[0]!.photos) },
      online: { seconds: onlineSeconds, itemsPerSecond: count / onlineSeconds, refused },
    };
  } finally {
    await db.end();
    await context?.close();
    fs.rmSync(userDataDir, { recursive: true, force: true });
  }
}
