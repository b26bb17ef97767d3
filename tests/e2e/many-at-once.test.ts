/**
 * Several findings at once on a phone (390×844): the subcontractor ticks two findings on the list's
 * cards and sends one fix note with a shared photo (each finding gets its own fix, with the photo);
 * the inspector then ticks both and accepts the two fixes together. Checked in the database.
 */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { CatalogueItem, Company, Finding, Fix, Photo, User } from '../../server/models';
import { DEMO_ACCOUNTS, DEMO_COMPANIES, DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { nextFindingNumber, recordFindingEvent } from '../../server/services/findings';
import { PHONE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { demoLevel, type DemoLevel } from '../support/demo';
import { waitFor } from '../support/wait';

jest.setTimeout(240_000);

const suffix = randomUUID().slice(0, 4).toUpperCase();
const tags = ['01', '02'].map((n) => `IU-M${suffix}-${n}`);
const inspector = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!;
const mechanical = DEMO_ACCOUNTS.find((a) => a.company === 'mechanical')!;

let h: BrowserHarness;
let level: DemoLevel;
const findings: Finding[] = [];

beforeAll(async () => {
  h = await startBrowserHarness();
  await seedDemo(h.db);
  level = await demoLevel(`Many ${suffix}`, tags, { kind: 'cassette_4way' });
  const item = (await CatalogueItem.findAll({ where: { jobId: level.jobId, isOther: false, retiredAt: null } })).find((c) => c.unitKinds.includes('cassette_4way') && !c.measuredRule)!;
  const company = (await Company.findOne({ where: { name: DEMO_COMPANIES.mechanical } }))!;
  const by = (await User.findOne({ where: { email: inspector.email } }))!;
  const sequelize = Finding.sequelize!;
  for (const unitId of level.unitIds) {
    findings.push(
      await sequelize.transaction(async (transaction) => {
        const f = await Finding.create(
          {
            jobId: level.jobId,
            number: await nextFindingNumber(sequelize, level.jobId, transaction),
            unitId,
            spaceId: null,
            levelId: level.levelId,
            catalogueItemId: item.id,
            walkId: null,
            unitCheckId: null,
            severity: 'major',
            status: 'open',
            companyId: company.id,
            dueOn: '2027-01-15',
            note: 'Hung on chain.',
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
      }),
    );
  }
});
afterAll(async () => {
  await h?.close();
});

describe('Several findings at once (phone)', () => {
  it('one fix for two findings from the subcontractor, then both accepted together by the inspector', async () => {
    const labels = findings.map((f) => `#${f.number}`);
    const sub = await h.newPage(PHONE);
    await h.signIn(sub.page, mechanical.email, DEMO_PASSWORD);
    await sub.page.goto(`${h.baseUrl}/jobs/${level.jobId}/findings?levelId=${level.levelId}`);
    for (const l of labels) await sub.page.getByTestId(`finding-pick-${l}`).click();
    await sub.page.getByTestId('bulk-fix-note').fill('Replaced the chain with threaded rod, nuts and washers above and below.');
    const photo = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 60, g: 140, b: 90 } } }).jpeg().toBuffer();
    await sub.page.getByTestId('bulk-fix-files-input').setInputFiles({ name: 'rod.jpg', mimeType: 'image/jpeg', buffer: photo });
    await sub.page.getByTestId('bulk-fix-photos-thumb-0').waitFor();
    await h.screenshot(sub.page, 'many-at-once-01-one-fix-phone');
    await sub.page.getByTestId('bulk-fix-send').click();
    await sub.page.getByTestId('bulk-fix-done').waitFor();
    await waitFor(async () => (await Finding.count({ where: { id: findings.map((f) => f.id), status: 'fix_submitted' } })) === 2);
    const fixes = await Fix.findAll({ where: { findingId: findings.map((f) => f.id) } });
    expect(fixes).toHaveLength(2);
    for (const fix of fixes) expect(await Photo.count({ where: { fixId: fix.id } })).toBe(1);
    expect(sub.problems).toEqual([]);

    const insp = await h.newPage(PHONE);
    await h.signIn(insp.page, inspector.email, DEMO_PASSWORD);
    await insp.page.goto(`${h.baseUrl}/jobs/${level.jobId}/findings?levelId=${level.levelId}`);
    for (const l of labels) await insp.page.getByTestId(`finding-pick-${l}`).click();
    await insp.page.getByTestId('many-kind-accept').click();
    for (const l of labels) await insp.page.getByTestId(`bulk-accept-item-${l}`).waitFor();
    await h.screenshot(insp.page, 'many-at-once-02-accept-phone');
    await insp.page.getByTestId('bulk-accept-send').click();
    await insp.page.getByTestId('bulk-accept-done').waitFor();
    await waitFor(async () => (await Finding.count({ where: { id: findings.map((f) => f.id), status: 'closed' } })) === 2);
    expect(insp.problems).toEqual([]);
  });
});
