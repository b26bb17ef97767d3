/**
 * The correction loop without signal, on a phone (390×844, touch): a subcontractor submits fixes
 * with a photo for three findings of their company with no network, reloads while still offline
 * (the queue is kept in IndexedDB), and back online each fix reaches the server exactly once, with
 * its photo. An inspector with the level kept on the phone returns a fixed finding with a reason
 * offline on the finding's page opened cold from the kept level (a re-inspection verdict kept in the outbox), reloads offline (the queue is shown), and back
 * online there is one return and the finding is open again with that reason. Counted in SQL.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { CatalogueItem, Company, JobCompany } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD } from '../../server/seed/demo';
import { signIn } from '../support/app';
import { demoJob, demoLevel } from '../support/demo';
import { PHONE, pageHolds, serviceWorkerControls, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { startFakeS3, type FakeS3 } from '../support/storage';
import { countRows } from '../support/db';
import { until } from '../support/wait';

jest.setTimeout(240_000);

let h: BrowserHarness;
let s3: FakeS3;
let browser: Browser;
let jobId = '';
let levelId = '';
let mechanicalId = '';
const suffix = randomUUID().slice(0, 4).toUpperCase();
const tags = [`IU-F${suffix}-01`, `IU-F${suffix}-02`, `IU-F${suffix}-03`, `IU-F${suffix}-04`] as const;
const unitIds: string[] = [];
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const mechanical = DEMO_ACCOUNTS.find((a) => a.role === 'subcontractor' && a.company === 'mechanical')!;

beforeAll(async () => {
  s3 = await startFakeS3();
  h = await startBrowserHarness({ objectStore: s3.store });
  await seedDemo(h.db);
  jobId = (await demoJob()).id;
  const company = await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } });
  mechanicalId = company!.id;
  if (!(await JobCompany.findOne({ where: { jobId, companyId: mechanicalId } }))) {
    await JobCompany.create({ jobId, companyId: mechanicalId, trades: ['mechanical', 'plumbing', 'insulation', 'controls'] });
  }
  const made = await demoLevel(`Fixes offline ${suffix}`, tags, { kind: 'cassette_4way', modelName: `Cassette FX-${suffix}` });
  levelId = made.levelId;
  unitIds.push(...made.unitIds);
  browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu'] });
});
afterAll(async () => {
  await browser?.close();
  await h?.close();
  await s3?.close();
});

function jpeg(colour: { r: number; g: number; b: number }): Promise<Buffer> {
  return sharp({ create: { width: 640, height: 480, channels: 3, background: colour } }).jpeg({ quality: 80 }).toBuffer();
}

/** Rows counted in SQL (`SELECT count(*) AS n ...`). */
const count = (sql: string, bind: unknown[]) => countRows(h.db, sql, bind);

/** A phone: 390×844, touch, mobile, signed in through the form. */
async function phone(email: string): Promise<{ context: BrowserContext; page: Page; problems: string[] }> {
  const context = await browser.newContext({ viewport: PHONE, hasTouch: true, isMobile: true, baseURL: h.baseUrl });
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('pageerror', (err) => problems.push(`page error: ${err.message}`));
  page.on('console', (msg) => {
    if (msg.type() === 'error' && !/status of 40[14]/.test(msg.text())) problems.push(`console: ${msg.text()}`);
  });
  page.on('dialog', (d) => void d.accept());
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').tap();
  await page.getByTestId('job-list').waitFor();
  return { context, page, problems };
}

/** The outbox's records as kept in IndexedDB (browser code as a string: no DOM types here). */
const READ_OUTBOX = `new Promise((resolve, reject) => {
  const open = indexedDB.open('trimout-outbox');
  open.onerror = () => reject(open.error);
  open.onsuccess = () => {
    const d = open.result;
    if (!d.objectStoreNames.contains('writes')) { d.close(); return resolve([]); }
    const get = d.transaction('writes').objectStore('writes').getAll();
    get.onsuccess = () => {
      d.close();
      resolve(get.result.map((item) => ({
        kind: item.kind,
        key: item.write.idempotencyKey,
        path: item.write.path,
        blobs: item.write.body.kind === 'form' ? item.write.body.files.filter((f) => f.blob instanceof Blob).length : 0,
      })));
    };
    get.onerror = () => reject(get.error);
  };
})`;

interface KeptItem {
  kind: string;
  key: string;
  path: string;
  blobs: number;
}

