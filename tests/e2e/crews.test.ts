/**
 * Crews in the browser. A GC manager names a crew for a subcontractor on a wide screen and gives a
 * unit its crew in the unit form; the subcontractor names one of their own company's crews on a
 * phone (no other company to pick); the levels board shows a recurring defect by crew. Screenshots
 * of each at phone and wide size go to the artifacts folder and are looked at.
 */
import type { Page } from 'playwright-core';
import { Company, Unit } from '../../server/models';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { buildUnit, TEST_PASSWORD } from '../support/factories';
import { buildWalkJob, insertFinding, type WalkJob } from '../support/findings';

jest.setTimeout(240_000);

let h: BrowserHarness;
let w: WalkJob;
let mechName: string;

beforeAll(async () => {
  h = await startBrowserHarness();
  w = await buildWalkJob();
  mechName = (await Company.findByPk(w.subA.companyId))!.name;
});
afterAll(async () => {
  await h?.close();
});

async function shot(page: Page, name: string) {
  await page.waitForLoadState('networkidle');
  await h.screenshot(page, name);
}

async function explainFailure<T>(page: Page, name: string, problems: string[], work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    await h.screenshot(page, `FAILED-${name}`).catch(() => undefined);
    throw new Error(`${(err as Error).message}\npage problems: ${JSON.stringify(problems)}`);
  }
}

describe('crews', () => {
  it('a GC manager names a crew for a company and records it on a unit (wide)', async () => {
    const { page, context, problems } = await h.newPage(WIDE);
    await explainFailure(page, 'crews-gc-wide', problems, async () => {
      await h.signIn(page, w.gcManager.email, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/setup/crews`);
      await page.getByTestId('crews-empty').waitFor();
      await page.getByTestId('crew-add').click();
      await page.getByTestId('crew-company-input').selectOption({ label: mechName });
      await page.getByTestId('crew-name-input').fill('Blue crew');
      await page.getByTestId('crew-submit').click();
      await page.getByTestId(`crews-company-${mechName}`).getByText('Blue crew').waitFor();
      await shot(page, 'crews-gc-wide');

      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/setup/units`);
      await page.getByTestId('unit-edit-IU-3-01').click();
      await page.getByTestId('unit-crew-input').selectOption({ label: `${mechName} · Blue crew` });
      await shot(page, 'crews-unit-form-wide');
      await page.getByTestId('unit-submit').click();
      await page.getByTestId('unit-row-IU-3-01').getByText(`${mechName} · Blue crew`).waitFor();
      await shot(page, 'crews-units-table-wide');
    });
    expect((await Unit.findByPk(w.cassette.id))!.installedByCrewId).not.toBeNull();
    expect(problems).toEqual([]);
    await context.close();
  });

  it('a subcontractor names a crew of their own company on a phone; the board shows a recurring defect by crew', async () => {
    // Three units by the Blue crew and one without a crew carry the same defect type.
    const blue = (await Unit.findByPk(w.cassette.id))!.installedByCrewId!;
    for (const tag of ['IU-3-11', 'IU-3-12']) {
      const u = await buildUnit(w.job.id, w.level.id, { tag, kind: 'cassette_4way' });
      await Unit.update({ installedByCrewId: blue }, { where: { id: u.id } });
      await insertFinding(w, { unitId: u.id, code: 'DR-03' });
    }
    await insertFinding(w, { unitId: w.cassette.id, code: 'DR-03' });
    await insertFinding(w, { unitId: w.cassette2.id, code: 'DR-03' });

    const { page, context, problems } = await h.newPage(PHONE);
    await explainFailure(page, 'crews-sub-phone', problems, async () => {
      await h.signIn(page, w.subA.email, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/setup/crews`);
      await page.getByTestId(`crews-company-${mechName}`).getByText('Installed 3 units').waitFor();
      await page.getByTestId('crew-add').click();
      await page.getByTestId('crew-form-company').getByText(`A crew of ${mechName}`).waitFor();
      await page.getByTestId('crew-name-input').fill('Red crew');
      await page.getByTestId('crew-submit').click();
      await page.getByTestId(`crews-company-${mechName}`).getByText('Red crew').waitFor();
      await shot(page, 'crews-sub-phone');

      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/board`);
      const crews = page.getByTestId('recurring-crews-DR-03');
      await crews.getByText('Blue crew').waitFor();
      await crews.getByText('Crew not recorded').waitFor();
      // Nothing runs off the side of the phone.
      const overflow = await page.evaluate<number>(
        `(() => { const r = document.querySelector('[data-testid="recurring"]'); return Math.max(...[r, ...r.querySelectorAll('div')].map((d) => d.scrollWidth - d.clientWidth)); })()`,
      );
      expect(overflow).toBeLessThanOrEqual(1);
      await crews.scrollIntoViewIfNeeded();
      await shot(page, 'crews-recurring-phone');
    });
    expect(problems).toEqual([]);
    await context.close();
  });

  it('the board shows the recurring defect by crew on a wide screen', async () => {
    const { page, context, problems } = await h.newPage(WIDE);
    await explainFailure(page, 'crews-recurring-wide', problems, async () => {
      await h.signIn(page, w.gcManager.email, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/board`);
      const crews = page.getByTestId('recurring-crews-DR-03');
      await crews.getByText('Blue crew').waitFor();
      await crews.scrollIntoViewIfNeeded();
      await shot(page, 'crews-recurring-wide');
    });
    expect(problems).toEqual([]);
    await context.close();
  });
});
