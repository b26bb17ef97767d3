/**
 * Demo seed: the demo job holds one finished (accepted) sampling audit and one in progress, drawn
 * with recorded seeds and decided by the same code as any audit, once.
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { Audit, Job } from '../../../server/models';
import { seedDemo } from '../../../server/seed/demo';
import { auditDetail } from '../../../server/services/audits';
import { drawSample } from '../../../shared/calc/sampling';
import { connectTestDb } from '../../support/db';

jest.setTimeout(120_000);

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

describe('demo seed: sampling audits', () => {
  it('seeds an accepted audit and one in progress, once; each sample is the seed\'s own draw', async () => {
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const audits = await Audit.findAll({ where: { jobId: job.id, seed: ['demo-level-2', 'demo-cassettes-3-5'] }, order: [['number', 'ASC']] });
    expect(audits.map((a) => a.seed)).toEqual(['demo-level-2', 'demo-cassettes-3-5']);
    const [done, running] = await Promise.all(audits.map((a) => auditDetail({ sequelize: db.sequelize }, job.id, a.id)));
    expect(done!).toMatchObject({ scheme: 'tiered', decision: 'accept' });
    expect(done!.decidedAt).not.toBeNull();
    expect(running!).toMatchObject({ scheme: 'z14', inspectionLevel: 'II', decision: 'continue', checked: 6 });
    expect(running!.sampleSize).toBeGreaterThan(6);
    for (const [a, d] of [[audits[0]!, done!], [audits[1]!, running!]] as const) {
      const lot = await db.sequelize.query<{ unit_id: string }>(`SELECT unit_id FROM audit_units WHERE audit_id = $1`, { bind: [a.id], type: QueryTypes.SELECT });
      expect(d.sample.map((s) => s.unitId)).toEqual(drawSample(lot.map((r) => r.unit_id), a.seed, a.plan).map((s) => s.unitId));
    }
    // Once: a second run adds nothing.
    const before = await Audit.count({ where: { jobId: job.id } });
    await seedDemo(db);
    expect(await Audit.count({ where: { jobId: job.id } })).toBe(before);
    expect(await Audit.count({ where: { jobId: job.id, seed: ['demo-level-2', 'demo-cassettes-3-5'] } })).toBe(2);
  });
});
