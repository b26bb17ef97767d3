/**
 * Job set-up in the browser. A GC manager new to Trimout builds a small job from empty (job,
 * 2 levels, spaces, a unit model, a system, units), imports a 50-row CSV schedule with 3 bad
 * rows (sees the 3 reasons, nothing imported), fixes the file and re-imports; then the main
 * screens at phone size, and the read-only view an inspector gets. Screenshots go to
 * .artifacts/screenshots and are looked at.
 */
import type { Page } from 'playwright-core';
import { Job } from '../../server/models';
import { addMember, buildCompany, buildUser, TEST_PASSWORD } from '../support/factories';
import { PHONE, WIDE, pageHolds, startBrowserHarness, type BrowserHarness } from '../support/browser';

jest.setTimeout(240_000);

let h: BrowserHarness;
let gcEmail: string;
let inspectorEmail: string;
let inspectorId: string;
/** Set by the wide pass; the phone passes visit the same job. */
let jobId = '';

beforeAll(async () => {
  h = await startBrowserHarness();
  const gc = await buildCompany({ name: 'Fernbrook Builders (test)' });
  const manager = await buildUser({ companyId: gc.id, name: 'Wren Adair' });
  const inspector = await buildUser({ name: 'Olu Mercer' });
  gcEmail = manager.email;
  inspectorEmail = inspector.email;
  inspectorId = inspector.id;
});
afterAll(async () => {
  await h?.close();
});

const signIn = (page: Page, email: string) => h.signIn(page, email, TEST_PASSWORD, 'job-list-screen');

/**
 * The screens scroll inside the app (not the document), so a full-page screenshot would stop at
 * the viewport: grow the viewport to the content's height for the picture, then put it back.
 */
async function shot(page: Page, name: string) {
  await page.waitForLoadState('networkidle');
  const size = page.viewportSize()!;
  const content = await page.evaluate<number>(
    `Math.max(...Array.from(document.querySelectorAll('div')).filter((d) => d.scrollHeight > d.clientHeight + 1 && getComputedStyle(d).overflowY !== 'visible').map((d) => d.scrollHeight - d.clientHeight), 0)`,
  );
  if (content > 0) await page.setViewportSize({ width: size.width, height: Math.min(size.height + content, 6000) });
  await h.screenshot(page, name);
  if (content > 0) await page.setViewportSize(size);
}

/** On failure: a screenshot of where it stopped and the page's console problems, then the error. */
async function explainFailure<T>(page: Page, name: string, problems: string[], work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    await shot(page, `FAILED-${name}`).catch(() => undefined);
    throw new Error(`${(err as Error).message}\npage problems: ${JSON.stringify(problems)}`);
  }
}

/** Waits until the element shows the text (the screens update after each write). */
async function seeText(page: Page, testId: string, text: string | RegExp) {
  await page.getByTestId(testId).filter({ hasText: text }).first().waitFor();
}

/** The unit form is ready for the next unit: its tag box was emptied after the last save. */
async function tagCleared(page: Page) {
  await pageHolds(page, `document.querySelector('[data-testid="unit-tag-input"]')?.value === ''`, { what: 'the unit form to empty its tag' });
}

const KINDS = ['Ceiling cassette, four-way', 'Wall-mounted', 'Ducted, low static'];

/** A 50-row equipment schedule; `bad` puts an unknown level on line 11, a duplicate tag on line 26 and a wordy capacity on line 41. */
function schedule(bad: boolean): string {
  const quote = (s: string) => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  const lines = ['Tag,Unit kind,Model,Capacity,Level,Space,System'];
  for (let i = 0; i < 50; i++) {
    const line = i + 2;
    const kind = KINDS[i % 3]!;
    const onTwo = i % 2 === 1;
    let tag = `IU-${101 + i}`;
    let level = onTwo ? 'Level 2' : 'Level 1';
    let capacity = i % 3 === 0 ? '24000 Btu/h' : '2 tons';
    if (bad && line === 11) level = 'Level 9';
    if (bad && line === 26) tag = 'IU-104'; // the tag of line 5
    if (bad && line === 41) capacity = 'three tons';
    const space = level === 'Level 2' ? 'Office 201' : i % 4 === 0 ? 'Lobby' : 'Office 101';
    const model = kind.startsWith('Ceiling cassette') ? 'Cassette 24' : '';
    lines.push([tag, kind, model, capacity, level, space, 'VRF-1'].map(quote).join(','));
  }
  return `${lines.join('\r\n')}\r\n`;
}

