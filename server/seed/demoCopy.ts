/**
 * The demo's second building: a copy of the main job (POST /jobs/:jobId/copy's own command), in
 * set-up, with its setup checklist partly done. The copy brings the levels, spaces, models,
 * catalogue, settings, companies and crews; then a few units of its first level are entered, in
 * their spaces but on no system yet (the systems are not copied), so the checklist still names
 * the units without a system, and every other level has no units yet. Invented, like the rest.
 */
import type { Transaction } from 'sequelize';
import { copyJob } from '../commands/copyJob';
import type { Database } from '../db';

export const DEMO_COPY = {
  name: 'Cinder Lane Commons, north building',
  number: 'CLC-2612',
  address: '1420 Cinder Lane, Harrowgate',
} as const;

/** Tags of the units entered so far on the copy's lowest level. */
const FIRST_UNITS = ['N-1-01', 'N-1-02', 'N-1-03', 'N-1-04'];

export async function seedDemoCopy(db: Database, mainJobId: string, gc: { id: string; companyId: string }, transaction: Transaction): Promise<boolean> {
  const { Job, Level, Space, Unit } = db.models;
  if (await Job.findOne({ where: { name: DEMO_COPY.name, ownerCompanyId: gc.companyId }, transaction })) return false;
  const main = await Job.findByPk(mainJobId, { transaction });
  if (!main) return false;
  const copy = await copyJob({ transaction, actor: gc }, main, { ...DEMO_COPY, startsOn: '2027-02-01', endsOn: '2027-11-30' });
  const level = await Level.findOne({ where: { jobId: copy.id }, order: [['position', 'ASC']], transaction });
  if (!level) return true;
  const spaces = await Space.findAll({ where: { jobId: copy.id, levelId: level.id }, order: [['name', 'ASC']], transaction });
  await Unit.bulkCreate(
    FIRST_UNITS.map((tag, i) => ({ jobId: copy.id, tag, kind: 'cassette_4way' as const, levelId: level.id, spaceId: spaces[i % Math.max(spaces.length, 1)]?.id ?? null })),
    { transaction },
  );
  return true;
}
