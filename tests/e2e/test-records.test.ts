/**
 * Test records on a phone (390×844): a subcontractor of the company responsible for the system
 * follows the readiness screen's lines to record a pressure test with two gauge photos and a drain
 * test for a concealed (ducted) unit; an inspector witnesses both; the level's readiness changes
 * from "tests to pass" to "ceilings can close", checked on the screen and in the database.
 * Screenshots (phone and wide) go to TRIMOUT_ARTIFACTS/screenshots.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import type { Page } from 'playwright-core';
import { QueryTypes } from 'sequelize';
import { System } from '../../server/models';
import { signIn } from '../support/app';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { TEST_PASSWORD, buildJobWithCrew, buildLevel, buildSystem, buildUnit, copyCatalogue, linkCompany } from '../support/factories';
import { everyItem } from '../support/findings';

jest.setTimeout(300_000);

let h: BrowserHarness;
const suffix = randomUUID().slice(0, 4).toUpperCase();
let crew: Awaited<ReturnType<typeof buildJobWithCrew>>;
let jobId = '';
let levelId = '';
let systemName = '';
let unitTag = '';

beforeAll(async () => {
  h = await startBrowserHarness();
  crew = await buildJobWithCrew();
  jobId = crew.job.id;
  await linkCompany(jobId, crew.gcCompany.id, ['general']);
  await linkCompany(jobId, crew.subA.companyId, ['mechanical']);
  await linkCompany(jobId, crew.subB.companyId, ['electrical']);
  await copyCatalogue(jobId);
  const level = await buildLevel(jobId, { name: `Level T${suffix}` });
  levelId = level.id;
  systemName = `VRF-T${suffix}`;
  const system = await buildSystem(jobId, { name: systemName });
  // Subcontractor A's company answers for the system's test records.
  await System.update({ companyId: crew.subA.companyId }, { where: { id: system.id } });
  unitTag = `IU-T${suffix}-01`;
  const unit = await buildUnit(jobId, level.id, { tag: unitTag, kind: 'ducted_low', systemId: system.id });
  // Today's rule is met: the unit has a complete check and no finding. Only the tests hold the ceiling.
  const inspector = await signIn(h.trimout.app, crew.inspector.email);
  await inspector.agent
    .post(`/api/jobs/${jobId}/units/${unit.id}/checks`)
    .set('X-CSRF-Token', inspector.csrf)
    .send({ items: await everyItem(jobId, 'ducted_low'), complete: true })
    .expect(201);
});
afterAll(async () => {
  await h?.close();
});

async function jpeg(r: number, g: number, b: number): Promise<Buffer> {
  return sharp({ create: { width: 640, height: 480, channels: 3, background: { r, g, b } } }).jpeg().toBuffer();
}

async function records(): Promise<Array<{ kind: string; result: string; witnessed: boolean; photos: number; stages: string | null }>> {
  return h.db.sequelize.query(
    `SELECT r.kind, r.result, r.witnessed_at IS NOT NULL AS witnessed,
            (SELECT count(*)::int FROM photos p WHERE p.test_record_id = r.id) AS photos,
            (SELECT string_agg(p.stage, ',' ORDER BY p.stage) FROM photos p WHERE p.test_record_id = r.id) AS stages
       FROM test_records r WHERE r.job_id = :jobId ORDER BY r.kind`,
    { replacements: { jobId }, type: QueryTypes.SELECT },
  );
}

async function readinessOf(page: Page) {
  await page.goto(`${h.baseUrl}/jobs/${jobId}/readiness`);
  const card = page.getByTestId(`level-readiness-${levelId}`);
  await card.waitFor();
  return card;
}

/** The whole screen: the app scrolls inside its own view, so a full-page shot needs a tall window for a moment. */
async function shot(page: Page, name: string) {
  const size = page.viewportSize()!;
  const height = await page.evaluate('Math.max(...Array.from(document.querySelectorAll("div")).map((d) => d.scrollHeight))');
  await page.setViewportSize({ width: size.width, height: Math.min(Math.max(Number(height) + 200, size.height), 6000) });
  await h.screenshot(page, name);
  await page.setViewportSize(size);
}

async function type(page: Page, testID: string, text: string) {
  await page.getByTestId(testID).fill(text);
}