describe('a GC manager sets up a job from empty (wide, 1280x800)', () => {
  it('creates the job, its levels, spaces, a model, a system and units, then imports a schedule', async () => {
    const { page, problems } = await h.newPage(WIDE);
    await explainFailure(page, 'setup-wide', problems, async () => {
    await signIn(page, gcEmail);

    // An empty job list shows the first step.
    await page.getByTestId('state-empty').waitFor();
    await shot(page, 'setup-01-empty-job-list-wide');
    await page.getByTestId('create-first-job').click();
    await page.waitForURL('**/jobs/new');

    // The shared schema's message shows at the field.
    await page.getByTestId('new-job-form-submit').click();
    await seeText(page, 'job-name-input-error', 'Enter a job name.');
    await page.getByTestId('job-name-input').fill('Larkspur Court Offices');
    await page.getByTestId('job-number-input').fill('T-2026-14');
    await page.getByTestId('job-address-input').fill('14 Larkspur Court');
    await page.getByTestId('job-starts-input').fill('2026-12-07');
    await page.getByTestId('job-ends-input').fill('2026-11-01');
    await page.getByTestId('job-timezone-input').selectOption('America/Chicago');
    await page.getByTestId('new-job-form-submit').click();
    await seeText(page, 'job-ends-input-error', 'The end date is before the start date.');
    await page.getByTestId('job-ends-input').fill('2027-03-31');
    await shot(page, 'setup-02-new-job-wide');
    await page.getByTestId('new-job-form-submit').click();

    // Levels: add two (one with a typo), rename inline, reorder.
    await page.waitForURL('**/setup/levels');
    jobId = new URL(page.url()).pathname.split('/')[2]!;
    await page.getByTestId('levels-empty').waitFor();
    await page.getByTestId('level-name-input').fill('Level 1');
    await page.getByTestId('level-add-submit').click();
    await seeText(page, 'level-name-1', 'Level 1');
    await page.getByTestId('level-name-input').fill('Levl 2');
    await page.getByTestId('level-add-submit').click();
    await seeText(page, 'level-name-2', 'Levl 2');
    await page.getByTestId('level-rename-2').click();
    await page.getByTestId('level-rename-input-2').fill('Level 2');
    await page.getByTestId('level-rename-save-2').click();
    await seeText(page, 'level-name-2', /^Level 2$/);
    await page.getByTestId('level-up-2').click();
    await seeText(page, 'level-name-1', 'Level 2');
    await seeText(page, 'level-name-2', 'Level 1');
    await page.getByTestId('level-down-1').click();
    await seeText(page, 'level-name-1', 'Level 1');
    await seeText(page, 'level-name-2', 'Level 2');
    await shot(page, 'setup-03-levels-wide');

    // Spaces on each level, typed with a unit picked beside the number, or written out.
    await page.getByTestId('setup-tabs-spaces').click();
    await page.getByTestId('spaces-empty').waitFor();
    const addSpace = async (name: string, area: string, height: string, units?: { area: string; height: string }, joinedTo?: string) => {
      await page.getByTestId('space-name-input').fill(name);
      if (joinedTo) await page.getByTestId('space-links-input').getByText(joinedTo, { exact: true }).click();
      await page.getByTestId('space-area-input').fill(area);
      await page.getByTestId('space-height-input').fill(height);
      if (units) {
        await page.getByTestId(`space-area-input-unit-${units.area}`).click();
        await page.getByTestId(`space-height-input-unit-${units.height}`).click();
      }
      await page.getByTestId('space-submit').click();
      await page.getByTestId(`space-row-${name}`).waitFor();
    };
    await addSpace('Lobby', '400', '10');
    // Office 101 opens onto the lobby through a permanent opening: one volume for the refrigerant check.
    await addSpace('Office 101', '200', `9' 0"`, undefined, 'Lobby');
    await seeText(page, 'space-row-Lobby', 'Joined to 1 space');
    await page.getByTestId('spaces-level').selectOption({ label: '2. Level 2' });
    await page.getByTestId('spaces-empty').waitFor();
    await addSpace('Office 201', '23.2', '2.75', { area: 'm²', height: 'm' });
    await seeText(page, 'space-row-Office 201', `Floor area 249.7 ft² · Ceiling 9' 1/4"`);
    // the form is empty again for the next space
    expect(await page.getByTestId('space-area-input').inputValue()).toBe('');
    await shot(page, 'setup-04-spaces-wide');

    // A unit model with a limit from its installation manual.
    await page.getByTestId('setup-tabs-models').click();
    await page.getByTestId('models-empty').waitFor();
    await page.getByTestId('model-add').click();
    await page.getByTestId('model-name-input').fill('Cassette 24');
    await page.getByTestId('model-number-input').fill('CX-24');
    // The manual is named once; each limit gives its page.
    await page.getByTestId('model-manual-input').fill('Cassette 24 installation manual (invented for the test), 1st edition');
    await page.getByTestId('model-limit-max_pump_lift-value').fill('27-9/16 in');
    await page.getByTestId('model-limit-max_pump_lift-source').fill('12');
    // A level tolerance stated as a tilt across the unit: 1° across 32 in is 32 in × tan 1° = 0.559 in.
    await page.getByTestId('model-limit-max_level_deviation-value').fill('1° across 32 in');
    await page.getByTestId('model-limit-max_level_deviation-source').fill('p. 14');
    await page.getByTestId('model-submit').click();
    await seeText(page, 'model-limit-max_pump_lift', '27-9/16 in');
    await seeText(page, 'model-limit-max_pump_lift', 'Cassette 24 installation manual (invented for the test), 1st edition, p. 12');
    await seeText(page, 'model-limit-max_level_deviation', '1° across 32 in = 9/16"');
    await seeText(page, 'model-limit-max_level_deviation', '1st edition, p. 14');
    await shot(page, 'setup-05-models-wide');

    // A system with its charge in lb.
    await page.getByTestId('setup-tabs-systems').click();
    await page.getByTestId('systems-empty').waitFor();
    await page.getByTestId('system-add').click();
    await page.getByTestId('system-name-input').fill('VRF-1');
    await page.getByTestId('system-outdoor-input').fill('ODU-12');
    await page.getByTestId('system-factory-input').fill('30');
    await page.getByTestId('system-field-input').fill('5 lb 8 oz');
    await page.getByTestId('system-submit').click();
    await seeText(page, 'system-card-VRF-1', 'total 35.5 lb');

    // Units one by one.
    await page.getByTestId('setup-tabs-units').click();
    await page.getByTestId('units-empty').waitFor();
    await page.getByTestId('unit-add').click();
    await page.getByTestId('unit-tag-input').fill('IU-1');
    await page.getByTestId('unit-model-input').selectOption({ label: 'Cassette 24 (CX-24)' });
    await page.getByTestId('unit-capacity-input').fill('24000');
    await page.getByTestId('unit-space-input').selectOption({ label: 'Lobby' });
    await page.getByTestId('unit-system-input').selectOption({ label: 'VRF-1' });
    await page.getByTestId('unit-submit').click();
    await page.getByTestId('unit-row-IU-1').waitFor();
    // The form empties its tag once the save has settled (the list may show the unit first): type after that.
    await tagCleared(page);
    await page.getByTestId('unit-tag-input').fill('IU-2');
    await page.getByTestId('unit-kind-input').selectOption('wall_mounted');
    await page.getByTestId('unit-level-input').selectOption({ label: 'Level 2' });
    await page.getByTestId('unit-space-input').selectOption({ label: 'Office 201' });
    await page.getByTestId('unit-capacity-input').fill('1.5');
    await page.getByTestId('unit-capacity-input-unit-ton').click();
    await page.getByTestId('unit-submit').click();
    await page.getByTestId('unit-row-IU-2').waitFor();
    await tagCleared(page);
    // a tag is unique within the job: the server's answer shows at the form
    await page.getByTestId('unit-tag-input').fill('IU-2');
    await page.getByTestId('unit-submit').click();
    await seeText(page, 'unit-tag-input-error', 'Tag "IU-2" is already used by another unit of this job.');
    await shot(page, 'setup-06-units-form-wide');
    await page.getByTestId('unit-form-close').click();
    await seeText(page, 'unit-row-IU-2', '18,000 Btu/h');
    await seeText(page, 'unit-row-IU-1', 'Cassette 24');

    // The refrigerant check in plain words, with its source and the caution.
    await page.getByTestId('setup-tabs-systems').click();
    await page.getByTestId('system-check-VRF-1').click();
    await seeText(page, 'concentration-status', 'Within the limit');
    await seeText(page, 'concentration-governing', 'Office 201');
    await seeText(page, 'concentration-source', /ASHRAE 34/);
    await seeText(page, 'systems-screen', /manufacturer's installation manual, local codes and licensed practice govern/);
    await shot(page, 'setup-07-systems-check-wide');

    // A subcontractor company with the trades it covers.
    await page.getByTestId('setup-tabs-companies').click();
    await page.getByTestId('companies-list').waitFor();
    await page.getByTestId('company-add').click();
    await page.getByTestId('company-name-input').fill('Quarry Mechanical (test)');
    await page.getByTestId('company-trades-input-mechanical').click();
    await page.getByTestId('company-trades-input-controls').click();
    await page.getByTestId('company-submit').click();
    await seeText(page, 'company-card-Quarry Mechanical (test)', /Mechanical.*Controls/);
    await shot(page, 'setup-07b-companies-wide');

    // Import: 50 rows, 3 bad. Nothing is imported and every reason is shown with its line.
    await page.getByTestId('setup-tabs-import').click();
    await page.getByTestId('import-csv').fill(schedule(true));
    await page.getByTestId('import-mapping').waitFor();
    await page.getByTestId('import-preview-button').click();
    await page.getByTestId('import-bad-rows').waitFor();
    const badRows = page.locator('[data-testid^="import-bad-row-"]');
    expect(await badRows.count()).toBe(3);
    const reasons = await badRows.allTextContents();
    expect(reasons[0]).toMatch(/Line 11.*Unknown level "Level 9"/);
    expect(reasons[1]).toMatch(/Line 26.*Duplicate tag "IU-104".*line 5/);
    expect(reasons[2]).toMatch(/Line 41.*Capacity/);
    await seeText(page, 'import-total', '50 rows read');
    await seeText(page, 'import-good', '47 good');
    await seeText(page, 'import-bad', '3 bad');
    expect(await page.getByTestId('import-commit').count()).toBe(0);
    await shot(page, 'setup-08-import-bad-rows-wide');

    // The fixed file, picked as a file this time: previews clean and imports all 50 at once.
    await page.getByTestId('import-file-input').setInputFiles({
      name: 'larkspur-schedule-fixed.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(schedule(false), 'utf8'),
    });
    await seeText(page, 'import-file-name', 'larkspur-schedule-fixed.csv');
    await page.getByTestId('import-preview-button').click();
    await page.getByTestId('import-ready').waitFor();
    await seeText(page, 'import-good', '50 good');
    await shot(page, 'setup-09-import-ready-wide');
    await page.getByTestId('import-commit').click();
    await seeText(page, 'import-done', '50 units were added to the register.');
    await shot(page, 'setup-10-import-done-wide');

    // The register: a table on a wide screen, paged by cursor, filtered by level and tag.
    await page.getByTestId('import-see-units').click();
    await page.getByTestId('units-table').waitFor();
    await seeText(page, 'units-count', 'Showing 50 units; more below.');
    await page.getByTestId('units-load-more').click();
    await seeText(page, 'units-count', 'Showing 52 units.');
    await shot(page, 'setup-11-units-register-wide');
    await page.getByTestId('unit-filters-level').selectOption({ label: 'Level 2' });
    await seeText(page, 'units-count', 'Showing 26 units.');
    await page.getByTestId('unit-filters-q').fill('IU-12');
    await seeText(page, 'units-count', /Showing [1-9] units?\./);
    const tags = await page.locator('[data-testid^="unit-row-"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));
    expect(tags.length).toBeGreaterThan(0);
    for (const t of tags) expect(t).toMatch(/^unit-row-IU-12\d$/);
    await shot(page, 'setup-12-units-filtered-wide');

    // The job overview links every set-up section for a GC manager.
    await page.getByTestId('setup-back').click();
    await page.getByTestId('job-setup-links').waitFor();
    expect(await page.locator('[data-testid^="setup-link-"]').count()).toBe(12); // job details and the 11 sections (crews included)
    await shot(page, 'setup-13-job-overview-wide');

    // Catalogue: grouped, with the measured rule, fix guidance and caution.
    await page.getByTestId('setup-link-catalogue').click();
    await page.getByTestId('catalogue-list').waitFor();
    await page.getByTestId('catalogue-more-MT-01').click();
    await seeText(page, 'catalogue-caution-MT-01', /licensed practice govern/);
    await shot(page, 'setup-14-catalogue-wide');
    // retire a type, then see it again among the retired
    await page.getByTestId('catalogue-retire-MT-01').click();
    await page.getByTestId('catalogue-item-MT-01').waitFor({ state: 'detached' });
    await page.getByTestId('catalogue-retired').selectOption('all');
    await seeText(page, 'catalogue-item-MT-01', 'Retired');
    // filter by unit kind: MT-01 (threaded rod) does not apply to a wall-mounted unit
    await page.getByTestId('catalogue-kind').selectOption('wall_mounted');
    await page.getByTestId('catalogue-item-MT-01').waitFor({ state: 'detached' });
    await page.getByTestId('catalogue-list').waitFor();
    // a job's own defect type, with a measured rule against the model's limit
    await page.getByTestId('catalogue-add').click();
    await page.getByTestId('catalogue-code-input').fill('dr-90');
    await page.getByTestId('catalogue-group-input').selectOption('drainage');
    await page.getByTestId('catalogue-title-input').fill('Pump discharge line kinked');
    await page.getByTestId('catalogue-description-input').fill('The condensate pump discharge tube is kinked or crushed where it leaves the unit.');
    await page.getByTestId('catalogue-kinds-input-wall_mounted').click();
    await page.getByTestId('catalogue-fix-input').fill('Re-route the tube in a smooth curve and support it.');
    // Drainage work is hazardous: the type needs its caution.
    await page.getByTestId('catalogue-caution-input').fill("Electrical work: isolate the pump's supply first. The manufacturer's installation manual, local codes and licensed practice govern.");
    await shot(page, 'setup-15a-catalogue-form-wide');
    await page.getByTestId('catalogue-submit').click();
    await seeText(page, 'catalogue-item-DR-90', 'Pump discharge line kinked');
    await seeText(page, 'catalogue-item-DR-90', 'Added for this job');
    await shot(page, 'setup-15-catalogue-added-wide');

    // The only refused request was the duplicate tag provoked above (409).
    expect(problems.filter((p) => !/status of 409/.test(p))).toEqual([]);
    expect(problems.filter((p) => /status of 409/.test(p))).toHaveLength(1);
    });
    await page.context().close();
  });
});

describe('at phone size (390x844)', () => {
  const screens = ['levels', 'spaces', 'systems', 'models', 'units', 'import', 'companies', 'members', 'catalogue', 'job'] as const;

  it('the GC manager’s set-up screens fit a phone', async () => {
    expect(jobId).not.toBe('');
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page, gcEmail);
    await page.getByTestId(`job-card-${jobId}`).click();
    await page.getByTestId('job-setup-links').waitFor();
    await shot(page, 'setup-phone-00-overview');
    for (const s of screens) {
      await page.goto(`${h.baseUrl}/jobs/${jobId}/setup/${s}`);
      await page.getByTestId('setup-title').waitFor();
      if (s === 'units') {
        await page.getByTestId('units-cards').waitFor();
        expect(await page.getByTestId('units-table').count()).toBe(0);
      }
      if (s === 'systems') {
        await page.getByTestId('system-check-VRF-1').click();
        await page.getByTestId('concentration-status').waitFor();
      }
      if (s === 'catalogue') {
        await page.getByTestId('catalogue-list').waitFor();
        const first = page.locator('[data-testid^="catalogue-more-"]').first();
        await first.click();
      }
      if (s === 'levels') await page.getByTestId('levels-list').waitFor();
      if (s === 'companies') await page.getByTestId('companies-list').waitFor();
      if (s === 'members') await page.getByTestId('members-list').waitFor();
      // nothing wider than the phone
      const overflow = await page.evaluate<number>('document.documentElement.scrollWidth - window.innerWidth');
      expect({ screen: s, overflow }).toEqual({ screen: s, overflow: 0 });
      await shot(page, `setup-phone-${s}`);
      if (s === 'job') {
        // Someone changes the job after this form was filled: the save is refused (412) with a
        // clear message, the form shows the current record, and saving again works.
        const job = (await Job.findByPk(jobId))!;
        await job.update({ address: '14 Larkspur Court, Building B', version: job.version + 1 });
        await page.getByTestId('job-name-input').fill('Larkspur Court Offices, phase 1');
        await page.getByTestId('job-details-form-submit').click();
        await seeText(page, 'job-details-conflict', /changed this since you loaded it/);
        await seeText(page, 'job-details-screen', /current version is shown/);
        expect(await page.getByTestId('job-address-input').inputValue()).toBe('14 Larkspur Court, Building B');
        await shot(page, 'setup-phone-job-conflict');
        await page.getByTestId('job-name-input').fill('Larkspur Court Offices, phase 1');
        await page.getByTestId('job-details-form-submit').click();
        await page.getByTestId('job-details-saved').waitFor();
        expect(await page.getByTestId('job-details-conflict').count()).toBe(0);
      }
    }
    // The only refused request was the stale save provoked above (412).
    expect(problems.filter((p) => !/status of 412/.test(p))).toEqual([]);
    await page.context().close();
  });

  it('an inspector reads the set-up but cannot change it', async () => {
    await addMember(jobId, inspectorId, 'inspector');
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page, inspectorEmail);
    await page.getByTestId(`job-card-${jobId}`).click();
    await page.getByTestId('job-setup-links').waitFor();
    expect(await page.getByTestId('setup-link-import').count()).toBe(0);
    expect(await page.getByTestId('setup-link-job').count()).toBe(0);
    await shot(page, 'setup-phone-inspector-overview');
    await page.getByTestId('setup-link-units').click();
    await page.getByTestId('setup-read-only').waitFor();
    await page.getByTestId('units-cards').waitFor();
    expect(await page.getByTestId('unit-add').count()).toBe(0);
    expect(await page.locator('[data-testid^="unit-edit-"]').count()).toBe(0);
    await page.goto(`${h.baseUrl}/jobs/${jobId}/setup/levels`);
    await page.getByTestId('levels-list').waitFor();
    expect(await page.getByTestId('level-add').count()).toBe(0);
    await shot(page, 'setup-phone-inspector-levels');
    expect(problems).toEqual([]);
    await page.context().close();
  });
});
