/**
 * A walk that starts and ends with no signal, at phone size (390×844): the inspector keeps a level
 * on the phone online without starting a walk, then, offline and after a reload, checks a unit (the
 * walk starts on the phone, named by an id made there), ends the walk (its summary cannot be read
 * offline and says so), and checks another unit (a second walk starts on the phone). Back online,
 * the server holds exactly two walks, the first ended, each with its own check, once each. Counted
 * in SQL.
 */
import { randomUUID } from 'node:crypto';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo';
import { demoLevel } from '../support/demo';
import { PHONE, serviceWorkerControls, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { waitFor } from '../support/wait';

jest.setTimeout(240_000);

let h: BrowserHarness;
let jobId = '';
let levelId = '';
const suffix = randomUUID().slice(0, 4).toUpperCase();
const tags = [`IU-W${suffix}-01`, `IU-W${suffix}-02`] as const;
const unitIds: string[] = [];
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  const made = await demoLevel(`Walk offline ${suffix}`, tags, { kind: 'cassette_4way', modelName: `Cassette WS-${suffix}` });
  ({ jobId, levelId } = made);
  unitIds.push(...made.unitIds);
});
afterAll(async () => {
  await h?.close();
});

async function rows<T>(sql: string, bind: unknown[]): Promise<T[]> {
  const [found] = await h.db.sequelize.query(sql, { bind });
  return found as T[];
}

it('starts a walk on the phone with no signal, ends it offline and starts another; back online the server holds both walks and their checks once each', async () => {
  const { page, context, problems } = await h.newPage(PHONE);
  await h.signIn(page, inspector.email, DEMO_PASSWORD);
  // Online: the level is kept on the phone; no walk is started.
  await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
  await serviceWorkerControls(page);
  await page.getByTestId('kept-level-keep').click();
  await page.getByTestId('kept-level-status').waitFor();
  expect(await page.getByTestId('walk-open').count()).toBe(0);
  expect(await rows(`SELECT id FROM walks WHERE level_id = $1`, [levelId])).toEqual([]);

  // No signal, and the app opened cold.
  await context.setOffline(true);
  await page.reload();
  await page.getByTestId(`walk-unit-${tags[0]}`).waitFor();

  // The first check starts the walk on the phone; the walk screen shows it open.
  await page.getByTestId(`walk-unit-${tags[0]}`).click();
  await page.getByTestId('unit-check-all-ok').click();
  await page.getByTestId('unit-check-save').click();
  await page.getByTestId('level-walk-name').waitFor();
  await page.getByTestId('walk-open').waitFor();
  await page.getByTestId('header-outbox').filter({ hasText: '2 waiting to send' }).waitFor();

  // Ending it offline: the summary says why it cannot be read, and the end waits on the phone.
  await page.getByTestId('walk-finish').click();
  await page.getByTestId('walk-summary-offline').waitFor();
  await h.screenshot(page, 'offline-walk-start-01-finish-without-signal');
  await page.getByTestId('walk-summary-end').click();
  await page.getByTestId('header-outbox').filter({ hasText: '3 waiting to send' }).waitFor();
  await waitFor(async () => (await page.getByTestId('walk-open').count()) === 0, { what: 'the walk to end on the phone' });

  // The next check starts another walk on the phone.
  await page.getByTestId(`walk-unit-${tags[1]}`).click();
  await page.getByTestId('unit-check-all-ok').click();
  await page.getByTestId('unit-check-save').click();
  await page.getByTestId('level-walk-name').waitFor();
  await page.getByTestId('walk-open').waitFor();
  await page.getByTestId('header-outbox').filter({ hasText: '5 waiting to send' }).waitFor();

  // A reload with no signal keeps the queue; the sync screen names each write in order.
  await page.reload();
  await page.getByTestId('header-outbox').filter({ hasText: '5 waiting to send' }).waitFor();
  await page.getByTestId('header-outbox').click();
  await page.getByTestId('sync-screen').waitFor();
  await waitFor(async () => (await page.getByTestId('sync-item-waiting').count()) === 5, { what: 'the sync screen to list the queue' });
  const words = await page.getByTestId('sync-item-waiting').allTextContents();
  expect(words.map((w) => (/Start of a walk/.test(w) ? 'start' : /End of a walk/.test(w) ? 'end' : /Unit check/.test(w) ? 'check' : w))).toEqual([
    'start',
    'check',
    'end',
    'start',
    'check',
  ]);
  expect([words[0], words[2]].map((w) => w.includes(`Walk offline ${suffix}`))).toEqual([true, true]);
  await h.screenshot(page, 'offline-walk-start-02-sync-screen');
  expect(await rows(`SELECT id FROM walks WHERE level_id = $1`, [levelId])).toEqual([]);

  await context.setOffline(false);
  await waitFor(async () => (await page.getByTestId('header-outbox').count()) === 0, { timeout: 60_000, what: 'the queue to be sent' });

  const walks = await rows<{ id: string; finished: boolean }>(
    `SELECT id, finished_at IS NOT NULL AS finished FROM walks WHERE level_id = $1 AND inspector_id = (SELECT id FROM users WHERE email = $2) ORDER BY started_at`,
    [levelId, inspector.email],
  );
  const checks = await rows<{ unit_id: string; walk_id: string }>(`SELECT unit_id, walk_id FROM unit_checks WHERE unit_id = ANY($1::uuid[]) ORDER BY created_at`, [unitIds]);
  console.log(`walks started offline: ${walks.length} (${walks.map((w) => (w.finished ? 'ended' : 'open')).join(', ')}), checks: ${checks.length}`);
  expect(walks.map((w) => w.finished)).toEqual([true, false]);
  expect(checks).toEqual([
    { unit_id: unitIds[0], walk_id: walks[0]!.id },
    { unit_id: unitIds[1], walk_id: walks[1]!.id },
  ]);
  expect(problems.filter((p) => !/ERR_INTERNET_DISCONNECTED|Failed to fetch|net::/.test(p))).toEqual([]);
  await context.close();
});
