/**
 * Keyboard only, at 1280x800: the inspector signs in, logs a finding on a unit and, once the
 * mechanical subcontractor has submitted a fix (through the API: a photo cannot be chosen from the
 * keyboard alone in a headless browser), accepts it from the re-inspection queue. Tab, Shift+Tab,
 * Enter, Space, arrows and typing only: no mouse click. Every control reached shows a visible focus
 * ring and is named by its visible text.
 */
import { randomUUID } from 'node:crypto';
import type { Page } from 'playwright-core';
import sharp from 'sharp';
import { Company, Finding, JobCompany } from '../../server/models';
import { DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { signIn as apiSignIn } from '../support/app';
import { WIDE, pageHolds, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoLevel } from '../support/demo';
import { waitFor } from '../support/wait';

jest.setTimeout(300_000);

let h: BrowserHarness;
const suffix = randomUUID().slice(0, 4).toUpperCase();
const tag = `IU-K${suffix}-01`;
let jobId = '';
let unitId = '';
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const mechanical = DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  const level = await demoLevel(`Keyboard level ${suffix}`, [tag], { kind: 'cassette_4way' });
  jobId = level.jobId;
  unitId = level.unitIds[0]!;
  // The mechanical subcontractor covers the mechanical trade (the finding form suggests it).
  const company = await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } });
  if (!company) throw new Error('The demo mechanical company is missing.');
  const linked = await JobCompany.findOne({ where: { jobId, companyId: company.id } });
  if (!linked) await JobCompany.create({ jobId, companyId: company.id, trades: ['mechanical'] });
  else if (!linked.trades.includes('mechanical')) await linked.update({ trades: [...linked.trades, 'mechanical'] });
});
afterAll(async () => {
  await h?.close();
});

/** The focused element's testID (its own, or the nearest element's around it). */
function focusedTestId(page: Page): Promise<string | null> {
  return page.evaluate(`(() => { const el = document.activeElement; const t = el && el.closest('[data-testid]'); return t ? t.getAttribute('data-testid') : null; })()`) as Promise<string | null>;
}

/** Presses Tab (or Shift+Tab) until the element with `testID` has the focus; fails after `max` presses. */
async function tabTo(page: Page, testID: string, { back = false, max = 150 } = {}): Promise<void> {
  const seen: (string | null)[] = [];
  for (let i = 0; i < max; i += 1) {
    if ((await focusedTestId(page)) === testID) return;
    await page.keyboard.press(back ? 'Shift+Tab' : 'Tab');
    seen.push(await focusedTestId(page));
  }
  throw new Error(`${testID} was not reached with ${back ? 'Shift+Tab' : 'Tab'} in ${max} presses; focus went through: ${seen.filter(Boolean).slice(-30).join(', ')}`);
}

/** The focused control shows where the focus is (an outline or a ring), and its accessible name. */
async function focusShown(page: Page): Promise<{ ring: boolean; name: string }> {
  return JSON.parse(
    (await page.evaluate(`(() => {
      const el = document.activeElement;
      const s = getComputedStyle(el);
      const ring = (s.outlineStyle !== 'none' && parseFloat(s.outlineWidth) > 0) || (s.boxShadow && s.boxShadow !== 'none');
      const name = el.getAttribute('aria-label') || el.textContent || '';
      return JSON.stringify({ ring: Boolean(ring), name: name.trim() });
    })()`)) as string,
  );
}

describe('keyboard only, at 1280x800', () => {
  it('logs a finding and accepts its fix with Tab, Shift+Tab, Enter, Space and typing', async () => {
    const { page, problems } = await h.newPage(WIDE);

    // Sign in.
    await page.goto(`${h.baseUrl}/sign-in`);
    await page.getByTestId('sign-in-email').waitFor();
    await tabTo(page, 'sign-in-email');
    await page.keyboard.type(inspector.email);
    await tabTo(page, 'sign-in-password');
    await page.keyboard.type(DEMO_PASSWORD);
    await page.keyboard.press('Enter');
    await page.getByTestId('job-list').waitFor();

    // Log a finding on the unit: choose the defect type with the arrow keys; the rest is prefilled.
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings/new?unitId=${unitId}`);
    await page.getByTestId('finding-form-item').waitFor();
    await tabTo(page, 'finding-form-item');
    expect((await focusShown(page)).ring).toBe(true);
    await page.keyboard.press('ArrowDown');
    await pageHolds(page, `document.querySelector('[data-testid="finding-form-item"]').value !== ''`, { what: 'a defect type chosen' });
    await tabTo(page, 'finding-form-note');
    await page.keyboard.type('Logged from the keyboard alone.');
    // Back up one field and forward again: Shift+Tab moves in reading order too.
    await page.keyboard.press('Shift+Tab');
    expect(await focusedTestId(page)).not.toBe('finding-form-note');
    await tabTo(page, 'finding-form-submit');
    const submit = await focusShown(page);
    expect(submit.ring).toBe(true);
    expect(submit.name).toContain('Log finding');
    await page.keyboard.press('Enter');
    const finding = await waitFor(() => Finding.findOne({ where: { jobId, unitId } }), { what: 'the finding to be logged', timeout: 30_000 });
    expect(finding.note).toBe('Logged from the keyboard alone.');
    expect(finding.status).toBe('open');

    // The mechanical subcontractor submits a fix (API: a photo file is chosen through the system's dialog).
    const sub = await apiSignIn(h.trimout.app, mechanical.email, DEMO_PASSWORD);
    const photo = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 60, g: 120, b: 90 } } }).jpeg().toBuffer();
    const fix = await sub.agent
      .post(`/api/jobs/${jobId}/findings/${finding.id}/fixes`)
      .set('X-CSRF-Token', sub.csrf)
      .set('Idempotency-Key', randomUUID())
      .field('data', JSON.stringify({ note: 'Refitted from the keyboard test.' }))
      .attach('photos', photo, { filename: 'fix.jpg', contentType: 'image/jpeg' });
    expect(fix.status).toBe(201);

    // Accept it from the re-inspection queue.
    await page.goto(`${h.baseUrl}/jobs/${jobId}/reinspections`);
    const accept = `reinspection-${finding.number}-verdict-accept`;
    await page.getByTestId(accept).waitFor();
    await tabTo(page, accept);
    const shown = await focusShown(page);
    expect(shown.ring).toBe(true);
    // Named by its visible words first, then the finding it acts on.
    expect(shown.name).toMatch(/^Accept fix/);
    expect(shown.name).toContain(`#${finding.number}`);
    await page.keyboard.press('Space');
    await page.getByTestId('reinspections-done').waitFor();
    await waitFor(async () => (await Finding.findByPk(finding.id))?.status === 'closed', { what: 'the finding to close', timeout: 30_000 });
    await h.screenshot(page, 'keyboard-01-accepted-wide');
    expect(problems).toEqual([]);
  });
});
