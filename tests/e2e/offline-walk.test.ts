/**
 * A walk without signal, at phone size (390×844): the inspector starts a walk and keeps the level on
 * the phone online, goes offline, returns a fixed finding with a reason (the re-inspection screen),
 * checks 10 units (All OK where nothing is wrong) and logs 5 findings with two photos each;
 * everything is kept in the outbox (IndexedDB) and shown as waiting to send, survives a reload while
 * offline, and reaches the server once back online, exactly once each, even with the network cut
 * after the third request of the sync (its answer lost after the server did the work). Counted in
 * SQL; photos compared by SHA-256 as stored (the same bytes posted again online re-encode the same).
 * Then: a fix that waits while its finding is voided on the server needs attention, shown with both
 * versions, while the other queued fix goes through; and a second person signed in on the same
 * browser profile never sees nor sends the first one's queue.
 */
import { createHash, randomUUID } from 'node:crypto';
import sharp from 'sharp';
import type { Route } from 'playwright-core';
import { CatalogueItem, Company, Job, JobCompany, Photo, UnitModel } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD } from '../../server/seed/demo';
import { signIn } from '../support/app';
import { buildLevel, buildUnit, copyCatalogue } from '../support/factories';
import { PHONE, serviceWorkerControls, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { startFakeS3, type FakeS3 } from '../support/storage';
import { countRows } from '../support/db';
import { until } from '../support/wait';

jest.setTimeout(240_000);

let h: BrowserHarness;
let s3: FakeS3;
let jobId = '';
let levelId = '';
let mechanicalId = '';
const suffix = randomUUID().slice(0, 4).toUpperCase();
const levelName = `No signal ${suffix}`;
/** The 10 units the walk checks. */
const tags = Array.from({ length: 10 }, (_, i) => `IU-N${suffix}-${String(i + 1).padStart(2, '0')}`);
const unitIds: string[] = [];
/** The defect logged on each of the first five units (the other five are checked with nothing wrong). */
const DEFECTS = ['MT-01', 'MT-02', 'MT-04', 'MT-01', 'MT-02'] as const;
/** One more unit on the level, whose finding has a fix waiting for re-inspection (returned offline). */
const fixedTag = `IU-N${suffix}-FX`;
let fixed = { id: '', number: 0 };
/** A unit checked with nothing wrong (the last test saves its check again). */
const allOk = tags.length - 1;
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;
const mechanical = DEMO_ACCOUNTS.find((a) => a.role === 'subcontractor' && a.company === 'mechanical')!;

beforeAll(async () => {
  s3 = await startFakeS3();
  h = await startBrowserHarness({ objectStore: s3.store });
  await seedDemo(h.db);
  const job = await Job.findOne({ where: { name: 'Cinder Lane Commons' } });
  if (!job) throw new Error('The demo job is missing.');
  jobId = job.id;
  if ((await CatalogueItem.count({ where: { jobId } })) === 0) await copyCatalogue(jobId);
  const company = await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } });
  mechanicalId = company!.id;
  if (!(await JobCompany.findOne({ where: { jobId, companyId: mechanicalId } }))) {
    await JobCompany.create({ jobId, companyId: mechanicalId, trades: ['mechanical', 'plumbing', 'insulation', 'controls'] });
  }
  const level = await buildLevel(jobId, { name: levelName });
  levelId = level.id;
  const model = await UnitModel.create({ jobId, name: `Cassette NX-${suffix}`, modelNumber: null, unitKind: 'cassette_4way', nominalCapacity: null });
  for (const tag of tags) unitIds.push((await buildUnit(jobId, level.id, { tag, kind: 'cassette_4way', modelId: model.id })).id);
  // A finding with a fix submitted, through the API: logged by the inspector, fixed with a photo by the mechanical sub.
  const fixedUnit = await buildUnit(jobId, level.id, { tag: fixedTag, kind: 'cassette_4way', modelId: model.id });
  const inspectorApi = await signIn(h.trimout.app, inspector.email, DEMO_PASSWORD);
  const item = await CatalogueItem.findOne({ where: { jobId, code: 'MT-03' } });
  const logged = await inspectorApi.agent
    .post(`/api/jobs/${jobId}/findings`)
    .set('X-CSRF-Token', inspectorApi.csrf)
    .send({ catalogueItemId: item!.id, unitId: fixedUnit.id, companyId: mechanicalId, note: `Fixed before the walk ${suffix}` });
  if (logged.status !== 201) throw new Error(`The finding was refused: ${logged.status} ${JSON.stringify(logged.body)}`);
  fixed = logged.body as { id: string; number: number };
  const sub = await signIn(h.trimout.app, mechanical.email, DEMO_PASSWORD);
  const fix = await sub.agent
    .post(`/api/jobs/${jobId}/findings/${fixed.id}/fixes`)
    .set('X-CSRF-Token', sub.csrf)
    .field('data', JSON.stringify({ note: `Bracing added ${suffix}` }))
    .attach('photos', await jpeg({ r: 20, g: 20, b: 200 }), { filename: 'fixed.jpg', contentType: 'image/jpeg' });
  if (fix.status !== 201) throw new Error(`The fix was refused: ${fix.status} ${JSON.stringify(fix.body)}`);
});
afterAll(async () => {
  await h?.close();
  await s3?.close();
});

