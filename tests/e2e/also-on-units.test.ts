/**
 * "Also on other units" on a phone (390×844): from a finding just logged on one cassette, the
 * inspector picks more units of the same level, gives one of them its own photo, and logs the same
 * defect on all of them in one write; each unit gets its own finding (checked in the database).
 * Screenshots go to TRIMOUT_ARTIFACTS/screenshots.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { CatalogueItem, Company, Finding, Photo, User } from '../../server/models';
import { DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { nextFindingNumber, recordFindingEvent } from '../../server/services/findings';
import { PHONE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoLevel, type DemoLevel } from '../support/demo';
import { waitFor } from '../support/wait';

jest.setTimeout(240_000);

const suffix = randomUUID().slice(0, 4).toUpperCase();
const tags = ['01', '02', '03', '04'].map((n) => `IU-A${suffix}-${n}`);
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;

let h: BrowserHarness;
let level: DemoLevel;
let first: Finding;
let item: CatalogueItem;

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  level = await demoLevel(`Also ${suffix}`, tags, { kind: 'cassette_4way' });
  item = (await CatalogueItem.findAll({ where: { jobId: level.jobId, isOther: false, retiredAt: null } })).find((c) => c.unitKinds.includes('cassette_4way') && !c.measuredRule)!;
  const mechanical = (await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } }))!;
  const by = (await User.findOne({ where: { email: inspector.email } }))!;
  const sequelize = Finding.sequelize!;
  first = await sequelize.transaction(async (transaction) => {
    const f = await Finding.create(
      {
        jobId: level.jobId,
        number: await nextFindingNumber(sequelize, level.jobId, transaction),
        unitId: level.unitIds[0]!,
        spaceId: null,
        levelId: level.levelId,
        catalogueItemId: item.id,
        walkId: null,
        unitCheckId: null,
        severity: 'major',
        status: 'open',
        companyId: mechanical.id,
        dueOn: '2027-01-15',
        note: 'Hung on chain, no washers above the nuts.',
        measuredText: null,
        measuredValue: null,
        ruleResult: null,
        loggedBy: by.id,
        loggedAt: new Date(),
        pinX: null,
        pinY: null,
        voidedReason: null,
      },
      { transaction },
    );
    await recordFindingEvent({ findingId: f.id, jobId: level.jobId, actorId: by.id, kind: 'logged', to: { status: 'open' } }, transaction);
    return f;
  });
});
afterAll(async () => {
  await h?.close();
});

describe('Also on other units (phone)', () => {
  it('logs the defect just logged on two more units of the level, one with its own photo', async () => {
    const { page, problems } = await h.newPage(PHONE);
    await h.signIn(page, inspector.email, DEMO_PASSWORD);
    await page.goto(`${h.baseUrl}/jobs/${level.jobId}/findings/${first.id}`);
    await page.getByTestId('finding-also-open').click();
    await page.getByTestId(`finding-also-unit-${tags[1]}`).waitFor();
    // The finding's own unit is not offered again.
    expect(await page.getByTestId(`finding-also-unit-${tags[0]}`).count()).toBe(0);
    await page.getByTestId(`finding-also-unit-${tags[1]}-toggle`).click();
    await page.getByTestId(`finding-also-unit-${tags[3]}-toggle`).click();
    const photo = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 90, g: 120, b: 160 } } }).jpeg().toBuffer();
    await page.getByTestId(`finding-also-unit-${tags[3]}-photo-input`).setInputFiles({ name: 'washers.jpg', mimeType: 'image/jpeg', buffer: photo });
    await page.getByTestId(`finding-also-unit-${tags[3]}-photo-name`).waitFor();
    await page.getByTestId('finding-also').scrollIntoViewIfNeeded();
    await h.screenshot(page, 'also-on-units-01-picker-phone');
    await page.getByTestId('finding-also-send').click();
    await page.getByTestId('finding-also-done').waitFor();
    await h.screenshot(page, 'also-on-units-02-logged-phone');
    // The units just logged are listed with their new finding and cannot be chosen twice.
    expect(await page.getByTestId(`finding-also-unit-${tags[1]}-toggle`).getAttribute('aria-disabled')).toBe('true');
    expect(await page.getByTestId(`finding-also-unit-${tags[2]}-toggle`).getAttribute('aria-disabled')).not.toBe('true');

    const logged = await waitFor(async () => {
      const rows = await Finding.findAll({ where: { jobId: level.jobId, levelId: level.levelId }, order: [['number', 'ASC']] });
      return rows.length === 3 ? rows : null;
    });
    expect(logged.map((f) => f.unitId)).toEqual([level.unitIds[0], level.unitIds[1], level.unitIds[3]]);
    for (const f of logged.slice(1)) {
      expect({ item: f.catalogueItemId, severity: f.severity, company: f.companyId, note: f.note }).toEqual({
        item: item.id,
        severity: 'major',
        company: first.companyId,
        note: first.note,
      });
    }
    expect(await Photo.count({ where: { findingId: logged[1]!.id } })).toBe(0);
    expect(await Photo.count({ where: { findingId: logged[2]!.id } })).toBe(1);
    // Each new finding links to its own page.
    await page.getByTestId(`finding-also-done-${tags[3]}`).click();
    await page.getByTestId('finding-title').waitFor();
    expect(new URL(page.url()).pathname).toBe(`/jobs/${level.jobId}/findings/${logged[2]!.id}`);
    expect(problems).toEqual([]);
  });
});
