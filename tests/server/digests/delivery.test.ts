/**
 * Delivery: preferences (defaults per role, validation, If-Match), the once-per-period claim
 * under two racing workers and through pg-boss, unsubscribe links (good, expired, tampered;
 * RFC 8058 one-click without a session), and the critical-assignment event mail.
 */
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import type { MailService } from '../../../server/mail';
import { loadPreferences, lockPreferencesRow, updatePreferences } from '../../../server/digests/preferences';
import { SEND_QUEUE, startDigestScheduler, type DigestScheduler } from '../../../server/digests/scheduler';
import { duePeriod, localClock, type DigestService } from '../../../server/digests/service';
import { signUnsubscribeToken, UNSUBSCRIBE_LIFETIME_MS } from '../../../server/digests/unsubscribeToken';
import { buildTestApp, signIn, testEnv, type SignedIn } from '../../support/app';
import { caller, ifMatch, jobPath, type Caller } from '../../support/api';
import { connectTestDb, testDatabaseUrl } from '../../support/db';
import { buildUser } from '../../support/factories';
import { buildWalkJob, type WalkJob } from '../../support/findings';
import { startFakeSmtp, testMailService, type FakeSmtp } from '../../support/mail';
import { waitFor } from '../../support/wait';

jest.setTimeout(120_000);

let db: Database;
let smtp: FakeSmtp;
let trimout: TrimoutApp;
let mail: MailService;
let digests: DigestService;
let w: WalkJob;
let gc: Caller;
let insp: Caller;
let subA: SignedIn;
let subB: SignedIn;

const SECRETS = testEnv().sessionSecrets;

