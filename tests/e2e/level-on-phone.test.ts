/**
 * A level kept on the phone (390×844): kept online from the level's walk, then, offline after a
 * reload, the level's units, a unit check with its checklist (a measured check evaluated on the
 * phone) and the level's findings with their thumbnails all open from the device. A second person
 * signing in on the same browser profile finds nothing of the first one's kept level. And a
 * 4000×3000 photo picked in the finding form reaches the server at 2560 px on its long side.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import type { Page } from 'playwright-core';
import { CatalogueItem, Photo, UnitModel } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo';
import { demoLevel } from '../support/demo';
import { pageHolds, PHONE, serviceWorkerControls, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { startFakeS3, type FakeS3 } from '../support/storage';

jest.setTimeout(240_000);

let h: BrowserHarness;
let s3: FakeS3;
let jobId = '';
let levelId = '';
const suffix = randomUUID().slice(0, 4).toUpperCase();
const levelName = `Kept level ${suffix}`;
const tags = [`IU-K${suffix}-01`, `IU-K${suffix}-02`, `IU-K${suffix}-03`] as const;
const unitIds: string[] = [];
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;

beforeAll(async () => {
  s3 = await startFakeS3();
  h = await startBrowserHarness({ objectStore: s3.store });
  await seedDemo(h.db);
  const made = await demoLevel(levelName, tags, { kind: 'cassette_4way', modelName: `Cassette KX-${suffix}` });
  ({ jobId, levelId } = made);
  unitIds.push(...made.unitIds);
  await UnitModel.update(
    { limits: { max_pump_lift: { value: 762, stated: 30, unit: 'in', text: '30 in', source: 'installation manual p. 14 (invented)' } } },
    { where: { id: made.modelId! } },
  );
});
afterAll(async () => {
  await h?.close();
  await s3?.close();
});

/** A photo made here: a JPEG of the given size and colour. */
function jpeg(width: number, height: number, colour: { r: number; g: number; b: number }): Promise<Buffer> {
  return sharp({ create: { width, height, channels: 3, background: colour } }).jpeg({ quality: 80 }).toBuffer();
}

/** Logs an open finding with one photo through the API, as the signed-in person. */
async function logFinding(page: Page, unitId: string, code: string, note: string, colour: { r: number; g: number; b: number }) {
  const session = (await (await page.request.get(`${h.baseUrl}/api/session`)).json()) as { csrfToken: string };
  const item = await CatalogueItem.findOne({ where: { jobId, code } });
  const res = await page.request.post(`${h.baseUrl}/api/jobs/${jobId}/findings`, {
    headers: { 'X-CSRF-Token': session.csrfToken, 'Idempotency-Key': randomUUID() },
    multipart: {
      data: JSON.stringify({ catalogueItemId: item!.id, unitId, note }),
      photos: { name: 'defect.jpg', mimeType: 'image/jpeg', buffer: await jpeg(800, 600, colour) },
    },
  });
  if (res.status() !== 201) throw new Error(`The finding was refused: ${res.status()} ${await res.text()}`);
  return (await res.json()) as { id: string; number: number };
}

// Browser-side code is written as strings: the test code is compiled without the DOM library.
const readKept = (key: string, db = 'trimout-kept', store = 'cache') => `new Promise((resolve, reject) => {
  const open = indexedDB.open(${JSON.stringify(db)});
  open.onerror = () => reject(open.error);
  open.onsuccess = () => {
    const d = open.result;
    if (!d.objectStoreNames.contains(${JSON.stringify(store)})) { d.close(); return resolve(null); }
    const get = d.transaction(${JSON.stringify(store)}).objectStore(${JSON.stringify(store)}).${key === '*' ? 'getAllKeys()' : `get(${JSON.stringify(key)})`};
    get.onsuccess = () => { d.close(); resolve(get.result ?? null); };
    get.onerror = () => reject(get.error);
  };
})`;

/** Every image under the element has loaded; answers their addresses. */
async function imagesLoaded(page: Page, testID: string): Promise<string[]> {
  await pageHolds(
    page,
    `(() => { const imgs = [...document.querySelectorAll('[data-testid="${testID}"] img')]; return imgs.length > 0 && imgs.every((i) => i.complete && i.naturalWidth > 0); })()`,
  );
  return page.evaluate(`[...document.querySelectorAll('[data-testid="${testID}"] img')].map((i) => i.src)`);
}

