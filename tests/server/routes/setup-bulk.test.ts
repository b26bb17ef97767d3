/**
 * Bulk entry in set-up: levels and spaces pasted one per line, people invited from a pasted list,
 * a pending invitation sent again. Each list is all or none.
 */
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { AuthToken, Level, Space } from '../../../server/models';
import { pastedLines } from '../../../shared/schemas/setup';
import { jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildLevel, buildSpace } from '../../support/factories';

jest.setTimeout(120_000);

let db: Database;
let trimout: TrimoutApp;
let crew: SignedCrew;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  crew = await signInCrew(trimout.app);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

describe('levels and spaces pasted one per line', () => {
  it('reads a pasted list: trimmed, empty lines dropped, any line ending', () => {
    expect(pastedLines('Level 1\r\n\r\n  Level 2  \nRoof\r')).toEqual(['Level 1', 'Level 2', 'Roof']);
  });

  it('appends the levels in the order pasted; a name the job has, or the same name twice, adds none', async () => {
    const job = await newJobFor(crew);
    await buildLevel(job.id, { name: 'Basement' });
    const res = await crew.gc.post(jobPath(job.id, '/levels/bulk'), { names: ['Level 1', 'Level 2', 'Roof'] });
    expect(res.status).toBe(201);
    expect(res.body.items.map((l: { name: string; position: number }) => [l.name, l.position])).toEqual([
      ['Level 1', 2],
      ['Level 2', 3],
      ['Roof', 4],
    ]);
    const clash = await crew.gc.post(jobPath(job.id, '/levels/bulk'), { names: ['Level 3', 'roof'] });
    expect(clash.status).toBe(409);
    expect(clash.body.error.message).toBe('This job already has a level named "roof".');
    const twice = await crew.gc.post(jobPath(job.id, '/levels/bulk'), { names: ['Level 3', 'Level 4', 'level 3'] });
    expect(twice.status).toBe(400);
    expect(twice.body.error.message).toBe('names.2: "level 3" is on lines 1 and 3.');
    expect(await Level.count({ where: { jobId: job.id } })).toBe(4);
    expect((await crew.gc.post(jobPath(job.id, '/levels/bulk'), { names: [] })).body.error.message).toBe('names: Paste at least one name.');
    expect((await crew.insp.post(jobPath(job.id, '/levels/bulk'), { names: ['Level 9'] })).status).toBe(403);
  });

  it('adds the spaces to one level; a name the level has already adds none', async () => {
    const job = await newJobFor(crew);
    const l1 = await buildLevel(job.id, { name: 'Level 1' });
    await buildSpace(job.id, l1.id, { name: 'Lobby' });
    const res = await crew.gc.post(jobPath(job.id, '/spaces/bulk'), { levelId: l1.id, names: ['Exam 101', 'Exam 102', 'Staff 103'] });
    expect(res.status).toBe(201);
    expect(res.body.items.map((s: { name: string; levelName: string }) => [s.name, s.levelName])).toEqual([
      ['Exam 101', 'Level 1'],
      ['Exam 102', 'Level 1'],
      ['Staff 103', 'Level 1'],
    ]);
    const clash = await crew.gc.post(jobPath(job.id, '/spaces/bulk'), { levelId: l1.id, names: ['Exam 104', 'LOBBY'] });
    expect(clash.status).toBe(409);
    expect(clash.body.error.message).toBe('Level 1 already has "LOBBY": nothing was added. Leave it out and paste again.');
    expect(await Space.count({ where: { jobId: job.id } })).toBe(4);
    const other = await newJobFor(crew);
    const foreign = await buildLevel(other.id, { name: 'Level 1' });
    const wrongLevel = await crew.gc.post(jobPath(job.id, '/spaces/bulk'), { levelId: foreign.id, names: ['X'] });
    expect(wrongLevel.status).toBe(400);
    expect(wrongLevel.body.error.message).toBe('levelId: Not a level of this job.');
  });
});

describe('invitations from a pasted list, and sent again', () => {
  it('invites several people at once; one refused invites nobody, and the message names the line', async () => {
    const job = await newJobFor(crew);
    const a = `bulk-a-${job.id.slice(0, 8)}@test.trimout.example`;
    const b = `bulk-b-${job.id.slice(0, 8)}@test.trimout.example`;
    const refused = await crew.gc.post(jobPath(job.id, '/invitations/bulk'), {
      people: [
        { email: a, role: 'inspector' },
        { email: crew.inspector.email, role: 'inspector' },
      ],
    });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe(`Line 2 (${crew.inspector.email}): That person is already a member of this job. Nobody was invited.`);
    expect(await AuthToken.count({ where: { jobId: job.id, purpose: 'invitation' } })).toBe(0);
    const noCompany = await crew.gc.post(jobPath(job.id, '/invitations/bulk'), { people: [{ email: a, role: 'subcontractor' }] });
    expect(noCompany.status).toBe(400);
    expect(noCompany.body.error.fields).toEqual({ 'people.0.companyId': 'A subcontractor invitation needs the company they work for.' });

    const ok = await crew.gc.post(jobPath(job.id, '/invitations/bulk'), {
      people: [
        { email: a, role: 'inspector' },
        { email: b, role: 'gc_manager' },
      ],
    });
    expect(ok.status).toBe(201);
    expect(ok.body.items.map((i: { email: string; role: string }) => [i.email, i.role])).toEqual([
      [a, 'inspector'],
      [b, 'gc_manager'],
    ]);
    const twice = await crew.gc.post(jobPath(job.id, '/invitations/bulk'), { people: [{ email: a, role: 'inspector' }, { email: a.toUpperCase(), role: 'inspector' }] });
    expect(twice.status).toBe(400);
  });

  it('sends a pending invitation again with a new link; the old link dies; a withdrawn one is 409', async () => {
    const job = await newJobFor(crew);
    const email = `resend-${job.id.slice(0, 8)}@test.trimout.example`;
    const first = await crew.gc.post(jobPath(job.id, '/invitations'), { email, role: 'inspector' });
    expect(first.status).toBe(201);
    const again = await crew.gc.post(jobPath(job.id, `/invitations/${first.body.id}/resend`), {});
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ email, role: 'inspector' });
    expect(again.body.id).not.toBe(first.body.id);
    const old = await AuthToken.findByPk(first.body.id);
    expect(old!.revokedAt).not.toBeNull();
    const pending = await crew.gc.get(jobPath(job.id, '/invitations'));
    expect(pending.body.items.map((i: { id: string }) => i.id)).toEqual([again.body.id]);
    const stale = await crew.gc.post(jobPath(job.id, `/invitations/${first.body.id}/resend`), {});
    expect(stale.status).toBe(409);
    expect(stale.body.error).toMatchObject({ id: 'not_pending', message: 'That invitation was withdrawn or has expired: invite the person again.' });
    expect((await crew.insp.post(jobPath(job.id, `/invitations/${again.body.id}/resend`), {})).status).toBe(403);
    const other = await newJobFor(crew);
    expect((await crew.gc.post(jobPath(other.id, `/invitations/${again.body.id}/resend`), {})).status).toBe(404);
  });
});
