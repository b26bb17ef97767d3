/**
 * Each unit kind has its own checks, in the browser: the demo inspector walks a level holding one
 * unit of each of the ten kinds and, on each unit's check, sees the checks (and the measured
 * limits from its model) that set that kind apart, and not those of the others. Then the GC
 * manager's catalogue screen lists the checks of one kind, at phone and wide size.
 * Model limits here are invented round figures for invented test models, not any product's rating.
 */
import { randomUUID } from 'node:crypto';
import type { Page } from 'playwright-core';
import { CatalogueItem, UnitModel } from '../../server/models';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo';
import type { ModelLimitKey } from '../../shared/catalogue/types';
import { toBase } from '../../shared/calc/quantity';
import type { UnitKindKey } from '../../shared/words';
import { buildLevel, buildSpace, buildSystem, buildUnit, copyCatalogue } from '../support/factories';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoJob } from '../support/demo';

jest.setTimeout(240_000);

let h: BrowserHarness;
const suffix = randomUUID().slice(0, 4).toUpperCase();
const levelName = `Kinds test level ${suffix}`;
let jobId = '';
let levelId = '';

const INVENTED = 'invented test model manual p. 1 (invented, not a real rating)';
/** A stated limit as the models screen stores it. */
const limit = (stated: number, unit: string) => ({ value: toBase(stated, unit), stated, unit, text: `${stated} ${unit}`, source: INVENTED });

interface KindCase {
  kind: UnitKindKey;
  /** Checks this kind has that some other kind lacks. */
  has: string[];
  /** Checks other kinds have and this one does not. */
  lacks: string[];
  /** A measured item whose limit, from the unit's model, is shown before anything is typed. */
  limit?: { code: string; text: RegExp };
  limits?: Partial<Record<ModelLimitKey, ReturnType<typeof limit>>>;
}

const CASES: KindCase[] = [
  { kind: 'cassette_4way', has: ['PG-04', 'PG-05', 'PG-08', 'DR-12'], lacks: ['PG-09', 'CT-04', 'MT-08'] },
  { kind: 'cassette_2way', has: ['PG-04', 'PG-06', 'PG-07', 'DR-13'], lacks: ['PG-08', 'PG-09'] },
  {
    kind: 'cassette_compact',
    has: ['PG-08', 'PG-09'],
    lacks: ['PG-10', 'MT-07'],
    limits: { min_body_to_ceiling: limit(0.5, 'in'), max_body_to_ceiling: limit(1, 'in') },
    limit: { code: 'PG-04', text: /^Limit: between .+ and .+ · Model .+invented/ },
  },
  {
    kind: 'wall_mounted',
    has: ['MT-07', 'MT-08', 'CL-01', 'DR-14', 'DR-15'],
    lacks: ['MT-01', 'PG-01', 'CT-04'],
    limits: { min_pipe_hole_slope: limit(0.25, 'in/ft') },
    limit: { code: 'PN-01', text: /^Limit: at least .+ · Model .+invented/ },
  },
  { kind: 'floor_console', has: ['CL-07', 'PG-10', 'DR-14'], lacks: ['MT-01', 'MT-07', 'PG-04'] },
  { kind: 'floor_ceiling', has: ['MT-01', 'PG-10', 'DR-15'], lacks: ['CL-07', 'MT-07', 'MT-08'] },
  { kind: 'ducted_low', has: ['CT-04', 'CL-08', 'PG-11', 'MT-10'], lacks: ['CT-05', 'CT-06', 'DR-12'] },
  { kind: 'ducted_high', has: ['CT-05'], lacks: ['CT-04', 'CT-06'] },
  { kind: 'ducted_very_high', has: ['CT-06'], lacks: ['CT-04', 'CT-05'] },
  {
    kind: 'ahu_coil_kit',
    has: ['MT-09', 'RP-10', 'RP-11', 'CT-07', 'CT-08', 'SN-04'],
    lacks: ['MT-01', 'MT-05', 'DR-12', 'CT-04'],
    limits: { min_coil_internal_volume: limit(1, 'L'), max_coil_internal_volume: limit(4, 'L') },
    limit: { code: 'RP-09', text: /^Limit: between .+ and .+ · Model .+invented/ },
  },
];
const tagOf = (kind: UnitKindKey) => `IU-K${suffix}-${kind.replace(/_/g, '-').toUpperCase()}`;