it('keeps a level on the phone; offline after a reload its units, a unit check and its findings with thumbnails open from the device', async () => {
  const { page, context, problems } = await h.newPage(PHONE);
  // Leaving the unit check with a typed value asks first (its draft); a person would say leave.
  page.on('dialog', (d) => void d.accept());
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  const first = await logFinding(page, unitIds[0]!, 'MT-01', 'Hung on chain at one corner.', { r: 176, g: 132, b: 74 });
  const second = await logFinding(page, unitIds[1]!, 'DR-01', 'Drain sags between hangers.', { r: 60, g: 110, b: 160 });

  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  await page.getByTestId('kept-level-none').waitFor();
  await serviceWorkerControls(page);
  await page.getByTestId('kept-level-keep').click();
  const status = page.getByTestId('kept-level-status');
  const failed = page.getByTestId('kept-level-error');
  await status.or(failed).first().waitFor();
  if (await failed.count()) throw new Error(`Keeping failed: ${await failed.textContent()} ${problems.join('; ')}`);
  expect(await status.textContent()).toMatch(new RegExp(`^${levelName} kept on this phone, \\d+(\\.\\d)? (KB|MB), updated \\d\\d:\\d\\d$`));
  await h.screenshot(page, 'level-on-phone-01-kept-phone');
  // Stored on the device: the list of kept levels names this one, the thumbnails are Blobs.
  await pageHolds(page, `${readKept('queries')}.then((v) => typeof v === 'string' && v.includes(${JSON.stringify(tags[2])}))`);
  const registry = (await page.evaluate(readKept('registry'))) as { owner: string; levels: { levelId: string; photos: string[] }[] };
  expect(registry.levels.map((l) => l.levelId)).toEqual([levelId]);
  expect(registry.levels[0]!.photos).toHaveLength(2);
  expect(await page.evaluate(readKept('*', 'trimout-kept-photos', 'thumbnails'))).toHaveLength(2);

  // No network, and a reload: the app and the level come from the device.
  await context.setOffline(true);
  await page.reload();
  await page.getByTestId(`walk-unit-${tags[0]}`).waitFor();
  expect(await page.getByTestId('level-walk-name').textContent()).toBe(levelName);
  expect(await page.getByTestId('kept-level-status').textContent()).toContain(`${levelName} kept on this phone`);
  await h.screenshot(page, 'level-on-phone-02-offline-level');

  // A unit check: the checklist, the unit's open finding on its item, and a measured check judged on the phone.
  await page.getByTestId(`walk-unit-${tags[0]}`).click();
  await page.getByTestId('check-item-MT-01').waitFor();
  expect(await page.getByTestId('unit-check-tag').first().textContent()).toContain(tags[0]);
  await page.getByTestId('check-item-MT-01-unresolved').waitFor();
  await page.getByTestId('check-item-DR-03-measured-input').fill('34 in');
  expect(await page.getByTestId('check-item-DR-03-measured-status').textContent()).toBe('✗ FAIL');
  await page.getByTestId('check-item-DR-03-measured-input').fill('28 in');
  expect(await page.getByTestId('check-item-DR-03-measured-status').textContent()).toBe('✓ PASS');
  await h.screenshot(page, 'level-on-phone-03-offline-unit-check');

  // The level's findings, with their thumbnails from the device.
  await page.goto(`${h.baseUrl}/jobs/${jobId}/findings?levelId=${levelId}`);
  await page.getByTestId(`finding-card-${first.number}`).waitFor();
  await page.getByTestId(`finding-card-${second.number}`).waitFor();
  const shown = [...(await imagesLoaded(page, `finding-card-${first.number}`)), ...(await imagesLoaded(page, `finding-card-${second.number}`))];
  expect(shown.every((src) => src.startsWith('blob:'))).toBe(true);
  await h.screenshot(page, 'level-on-phone-04-offline-findings');

  await context.setOffline(false);
  expect(problems.filter((p) => !/ERR_INTERNET_DISCONNECTED|Failed to fetch|net::/.test(p))).toEqual([]);
  await page.close();
});