beforeAll(async () => {
  db = await connectTestDb();
  smtp = await startFakeSmtp();
  mail = testMailService(smtp);
  trimout = buildTestApp(db, { mail });
  digests = trimout.app.get('digests') as DigestService;
  w = await buildWalkJob();
  gc = caller(await signIn(trimout.app, w.gcManager.email));
  insp = caller(await signIn(trimout.app, w.inspector.email));
  subA = await signIn(trimout.app, w.subA.email);
  subB = await signIn(trimout.app, w.subB.email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await smtp.close();
});

const mailsTo = (address: string) => smtp.messages().filter((m) => m.to.includes(address));
/**
 * Every mail handed to the outbox so far has reached the fake SMTP server (or failed): the fake
 * acknowledges a message only after it has recorded it, and the outbox is idle only after that.
 */
async function settle() {
  await mail.outbox.idle();
}

describe('GET/PATCH /api/me/preferences', () => {
  it('401 without a session', async () => {
    await request(trimout.app).get('/api/me/preferences').expect(401);
  });

  it('defaults: daily at 07:00 in the first job\'s time zone for subcontractors and GC managers, off for inspectors', async () => {
    const a = await caller(subA).get('/api/me/preferences');
    expect(a.status).toBe(200);
    expect(a.headers.etag).toBe('"v1"');
    expect(a.body).toMatchObject({ digestFrequency: 'daily', digestHour: 7, digestWeekday: 1, timeZone: w.job.timeZone, timeZoneIsDefault: true, criticalAssignmentMail: true, isDefault: true, mailboxPath: '/mailbox' });
    expect((await gc.get('/api/me/preferences')).body).toMatchObject({ digestFrequency: 'daily', digestHour: 7 });
    expect((await insp.get('/api/me/preferences')).body).toMatchObject({ digestFrequency: 'off' });
  });

  it('validates: unknown keys, hours outside 0–23, weekdays outside 1–7, unknown time zones, empty bodies → 400 with the field', async () => {
    const sub = caller(subB);
    const cases: [unknown, string][] = [
      [{ digestHour: 24 }, 'digestHour'],
      [{ digestHour: -1 }, 'digestHour'],
      [{ digestHour: 7.5 }, 'digestHour'],
      [{ digestWeekday: 0 }, 'digestWeekday'],
      [{ digestWeekday: 8 }, 'digestWeekday'],
      [{ digestFrequency: 'hourly' }, 'digestFrequency'],
      [{ timeZone: 'Mars/Olympus_Mons' }, 'timeZone'],
      [{ criticalAssignmentMail: 'yes' }, 'criticalAssignmentMail'],
      [{ email: 'someone@else.example' }, 'body'],
      [{}, 'body'],
    ];
    for (const [body, field] of cases) {
      const res = await sub.patch('/api/me/preferences', body, ifMatch(1));
      expect({ body, status: res.status }).toEqual({ body, status: 400 });
      expect(Object.keys(res.body.error.fields ?? {}).join(',')).toContain(field === 'body' ? '' : field);
    }
  });

  it('needs If-Match (428), refuses a stale one (412), and saves a good change with a new ETag', async () => {
    const sub = caller(subB);
    expect((await sub.patch('/api/me/preferences', { digestHour: 6 })).status).toBe(428);
    const ok = await sub.patch('/api/me/preferences', { digestFrequency: 'weekly', digestWeekday: 5, digestHour: 6, timeZone: 'Europe/Lisbon' }, ifMatch(1));
    expect(ok.status).toBe(200);
    expect(ok.headers.etag).toBe('"v2"');
    expect(ok.body).toMatchObject({ digestFrequency: 'weekly', digestWeekday: 5, digestHour: 6, timeZone: 'Europe/Lisbon', timeZoneIsDefault: false, isDefault: false, version: 2 });
    expect((await sub.patch('/api/me/preferences', { digestHour: 8 }, ifMatch(1))).status).toBe(412);
    const back = await sub.patch('/api/me/preferences', { timeZone: null, digestFrequency: 'daily' }, ifMatch(2));
    expect(back.body).toMatchObject({ timeZone: w.job.timeZone, timeZoneIsDefault: true, digestFrequency: 'daily', digestHour: 6, version: 3 });
  });
});

describe('when a digest is due', () => {
  // 2026-12-01 is a Tuesday (ISO weekday 2); 13:30 UTC is 07:30 in America/Chicago (CST, UTC−6).
  const at = new Date('2026-12-01T13:30:00Z');
  it('reads the clock in the user\'s time zone', () => {
    expect(localClock('America/Chicago', at)).toEqual({ date: '2026-12-01', hour: 7, weekday: 2 });
    expect(localClock('Asia/Kolkata', at)).toEqual({ date: '2026-12-01', hour: 19, weekday: 2 }); // UTC+5:30
  });
  it.each([
    [{ digestFrequency: 'daily', digestHour: 7, digestWeekday: 1, timeZone: 'America/Chicago' }, { period: 'daily', periodKey: 'daily:2026-12-01' }],
    [{ digestFrequency: 'daily', digestHour: 8, digestWeekday: 1, timeZone: 'America/Chicago' }, null],
    [{ digestFrequency: 'daily', digestHour: 7, digestWeekday: 1, timeZone: 'Pacific/Honolulu' }, null], // 03:30 there
    [{ digestFrequency: 'weekly', digestHour: 7, digestWeekday: 2, timeZone: 'America/Chicago' }, { period: 'weekly', periodKey: 'weekly:2026-12-01' }],
    [{ digestFrequency: 'weekly', digestHour: 7, digestWeekday: 3, timeZone: 'America/Chicago' }, null],
    [{ digestFrequency: 'off', digestHour: 0, digestWeekday: 1, timeZone: 'UTC' }, null],
  ] as const)('%j → %j', (prefs, expected) => {
    expect(duePeriod(prefs, at)).toEqual(expected);
  });
});

describe('at most once per period', () => {
  it('two workers racing for the same user and period: one claim, exactly one mail', async () => {
    const user = await buildUser({ companyId: w.subA.companyId });
    await db.sequelize.query(`INSERT INTO job_members (id, job_id, user_id, role, company_id, created_at, updated_at) SELECT gen_random_uuid(), $1, u.id, 'subcontractor', u.company_id, now(), now() FROM users u WHERE u.id = $2`, { bind: [w.job.id, user.id] });
    await db.sequelize.transaction(async (t) => {
      await lockPreferencesRow(db.sequelize, user.id, t);
      await updatePreferences(db.sequelize, user.id, { digestHour: 0, timeZone: 'UTC' }, t);
    });
    const now = new Date();
    const due = (await digests.dueDigests(now)).find((d) => d.userId === user.id)!;
    expect(due).toEqual({ userId: user.id, period: 'daily', periodKey: `daily:${now.toISOString().slice(0, 10)}` });

    const results = await Promise.all([digests.sendScheduled(due, 'worker-1'), digests.sendScheduled(due, 'worker-2'), digests.sendScheduled(due, 'worker-3')]);
    expect(results.filter((r) => r.claimed)).toHaveLength(1);
    expect(results.filter((r) => r.sent)).toHaveLength(1);
    await smtp.waitFor((m) => m.to.includes(user.email));
    await settle();
    expect(mailsTo(user.email)).toHaveLength(1);
    const rows = await db.sequelize.query<{ sent_at: Date | null }>(`SELECT sent_at FROM digest_sends WHERE user_id = $1`, { bind: [user.id], type: QueryTypes.SELECT });
    expect(rows).toHaveLength(1);
    expect(rows[0]!.sent_at).not.toBeNull();
    // Claimed: no longer due, and a later attempt sends nothing.
    expect((await digests.dueDigests(now)).some((d) => d.userId === user.id)).toBe(false);
    expect((await digests.sendScheduled(due, 'worker-4')).claimed).toBe(false);
    expect(mailsTo(user.email)).toHaveLength(1);
  });

  it('a claim left by a worker that died mid-send is not sent again (at most once)', async () => {
    const user = await buildUser({ companyId: w.subA.companyId });
    await db.sequelize.query(`INSERT INTO job_members (id, job_id, user_id, role, company_id, created_at, updated_at) SELECT gen_random_uuid(), $1, u.id, 'subcontractor', u.company_id, now(), now() FROM users u WHERE u.id = $2`, { bind: [w.job.id, user.id] });
    await db.sequelize.query(`INSERT INTO digest_sends (id, user_id, period_key, claimed_at, claimed_by) VALUES (gen_random_uuid(), $1, 'daily:2026-12-01', now(), 'died')`, { bind: [user.id] });
    const r = await digests.sendScheduled({ userId: user.id, period: 'daily', periodKey: 'daily:2026-12-01' }, 'restarted');
    expect(r.claimed).toBe(false);
    await settle();
    expect(mailsTo(user.email)).toHaveLength(0);
  });

  it('through pg-boss: the same job sent twice (singletonKey) and two workers polling give one mail', async () => {
    const user = await buildUser({ companyId: w.subB.companyId });
    await db.sequelize.query(`INSERT INTO job_members (id, job_id, user_id, role, company_id, created_at, updated_at) SELECT gen_random_uuid(), $1, u.id, 'subcontractor', u.company_id, now(), now() FROM users u WHERE u.id = $2`, { bind: [w.job.id, user.id] });
    const schedulers: DigestScheduler[] = [];
    try {
      // Two "servers": two pg-boss instances on the same database, each with its workers.
      for (let i = 0; i < 2; i++) {
        schedulers.push(await startDigestScheduler({ connectionString: testDatabaseUrl(), digests, log: () => undefined, schedule: false, pollingIntervalSeconds: 0.5 }));
      }
      const due = { userId: user.id, period: 'daily' as const, periodKey: 'daily:2026-11-30' };
      const key = `${due.userId}:${due.periodKey}`;
      const first = await schedulers[0]!.boss.send(SEND_QUEUE, due, { singletonKey: key });
      const second = await schedulers[1]!.boss.send(SEND_QUEUE, due, { singletonKey: key });
      expect(first).toEqual(expect.any(String));
      // Policy "short" refuses a second job for the key while the first is still queued (null);
      // once a worker has picked the first up, the second is queued too. Either way one mail:
      // the digest_sends claim, not the queue, is what guarantees it.
      const jobIds = [first, second].filter((id): id is string => typeof id === 'string').map((id) => `pg-boss:${id}`);
      await smtp.waitFor((m) => m.to.includes(user.email), 20_000);
      // Even a job that slips past the queue (another key, same period) finds the period claimed.
      const slipped = await schedulers[1]!.boss.send(SEND_QUEUE, due, { singletonKey: `${key}:again` });
      expect(slipped).toEqual(expect.any(String));
      const done = await waitFor(
        async () => {
          const job = await schedulers[1]!.boss.getJobById(SEND_QUEUE, slipped!);
          return job && ['completed', 'failed', 'cancelled'].includes(job.state) ? job : null;
        },
        { what: 'a worker to finish the job that slipped past the queue', timeout: 20_000, interval: 100 },
      );
      expect(done.state).toBe('completed');
      await settle();
      expect(mailsTo(user.email)).toHaveLength(1);
      const rows = await db.sequelize.query<{ claimed_by: string }>(`SELECT claimed_by FROM digest_sends WHERE user_id = $1`, { bind: [user.id], type: QueryTypes.SELECT });
      expect(rows).toHaveLength(1);
      expect(jobIds).toContain(rows[0]!.claimed_by);
    } finally {
      for (const s of schedulers) await s.stop();
    }
  });
});

describe('"Send me a digest now"', () => {
  it('follows the chosen frequency: right after choosing weekly, the subject, title and period say weekly', async () => {
    const current = await gc.get('/api/me/preferences');
    const version = Number(/"v(\d+)"/.exec(String(current.headers.etag))![1]);
    const saved = await gc.patch('/api/me/preferences', { digestFrequency: 'weekly', digestWeekday: 1 }, ifMatch(version));
    expect(saved.status).toBe(200);
    try {
      smtp.clear();
      const res = await gc.post('/api/me/digest', {}, { 'Idempotency-Key': `weekly-now-${Math.random().toString(36).slice(2)}` });
      expect(res.status).toBe(202);
      expect(res.body.subject).toMatch(/^Weekly Trimout digest/);
      const caught = await smtp.waitFor((m) => m.to.includes(w.gcManager.email));
      expect(caught.subject).toMatch(/^Weekly Trimout digest/);
      expect(caught.text).toMatch(/^Weekly digest for /);
      expect(caught.text).not.toMatch(/\bDaily\b/);
    } finally {
      const now = Number(/"v(\d+)"/.exec(String(saved.headers.etag))![1]);
      await gc.patch('/api/me/preferences', { digestFrequency: 'daily' }, ifMatch(now));
    }
  });
});

describe('the digest names the schedule the person chose', () => {
  const version = (res: { headers: Record<string, unknown> }) => Number(/"v(\d+)"/.exec(String(res.headers.etag))![1]);
  const firstLine = (text: string) => text.split('\n')[0]!;

  it('weekly on Thursday: subject, first line and schedule sentence say weekly and Thursday (button and schedule alike); daily says daily', async () => {
    const current = await gc.get('/api/me/preferences');
    const saved = await gc.patch('/api/me/preferences', { digestFrequency: 'weekly', digestWeekday: 4, digestHour: 7 }, ifMatch(version(current)));
    expect(saved.status).toBe(200);
    let latest = saved;
    try {
      // "Send me a digest now", caught by the fake SMTP server.
      smtp.clear();
      const res = await gc.post('/api/me/digest', {}, { 'Idempotency-Key': `thursday-now-${Math.random().toString(36).slice(2)}` });
      expect(res.status).toBe(202);
      const now = await smtp.waitFor((m) => m.to.includes(w.gcManager.email));
      expect(now.subject).toMatch(/^Weekly Trimout digest \(Thursdays\): /);
      expect(firstLine(now.text)).toMatch(/^Weekly digest for .+ \(Thursdays\)$/);
      expect(now.text).toMatch(/Your digest comes once a week, every Thursday at 07:00 \([A-Za-z_/]+\)\./);
      expect(now.html).toMatch(/<h1[^>]*>Weekly digest for .+ \(Thursdays\)<\/h1>/);
      expect(now.html).toContain('Your digest comes once a week, every Thursday at 07:00');
      for (const part of [now.subject, now.text, now.html]) expect(part).not.toMatch(/\bdaily\b|every day/i);

      // The scheduled send says the same.
      smtp.clear();
      const sent = await digests.sendScheduled({ userId: w.gcManager.id, period: 'weekly', periodKey: `weekly:named-${Math.random().toString(36).slice(2)}` }, 'test');
      expect(sent.sent).toBe(true);
      const scheduled = await smtp.waitFor((m) => m.to.includes(w.gcManager.email));
      expect(scheduled.subject).toMatch(/^Weekly Trimout digest \(Thursdays\): /);
      expect(firstLine(scheduled.text)).toMatch(/^Weekly digest for .+ \(Thursdays\)$/);
      expect(scheduled.text).toMatch(/because of your Trimout mail preferences\. Your digest comes once a week, every Thursday at 07:00/);
      for (const part of [scheduled.subject, scheduled.text, scheduled.html]) expect(part).not.toMatch(/\bdaily\b|every day/i);

      // Back to daily at 06:00: daily everywhere, no weekday.
      latest = await gc.patch('/api/me/preferences', { digestFrequency: 'daily', digestHour: 6 }, ifMatch(version(saved)));
      expect(latest.status).toBe(200);
      smtp.clear();
      const again = await gc.post('/api/me/digest', {}, { 'Idempotency-Key': `daily-now-${Math.random().toString(36).slice(2)}` });
      expect(again.status).toBe(202);
      const daily = await smtp.waitFor((m) => m.to.includes(w.gcManager.email));
      expect(daily.subject).toMatch(/^Daily Trimout digest: /);
      expect(firstLine(daily.text)).toMatch(/^Daily digest for [^()]+$/);
      expect(daily.text).toMatch(/Your digest comes every day at 06:00 \([A-Za-z_/]+\)\./);
      for (const part of [daily.subject, daily.text, daily.html]) expect(part).not.toMatch(/weekly|Thursday|once a week/i);
    } finally {
      await gc.patch('/api/me/preferences', { digestFrequency: 'daily', digestHour: 7, digestWeekday: 1 }, ifMatch(version(latest)));
    }
  });
});

describe('a digest listed before the person changed their choice', () => {
  it('is not sent under the old schedule and claims nothing (the next hourly run lists the new one)', async () => {
    const current = await gc.get('/api/me/preferences');
    const saved = await gc.patch('/api/me/preferences', { digestFrequency: 'weekly', digestWeekday: 4 }, ifMatch(Number(/"v(\d+)"/.exec(String(current.headers.etag))![1])));
    expect(saved.status).toBe(200);
    try {
      smtp.clear();
      const periodKey = `daily:stale-${Math.random().toString(36).slice(2)}`;
      const r = await digests.sendScheduled({ userId: w.gcManager.id, period: 'daily', periodKey }, 'test');
      expect(r).toMatchObject({ sent: false, claimed: false });
      const claims = await db.sequelize.query(`SELECT 1 FROM digest_sends WHERE user_id = $1 AND period_key = $2`, { bind: [w.gcManager.id, periodKey], type: QueryTypes.SELECT });
      expect(claims).toEqual([]);
      await settle();
      expect(mailsTo(w.gcManager.email)).toEqual([]);
    } finally {
      await gc.patch('/api/me/preferences', { digestFrequency: 'daily', digestWeekday: 1 }, ifMatch(Number(/"v(\d+)"/.exec(String(saved.headers.etag))![1])));
    }
  });
});

describe('unsubscribe links', () => {
  async function digestToken(signed: SignedIn, address: string): Promise<string> {
    smtp.clear();
    await caller(signed).post('/api/me/digest', {}, { 'Idempotency-Key': `now-${Math.random().toString(36).slice(2)}` }).then((r) => expect(r.status).toBe(202));
    const caught = await smtp.waitFor((m) => m.to.includes(address));
    const headers = caught.raw.split(/\r?\n\r?\n/)[0]!.replace(/\r?\n[ \t]+/g, ' ');
    const oneClick = /^List-Unsubscribe: <([^>]+)>$/m.exec(headers)![1]!;
    const page = caught.links.find((l) => new URL(l).pathname.startsWith('/unsubscribe/'))!;
    const token = new URL(oneClick).pathname.split('/').pop()!;
    expect(new URL(page).pathname).toBe(`/unsubscribe/${token}`);
    return token;
  }

  it('GET shows what will change without a session and changes nothing; the RFC 8058 one-click POST turns the digest off', async () => {
    const token = await digestToken(subA, w.subA.email);
    const anon = request(trimout.app);
    const preview = await anon.get(`/api/unsubscribe/${token}`).expect(200);
    expect(preview.body).toMatchObject({ list: 'digest', alreadyOff: false, address: expect.stringMatching(/^.•+@/) });
    expect(preview.body.address).not.toBe(w.subA.email);
    expect((await loadPreferences(db.sequelize, w.subA.id))!.digestFrequency).toBe('daily');
    // What a mail client sends (RFC 8058 §3.1): a form body, no cookie, no Origin, no CSRF header.
    const done = await anon.post(`/api/unsubscribe/${token}`).type('form').send('List-Unsubscribe=One-Click').expect(200);
    expect(done.body).toMatchObject({ list: 'digest', done: true, alreadyOff: true });
    expect((await loadPreferences(db.sequelize, w.subA.id))!.digestFrequency).toBe('off');
    // Again: still fine (idempotent), and the signed-in user sees "off".
    await anon.post(`/api/unsubscribe/${token}`).type('form').send('List-Unsubscribe=One-Click').expect(200);
    expect((await caller(subA).get('/api/me/preferences')).body.digestFrequency).toBe('off');
    // The app page's JSON POST works too.
    await anon.post(`/api/unsubscribe/${token}`).send({}).expect(200);
  });

  it('refuses tampered (404), foreign-key (404), expired (410) and malformed (400) tokens, changing nothing', async () => {
    const good = signUnsubscribeToken(SECRETS, w.subB.id, 'critical');
    const [payload, sig] = good.split('.') as [string, string];
    const otherUser = Buffer.from(JSON.stringify({ u: w.subA.id, l: 'critical', e: Math.floor(Date.now() / 1000) + 3600 })).toString('base64url');
    const flipped = `${sig.slice(0, -1)}${sig.endsWith('A') ? 'B' : 'A'}`;
    const anon = request(trimout.app);
    for (const bad of [`${otherUser}.${sig}`, `${payload}.${flipped}`, signUnsubscribeToken(['another-secret-entirely-0123456789abcdef'], w.subB.id, 'critical')]) {
      const res = await anon.post(`/api/unsubscribe/${bad}`).type('form').send('List-Unsubscribe=One-Click');
      expect(res.status).toBe(404);
      expect((await anon.get(`/api/unsubscribe/${bad}`)).status).toBe(404);
    }
    const expired = signUnsubscribeToken(SECRETS, w.subB.id, 'critical', new Date(Date.now() - UNSUBSCRIBE_LIFETIME_MS - 1000));
    expect((await anon.get(`/api/unsubscribe/${expired}`)).status).toBe(410);
    expect((await anon.post(`/api/unsubscribe/${expired}`).type('form').send('List-Unsubscribe=One-Click')).status).toBe(410);
    expect((await anon.get('/api/unsubscribe/not-a-token')).status).toBe(400);
    expect((await anon.post(`/api/unsubscribe/${good}`).send({ other: 1 })).status).toBe(400);
    expect((await loadPreferences(db.sequelize, w.subB.id))!.criticalAssignmentMail).toBe(true);
    // The good one works (and only for its own list).
    await anon.post(`/api/unsubscribe/${good}`).type('form').send('List-Unsubscribe=One-Click').expect(200);
    const after = (await loadPreferences(db.sequelize, w.subB.id))!;
    expect(after.criticalAssignmentMail).toBe(false);
    expect(after.digestFrequency).toBe('daily');
    // Put it back for the event-mail tests.
    await db.sequelize.transaction(async (t) => {
      await lockPreferencesRow(db.sequelize, w.subB.id, t);
      await updatePreferences(db.sequelize, w.subB.id, { criticalAssignmentMail: true }, t);
    });
  });
});

describe('event mail: a critical finding assigned to a company', () => {
  const critical = () => ({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, severity: 'critical', companyId: w.subA.companyId });

  it('logging a critical finding mails the company\'s subcontractors on the job at once, with a link; a major one does not', async () => {
    smtp.clear();
    const res = await insp.post(jobPath(w.job.id, '/findings'), critical());
    expect(res.status).toBe(201);
    const caught = await smtp.waitFor((m) => m.to.includes(w.subA.email) && /Critical finding/.test(m.subject));
    expect(caught.subject).toContain(`#${res.body.number}`);
    expect(caught.links.some((l) => l.endsWith(`/jobs/${w.job.id}/findings/${res.body.id}`))).toBe(true);
    expect(caught.text).toMatch(/installation manual, local codes and licensed practice/);
    await insp.post(jobPath(w.job.id, '/findings'), { ...critical(), severity: 'major' }).then((r) => expect(r.status).toBe(201));
    await settle();
    expect(mailsTo(w.subA.email)).toHaveLength(1);
    expect(mailsTo(w.subB.email)).toHaveLength(0);
  });

  it('reassigning a critical finding mails the new company; nothing when their preference is off', async () => {
    smtp.clear();
    const created = await insp.post(jobPath(w.job.id, '/findings'), critical());
    await smtp.waitFor((m) => m.to.includes(w.subA.email));
    const moved = await gc.patch(jobPath(w.job.id, `/findings/${created.body.id}`), { reassign: { companyId: w.subB.companyId, reason: 'Controls wiring.' } }, ifMatch(created.body.version));
    expect(moved.status).toBe(200);
    const caught = await smtp.waitFor((m) => m.to.includes(w.subB.email));
    expect(caught.text).toContain('reassigned to');

    // Company A turns the mail off; a new critical finding for A mails nobody.
    const prefs = await caller(subA).get('/api/me/preferences');
    await caller(subA).patch('/api/me/preferences', { criticalAssignmentMail: false }, { 'If-Match': prefs.headers.etag as string }).then((r) => expect(r.status).toBe(200));
    smtp.clear();
    await insp.post(jobPath(w.job.id, '/findings'), critical()).then((r) => expect(r.status).toBe(201));
    await settle();
    expect(mailsTo(w.subA.email)).toHaveLength(0);
  });
});