function jpeg(colour: { r: number; g: number; b: number }): Promise<Buffer> {
  return sharp({ create: { width: 640, height: 480, channels: 3, background: colour } }).jpeg({ quality: 80 }).toBuffer();
}

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

async function storedSha(key: string): Promise<string> {
  const obj = await s3.store.get(key);
  if (!obj) throw new Error(`No stored object ${key}`);
  const chunks: Buffer[] = [];
  for await (const c of obj.body) chunks.push(Buffer.from(c as Buffer));
  return sha(Buffer.concat(chunks));
}

/** Rows counted in SQL (`SELECT count(*) AS n ...`). */
const count = (sql: string, bind: unknown[]) => countRows(h.db, sql, bind);

/** The outbox's records as kept in IndexedDB, photos read back as base64 (browser code as a string: no DOM types here). */
const READ_OUTBOX = `new Promise((resolve, reject) => {
  const open = indexedDB.open('trimout-outbox');
  open.onerror = () => reject(open.error);
  open.onsuccess = () => {
    const d = open.result;
    if (!d.objectStoreNames.contains('writes')) { d.close(); return resolve([]); }
    const get = d.transaction('writes').objectStore('writes').getAll();
    get.onsuccess = async () => {
      d.close();
      const out = [];
      for (const item of get.result) {
        const files = item.write.body.kind === 'form' ? item.write.body.files : [];
        const photos = [];
        for (const f of files) {
          if (!(f.blob instanceof Blob)) throw new Error('A photo is not kept as a Blob');
          const bytes = new Uint8Array(await f.blob.arrayBuffer());
          let s = ''; for (const b of bytes) s += String.fromCharCode(b);
          photos.push(btoa(s));
        }
        const data = item.write.body.kind === 'form' ? JSON.parse(item.write.body.fields.find((x) => x.name === 'data').value) : item.write.body.value;
        out.push({ userId: item.userId, kind: item.kind, state: item.state, key: item.write.idempotencyKey, path: item.write.path, data, photos });
      }
      resolve(out);
    };
    get.onerror = () => reject(get.error);
  };
})`;

interface KeptItem {
  userId: string;
  kind: string;
  state: string;
  key: string;
  path: string;
  data: { id?: string; note?: string };
  photos: string[];
}

