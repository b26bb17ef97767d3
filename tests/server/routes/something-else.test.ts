/**
 * "Something else": a finding whose defect is not in the catalogue, logged with a free-text title
 * and a trade against the job's one "other" defect type. Field errors for what it lacks, who may
 * log it, and that it counts on the board, exports in findings.csv and recurs by its title.
 */
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import { FINDINGS_CSV_HEADER } from '../../../server/services/csvFindings';
import type { BoardResponse, RecurringResponse } from '../../../shared/schemas/board';
import { csrfFor, signIn, type SignedIn } from '../../support/app';
import { buildUser } from '../../support/factories';
import { buildWalkJob, countRows, startWalkApp, type People, type WalkJob } from '../../support/findings';

jest.setTimeout(180_000);

let api: Awaited<ReturnType<typeof startWalkApp>>;
let trimout: TrimoutApp;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let outsider: SignedIn;

beforeAll(async () => {
  api = await startWalkApp();
  ({ trimout, people, gc, inspector, subA } = api);
  outsider = await signIn(trimout.app, (await buildUser()).email);
});
afterAll(() => api.close());

function post(who: SignedIn, w: WalkJob, body: object) {
  return who.agent.post(`/api/jobs/${w.job.id}/findings`).set('X-CSRF-Token', who.csrf).send(body);
}

const loose = (w: WalkJob, over: object = {}) => ({ unitId: w.cassette.id, title: 'Return grille hanging loose', trade: 'ceilings', severity: 'minor', companyId: w.gcCompany.id, ...over });

async function otherTypes(jobId: string) {
  const [rows] = await api.db.sequelize.query(`SELECT id, code, unit_kinds FROM catalogue_items WHERE job_id = $1 AND is_other`, { bind: [jobId] });
  return rows as { id: string; code: string; unit_kinds: string[] }[];
}

describe('POST /findings: something else', () => {
  it('logs it under the job\'s one other type with its own title; the company follows the trade when none is named', async () => {
    const w = await buildWalkJob(people);
    expect(await otherTypes(w.job.id)).toEqual([]);
    const first = await post(inspector, w, loose(w, { note: 'Tabs bent.' })).expect(201);
    expect(first.body).toMatchObject({ code: 'OTHER', title: 'Return grille hanging loose', severity: 'minor', companyId: w.gcCompany.id, status: 'open', unitId: w.cassette.id });
    const [type] = await otherTypes(w.job.id);
    expect(first.body.catalogueItemId).toBe(type!.id);

    // Electrical: company B covers it on this job, so it is suggested.
    const second = await post(gc, w, { unitId: w.wall.id, title: 'Junction box cover missing', trade: 'electrical', severity: 'major' }).expect(201);
    expect(second.body).toMatchObject({ code: 'OTHER', title: 'Junction box cover missing', companyId: w.subB.companyId });
    expect(second.body.catalogueItemId).toBe(type!.id);
    expect(await otherTypes(w.job.id)).toHaveLength(1);

    const detail = await inspector.agent.get(`/api/jobs/${w.job.id}/findings/${first.body.id}`).expect(200);
    expect(detail.body.title).toBe('Return grille hanging loose');
    const found = await inspector.agent.get(`/api/jobs/${w.job.id}/findings?q=${encodeURIComponent('junction box')}`).expect(200);
    expect(found.body.items.map((f: { id: string }) => f.id)).toEqual([second.body.id]);
  });

  it('the other type is never a defect to pick: not in the catalogue list, refused by its id', async () => {
    const w = await buildWalkJob(people);
    await post(inspector, w, loose(w)).expect(201);
    const [type] = await otherTypes(w.job.id);
    const list = await gc.agent.get(`/api/jobs/${w.job.id}/catalogue?limit=200`).expect(200);
    expect(list.body.items.map((i: { code: string }) => i.code)).not.toContain('OTHER');
    await gc.agent.get(`/api/jobs/${w.job.id}/catalogue/${type!.id}`).expect(404);
    const byId = await post(inspector, w, { unitId: w.cassette.id, catalogueItemId: type!.id }).expect(400);
    expect(byId.body.error.fields).toEqual({ catalogueItemId: 'Choose the defect from the list, or describe it under Something else.' });
  });

  it.each([
    ['no title', (w: WalkJob) => ({ unitId: w.cassette.id, trade: 'ceilings', severity: 'minor' }), { title: 'Say what is wrong, in a few words.' }],
    ['a blank title', (w: WalkJob) => ({ ...loose(w), title: '   ' }), { title: 'Say what is wrong, in a few words.' }],
    ['no trade', (w: WalkJob) => ({ unitId: w.cassette.id, title: 'Loose grille', severity: 'minor' }), { trade: 'Choose the trade that usually fixes it.' }],
    ['no severity', (w: WalkJob) => ({ unitId: w.cassette.id, title: 'Loose grille', trade: 'ceilings' }), { severity: 'Choose the severity.' }],
    ['a title beside a defect type', (w: WalkJob) => ({ ...loose(w), catalogueItemId: w.byCode('DR-03').id, trade: undefined }), { title: 'A defect type from the catalogue has its own title; leave this out.' }],
    ['a measured value', (w: WalkJob) => ({ ...loose(w), measuredText: '3 in' }), { measuredText: 'Something else takes no measured value.' }],
    ['neither a type nor a title', (w: WalkJob) => ({ unitId: w.cassette.id, severity: 'minor' }), { catalogueItemId: 'Choose the defect from the list, or describe it under Something else.' }],
    ['a title too long', (w: WalkJob) => ({ ...loose(w), title: 'x'.repeat(161) }), { title: 'The title is at most 160 characters: shorten it by 1.' }],
  ])('400 with the field named for %s, nothing written', async (_what, body, fields) => {
    const w = await buildWalkJob(people);
    const before = await countRows(w.job.id);
    const res = await post(inspector, w, body(w)).expect(400);
    expect(res.body.error.fields).toEqual(fields);
    expect(await countRows(w.job.id)).toEqual(before);
    expect(await otherTypes(w.job.id)).toEqual([]);
  });

  it('401 signed out, 403 for a subcontractor, 404 for a non-member; nothing written', async () => {
    const w = await buildWalkJob(people);
    const before = await countRows(w.job.id);
    const anon = request.agent(trimout.app);
    await anon.post(`/api/jobs/${w.job.id}/findings`).set('X-CSRF-Token', await csrfFor(anon)).send(loose(w)).expect(401);
    await post(subA, w, loose(w)).expect(403);
    await post(outsider, w, loose(w)).expect(404);
    expect(await countRows(w.job.id)).toEqual(before);
    expect(await otherTypes(w.job.id)).toEqual([]);
  });
});

