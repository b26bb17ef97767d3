/**
 * upgradeBuiltinCatalogues (server/services/catalogueUpgrade.ts): a job whose catalogue was copied
 * from an older built-in catalogue gains the defect types it lacks and the current fields of the
 * copies it never edited; edited, retired and the job's own items stay as they are; nothing is
 * renumbered or deleted; a second run changes nothing.
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { CatalogueItem } from '../../../server/models';
import { changeCatalogueItem, createCatalogueItem, retireCatalogueItem } from '../../../server/services/catalogue';
import { upgradeBuiltinCatalogues } from '../../../server/services/catalogueUpgrade';
import { BUILTIN_CATALOGUE, findItem } from '../../../shared/catalogue';
import { etagOf } from '../../../shared/rules/etag';
import { connectTestDb } from '../../support/db';
import { buildJob, copyCatalogue } from '../../support/factories';

jest.setTimeout(60_000);

let db: Database;

beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

/** Every row of the job, as the upgrade could change it. */
async function snapshot(jobId: string) {
  return db.sequelize.query<Record<string, unknown>>(
    `SELECT id, code, "group", title, description, unit_kinds, default_severity, trade, measured_rule, fix_guidance,
            caution, needs_ceiling_access, follows_builtin, position, retired_at, version, updated_at
       FROM catalogue_items WHERE job_id = $1 ORDER BY code`,
    { bind: [jobId], type: QueryTypes.SELECT },
  );
}

const byCode = (jobId: string, code: string) => CatalogueItem.findOne({ where: { jobId, code }, rejectOnEmpty: true });

/** A built-in item with a measured rule, one without, one with a caution, and the catalogue's last one. */
const RULED = BUILTIN_CATALOGUE.find((i) => i.measuredRule)!;
const PLAIN = BUILTIN_CATALOGUE.find((i) => !i.measuredRule && i.code !== RULED.code)!;
const CAUTIONED = BUILTIN_CATALOGUE.find((i) => i.caution && ![RULED.code, PLAIN.code].includes(i.code))!;
const LAST = BUILTIN_CATALOGUE[BUILTIN_CATALOGUE.length - 1]!;
/** A group's item that is not its group's last: added back, it must still come after the group's others. */
const MIDDLE = BUILTIN_CATALOGUE.find((i, n) => {
  const next = BUILTIN_CATALOGUE[n + 1];
  return next?.group === i.group && ![RULED.code, PLAIN.code, CAUTIONED.code].includes(i.code);
})!;

/** A job copied from "an older catalogue": two items missing, one unedited item with an old rule. */
async function oldJob() {
  const job = await buildJob();
  await copyCatalogue(job.id);
  await db.sequelize.query(`DELETE FROM catalogue_items WHERE job_id = $1 AND code IN ($2, $3)`, { bind: [job.id, LAST.code, MIDDLE.code] });
  const oldRule = { ...RULED.measuredRule!, measure: 'An older wording of the measurement' };
  await db.sequelize.query(`UPDATE catalogue_items SET measured_rule = $2::jsonb, unit_kinds = '{wall_mounted}' WHERE job_id = $1 AND code = $3`, {
    bind: [job.id, JSON.stringify(oldRule), RULED.code],
  });
  return job;
}

