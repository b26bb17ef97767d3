/**
 * Due dates that are honest: a finding cannot be logged or moved to a date before today on the
 * job's clock (its time zone, not the server's) unless a GC manager back-dates it on purpose
 * (`backdated: true`; anyone else sending the flag gets 403), and a returned fix gets a new due
 * date from the job's policy, kept in the "returned" event. "Today" in a zone is computed here
 * from fixed offsets (Kiritimati UTC+14, Pago Pago UTC-11: neither keeps daylight saving, IANA tz
 * database), not by the code under test.
 */
import { Finding, Job } from '../../../server/models';
import { dueAgainWords } from '../../../shared/rules/dueAgain';
import { startWalkApp } from '../../support/findings';
import { buildWalkJob, countRows, insertFinding, type WalkJob } from '../../support/findings';
import type { SignedIn } from '../../support/app';

jest.setTimeout(180_000);

let app: Awaited<ReturnType<typeof startWalkApp>>;
let gc: SignedIn;
let inspector: SignedIn;

beforeAll(async () => {
  app = await startWalkApp();
  ({ gc, inspector } = app);
});
afterAll(async () => {
  await app.close();
});

const HOUR = 3_600_000;
/** Today's date at a fixed offset from UTC (hours). */
const todayAt = (offsetHours: number) => new Date(Date.now() + offsetHours * HOUR).toISOString().slice(0, 10);
/** A calendar date plus days, by hand (UTC calendar arithmetic). */
function plusDays(day: string, days: number): string {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  const t = new Date(Date.UTC(y, m - 1, d));
  t.setUTCDate(t.getUTCDate() + days);
  return t.toISOString().slice(0, 10);
}

async function jobIn(timeZone: string, severityDueDays?: Record<string, number>): Promise<WalkJob> {
  const w = await buildWalkJob(app.people);
  await Job.update({ timeZone, ...(severityDueDays ? { severityDueDays } : {}) } as Partial<Job>, { where: { id: w.job.id } });
  return w;
}

const dr03 = (w: WalkJob) => ({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id });
const post = (who: SignedIn, w: WalkJob, body: object) => who.agent.post(`/api/jobs/${w.job.id}/findings`).set('X-CSRF-Token', who.csrf).send(body);
const patch = (who: SignedIn, w: WalkJob, f: { id: string }, body: object, version = 1) =>
  who.agent.patch(`/api/jobs/${w.job.id}/findings/${f.id}`).set('X-CSRF-Token', who.csrf).set('If-Match', `"v${version}"`).send(body);
const bulk = (who: SignedIn, w: WalkJob, body: object) => who.agent.post(`/api/jobs/${w.job.id}/findings/bulk`).set('X-CSRF-Token', who.csrf).send(body);
const events = async (w: WalkJob, f: { id: string }) => (await gc.agent.get(`/api/jobs/${w.job.id}/findings/${f.id}/events`).expect(200)).body.items as Array<{ kind: string; from: Record<string, unknown> | null; to: Record<string, unknown> | null }>;

const pastMessage = (today: string) => `The due date is before today (${today} on this job's clock). Choose today or a later date.`;
const FORBIDDEN = 'Only a GC manager can back-date a due date. Choose today or a later date.';

describe('logging a finding with a due date', () => {
  it("refuses a date before today on the job's clock, at the field, saving nothing (job at UTC+14)", async () => {
    const w = await jobIn('Pacific/Kiritimati');
    const today = todayAt(14);
    const before = await countRows(w.job.id);
    const res = await post(inspector, w, { ...dr03(w), dueOn: plusDays(today, -1) }).expect(400);
    expect(res.body.error.fields).toEqual({ dueOn: pastMessage(today) });
    expect(res.body.error.message).toBe(`dueOn: ${pastMessage(today)}`);
    expect(await countRows(w.job.id)).toEqual(before);
    const ok = await post(inspector, w, { ...dr03(w), dueOn: today }).expect(201);
    expect(ok.body).toMatchObject({ dueOn: today, overdue: false });
  });

  it("takes today on the job's clock even while the server's date is later (job at UTC-11)", async () => {
    const w = await jobIn('Pacific/Pago_Pago');
    const today = todayAt(-11);
    await post(inspector, w, { ...dr03(w), dueOn: today }).expect(201);
    const res = await post(inspector, w, { ...dr03(w), dueOn: plusDays(today, -1) }).expect(400);
    expect(res.body.error.fields).toEqual({ dueOn: pastMessage(today) });
  });

  it('lets a GC manager back-date on purpose (kept in the event), not without the flag; the flag from an inspector is 403', async () => {
    const w = await jobIn('UTC');
    const past = plusDays(todayAt(0), -3);
    const before = await countRows(w.job.id);
    const refused = await post(inspector, w, { ...dr03(w), dueOn: past, backdated: true }).expect(403);
    expect(refused.body.error).toMatchObject({ id: 'backdate_forbidden', message: FORBIDDEN });
    // The flag is the GC manager's authority, whatever the date.
    await post(inspector, w, { ...dr03(w), dueOn: plusDays(todayAt(0), 5), backdated: true }).expect(403);
    const noFlag = await post(gc, w, { ...dr03(w), dueOn: past }).expect(400);
    expect(noFlag.body.error.fields).toEqual({ dueOn: pastMessage(todayAt(0)) });
    expect(await countRows(w.job.id)).toEqual(before);

    const res = await post(gc, w, { ...dr03(w), dueOn: past, backdated: true }).expect(201);
    expect(res.body).toMatchObject({ dueOn: past, overdue: true });
    const logged = (await events(w, res.body)).find((e) => e.kind === 'logged')!;
    expect(logged.to).toMatchObject({ dueOn: past, backdated: true });
    const bad = await post(gc, w, { ...dr03(w), dueOn: past, backdated: 'yes' }).expect(400);
    expect(bad.body.error.fields).toEqual({ backdated: 'Say yes or no to back-dating.' });
  });
});