/** Logs an open finding of the mechanical company on a unit, through the API as the inspector. */
async function logFinding(unitId: string, note: string): Promise<{ id: string; number: number }> {
  const api = await signIn(h.trimout.app, inspector.email, DEMO_PASSWORD);
  const item = await CatalogueItem.findOne({ where: { jobId, code: 'MT-03' } });
  const res = await api.agent
    .post(`/api/jobs/${jobId}/findings`)
    .set('X-CSRF-Token', api.csrf)
    .send({ catalogueItemId: item!.id, unitId, companyId: mechanicalId, note });
  if (res.status !== 201) throw new Error(`The finding was refused: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as { id: string; number: number };
}

it('a subcontractor submits fixes with a photo for 3 findings offline, reloads offline, and back online each fix arrives once', async () => {
  const logged = [];
  for (const [i, unitId] of unitIds.slice(0, 3).entries()) logged.push(await logFinding(unitId, `Offline fix ${suffix} ${i + 1}`));
  const ids = logged.map((f) => f.id);
  const { context, page, problems } = await phone(mechanical.email);
  // Online: the inbox and each finding opened in the app (kept in memory), the shell controlled by the service worker.
  await page.goto(`${h.baseUrl}/inbox`);
  await serviceWorkerControls(page);
  for (const f of logged) {
    await page.getByTestId(`inbox-card-${f.number}`).tap();
    await page.getByTestId('fix-form').waitFor();
    await page.goBack();
    await page.getByTestId(`inbox-card-${f.number}`).waitFor();
  }

  // No signal from here.
  await context.setOffline(true);
  for (const [i, f] of logged.entries()) {
    await page.getByTestId(`inbox-card-${f.number}`).tap();
    await page.getByTestId('fix-form').waitFor();
    await page.getByTestId('fix-form-note').fill(`Re-hung on threaded rod ${suffix} ${i + 1}`);
    await page.getByTestId('fix-form-files-input').setInputFiles({ name: `fix-${i + 1}.jpg`, mimeType: 'image/jpeg', buffer: await jpeg({ r: 30 + 70 * i, g: 160, b: 90 }) });
    await page.getByTestId('fix-form-photos-thumb-0').waitFor();
    await page.getByTestId('fix-form-submit').tap();
    await page.getByTestId('fix-form-waiting').waitFor();
    await page.getByTestId('header-outbox').filter({ hasText: `${i + 1} waiting to send` }).waitFor();
    await page.goBack();
  }
  expect(await page.getByTestId('header-outbox').textContent()).toBe('3 waiting to send');
  const kept = (await page.evaluate(READ_OUTBOX)) as KeptItem[];
  expect(kept.map((k) => [k.kind, k.blobs])).toEqual([
    ['fix', 1],
    ['fix', 1],
    ['fix', 1],
  ]);
  expect(await count(`SELECT count(*) AS n FROM fixes WHERE finding_id = ANY($1::uuid[])`, [ids])).toBe(0);

  await h.screenshot(page, 'offline-fixes-01-inbox-three-waiting');

  // A reload with no signal: the app opens from the service worker and the queue is intact on the
  // device, the same records under the same keys. With no level kept, the session is not kept on
  // the device: the app says there is no signal and how much of this person's work waits.
  await page.reload();
  await page.getByTestId('offline-start-waiting').filter({ hasText: '3 waiting to send' }).waitFor();
  await h.screenshot(page, 'offline-fixes-02-after-offline-reload');
  const afterReload = (await page.evaluate(READ_OUTBOX)) as KeptItem[];
  expect(afterReload.map((k) => [k.kind, k.blobs])).toEqual(kept.map((k) => [k.kind, k.blobs]));
  expect(afterReload.map((k) => k.key).sort()).toEqual(kept.map((k) => k.key).sort());
  expect(await count(`SELECT count(*) AS n FROM fixes WHERE finding_id = ANY($1::uuid[])`, [ids])).toBe(0);

  // Back online: the app opens by itself (nobody taps anything) and the queue sends itself, each fix once.
  await context.setOffline(false);
  await until(async () => ((await page.evaluate(READ_OUTBOX)) as KeptItem[]).length === 0, 'the outbox to be empty');
  await until(async () => (await page.getByTestId('header-outbox').count()) === 0, 'the header count to go');
  await until(async () => ((await page.evaluate(READ_OUTBOX)) as KeptItem[]).length === 0, 'the outbox to be empty');

  const perFinding = [];
  for (const id of ids) perFinding.push(await count(`SELECT count(*) AS n FROM fixes WHERE finding_id = $1`, [id]));
  const fixes = await count(`SELECT count(*) AS n FROM fixes WHERE finding_id = ANY($1::uuid[])`, [ids]);
  const fixPhotos = await count(`SELECT count(*) AS n FROM photos p JOIN fixes x ON x.id = p.fix_id WHERE x.finding_id = ANY($1::uuid[]) AND p.stage = 'fix'`, [ids]);
  const events = await count(`SELECT count(*) AS n FROM finding_events WHERE finding_id = ANY($1::uuid[]) AND kind = 'fix_submitted'`, [ids]);
  const waiting = await count(`SELECT count(*) AS n FROM findings WHERE id = ANY($1::uuid[]) AND status = 'fix_submitted'`, [ids]);
  console.log(`offline fixes synced: ${fixes} fixes (${perFinding.join(', ')} per finding), ${fixPhotos} fix photos, ${events} fix_submitted events, ${waiting} findings waiting for re-inspection`);
  expect({ perFinding, fixes, fixPhotos, events, waiting }).toEqual({ perFinding: [1, 1, 1], fixes: 3, fixPhotos: 3, events: 3, waiting: 3 });
  expect(problems.filter((p) => !/ERR_INTERNET_DISCONNECTED|Failed to fetch|net::/.test(p))).toEqual([]);
  await context.close();
});

it('an inspector returns a fixed finding with a reason offline, reloads offline, and back online it is returned once and open again', async () => {
  const finding = await logFinding(unitIds[3]!, `Offline return ${suffix}`);
  const sub = await signIn(h.trimout.app, mechanical.email, DEMO_PASSWORD);
  const fixed = await sub.agent
    .post(`/api/jobs/${jobId}/findings/${finding.id}/fixes`)
    .set('X-CSRF-Token', sub.csrf)
    .field('data', JSON.stringify({ note: `Drain re-pitched ${suffix}` }))
    .attach('photos', await jpeg({ r: 20, g: 20, b: 200 }), { filename: 'fixed.jpg', contentType: 'image/jpeg' });
  expect(fixed.status).toBe(201);

  const { context, page, problems } = await phone(inspector.email);
  // The inspector keeps the level on the phone (as on a walk): the session is kept with it, so the
  // app opens signed in after an offline reload.
  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  await serviceWorkerControls(page);
  await page.getByTestId('kept-level-keep').tap();
  await page.getByTestId('kept-level-status').waitFor();
  // No signal, and the finding opened cold (a reload, nothing in memory): its page is kept with
  // the level, with the fix's photo.
  await context.setOffline(true);
  await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/${finding.id}`);
  await page.getByTestId('finding-reinspect').waitFor();
  expect(await page.getByTestId('finding-label').textContent()).toContain(`#${finding.number}`);
  await pageHolds(page, `Array.from(document.querySelectorAll('img')).some((i) => i.complete && i.naturalWidth > 0 && i.src.startsWith('blob:'))`, { what: 'a kept photo shown' });
  await h.screenshot(page, 'offline-fixes-03a-finding-opened-offline');

  // The verdict is kept on the phone.
  const reason = `Drain still falls back toward the unit ${suffix}.`;
  await page.getByTestId('reinspect-reason').fill(reason);
  await page.getByTestId('reinspect-return').tap();
  await page.getByTestId('header-outbox').filter({ hasText: '1 waiting to send' }).waitFor();
  const kept = (await page.evaluate(READ_OUTBOX)) as KeptItem[];
  expect(kept.map((k) => k.path)).toEqual([`/api/jobs/${jobId}/findings/${finding.id}/reinspections`]);
  expect(await count(`SELECT count(*) AS n FROM finding_events WHERE finding_id = $1 AND kind = 'returned'`, [finding.id])).toBe(0);

  await page.reload();
  await page.getByTestId('header-outbox').filter({ hasText: '1 waiting to send' }).waitFor();
  await page.getByTestId('header-outbox').tap();
  await page.getByTestId('sync-screen').waitFor();
  await until(async () => (await page.getByTestId('sync-item-waiting').count()) === 1, 'the sync screen to list the verdict', 10_000);
  // It names the finding, and every button and link on the screen is a touch target at phone size.
  expect(await page.getByTestId('sync-item-waiting').textContent()).toContain(`Return of finding #${finding.number}`);
  const targets = page.getByTestId('sync-screen').locator('[role="button"], button, a');
  expect(await targets.count()).toBeGreaterThanOrEqual(2);
  for (const target of await targets.all()) {
    const box = await target.boundingBox();
    expect([await target.textContent(), (box?.height ?? 0) >= 44]).toEqual([await target.textContent(), true]);
  }
  await h.screenshot(page, 'offline-fixes-03-return-waiting-after-offline-reload');
  expect(((await page.evaluate(READ_OUTBOX)) as KeptItem[]).map((k) => k.key)).toEqual(kept.map((k) => k.key));

  await context.setOffline(false);
  await until(async () => (await page.getByTestId('header-outbox').count()) === 0, 'the verdict to be sent');
  await until(async () => ((await page.evaluate(READ_OUTBOX)) as KeptItem[]).length === 0, 'the outbox to be empty');

  const returned = await count(`SELECT count(*) AS n FROM finding_events WHERE finding_id = $1 AND kind = 'returned'`, [finding.id]);
  const withReason = await count(`SELECT count(*) AS n FROM finding_events WHERE finding_id = $1 AND kind = 'returned' AND reason = $2`, [finding.id, reason]);
  const open = await count(`SELECT count(*) AS n FROM findings WHERE id = $1 AND status = 'open' AND return_count = 1`, [finding.id]);
  console.log(`offline return synced: ${returned} return event(s), ${withReason} with the typed reason, finding open again: ${open === 1}`);
  expect({ returned, withReason, open }).toEqual({ returned: 1, withReason: 1, open: 1 });
  // The subcontractor's inbox says why it came back.
  const inbox = await sub.agent.get('/api/inbox');
  const item = (inbox.body.items as { id: string; lastReturnReason: string | null }[]).find((f) => f.id === finding.id);
  expect(item?.lastReturnReason).toBe(reason);
  expect(problems.filter((p) => !/ERR_INTERNET_DISCONNECTED|Failed to fetch|net::/.test(p))).toEqual([]);
  await context.close();
});