it('adds the missing built-in items after the job items, brings unedited copies up to date, and leaves the rest', async () => {
  const job = await oldJob();
  const setup = (ifMatch?: string) => ({ jobId: job.id, ifMatch });
  // Edited by the job (version 2), then the built-in text drifts away from it: it must stay the job's.
  const edited = await db.sequelize.transaction(async (transaction) => {
    const item = await byCode(job.id, PLAIN.code);
    return changeCatalogueItem({ ...setup(etagOf(item.version)), transaction }, item.id, { title: 'Our own words for this check' });
  });
  // Retired, and its text differs from the built-in one: left alone.
  const retired = await byCode(job.id, CAUTIONED.code);
  await db.sequelize.transaction((transaction) => retireCatalogueItem({ ...setup(etagOf(retired.version)), transaction }, retired.id));
  await db.sequelize.query(`UPDATE catalogue_items SET caution = 'An old caution' WHERE id = $1`, { bind: [retired.id] });
  // The job's own item, with the code-like title of no built-in item.
  const own = await db.sequelize.transaction((transaction) =>
    createCatalogueItem(
      { transaction, jobId: job.id },
      { code: 'ZZ-01', group: RULED.group, title: 'Job-specific check', description: 'Ours.', unitKinds: ['wall_mounted'], defaultSeverity: 'minor', trade: RULED.trade, measuredRule: null, fixGuidance: 'Fix it.', caution: null, needsCeilingAccess: false },
    ),
  );
  const before = await snapshot(job.id);
  const lastPosition = Math.max(...before.map((r) => Number(r.position)));
  const ruledBefore = await byCode(job.id, RULED.code);
  expect(ruledBefore.version).toBe(1);

  expect(await upgradeBuiltinCatalogues(db.sequelize, { jobIds: [job.id] })).toEqual({ added: 2, updated: 1 });

  // The missing items, after every item the job had, in catalogue order, as followers of the catalogue.
  const middle = await byCode(job.id, MIDDLE.code);
  const last = await byCode(job.id, LAST.code);
  expect([middle.position, last.position]).toEqual([lastPosition + 1, lastPosition + 2]);
  expect(middle.title).toBe(MIDDLE.title);
  expect(middle.builtin && middle.followsBuiltin && middle.version === 1).toBe(true);
  const group = await CatalogueItem.findAll({ where: { jobId: job.id, group: MIDDLE.group }, order: [['position', 'ASC']] });
  expect(group[group.length - (MIDDLE.group === LAST.group ? 2 : 1)]!.code).toBe(MIDDLE.code);

  // The unedited copy has the current rule and kinds, and a new version (a screen holding the old one gets 412).
  const ruled = await byCode(job.id, RULED.code);
  expect(ruled.measuredRule).toEqual(RULED.measuredRule);
  expect(ruled.unitKinds).toEqual([...RULED.unitKinds]);
  expect(ruled.version).toBe(2);
  expect(ruled.followsBuiltin).toBe(true);

  // Every other row is exactly as it was: positions, the edited item, the retired one, the job's own.
  const after = await snapshot(job.id);
  const unchanged = (rows: Record<string, unknown>[]) => rows.filter((r) => ![RULED.code, MIDDLE.code, LAST.code].includes(r.code as string));
  expect(unchanged(after)).toEqual(unchanged(before));
  expect((await byCode(job.id, PLAIN.code)).title).toBe('Our own words for this check');
  expect(edited.version).toBe(2);
  expect((await byCode(job.id, CAUTIONED.code)).caution).toBe('An old caution');
  expect((await byCode(job.id, own.code)).title).toBe('Job-specific check');
  expect(after).toHaveLength(before.length + 2);
});

it('changes nothing the second time', async () => {
  const job = await oldJob();
  await upgradeBuiltinCatalogues(db.sequelize, { jobIds: [job.id] });
  const once = await snapshot(job.id);
  expect(await upgradeBuiltinCatalogues(db.sequelize, { jobIds: [job.id] })).toEqual({ added: 0, updated: 0 });
  expect(await snapshot(job.id)).toEqual(once);
});

it('keeps following the catalogue after an upgrade, and stops once the job edits the item', async () => {
  const job = await oldJob();
  await upgradeBuiltinCatalogues(db.sequelize, { jobIds: [job.id] });
  // The catalogue changes again: the upgraded copy (version 2 now) still follows it.
  await db.sequelize.query(`UPDATE catalogue_items SET title = 'Older title' WHERE job_id = $1 AND code = $2`, { bind: [job.id, RULED.code] });
  expect(await upgradeBuiltinCatalogues(db.sequelize, { jobIds: [job.id] })).toEqual({ added: 0, updated: 1 });
  const ruled = await byCode(job.id, RULED.code);
  expect(ruled.title).toBe(findItem(RULED.code)!.title);
  // An edit that only retires and brings back is no edit; changing a field is.
  await db.sequelize.transaction((transaction) => changeCatalogueItem({ transaction, jobId: job.id, ifMatch: etagOf(ruled.version) }, ruled.id, { defaultSeverity: ruled.defaultSeverity === 'minor' ? 'major' : 'minor' }));
  const chosen = await byCode(job.id, RULED.code);
  expect(chosen.followsBuiltin).toBe(false);
  expect(await upgradeBuiltinCatalogues(db.sequelize, { jobIds: [job.id] })).toEqual({ added: 0, updated: 0 });
  expect((await byCode(job.id, RULED.code)).defaultSeverity).toBe(chosen.defaultSeverity);
});

it('skips a job that never held a built-in copy', async () => {
  const job = await buildJob();
  await db.sequelize.transaction((transaction) =>
    createCatalogueItem(
      { transaction, jobId: job.id },
      { code: 'ZZ-02', group: RULED.group, title: 'Only ours', description: 'Ours.', unitKinds: ['wall_mounted'], defaultSeverity: 'minor', trade: RULED.trade, measuredRule: null, fixGuidance: 'Fix it.', caution: null, needsCeilingAccess: false },
    ),
  );
  expect(await upgradeBuiltinCatalogues(db.sequelize, { jobIds: [job.id] })).toEqual({ added: 0, updated: 0 });
});