async function setUpLevel() {
  const job = await demoJob();
  jobId = job.id;
  if ((await CatalogueItem.count({ where: { jobId } })) === 0) await copyCatalogue(jobId);
  const level = await buildLevel(jobId, { name: levelName });
  levelId = level.id;
  const space = await buildSpace(jobId, level.id, { name: `Kinds room ${suffix}` });
  const system = await buildSystem(jobId, { name: `VRF-K${suffix}` });
  for (const c of CASES) {
    const model = await UnitModel.create({ jobId, name: `Test ${c.kind} ${suffix}`, modelNumber: null, unitKind: c.kind, nominalCapacity: null });
    if (c.limits) await model.update({ limits: c.limits });
    await buildUnit(jobId, level.id, { tag: tagOf(c.kind), kind: c.kind, modelId: model.id, spaceId: space.id, systemId: system.id });
  }
}

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  await setUpLevel();
});
afterAll(async () => {
  await h?.close();
});

async function signIn(page: Page, role: 'inspector' | 'gc_manager') {
  const account = DEMO_ACCOUNTS.find((a) => a.role === role)!;
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(account.email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('job-list').waitFor();
}

describe('each unit kind has its own checks', () => {
  it('a walk over one unit of each of the ten kinds shows the checks and measured limits that set each kind apart', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await signIn(page, 'inspector');
    for (const c of CASES) {
      const tag = tagOf(c.kind);
      await page.goto(`${h.baseUrl}/jobs/${jobId}/levels/${levelId}/walk`);
      await page.getByTestId(`walk-unit-${tag}`).click();
      await page.getByTestId('unit-check-tag').filter({ hasText: tag }).waitFor();
      await page.getByTestId('unit-check-progress').waitFor();
      for (const code of c.has) await page.getByTestId(`check-item-${code}`).waitFor();
      for (const code of c.lacks) expect({ kind: c.kind, code, shown: await page.getByTestId(`check-item-${code}`).count() }).toEqual({ kind: c.kind, code, shown: 0 });
      if (c.limit) {
        const shown = page.getByTestId(`check-item-${c.limit.code}-measured-limit`);
        await shown.waitFor();
        expect(await shown.textContent()).toMatch(c.limit.text);
      }
      if (c.has.includes('DR-12')) {
        // The ductless drain's check valve or trap: decided by the code calculation, which names its section.
        expect(await page.getByTestId('check-item-DR-12-measured-limit').textContent()).toMatch(/must be yes · IMC \d{4} Section 307\.2\.4\.1/);
      }
      if (c.kind === 'cassette_compact' || c.kind === 'ducted_low') await h.screenshot(page, `kinds-walk-${c.kind}-phone`);
    }
    expect(problems).toEqual([]);
  });

  it('the catalogue screen lists the checks that apply to a kind, at phone and wide size', async () => {
    for (const [size, viewport] of [['phone', PHONE], ['wide', WIDE]] as const) {
      const { page, problems } = await h.newPage(viewport);
      await signIn(page, 'gc_manager');
      await page.goto(`${h.baseUrl}/jobs/${jobId}/setup/catalogue`);
      await page.getByTestId('catalogue-list').waitFor();
      await page.getByTestId('catalogue-kind').selectOption('cassette_compact');
      await page.getByTestId('catalogue-item-CT-04').waitFor({ state: 'detached' });
      const summary = page.getByTestId('catalogue-kind-summary');
      await summary.waitFor();
      expect(await summary.textContent()).toMatch(/Ceiling cassette, compact four-way\d+ checks apply: \d+ measured, 1 check for this kind only\./);
      await page.getByTestId('catalogue-item-PG-09').filter({ hasText: 'This kind only' }).waitFor();
      await page.getByTestId('catalogue-item-PG-08').waitFor();
      await h.screenshot(page, `kinds-catalogue-compact-${size}`);
      await page.getByTestId('catalogue-kind').selectOption('ducted_very_high');
      await page.getByTestId('catalogue-item-CT-06').filter({ hasText: 'This kind only' }).waitFor();
      expect(await page.getByTestId('catalogue-item-CT-04').count()).toBe(0);
      await h.screenshot(page, `kinds-catalogue-ducted-very-high-${size}`);
      expect(problems).toEqual([]);
    }
  });
});
