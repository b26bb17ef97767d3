/**
 * Sign-in through the real page, as each role, at phone size and wide. The app must run under
 * the server's content security policy: any CSP refusal or page error fails the test.
 */
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';

jest.setTimeout(120_000);

let h: BrowserHarness;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
});
afterAll(async () => {
  await h?.close();
});

const roles = [
  // The GC manager also has the demo's second building, a copy in set-up (server/seed/demoCopy.ts).
  { account: DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!, badge: 'GC manager', jobs: 3 },
  { account: DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!, badge: 'Inspector', jobs: 2 },
  { account: DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!, badge: 'Subcontractor', jobs: 1 },
];
const sizes = [
  { name: 'phone', viewport: PHONE },
  { name: 'wide', viewport: WIDE },
];

describe.each(sizes)('at $name size', ({ name, viewport }) => {
  it.each(roles)('the $badge signs in through the page and sees their jobs and role', async ({ account, badge, jobs }) => {
    const { page, problems } = await h.newPage(viewport);
    await page.goto(`${h.baseUrl}/`);
    await page.waitForURL('**/sign-in');
    await page.getByTestId('sign-in-email').fill(account.email);
    await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
    await page.getByTestId('sign-in-submit').click();
    await page.getByTestId('job-list').waitFor();
    expect(new URL(page.url()).pathname).toBe('/');
    await expect(page.getByTestId('header-user-name').textContent()).resolves.toBe(account.name);
    const badges = await page.getByTestId('job-role').allTextContents();
    expect(badges).toEqual(Array(jobs).fill(badge));
    await h.screenshot(page, `sign-in-${account.role}-${account.company}-${name}`);

    // a reload keeps you signed in (the session lives in PostgreSQL); the session is read once,
    // by the page's early script (public/early-session.js), and the app takes that answer
    const sessionReads: string[] = [];
    const countSession = (r: { method(): string; url(): string }) => {
      if (r.method() === 'GET' && new URL(r.url()).pathname === '/api/session') sessionReads.push(r.url());
    };
    page.on('request', countSession);
    await page.reload();
    await page.getByTestId('job-list').waitFor();
    page.off('request', countSession);
    expect(sessionReads).toHaveLength(1);
    await expect(page.evaluate(() => Object.keys((globalThis as { __trimoutEarly?: object }).__trimoutEarly ?? { none: 1 }))).resolves.toEqual([]);

    // open the first job
    await page.getByText('Cinder Lane Commons', { exact: true }).click();
    await page.getByTestId('job-name').waitFor();
    await expect(page.getByTestId('job-name').textContent()).resolves.toBe('Cinder Lane Commons');
    await h.screenshot(page, `job-overview-${account.role}-${name}`);

    await page.getByTestId('sign-out').click();
    await page.waitForURL('**/sign-in');
    expect(problems).toEqual([]);
    await page.context().close();
  });

  it('a wrong password shows a message at the form, not a crash', async () => {
    const { page, problems } = await h.newPage(viewport);
    await page.goto(`${h.baseUrl}/sign-in`);
    await page.getByTestId('sign-in-email').fill(DEMO_ACCOUNTS[0]!.email);
    await page.getByTestId('sign-in-password').fill('not the password');
    await page.getByTestId('sign-in-submit').click();
    const alert = page.getByTestId('sign-in-error');
    await alert.waitFor();
    await expect(alert.textContent()).resolves.toMatch(/do not match/);
    await h.screenshot(page, `sign-in-wrong-password-${name}`);
    expect(problems).toEqual([]);
    await page.context().close();
  });

  it('an empty form shows the field messages from the shared schema', async () => {
    const { page } = await h.newPage(viewport);
    await page.goto(`${h.baseUrl}/sign-in`);
    await page.getByTestId('sign-in-submit').click();
    await page.getByTestId('sign-in-email-error').waitFor();
    await expect(page.getByTestId('sign-in-email-error').textContent()).resolves.toBe('Enter your e-mail address.');
    await h.screenshot(page, `sign-in-empty-${name}`);
    await page.context().close();
  });
});
