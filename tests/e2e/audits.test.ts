/**
 * Sampling audits in the browser. An inspector plans an audit on a lot of 120 cassettes at general
 * inspection level II on a wide screen: the form shows code letter F (Z1.4 Table I, lots 91 to 150),
 * major at AQL 2.5 a sample of 20 with accept 1 / reject 2, and minor at AQL 1.0 the resolved plan
 * of 13 units with accept 0 / reject 1 (Z1.4 Table II-A: the arrow at F leads to E). On a phone the
 * walk marks the sampled units; unit checks are recorded for the sample (the last one through the
 * check screen) and the audit reaches its decision. Screenshots at phone and wide size are looked at.
 */
import type { Page } from 'playwright-core';
import { Audit, AuditUnit, Unit, UnitCheck } from '../../server/models';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { buildLevel, TEST_PASSWORD } from '../support/factories';
import { buildWalkJob, type WalkJob } from '../support/findings';

jest.setTimeout(300_000);

let h: BrowserHarness;
let w: WalkJob;
let lotLevelId: string;

beforeAll(async () => {
  h = await startBrowserHarness();
  w = await buildWalkJob();
  const lotLevel = await buildLevel(w.job.id, { name: 'Level 5' });
  lotLevelId = lotLevel.id;
  await Unit.bulkCreate(
    Array.from({ length: 120 }, (_, i) => ({ jobId: w.job.id, levelId: lotLevel.id, tag: `IU-5-${String(i + 1).padStart(3, '0')}`, kind: 'cassette_4way' as const })),
  );
});
afterAll(async () => {
  await h?.close();
});

async function shot(page: Page, name: string) {
  await page.waitForLoadState('networkidle');
  await h.screenshot(page, name);
}

async function text(page: Page, testID: string): Promise<string> {
  return (await page.getByTestId(testID).first().textContent()) ?? '';
}

async function explainFailure<T>(page: Page, name: string, problems: string[], work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    await h.screenshot(page, `FAILED-${name}`).catch(() => undefined);
    throw new Error(`${(err as Error).message}\npage problems: ${JSON.stringify(problems)}`);
  }
}