it('a second person signing in on the same browser profile sees nothing of the first one’s kept level', async () => {
  const { page, context } = await h.newPage(PHONE);
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  const keep = page.getByTestId('kept-level-keep');
  const status = page.getByTestId('kept-level-status');
  await keep.or(status).first().waitFor();
  if (await keep.count()) await keep.click();
  await status.waitFor();
  // The inspector's session ends without signing out (cookies cleared); what they kept is still on the profile
  // (read from a page of the app's origin that does not run the app).
  await context.clearCookies();
  await page.goto(`${h.baseUrl}/manifest.webmanifest`);
  expect(((await page.evaluate(readKept('registry'))) as { levels: unknown[] } | null)?.levels).toHaveLength(1);
  expect(await page.evaluate(readKept('*', 'trimout-kept-photos', 'thumbnails'))).toHaveLength(2);
  await h.signIn(page, gc.email, DEMO_PASSWORD);
  // Everything the first person kept is gone from the device: the list, the thumbnails, the cache.
  await pageHolds(page, `${readKept('registry')}.then((v) => v === null)`);
  expect(await page.evaluate(readKept('*', 'trimout-kept-photos', 'thumbnails'))).toEqual([]);
  const cached = (await page.evaluate(readKept('queries'))) as string | null;
  expect(cached ?? '').not.toContain(tags[0]);
  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  await page.getByTestId('kept-level-none').waitFor();
  // Offline, the level is not there for the second person.
  await context.setOffline(true);
  await page.reload();
  await page.getByTestId('offline-start').waitFor();
  expect(await page.getByTestId(`walk-unit-${tags[0]}`).count()).toBe(0);
  // nor of the first one's queue: nothing is said to wait on this phone
  expect(await page.getByTestId('offline-start-waiting').count()).toBe(0);
  await context.setOffline(false);
  await page.close();
});

it('a 4000×3000 photo picked in the finding form reaches the server at 2560 px on its long side', async () => {
  const { page, problems } = await h.newPage(PHONE);
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/new?unitId=${unitIds[2]}`);
  await page.getByTestId('finding-form').waitFor();
  const options = await page.getByTestId('finding-form-item').locator('option').allTextContents();
  await page.getByTestId('finding-form-item').selectOption({ label: options.find((o) => o.startsWith('MT-02'))! });
  const note = `Big photo ${suffix}`;
  await page.getByTestId('finding-form-files-input').setInputFiles({ name: 'wide.jpg', mimeType: 'image/jpeg', buffer: await jpeg(4000, 3000, { r: 90, g: 140, b: 60 }) });
  await page.getByTestId('finding-form-photos-thumb-0').waitFor();
  await page.getByTestId('finding-form-note').fill(note);
  await page.getByTestId('finding-form-submit').click();
  // The stored photo of that finding, read back from the object store.
  const end = Date.now() + 30_000;
  let photo: Photo | null = null;
  while (!photo && Date.now() < end) {
    const [rows] = await h.db.sequelize.query(`SELECT p.id FROM photos p JOIN findings f ON f.id = p.finding_id WHERE f.note = :note`, { replacements: { note } });
    const id = (rows as { id: string }[])[0]?.id;
    photo = id ? await Photo.findByPk(id) : null;
    if (!photo) await new Promise((r) => setTimeout(r, 200));
  }
  if (!photo) throw new Error('The finding with the photo did not reach the server.');
  const stored = await s3.store.get(photo.storageKey);
  if (!stored) throw new Error('The photo is not in the object store.');
  const chunks: Buffer[] = [];
  for await (const chunk of stored.body) chunks.push(Buffer.from(chunk as Buffer));
  const meta = await sharp(Buffer.concat(chunks)).metadata();
  // The row and the file agree.
  expect([photo.width, photo.height]).toEqual([meta.width, meta.height]);
  expect(Math.max(meta.width ?? 0, meta.height ?? 0)).toBe(2560);
  expect(Math.min(meta.width ?? 0, meta.height ?? 0)).toBe(1920);
  expect(problems).toEqual([]);
  await page.close();
});