describe('something else on the board, in the export and in the recurring defects', () => {
  it('counts on the levels board like any finding', async () => {
    const w = await buildWalkJob(people);
    const levelOf = (b: BoardResponse) => b.levels.find((l) => l.levelId === w.level.id)!;
    const before = levelOf((await gc.agent.get(`/api/jobs/${w.job.id}/board`).expect(200)).body);
    await post(inspector, w, loose(w, { severity: 'critical' })).expect(201);
    const after = levelOf((await gc.agent.get(`/api/jobs/${w.job.id}/board`).expect(200)).body);
    expect(after.open).toBe(before.open + 1);
    expect(after.openCritical).toBe(before.openCritical + 1);
  });

  it('exports its code OTHER and its own title (neutralised like any cell) in findings.csv', async () => {
    const w = await buildWalkJob(people);
    const made = await post(inspector, w, loose(w, { title: '=HYPERLINK("x") grille' })).expect(201);
    const res = await gc.agent
      .get(`/api/jobs/${w.job.id}/findings.csv`)
      .buffer(true)
      .parse((r, cb) => {
        let text = '';
        r.setEncoding('utf8');
        r.on('data', (c: string) => (text += c));
        r.on('end', () => cb(null, text));
      })
      .expect(200);
    const records = parse(res.body as string, { bom: true }) as string[][];
    const header = records[0]!;
    expect(header).toEqual([...FINDINGS_CSV_HEADER]);
    const row = records.slice(1).find((r) => r[header.indexOf('Finding id')] === made.body.id)!;
    expect(row[header.indexOf('Defect code')]).toBe('OTHER');
    expect(row[header.indexOf('Defect title')]).toBe(`'=HYPERLINK("x") grille`);
  });

  it('recurs by its normalised title, not by the shared other type', async () => {
    const w = await buildWalkJob(people);
    await api.db.sequelize.query(`UPDATE jobs SET recurring_thresholds = '{"minUnits": 2, "minShare": 0.01}' WHERE id = $1`, { bind: [w.job.id] });
    await post(inspector, w, loose(w, { unitId: w.cassette.id, title: 'Return grille hanging loose' })).expect(201);
    await post(inspector, w, loose(w, { unitId: w.cassette2.id, title: '  return GRILLE   hanging loose ' })).expect(201);
    // Two other titles, each on one unit only: the shared type must not add them up.
    await post(inspector, w, loose(w, { unitId: w.wall.id, title: 'Filter missing' })).expect(201);
    await post(inspector, w, loose(w, { unitId: w.upstairs.id, title: 'Cover plate cracked' })).expect(201);

    const body = (await gc.agent.get(`/api/jobs/${w.job.id}/recurring`).expect(200)).body as RecurringResponse;
    const others = body.items.filter((i) => i.code === 'OTHER');
    expect(others).toHaveLength(1);
    expect(others[0]).toMatchObject({ key: 'other:return grille hanging loose', title: 'Return grille hanging loose', unitCount: 2 });
    expect(others[0]!.byLevel).toEqual([{ levelId: w.level.id, name: 'Level 3', count: 2 }]);
    // The share is over the job's looked-at units of every kind (the other type applies to all).
    expect(others[0]!.checkedUnits).toBe(2);

    // A subcontractor sees it only over their own company's findings: none of these are theirs.
    const mine = (await subA.agent.get(`/api/jobs/${w.job.id}/recurring`).expect(200)).body as RecurringResponse;
    expect(mine.items.filter((i) => i.code === 'OTHER')).toEqual([]);
  });
});
