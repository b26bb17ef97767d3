/**
 * Export links in the browser: the GC manager filters the findings list and downloads exactly
 * those findings as CSV (the link carries the screen's filters; the file's rows are the list's
 * total), then the unit register and the company scorecards; the file names come from the server. Screenshots at phone and
 * wide sizes go to .artifacts/screenshots.
 */
import fs from 'node:fs';
import { parse } from 'csv-parse/sync';
import type { Page } from 'playwright-core';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoJob } from '../support/demo';

jest.setTimeout(300_000);

let h: BrowserHarness;
let jobId = '';
const gc = DEMO_ACCOUNTS.find((a) => a.role === 'gc_manager')!;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  jobId = (await demoJob()).id;
});
afterAll(async () => {
  await h?.close();
});

const signIn = (page: Page, email: string) => h.signIn(page, email, DEMO_PASSWORD);

async function download(page: Page, testID: string): Promise<{ name: string; text: string }> {
  const [file] = await Promise.all([page.waitForEvent('download'), page.getByTestId(testID).click()]);
  const filePath = await file.path();
  return { name: file.suggestedFilename(), text: fs.readFileSync(filePath!, 'utf8') };
}

describe('export links', () => {
  it.each([
    ['phone', PHONE],
    ['wide', WIDE],
  ] as const)('downloads the filtered findings, the unit register and the scorecards (%s)', async (size, viewport) => {
    const { page, problems } = await h.newPage(viewport);
    await signIn(page, gc.email);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/findings?status=open,fix_submitted`);
    const link = page.getByTestId('findings-export');
    await link.waitFor();
    const total = Number(((await page.getByTestId('findings-total').textContent()) ?? '').match(/\d+/)![0]);
    expect(total).toBeGreaterThan(0);
    expect(await link.getAttribute('href')).toBe(`/api/jobs/${jobId}/findings.csv?status=open%2Cfix_submitted`);
    await h.screenshot(page, `exports-findings-${size}`);
    const findings = await download(page, 'findings-export');
    expect(findings.name).toMatch(/^findings-Cinder_Lane_Commons-\d{4}-\d{2}-\d{2}\.csv$/);
    expect(findings.text.charCodeAt(0)).toBe(0xfeff);
    const rows = (parse(findings.text, { bom: true }) as string[][]).slice(1);
    expect(rows).toHaveLength(total);
    expect(new Set(rows.map((r) => r[11]))).toEqual(new Set(['Open', 'Fix submitted']));

    await page.goto(`${h.baseUrl}/jobs/${jobId}/setup/units`);
    await page.getByTestId('unit-export').waitFor();
    await h.screenshot(page, `exports-units-${size}`);
    const units = await download(page, 'unit-export');
    expect(units.name).toMatch(/^units-CLC-2611-\d{4}-\d{2}-\d{2}\.csv$/);
    expect((parse(units.text, { bom: true }) as string[][])[0]).toEqual(['Tag', 'Kind', 'Model', 'Capacity (Btu/h)', 'Level', 'Space', 'System', 'Crew', 'Crew company', 'Mounting']);

    await page.goto(`${h.baseUrl}/jobs/${jobId}/scorecards`);
    await page.getByTestId('scorecards-export').waitFor();
    await h.screenshot(page, `exports-scorecards-${size}`);
    const cards = await download(page, 'scorecards-export');
    expect(cards.name).toMatch(/^scorecards-Cinder_Lane_Commons-\d{4}-\d{2}-\d{2}\.csv$/);
    const records = parse(cards.text, { bom: true }) as string[][];
    expect(records[0]![0]).toBe('Company');
    expect(records.length).toBeGreaterThan(1);
    expect(problems).toEqual([]);
  });
});