describe('sampling audits', () => {
  let auditId = '';

  it('plans an audit on a lot of 120 at level II: letter F, major AQL 2.5 → 20 with 1/2, AQL 1.0 → 13 with 0/1 (wide)', async () => {
    const { page, context, problems } = await h.newPage(WIDE);
    await explainFailure(page, 'audits-plan-wide', problems, async () => {
      await h.signIn(page, w.inspector.email, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${w.job.id}`);
      await page.getByTestId('job-audits').click();
      await page.getByTestId('audits-empty').waitFor();
      await page.getByTestId('audits-new').click();
      await page.getByTestId('audit-plan-screen').waitFor();
      await page.getByTestId('audit-name').fill('Level 5 cassettes');
      await page.getByTestId(`audit-lot-levels-${lotLevelId}`).click();
      await page.getByTestId('audit-lot-kinds-cassette_4way').click();
      await page.getByTestId('audit-class-major').selectOption('2.5');
      await page.getByTestId('audit-class-minor').selectOption('1.0');
      await page.getByTestId('audit-preview-letter').filter({ hasText: 'Code letter F' }).waitFor();
      expect(await text(page, 'audit-preview')).toContain('Lot of 120 units');
      expect(await text(page, 'audit-preview-letter')).toContain('sample of 20');
      expect(await text(page, 'audit-preview-major')).toBe('Major AQL 2.5: 20 units, accept 1, reject 2');
      expect(await text(page, 'audit-preview-minor')).toBe('Minor AQL 1.0: 13 units, accept 0, reject 1 (arrow to E)');
      await page.getByTestId('audit-preview').scrollIntoViewIfNeeded();
      await shot(page, 'audits-01-plan-wide');
      await page.getByTestId('audit-plan-submit').click();
      await page.getByTestId('audit-detail').waitFor();
      expect(await text(page, 'audit-class-major')).toContain('AQL 2.5: sample 20, accept 1, reject 2');
      expect(await text(page, 'audit-class-minor')).toContain('AQL 1.0: sample 13, accept 0, reject 1');
      expect(await text(page, 'audit-plan')).toContain('code letter F');
      expect(await text(page, 'audit-decision')).toContain('Keep checking');
      expect(await text(page, 'audit-progress')).toContain('0 of 20 sampled units checked');
      await shot(page, 'audits-02-audit-wide');
    });
    const audit = (await Audit.findOne({ where: { jobId: w.job.id } }))!;
    expect(audit).toMatchObject({ lotSize: 120, sampleSize: 20 });
    auditId = audit.id;
    expect(problems).toEqual([]);
    await context.close();
  });

  it('marks the sample on the walk (phone), records the checks and reaches a decision', async () => {
    const sample = await AuditUnit.findAll({ where: { auditId }, order: [['drawPosition', 'ASC']], limit: 20 });
    const tags = new Map((await Unit.findAll({ where: { id: sample.map((s) => s.unitId) } })).map((u) => [u.id, u.tag]));
    // Nineteen of the twenty were checked on other phones; the last is checked here.
    for (const s of sample.slice(0, 19)) {
      await UnitCheck.create({ jobId: w.job.id, unitId: s.unitId, walkId: null, checkedBy: w.inspector.id, checkedAt: new Date(), complete: true });
    }
    const lastTag = tags.get(sample[19]!.unitId)!;
    const { page, context, problems } = await h.newPage(PHONE);
    await explainFailure(page, 'audits-walk-phone', problems, async () => {
      await h.signIn(page, w.inspector.email, TEST_PASSWORD, 'job-list-screen');
      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/audits/${auditId}`);
      await page.getByTestId('audit-progress').filter({ hasText: '19 of 20' }).waitFor();
      await shot(page, 'audits-03-audit-phone');
      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/levels/${lotLevelId}/walk?q=${encodeURIComponent(lastTag)}`);
      await page.getByTestId(`walk-unit-${lastTag}-audit`).filter({ hasText: 'Audit 1 sample' }).waitFor();
      await page.getByTestId(`walk-unit-${lastTag}`).scrollIntoViewIfNeeded();
      await shot(page, 'audits-04-walk-mark-phone');
      await page.getByTestId(`walk-unit-${lastTag}`).click();
      await page.getByTestId('unit-check-tag').waitFor();
      await page.getByTestId('unit-check-all-ok').click();
      const unmarked = page.locator('[data-testid^="check-item-"][data-testid$="-state"]', { hasText: /^Not marked$/ });
      for (const id of await unmarked.evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')!))) {
        await page.getByTestId(id.replace(/-state$/, '-mark-ok')).click();
      }
      await page.getByTestId('unit-check-save').click();
      await page.getByTestId('level-walk-saved').waitFor();
      // Decided: the sample mark leaves the walk.
      await page.getByTestId(`walk-unit-${lastTag}-audit`).waitFor({ state: 'detached' });
      await page.goto(`${h.baseUrl}/jobs/${w.job.id}/audits/${auditId}`);
      await page.getByTestId('audit-decision').filter({ hasText: 'Accept the lot' }).waitFor();
      expect(await text(page, 'audit-progress')).toContain('20 of 20 sampled units checked');
      await shot(page, 'audits-05-accepted-phone');
    });
    expect(problems).toEqual([]);
    await context.close();
  });

  it('lists the audit with its decision (wide and phone)', async () => {
    for (const [size, name] of [[WIDE, 'wide'], [PHONE, 'phone']] as const) {
      const { page, context, problems } = await h.newPage(size);
      await explainFailure(page, `audits-list-${name}`, problems, async () => {
        await h.signIn(page, w.gcManager.email, TEST_PASSWORD, 'job-list-screen');
        await page.goto(`${h.baseUrl}/jobs/${w.job.id}/audits`);
        await page.getByTestId('audit-row-1-decision').filter({ hasText: 'Accept the lot' }).waitFor();
        await shot(page, `audits-06-list-${name}`);
        await page.goto(`${h.baseUrl}/jobs/${w.job.id}/audits/new`);
        await page.getByTestId('audit-preview').filter({ hasText: 'Lot of' }).waitFor();
        await shot(page, `audits-07-plan-${name}`);
      });
      expect(problems).toEqual([]);
      await context.close();
    }
  });
});
