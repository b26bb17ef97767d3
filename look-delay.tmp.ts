import { chromium } from 'playwright-core';
const BASE = 'http://127.0.0.1:3000';
(async () => {
  const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--disable-background-networking'] });
  for (const [name, viewport] of [['phone', { width: 390, height: 844 }], ['wide', { width: 1366, height: 900 }]] as const) {
    const ctx = await browser.newContext({ viewport });
    const page = await ctx.newPage();
    await page.goto(`${BASE}/sign-in`);
    await page.getByTestId('sign-in-email').fill('inspector@demo.trimout.example');
    await page.getByTestId('sign-in-password').fill('trimout-demo-2026');
    await page.getByTestId('sign-in-submit').click();
    await page.getByTestId('job-list').waitFor();
    const session = await page.evaluate(async () => (await fetch('/api/session')).json());
    const jobId = session.jobs[0].id;
    const levels = await page.evaluate(async (j) => (await fetch(`/api/jobs/${j}/levels`)).json(), jobId);
    const level = (levels.items ?? levels)[1];
    // The server asks to wait on every check write.
    await page.route('**/api/jobs/*/checks**', (route) =>
      route.request().method() === 'POST'
        ? route.fulfill({ status: 429, headers: { 'Retry-After': '120', 'Content-Type': 'application/json' }, body: JSON.stringify({ error: { id: 'rate_limited', message: 'Too many uploads from you in the last few minutes.' } }) })
        : route.continue(),
    );
    await page.route('**/api/jobs/*/units/*/checks**', (route) =>
      route.request().method() === 'POST'
        ? route.fulfill({ status: 429, headers: { 'Retry-After': '120', 'Content-Type': 'application/json' }, body: JSON.stringify({ error: { id: 'rate_limited', message: 'Too many uploads from you in the last few minutes.' } }) })
        : route.continue(),
    );
    await page.goto(`${BASE}/jobs/${jobId}/levels/${level.id}/walk`);
    const first = page.locator('[data-testid^="walk-unit-"]').first();
    await first.waitFor();
    await first.click();
    await page.waitForTimeout(2000); await page.screenshot({ path: '/tmp/look/check.png' }); if (await page.getByTestId('unit-check-all-ok').isEnabled()) await page.getByTestId('unit-check-all-ok').click();
    await page.getByTestId('unit-check-save').click();
    await page.waitForTimeout(3000);
    await page.goto(`${BASE}/sync`);
    await page.getByTestId('sync-screen').waitFor();
    await page.waitForTimeout(1500);
    await page.screenshot({ path: `/tmp/look/sync-delay-${name}.png`, fullPage: true });
    console.log(name, await page.getByTestId('sync-item-delay').allTextContents());
    await ctx.close();
  }
  await browser.close();
})();