describe('test records on a phone', () => {
  it('a subcontractor records a pressure test and a drain test from the readiness lines; an inspector witnesses both; the level can close its ceilings', async () => {
    const sub = await h.newPage(PHONE);
    await h.signIn(sub.page, crew.subA.email, TEST_PASSWORD);

    // Before: the level waits for both records, each line a link to its form.
    let card = await readinessOf(sub.page);
    const tests = sub.page.getByTestId(`level-tests-${levelId}`);
    await tests.waitFor();
    expect(await tests.innerText()).toContain(`Pressure test of ${systemName}: not on record`);
    expect(await tests.innerText()).toContain(`Drain test of unit ${unitTag}: not on record`);
    expect(await sub.page.getByTestId(`level-ceiling-${levelId}`).innerText()).toContain('2 tests to pass');
    expect(await records()).toEqual([]);
    await shot(sub.page, 'test-records-readiness-before-phone');

    // The pressure test, from its line.
    await tests.getByText(`Pressure test of ${systemName}: not on record`).click();
    await sub.page.getByTestId('test-form').waitFor();
    expect(await sub.page.getByTestId('test-form-caution-text').innerText()).toMatch(/Nitrogen pressure: .*licensed practice govern.*does not certify/s);
    await type(sub.page, 'test-form-target', '600');
    await type(sub.page, 'test-form-target-source', 'Outdoor unit manual p. 31 (invented for the test)');
    await type(sub.page, 'test-form-start-pressure', '600');
    await type(sub.page, 'test-form-end-pressure', '579');
    await sub.page.getByTestId('test-form-start-temperature-unit-°C').click();
    await type(sub.page, 'test-form-start-temperature', '20');
    await sub.page.getByTestId('test-form-end-temperature-unit-°C').click();
    await type(sub.page, 'test-form-end-temperature', '10');
    await type(sub.page, 'test-form-start-at', '2026-12-01 08:00');
    await type(sub.page, 'test-form-end-at', '2026-12-02 08:00');
    await type(sub.page, 'test-form-gauge-id', 'G-17');
    await type(sub.page, 'test-form-gauge-calibrated', '2026-06-01');
    await type(sub.page, 'test-form-gauge-resolution', '1');
    await sub.page.getByTestId('test-form-gauge-start-files-input').setInputFiles({ name: 'gauge-start.jpg', mimeType: 'image/jpeg', buffer: await jpeg(40, 90, 150) });
    await sub.page.getByTestId('test-form-gauge-end-files-input').setInputFiles({ name: 'gauge-end.jpg', mimeType: 'image/jpeg', buffer: await jpeg(150, 90, 40) });
    await sub.page.getByTestId('test-form-gauge-start-photos-thumb-0').waitFor();
    await sub.page.getByTestId('test-form-gauge-end-photos-thumb-0').waitFor();
    expect(await sub.page.getByTestId('test-form-preview-changes').innerText()).toBe('Change as read −21 psi · corrected for temperature −0.03 psi');
    await shot(sub.page, 'test-records-pressure-form-phone');
    await sub.page.getByTestId('test-form-submit').click();
    await sub.page.getByTestId('test-record-screen').waitFor();
    await sub.page.getByTestId('test-record-result').waitFor();
    expect(await sub.page.getByTestId('test-record-result').innerText()).toContain('Passed');
    expect(await sub.page.getByTestId('test-record-witness-state').innerText()).toBe('Waiting for a witness');
    expect(await sub.page.getByTestId('test-figures-uncorrected').innerText()).toContain('−21 psi');
    expect(await sub.page.getByTestId('test-figures-corrected').innerText()).toContain('−0.03 psi');
    await sub.page.getByTestId('test-record-photos-gauge_start-thumb-0').waitFor();
    await sub.page.getByTestId('test-record-photos-gauge_end-thumb-0').waitFor();
    await shot(sub.page, 'test-records-pressure-record-phone');

    // The drain test, from its line (the pressure test now waits for its witness).
    card = await readinessOf(sub.page);
    await sub.page.getByTestId(`level-tests-${levelId}`).getByText(`Drain test of unit ${unitTag}: not on record`).click();
    await sub.page.getByTestId('test-form').waitFor();
    expect(await sub.page.getByTestId('test-form-kind').innerText()).toBe('Drain test');
    for (const id of ['poured', 'termination', 'no-leak']) await sub.page.getByTestId(`test-form-${id}-yes`).click();
    await sub.page.getByTestId('test-form-pump-no').click();
    await sub.page.getByTestId('test-form-float-no').click();
    await type(sub.page, 'test-form-amount', '2 L');
    await sub.page.getByTestId('test-form-submit').click();
    await sub.page.getByTestId('test-record-screen').waitFor();
    await sub.page.getByTestId('test-record-result').waitFor();
    expect(await sub.page.getByTestId('test-record-title').innerText()).toBe('Drain test');
    expect(await records()).toEqual([
      { kind: 'drain', result: 'passed', witnessed: false, photos: 0, stages: null },
      { kind: 'pressure', result: 'passed', witnessed: false, photos: 2, stages: 'gauge_end,gauge_start' },
    ]);

    // The inspector sees the pressure test waiting for a witness; a passed drain test needs none.
    const insp = await h.newPage(PHONE);
    await h.signIn(insp.page, crew.inspector.email, TEST_PASSWORD);
    card = await readinessOf(insp.page);
    const waiting = insp.page.getByTestId(`level-tests-${levelId}`);
    await waiting.waitFor();
    expect(await waiting.innerText()).toContain(`Pressure test of ${systemName}: passed, waiting for a witness`);
    expect(await waiting.innerText()).not.toContain('Drain test');
    await shot(insp.page, 'test-records-readiness-waiting-phone');

    // Witness the pressure test from its line, then the drain test from the list.
    await waiting.getByText(`Pressure test of ${systemName}: passed, waiting for a witness`).click();
    await insp.page.getByTestId('test-record-witness-submit').waitFor();
    await shot(insp.page, 'test-records-witness-phone');
    await insp.page.getByTestId('test-record-witness-submit').click();
    await insp.page.getByTestId('test-record-correct').waitFor();
    expect(await insp.page.getByTestId('test-record-witness-state').innerText()).toBe('Witnessed · locked');
    expect(await insp.page.getByTestId('test-record-witnessed').innerText()).toContain(crew.inspector.name);

    await insp.page.goto(`${h.baseUrl}/jobs/${jobId}/tests?kind=drain&witnessed=false`);
    await insp.page.getByTestId('tests-list').waitFor();
    expect(await insp.page.getByTestId('tests-list').innerText()).toContain(`Drain test · unit ${unitTag}`);
    await shot(insp.page, 'test-records-list-phone');
    await insp.page.getByTestId('tests-list').getByText(`Drain test · unit ${unitTag}`).click();
    await insp.page.getByTestId('test-record-witness-submit').click();
    await insp.page.getByTestId('test-record-correct').waitFor();

    // After: the level can close its ceilings; the database agrees.
    card = await readinessOf(insp.page);
    await insp.page.getByText('✓ Ceilings can close').waitFor();
    expect(await insp.page.getByTestId(`level-ceiling-${levelId}`).innerText()).toBe('✓ Ceilings can close');
    expect(await insp.page.getByTestId(`level-tests-${levelId}`).count()).toBe(0);
    expect(await card.innerText()).not.toContain('tests to pass');
    expect(await records()).toEqual([
      { kind: 'drain', result: 'passed', witnessed: true, photos: 0, stages: null },
      { kind: 'pressure', result: 'passed', witnessed: true, photos: 2, stages: 'gauge_end,gauge_start' },
    ]);
    await shot(insp.page, 'test-records-readiness-after-phone');

    // Wide: the record page and the list as the GC manager sees them.
    const gc = await h.newPage(WIDE);
    await h.signIn(gc.page, crew.gcManager.email, TEST_PASSWORD);
    await gc.page.goto(`${h.baseUrl}/jobs/${jobId}/tests`);
    await gc.page.getByTestId('tests-list').waitFor();
    await shot(gc.page, 'test-records-list-wide');
    await gc.page.getByTestId('tests-list').getByText(`Pressure test · ${systemName}`).click();
    await gc.page.getByTestId('test-figures-corrected').waitFor();
    await gc.page.getByTestId('test-record-photos-gauge_end-thumb-0').waitFor();
    await shot(gc.page, 'test-records-pressure-record-wide');

    expect([...sub.problems, ...insp.problems, ...gc.problems]).toEqual([]);
  });
});