it('a walk offline: a return, 10 unit checks and 5 findings with 2 photos each kept through a reload, then sent once each, even with the network cut mid-sync', async () => {
  const { page, context, problems } = await h.newPage(PHONE);
  page.on('dialog', (d) => void d.accept());
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  // Online: the walk is started and the level kept on the phone.
  const session = (await (await page.request.get(`${h.baseUrl}/api/session`)).json()) as { csrfToken: string };
  const started = await page.request.post(`${h.baseUrl}/api/jobs/${jobId}/walks`, {
    headers: { 'X-CSRF-Token': session.csrfToken, 'Idempotency-Key': randomUUID() },
    data: { levelId },
  });
  expect(started.status()).toBe(201);
  const walkId = ((await started.json()) as { id: string }).id;
  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  await page.getByTestId('walk-open').waitFor();
  await serviceWorkerControls(page);
  await page.getByTestId('kept-level-keep').click();
  await page.getByTestId('kept-level-status').waitFor();
  // The fixed finding opened online (in the app's memory: a finding's page is not kept with the level).
  await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/${fixed.id}`);
  await page.getByTestId('finding-reinspect').waitFor();

  // No signal from here. The fix is returned with a reason through the re-inspection screen.
  await context.setOffline(true);
  await page.getByTestId('offline-banner').waitFor();
  const reason = `Bracing still loose at the second rod ${suffix}.`;
  await page.getByTestId('reinspect-reason').fill(reason);
  await page.getByTestId('reinspect-return').click();
  await page.getByTestId('header-outbox').filter({ hasText: '1 waiting to send' }).waitFor();
  // The walk screen opens offline from the service worker, with the level kept on the phone.
  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  await page.getByTestId(`walk-unit-${tags[0]}`).waitFor();
  const photos: Buffer[] = [];
  for (const [i, tag] of tags.entries()) {
    await page.getByTestId(`walk-unit-${tag}`).click();
    await page.getByTestId('unit-check-all-ok').waitFor();
    const code = DEFECTS[i];
    if (code) {
      await page.getByTestId(`check-item-${code}-mark-defect`).click();
      await page.getByTestId(`check-item-${code}-log`).click();
      await page.getByTestId('finding-form').waitFor();
      const pair = [await jpeg({ r: 40 + 60 * i, g: 90, b: 140 }), await jpeg({ r: 200, g: 40 + 60 * i, b: 60 })];
      photos.push(...pair);
      await page.getByTestId('finding-form-files-input').setInputFiles(pair.map((buffer, n) => ({ name: `${tag}-${n}.jpg`, mimeType: 'image/jpeg', buffer })));
      await page.getByTestId('finding-form-photos-thumb-1').waitFor();
      await page.getByTestId('finding-form-note').fill(`Offline ${suffix} on ${tag}`);
      const saving = Date.now();
      await page.getByTestId('finding-form-submit').click();
      await page.getByTestId('unit-check-confirmation').waitFor();
      console.log(`finding with 2 photos kept on the phone in ${Date.now() - saving} ms (press to confirmation, offline)`);
      expect(await page.getByTestId('unit-check-confirmation').textContent()).toContain('waiting to send');
    }
    await page.getByTestId('unit-check-all-ok').click();
    await page.getByTestId('unit-check-save').click();
    await page.getByTestId('level-walk-name').waitFor();
    await page.getByTestId(`walk-unit-${tag}-waiting`).waitFor();
  }
  // Saved on the phone, and said so: nothing pretends to be on the server.
  expect(await page.getByTestId('level-walk-saved').textContent()).toBe(`Unit check of ${tags[allOk]} saved on this phone, waiting to send.`);
  const expected = 1 + tags.length + DEFECTS.length;
  expect(await page.getByTestId('header-outbox').textContent()).toBe(`${expected} waiting to send`);
  expect(await page.getByTestId('offline-banner').textContent()).toContain(`${expected} waiting to send`);
  await page.getByTestId('level-walk-waiting').waitFor();
  await h.screenshot(page, 'offline-walk-01-banner-with-count');

  // Kept on the device: one record per write, the photos as Blobs, the finding ids made on the phone.
  const kept = (await page.evaluate(READ_OUTBOX)) as KeptItem[];
  expect(kept.map((k) => k.kind).sort()).toEqual([...Array(tags.length).fill('check'), ...Array(DEFECTS.length).fill('finding'), 'reinspection'].sort());
  expect(kept.find((k) => k.kind === 'reinspection')?.path).toBe(`/api/jobs/${jobId}/findings/${fixed.id}/reinspections`);
  const keptFindings = kept.filter((k) => k.kind === 'finding');
  expect(keptFindings.every((k) => k.photos.length === 2 && /^[0-9a-f-]{36}$/.test(k.data.id ?? ''))).toBe(true);
  expect(await count(`SELECT count(*) AS n FROM findings WHERE note LIKE $1`, [`Offline ${suffix}%`])).toBe(0);
  expect(await count(`SELECT count(*) AS n FROM finding_events WHERE finding_id = $1 AND kind = 'returned'`, [fixed.id])).toBe(0);

  // A reload with no signal: the app opens from the service worker, the queue is intact and shown.
  await page.reload();
  await page.getByTestId(`walk-unit-${tags[0]}`).waitFor();
  await page.getByTestId('header-outbox').waitFor();
  expect(await page.getByTestId('header-outbox').textContent()).toBe(`${expected} waiting to send`);
  await page.getByTestId('header-outbox').click();
  await page.getByTestId('sync-screen').waitFor();
  await until(async () => (await page.getByTestId('sync-item-waiting').count()) === expected, 'the sync screen to list the queue', 10_000);
  await h.screenshot(page, 'offline-walk-02-sync-screen-offline');
  const keptAfterReload = (await page.evaluate(READ_OUTBOX)) as KeptItem[];
  expect(keptAfterReload.map((k) => k.key).sort()).toEqual(kept.map((k) => k.key).sort());

  // Back online, with the network cut after the third request of the sync: its answer is lost after
  // the server did the work; the next two requests fail outright; then the network is back.
  let posts = 0;
  let down = 0;
  const cut = async (route: Route) => {
    if (down > 0) {
      down -= 1;
      return route.abort('internetdisconnected');
    }
    if (route.request().method() === 'POST' && ++posts === 3) {
      down = 2;
      await route.fetch(); // reaches the server, which does the work
      return route.abort('connectionreset'); // the answer never reaches the phone
    }
    return route.continue();
  };
  await page.route('**/api/**', cut);
  await context.setOffline(false);
  await until(async () => (await page.getByTestId('header-outbox').count()) === 0, 'the queue to be sent');
  await page.unroute('**/api/**', cut);
  expect(posts).toBeGreaterThan(expected);
  await page.getByTestId('sync-empty').or(page.getByTestId('sync-sent')).first().waitFor();
  expect(await page.getByTestId('sync-item-sent').count()).toBe(expected);

  // Exactly once each, counted in SQL.
  const findings = await count(`SELECT count(*) AS n FROM findings WHERE note LIKE $1`, [`Offline ${suffix}%`]);
  const photoRows = await count(`SELECT count(*) AS n FROM photos p JOIN findings f ON f.id = p.finding_id WHERE f.note LIKE $1`, [`Offline ${suffix}%`]);
  const checks = await count(`SELECT count(*) AS n FROM unit_checks WHERE unit_id = ANY($1::uuid[])`, [unitIds]);
  const onWalk = await count(`SELECT count(*) AS n FROM unit_checks WHERE unit_id = ANY($1::uuid[]) AND walk_id = $2`, [unitIds, walkId]);
  const byPhoneId = await count(`SELECT count(*) AS n FROM findings WHERE id = ANY($1::uuid[])`, [keptFindings.map((k) => k.data.id)]);
  console.log(`offline walk synced: ${findings} findings, ${photoRows} photos, ${checks} unit checks (${onWalk} on the walk); ${posts} POSTs for ${expected} writes (the cut one sent again)`);
  expect({ findings, photoRows, checks, onWalk, byPhoneId }).toEqual({ findings: DEFECTS.length, photoRows: 2 * DEFECTS.length, checks: tags.length, onWalk: tags.length, byPhoneId: DEFECTS.length });
  // The return: once, with the reason typed offline; the finding is open again, returned once.
  const returned = await count(`SELECT count(*) AS n FROM finding_events WHERE finding_id = $1 AND kind = 'returned'`, [fixed.id]);
  const withReason = await count(`SELECT count(*) AS n FROM finding_events WHERE finding_id = $1 AND kind = 'returned' AND reason = $2`, [fixed.id, reason]);
  const reopened = await count(`SELECT count(*) AS n FROM findings WHERE id = $1 AND status = 'open' AND return_count = 1`, [fixed.id]);
  expect({ returned, withReason, reopened }).toEqual({ returned: 1, withReason: 1, reopened: 1 });

  // The photos as stored: the same bytes as the kept Blobs posted again online (the server's re-encoding
  // is the same for the same bytes), compared by SHA-256.
  const control = await signIn(h.trimout.app, inspector.email, DEMO_PASSWORD);
  for (const k of keptFindings) {
    const stored = await Photo.findAll({ where: { findingId: k.data.id! }, order: [['createdAt', 'ASC']] });
    const req = control.agent
      .post(`/api/jobs/${jobId}/findings`)
      .set('X-CSRF-Token', control.csrf)
      .field('data', JSON.stringify({ ...k.data, id: undefined, note: `Control ${suffix}`, walkId: undefined }));
    k.photos.forEach((b64, n) => req.attach('photos', Buffer.from(b64, 'base64'), { filename: `c${n}.jpg`, contentType: 'image/jpeg' }));
    const res = await req;
    expect(res.status).toBe(201);
    const again = await Photo.findAll({ where: { findingId: res.body.id }, order: [['createdAt', 'ASC']] });
    expect(await Promise.all(stored.map((p) => storedSha(p.storageKey)))).toEqual(await Promise.all(again.map((p) => storedSha(p.storageKey))));
  }
  expect(photos).toHaveLength(2 * DEFECTS.length);
  expect(problems.filter((p) => !/ERR_INTERNET_DISCONNECTED|ERR_CONNECTION_RESET|Failed to fetch|net::/.test(p))).toEqual([]);
  await page.close();
});

it('a fix waiting while its finding is voided on the server needs attention, with both versions; the other fix goes through', async () => {
  const inspectorApi = await signIn(h.trimout.app, inspector.email, DEMO_PASSWORD);
  const item = await CatalogueItem.findOne({ where: { jobId, code: 'MT-03' } });
  const logged = [];
  for (const unitId of unitIds.slice(0, 2)) {
    const res = await inspectorApi.agent
      .post(`/api/jobs/${jobId}/findings`)
      .set('X-CSRF-Token', inspectorApi.csrf)
      .send({ catalogueItemId: item!.id, unitId, companyId: mechanicalId, note: `To fix ${suffix}` });
    expect(res.status).toBe(201);
    logged.push(res.body as { id: string; number: number });
  }
  const [voided, kept] = logged as [{ id: string; number: number }, { id: string; number: number }];
  const { page, context } = await h.newPage(PHONE);
  page.on('dialog', (d) => void d.accept());
  await context.clearCookies();
  await h.signIn(page, mechanical.email, DEMO_PASSWORD);
  // Both findings opened online (in-app, so they stay in memory), then no signal.
  await page.goto(`${h.baseUrl}/inbox`);
  await page.getByTestId(`inbox-card-${kept.number}`).click();
  await page.getByTestId('fix-form').waitFor();
  await page.goBack();
  await page.getByTestId(`inbox-card-${voided.number}`).click();
  await page.getByTestId('fix-form').waitFor();
  await context.setOffline(true);
  const fix = async (note: string, colour: { r: number; g: number; b: number }) => {
    await page.getByTestId('fix-form-note').fill(note);
    await page.getByTestId('fix-form-files-input').setInputFiles({ name: 'fixed.jpg', mimeType: 'image/jpeg', buffer: await jpeg(colour) });
    await page.getByTestId('fix-form-photos-thumb-0').waitFor();
    await page.getByTestId('fix-form-submit').click();
  };
  await fix(`Re-hung on rod ${suffix}`, { r: 10, g: 200, b: 10 });
  await page.getByTestId('fix-form-waiting').waitFor();
  await page.getByTestId('header-outbox').filter({ hasText: '1 waiting to send' }).waitFor();
  await page.goBack();
  await page.getByTestId(`inbox-card-${kept.number}`).click();
  await page.getByTestId('fix-form').waitFor();
  await fix(`Bracing added ${suffix}`, { r: 10, g: 10, b: 200 });
  await page.getByTestId('header-outbox').filter({ hasText: '2 waiting to send' }).waitFor();

  // Meanwhile the GC manager voids the first finding.
  const gcApi = await signIn(h.trimout.app, gc.email, DEMO_PASSWORD);
  const current = await gcApi.agent.get(`/api/jobs/${jobId}/findings/${voided.id}`);
  const voiding = await gcApi.agent
    .patch(`/api/jobs/${jobId}/findings/${voided.id}`)
    .set('X-CSRF-Token', gcApi.csrf)
    .set('If-Match', current.headers.etag as string)
    .send({ void: { reason: 'Logged twice.' } });
  expect(voiding.status).toBe(200);

  await context.setOffline(false);
  // Exactly that one left: the other fix went through.
  await page.getByTestId('header-outbox').filter({ hasText: /^1 needs attention$/ }).waitFor({ timeout: 60_000 });
  const fixes = async (findingId: string) => count(`SELECT count(*) AS n FROM fixes WHERE finding_id = $1`, [findingId]);
  expect([await fixes(voided.id), await fixes(kept.id)]).toEqual([0, 1]);
  await page.getByTestId('header-outbox').click();
  const card = page.getByTestId('sync-item-attention');
  await card.waitFor();
  expect(await card.getByTestId('sync-queued-version').textContent()).toContain(`Re-hung on rod ${suffix}`);
  expect(await card.getByTestId('sync-server-version').textContent()).toContain('Logged twice.');
  expect(await card.getByTestId('sync-server-version').textContent()).toMatch(/Status: Voided/i);
  await h.screenshot(page, 'offline-walk-03-sync-needs-attention');
  // Discarding asks first; then nothing is left and nothing was sent for the voided finding.
  await card.getByTestId('sync-discard').click();
  await card.getByTestId('sync-discard-confirm').click();
  await page.getByTestId('sync-item-attention').waitFor({ state: 'detached' });
  expect(await page.getByTestId('header-outbox').count()).toBe(0);
  expect([await fixes(voided.id), await fixes(kept.id)]).toEqual([0, 1]);
  await page.close();
});

it('a second person signed in on the same browser profile never sees nor sends the first one’s queue', async () => {
  const { page, context } = await h.newPage(PHONE);
  page.on('dialog', (d) => void d.accept());
  await context.clearCookies();
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  await page.getByTestId(`walk-unit-${tags[allOk]}`).click();
  // Checked before (all OK): saved again as it is, a new unit check.
  await page.getByTestId('unit-check-save').waitFor();
  await context.setOffline(true);
  await page.getByTestId('unit-check-save').click();
  await page.getByTestId('header-outbox').filter({ hasText: '1 waiting to send' }).waitFor();
  const before = await count(`SELECT count(*) AS n FROM unit_checks WHERE unit_id = $1`, [unitIds[allOk]]);

  // The inspector's session ends without signing out; the GC manager signs in on the same profile.
  await context.clearCookies();
  await context.setOffline(false);
  await h.signIn(page, gc.email, DEMO_PASSWORD);
  await page.goto(`${h.baseUrl}/sync`);
  await page.getByTestId('sync-empty').waitFor();
  expect(await page.getByTestId('header-outbox').count()).toBe(0);
  // Still on the device, still the inspector's, never sent with the GC manager's session.
  const kept = (await page.evaluate(READ_OUTBOX)) as KeptItem[];
  expect(kept.map((k) => k.kind)).toEqual(['check']);
  expect(await count(`SELECT count(*) AS n FROM unit_checks WHERE unit_id = $1`, [unitIds[allOk]])).toBe(before);

  // The inspector signs in again: their check goes, once.
  await context.clearCookies();
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  await until(async () => (await count(`SELECT count(*) AS n FROM unit_checks WHERE unit_id = $1`, [unitIds[allOk]])) === before + 1, 'the inspector’s check to be sent');
  await until(async () => ((await page.evaluate(READ_OUTBOX)) as KeptItem[]).length === 0, 'the outbox to be empty');
  expect(await count(`SELECT count(*) AS n FROM unit_checks WHERE unit_id = $1`, [unitIds[allOk]])).toBe(before + 1);
  await page.close();
});
