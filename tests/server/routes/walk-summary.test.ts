/**
 * What "Finish walk" shows before the walk ends (WalkDetail.summary, on GET /walks/:walkId and the
 * finish answer): the findings logged within this walk by severity, and the level's units whose
 * current unit check is not complete, listed by tag.
 */
import type { WalkDetail } from '../../../shared/schemas/findings';
import type { SignedIn } from '../../support/app';
import { buildUnit } from '../../support/factories';
import { buildWalkJob, everyItem, insertFinding, startWalkApp, type People, type WalkJob } from '../../support/findings';

jest.setTimeout(120_000);

let api: Awaited<ReturnType<typeof startWalkApp>>;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;

beforeAll(async () => {
  api = await startWalkApp();
  ({ people, gc, inspector, subA } = api);
});
afterAll(() => api.close());

const post = (who: SignedIn, path: string, body: object) => who.agent.post(path).set('X-CSRF-Token', who.csrf).send(body);

async function walkOn(w: WalkJob): Promise<WalkDetail> {
  return (await post(inspector, `/api/jobs/${w.job.id}/walks`, { levelId: w.level.id }).expect(201)).body as WalkDetail;
}

describe('the walk summary', () => {
  it('a new walk: nothing found yet, every unit of the level left, by tag; units of other levels not listed', async () => {
    const w = await buildWalkJob(people);
    const walk = await walkOn(w);
    expect(walk.summary).toEqual({
      findingsBySeverity: { critical: 0, major: 0, minor: 0 },
      unchecked: [
        { id: w.cassette.id, tag: 'IU-3-01', inProgress: false },
        { id: w.cassette2.id, tag: 'IU-3-02', inProgress: false },
        { id: w.wall.id, tag: 'IU-3-03', inProgress: false },
      ],
    });
  });

  it('counts the findings logged within this walk by severity (not other walks, not voided) and leaves out units whose current check is complete', async () => {
    const w = await buildWalkJob(people);
    const walk = await walkOn(w);
    const mt01 = w.byCode('MT-01');
    const checks = (unitId: string) => `/api/jobs/${w.job.id}/units/${unitId}/checks`;
    await post(inspector, checks(w.cassette.id), { walkId: walk.id, items: await everyItem(w.job.id, 'cassette_4way'), complete: true }).expect(201);
    await post(inspector, checks(w.cassette2.id), { walkId: walk.id, items: [{ catalogueItemId: mt01.id, mark: 'ok' }] }).expect(201);
    const log = (body: object) => post(inspector, `/api/jobs/${w.job.id}/findings`, { walkId: walk.id, unitId: w.cassette.id, ...body }).expect(201);
    await log({ catalogueItemId: w.byCode('DR-03').id, severity: 'critical' });
    await log({ catalogueItemId: w.byCode('DR-03').id, severity: 'critical' });
    await log({ title: 'Return grille hanging loose', trade: 'general', severity: 'minor' });
    const voided = await log({ catalogueItemId: w.byCode('DR-03').id, severity: 'major' });
    await inspector.agent
      .patch(`/api/jobs/${w.job.id}/findings/${voided.body.id}`)
      .set('X-CSRF-Token', inspector.csrf)
      .set('If-Match', voided.headers.etag!)
      .send({ void: { reason: 'Logged in error.' } })
      .expect(200);
    // Logged outside the walk: not counted.
    await insertFinding(w, { unitId: w.wall.id, severity: 'major' });
    // A unit added to the level later is left too, in tag order.
    const late = await buildUnit(w.job.id, w.level.id, { tag: 'IU-3-00', kind: 'wall_mounted' });

    const read = (await gc.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(200)).body as WalkDetail;
    expect(read.summary.findingsBySeverity).toEqual({ critical: 2, major: 0, minor: 1 });
    expect(read.summary.unchecked).toEqual([
      { id: late.id, tag: 'IU-3-00', inProgress: false },
      { id: w.cassette2.id, tag: 'IU-3-02', inProgress: true },
      { id: w.wall.id, tag: 'IU-3-03', inProgress: false },
    ]);
    expect(read.coverage).toMatchObject({ checked: 1, total: 4 });

    // Finishing answers the same summary.
    const finished = (await post(inspector, `/api/jobs/${w.job.id}/walks/${walk.id}/finish`, {}).expect(200)).body as WalkDetail;
    expect(finished.finishedAt).not.toBeNull();
    expect(finished.summary).toEqual(read.summary);
  });

  it('is read only by the field crew of the job: a subcontractor gets 403', async () => {
    const w = await buildWalkJob(people);
    const walk = await walkOn(w);
    await subA.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(403);
  });
});