describe('changing a due date', () => {
  it('refuses a date before today (PATCH and bulk) unless a GC manager back-dates it; nothing changes when refused', async () => {
    const w = await jobIn('Pacific/Kiritimati');
    const today = todayAt(14);
    const past = plusDays(today, -1);
    const f = await insertFinding(w, { dueOn: plusDays(today, 10) });
    const g = await insertFinding(w, { dueOn: plusDays(today, 10) });

    const one = await patch(inspector, w, f, { dueOn: { to: past, reason: 'Agreed on site.' } }).expect(400);
    expect(one.body.error.fields).toEqual({ 'dueOn.to': pastMessage(today) });
    const flagged = await patch(inspector, w, f, { dueOn: { to: past, backdated: true } }).expect(403);
    expect(flagged.body.error.id).toBe('backdate_forbidden');
    const many = await bulk(inspector, w, { findingIds: [f.id, g.id], change: { dueOn: { to: past } } }).expect(400);
    expect(many.body.error.fields).toEqual({ 'change.dueOn.to': pastMessage(today) });
    await bulk(inspector, w, { findingIds: [f.id, g.id], change: { dueOn: { to: past, backdated: true } } }).expect(403);
    for (const x of [f, g]) expect((await Finding.findByPk(x.id))!.toJSON()).toMatchObject({ dueOn: plusDays(today, 10), version: 1 });

    await patch(inspector, w, f, { dueOn: { to: today } }).expect(200);
    const back = await patch(gc, w, f, { dueOn: { to: past, reason: 'Paper list from last week.', backdated: true } }, 2).expect(200);
    expect(back.body).toMatchObject({ dueOn: past, overdue: true });
    expect((await events(w, f)).at(-1)).toMatchObject({ kind: 'due_changed', from: { dueOn: today }, to: { dueOn: past, backdated: true } });
    const all = await bulk(gc, w, { findingIds: [g.id], change: { dueOn: { to: past, backdated: true } } }).expect(200);
    expect(all.body.items[0]).toMatchObject({ id: g.id, dueOn: past });
  });
});

describe('returning a fix', () => {
  it("sets the due date to today on the job's clock + the job's days for the severity, and says so in the event", async () => {
    const w = await jobIn('Pacific/Kiritimati', { critical: 1, major: 5, minor: 9 });
    const today = todayAt(14);
    const f = await insertFinding(w, { severity: 'major', status: 'fix_submitted', dueOn: '2026-11-20' });
    const res = await inspector.agent
      .post(`/api/jobs/${w.job.id}/findings/${f.id}/reinspections`)
      .set('X-CSRF-Token', inspector.csrf)
      .set('If-Match', '"v1"')
      .send({ verdict: 'return', reason: 'Drain still holds water.' })
      .expect(200);
    const expected = plusDays(today, 5);
    expect(res.body).toMatchObject({ status: 'open', returnCount: 1, dueOn: expected, overdue: false });
    const returned = res.body.events.at(-1);
    expect(returned).toMatchObject({ kind: 'returned', from: { status: 'fix_submitted', returnCount: 0, dueOn: '2026-11-20' }, to: { status: 'open', returnCount: 1, dueOn: expected, daysToFix: 5 } });
    expect(dueAgainWords(returned.to, 'major')).toBe(`Due again on ${expected} (5 days for a major finding)`);
    expect((await Finding.findByPk(f.id))!.dueOn).toBe(expected);
  });

  it('leaves the due date alone when the fix is accepted', async () => {
    const w = await jobIn('UTC');
    const f = await insertFinding(w, { severity: 'minor', status: 'fix_submitted', dueOn: '2026-11-20' });
    const res = await inspector.agent
      .post(`/api/jobs/${w.job.id}/findings/${f.id}/reinspections`)
      .set('X-CSRF-Token', inspector.csrf)
      .set('If-Match', '"v1"')
      .send({ verdict: 'accept' })
      .expect(200);
    expect(res.body).toMatchObject({ status: 'closed', dueOn: '2026-11-20' });
    expect(res.body.events.at(-1).to).not.toHaveProperty('dueOn');
  });
});
