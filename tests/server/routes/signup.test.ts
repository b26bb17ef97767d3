/**
 * Sign-up and e-mail confirmation: a GC new to Trimout creates their company and first
 * account, confirms the address from the mail, and lands signed in with no jobs yet.
 */
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { AuthToken, Company, User } from '../../../server/models';
import { hashPassword } from '../../../server/auth/passwords';
import { hashToken, issueToken } from '../../../server/services/tokens';
import { buildTestApp, csrfFor, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser, TEST_PASSWORD } from '../../support/factories';
import { startFakeSmtp, testMailService, tokenOf, type FakeSmtp } from '../../support/mail';

// Several scrypt hashes per test (N=2^17): generous on a busy shared machine.
jest.setTimeout(60_000);

let db: Database;
let trimout: TrimoutApp;
let smtp: FakeSmtp;

beforeAll(async () => {
  db = await connectTestDb();
  smtp = await startFakeSmtp();
  trimout = buildTestApp(db, { mail: testMailService(smtp) });
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await smtp.close();
});

const uniq = () => Math.random().toString(36).slice(2, 10);
const PASSWORD = 'a long enough password';

async function anonymous() {
  const agent = request.agent(trimout.app);
  return { agent, csrf: await csrfFor(agent) };
}

async function signUp(body: Record<string, unknown>, status: number) {
  const { agent, csrf } = await anonymous();
  return agent.post('/api/signup').set('X-CSRF-Token', csrf).send(body).expect(status);
}

describe('POST /api/signup', () => {
  it('creates the company and an unconfirmed user, answers 202 and mails a confirmation link', async () => {
    const email = `new-${uniq()}@test.trimout.example`;
    const res = await signUp({ companyName: 'Larchmont Builders', name: 'Rhea Sandoval', email: email.toUpperCase(), password: PASSWORD }, 202);
    expect(res.body.message).toMatch(/Check your e-mail/);
    const user = await User.findOne({ where: { email } });
    expect(user).not.toBeNull();
    expect(user!.emailConfirmedAt).toBeNull();
    expect((await Company.findByPk(user!.companyId))!.name).toBe('Larchmont Builders');
    const mail = await smtp.waitFor((m) => m.to.includes(email));
    expect(mail.subject).toBe('Confirm your e-mail address for Trimout');
    // the address is not confirmed yet: no word the sign-up chose goes into the mail
    expect(mail.text).not.toContain('Rhea Sandoval');
    expect(mail.text).not.toContain('Larchmont');
    expect(mail.html).not.toContain('Rhea Sandoval');
    expect(mail.html).not.toContain('Larchmont');
    // and the account holds no password before confirmation
    expect(user!.passwordHash).toBeNull();
    const token = tokenOf(mail, '/confirm/');
    // only the hash is stored
    const stored = await AuthToken.findOne({ where: { userId: user!.id, purpose: 'email_confirmation' } });
    expect(stored!.tokenHash).toBe(hashToken(token));
    expect(JSON.stringify(stored!.toJSON())).not.toContain(token);
    const hours = (stored!.expiresAt.getTime() - stored!.createdAt.getTime()) / 3_600_000;
    expect(hours).toBeCloseTo(24, 1);
  });

  it('refuses sign-in until confirmed, saying so only after the password matched', async () => {
    const email = `unconfirmed-${uniq()}@test.trimout.example`;
    await signUp({ companyName: 'Brackwater Co', name: 'Lio Fenn', email, password: PASSWORD }, 202);
    const { agent, csrf } = await anonymous();
    const wrong = await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email, password: 'not the password' }).expect(401);
    expect(wrong.body.error.message).toMatch(/do not match/);
    const right = await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email, password: PASSWORD }).expect(403);
    expect(right.body.error).toMatchObject({ id: 'email_unconfirmed', message: expect.stringMatching(/Confirm your e-mail/) });
  });

  it('confirms from the mailed link, signs the person in with a new session, and they have no jobs yet', async () => {
    const email = `confirm-${uniq()}@test.trimout.example`;
    await signUp({ companyName: 'Ashgrove Build', name: 'Mina Aldous', email, password: PASSWORD }, 202);
    const token = tokenOf(await smtp.waitFor((m) => m.to.includes(email)), '/confirm/');
    const { agent, csrf } = await anonymous();
    const res = await agent.post(`/api/email-confirmations/${token}`).set('X-CSRF-Token', csrf).expect(200);
    expect(res.body.user).toMatchObject({ email, name: 'Mina Aldous', company: { name: 'Ashgrove Build' } });
    expect(res.body.jobs).toEqual([]);
    expect(String(res.headers['set-cookie'])).toMatch(/trimout\.sid=/);
    expect(res.body.csrfToken).not.toBe(csrf);
    const me = await agent.get('/api/session').expect(200);
    expect(me.body.user.email).toBe(email);
    expect((await User.findOne({ where: { email } }))!.emailConfirmedAt).toBeInstanceOf(Date);
    // and now the password signs in
    await signIn(trimout.app, email, PASSWORD);
    // the link works once
    const again = await request(trimout.app).post(`/api/email-confirmations/${token}`).set('X-CSRF-Token', csrf);
    expect(again.status).toBe(410);
    expect(again.body.error.message).toMatch(/already used/);
  });

  it('does not reveal an existing address: same 202, and the owner is told by mail instead', async () => {
    const existing = await buildUser();
    const fresh = `fresh-${uniq()}@test.trimout.example`;
    const a = await signUp({ companyName: 'Other Co', name: 'Someone Else', email: existing.email, password: PASSWORD }, 202);
    const b = await signUp({ companyName: 'Other Co', name: 'Someone Else', email: fresh, password: PASSWORD }, 202);
    expect(a.body).toEqual(b.body);
    const mail = await smtp.waitFor((m) => m.to.includes(existing.email));
    expect(mail.subject).toBe('Someone tried to sign up to Trimout with your address');
    expect(mail.links.some((l) => l.endsWith('/forgot-password'))).toBe(true);
    // nothing changed: one user, old password still works, no second company for them
    expect(await User.count({ where: { email: existing.email } })).toBe(1);
    await signIn(trimout.app, existing.email, TEST_PASSWORD);
  });

  it('sends a fresh confirmation link carrying the new sign-up\'s password; confirming it leaves only that password', async () => {
    const email = `twice-${uniq()}@test.trimout.example`;
    await signUp({ companyName: 'Twice Co', name: 'Ora Twice', email, password: PASSWORD }, 202);
    await signUp({ companyName: 'Twice Co', name: 'Ora Twice', email, password: 'another password here' }, 202);
    await smtp.waitFor((m) => m.to.includes(email) && smtp.messages().filter((x) => x.to.includes(email)).length === 2);
    const mails = smtp.messages().filter((m) => m.to.includes(email));
    expect(mails.map((m) => m.subject)).toEqual(['Confirm your e-mail address for Trimout', 'Confirm your e-mail address for Trimout']);
    const { agent, csrf } = await anonymous();
    await agent.post(`/api/email-confirmations/${tokenOf(mails[1]!, '/confirm/')}`).set('X-CSRF-Token', csrf).expect(200);
    await signIn(trimout.app, email, 'another password here');
    const other = await anonymous();
    const old = await other.agent.post('/api/session').set('X-CSRF-Token', other.csrf).send({ email, password: PASSWORD });
    expect(old.status).toBe(401);
    // the first link died with the confirmation
    const first = await other.agent.post(`/api/email-confirmations/${tokenOf(mails[0]!, '/confirm/')}`).set('X-CSRF-Token', other.csrf);
    expect(first.status).toBe(410);
  });

  it('a stranger who signs up first with the owner\'s address cannot keep a way in once the owner confirms', async () => {
    const email = `owner-${uniq()}@test.trimout.example`;
    const STRANGER = 'the stranger chose this one';
    const OWNER = 'the owner chose this password';
    // 1. the stranger signs up with the owner's address (their mail goes to the owner's inbox)
    await signUp({ companyName: 'Stranger Holdings', name: 'Not The Owner', email, password: STRANGER }, 202);
    await smtp.waitFor((m) => m.to.includes(email));
    // the stranger's password does not sign in (and says no more than "confirm first" to whoever knows it)
    const { agent: strangerAgent, csrf: strangerCsrf } = await anonymous();
    const early = await strangerAgent.post('/api/session').set('X-CSRF-Token', strangerCsrf).send({ email, password: STRANGER });
    expect(early.status).toBe(403);
    // 2. the owner signs up with their own address and password, and confirms from their inbox
    await signUp({ companyName: 'Owner Mechanical', name: 'Real Owner', email, password: OWNER }, 202);
    await smtp.waitFor((m) => m.to.includes(email) && smtp.messages().filter((x) => x.to.includes(email)).length === 2);
    const mails = smtp.messages().filter((m) => m.to.includes(email));
    const before = await User.findOne({ where: { email } });
    const { agent, csrf } = await anonymous();
    const confirmed = await agent.post(`/api/email-confirmations/${tokenOf(mails[1]!, '/confirm/')}`).set('X-CSRF-Token', csrf).expect(200);
    // the account is the owner's: their name and company, and only their password
    expect(confirmed.body.user).toMatchObject({ email, name: 'Real Owner', company: { name: 'Owner Mechanical' } });
    const after = await User.findOne({ where: { email } });
    expect(after!.sessionEpoch).toBe(before!.sessionEpoch + 1);
    await signIn(trimout.app, email, OWNER);
    const late = await strangerAgent.post('/api/session').set('X-CSRF-Token', strangerCsrf).send({ email, password: STRANGER });
    expect(late.status).toBe(401);
    expect(late.body.error.message).toMatch(/do not match/);
    // the stranger's link (in the owner's inbox) is dead too
    const stale = await strangerAgent.post(`/api/email-confirmations/${tokenOf(mails[0]!, '/confirm/')}`).set('X-CSRF-Token', strangerCsrf);
    expect(stale.status).toBe(410);
    // and the owner's session stays (it was made after the epoch rose)
    await agent.get('/api/session').expect(200).then((r) => expect(r.body.user.email).toBe(email));
  });

  it('confirming ends every other session of the account (the epoch rises)', async () => {
    // an account confirmed once already (e.g. through a reset link) with a live session
    const user = await buildUser();
    const live = await signIn(trimout.app, user.email, TEST_PASSWORD);
    const token = await db.sequelize.transaction(async (transaction) =>
      (await issueToken('email_confirmation', { userId: user.id, passwordHash: await hashPassword(PASSWORD) }, transaction)).token,
    );
    const { agent, csrf } = await anonymous();
    await agent.post(`/api/email-confirmations/${token}`).set('X-CSRF-Token', csrf).expect(200);
    const me = await live.agent.get('/api/session').expect(200);
    expect(me.body.user).toBeNull();
  });

  it.each([
    [{}, 'companyName'],
    [{ companyName: 'X', name: 'Y', email: 'not-an-address', password: PASSWORD }, 'email'],
    [{ companyName: 'X', name: 'Y', email: 'a@b.example', password: 'short' }, 'password'],
    [{ companyName: ' ', name: 'Y', email: 'a@b.example', password: PASSWORD }, 'companyName'],
    [{ companyName: 'X', name: 'Y', email: 'a@b.example', password: PASSWORD, role: 'gc_manager' }, ''],
  ])('refuses %j with 400 naming %s', async (body, field) => {
    const res = await signUp(body, 400);
    expect(res.body.error.id).toBe('bad_request');
    expect(res.body.error.message).toMatch(/:/);
    if (field) expect(Object.keys(res.body.error.fields)).toContain(field);
  });

  it('refuses a sign-up without the CSRF token (403)', async () => {
    await request(trimout.app).post('/api/signup').send({ companyName: 'X', name: 'Y', email: 'a@b.example', password: PASSWORD }).expect(403);
  });

  it('is rate-limited per address like sign-in', async () => {
    const limited = buildTestApp(db, { mail: testMailService(smtp), signInLimits: { perAccount: 100, perAddress: 2, windowMs: 60_000 } });
    try {
      const agent = request.agent(limited.app);
      const csrf = await csrfFor(agent);
      const body = () => ({ companyName: 'Rate Co', name: 'Rate', email: `rate-${uniq()}@test.trimout.example`, password: PASSWORD });
      await agent.post('/api/signup').set('X-CSRF-Token', csrf).send(body()).expect(202);
      await agent.post('/api/signup').set('X-CSRF-Token', csrf).send(body()).expect(202);
      const res = await agent.post('/api/signup').set('X-CSRF-Token', csrf).send(body()).expect(429);
      expect(res.headers['retry-after']).toBeDefined();
    } finally {
      await limited.close();
    }
  });

  it('keeps a name with CR/LF out of the mail headers', async () => {
    const email = `inject-${uniq()}@test.trimout.example`;
    await signUp({ companyName: 'Inject Co', name: 'Eve\r\nBcc: victim@evil.example', email, password: PASSWORD }, 202);
    const mail = await smtp.waitFor((m) => m.to.includes(email));
    const headers = mail.raw.split(/\r?\n\r?\n/)[0]!;
    expect(headers).not.toMatch(/^Bcc:/im);
    expect(mail.envelopeTo).toEqual([email]);
  });
});

describe('POST /api/email-confirmations/:token', () => {
  it('answers 400 for a malformed token and 404 for an unknown one', async () => {
    const { agent, csrf } = await anonymous();
    const bad = await agent.post('/api/email-confirmations/abc').set('X-CSRF-Token', csrf).expect(400);
    expect(bad.body.error.message).toMatch(/token: This link is not complete/);
    const unknown = await agent.post(`/api/email-confirmations/${'A'.repeat(43)}`).set('X-CSRF-Token', csrf).expect(404);
    expect(unknown.body.error.message).toMatch(/not valid/);
  });

  it('answers 410 "expired" for an expired link', async () => {
    const email = `expired-${uniq()}@test.trimout.example`;
    await signUp({ companyName: 'Late Co', name: 'Late', email, password: PASSWORD }, 202);
    const token = tokenOf(await smtp.waitFor((m) => m.to.includes(email)), '/confirm/');
    await AuthToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { tokenHash: hashToken(token) } });
    const { agent, csrf } = await anonymous();
    const res = await agent.post(`/api/email-confirmations/${token}`).set('X-CSRF-Token', csrf).expect(410);
    expect(res.body.error).toEqual({ id: 'link_expired', message: 'This link has expired. Ask for a new one.' });
    expect((await User.findOne({ where: { email } }))!.emailConfirmedAt).toBeNull();
  });

  it('does not accept a password-reset token as a confirmation (wrong purpose → 404)', async () => {
    const user = await buildUser();
    const { agent, csrf } = await anonymous();
    await agent.post('/api/password-resets').set('X-CSRF-Token', csrf).send({ email: user.email }).expect(202);
    const token = tokenOf(await smtp.waitFor((m) => m.to.includes(user.email) && m.subject.includes('Reset')), '/reset/');
    await agent.post(`/api/email-confirmations/${token}`).set('X-CSRF-Token', csrf).expect(404);
  });

  it('lets only one of two simultaneous uses of a link win', async () => {
    const email = `race-${uniq()}@test.trimout.example`;
    await signUp({ companyName: 'Race Co', name: 'Race', email, password: PASSWORD }, 202);
    const token = tokenOf(await smtp.waitFor((m) => m.to.includes(email)), '/confirm/');
    const one = await anonymous();
    const two = await anonymous();
    const results = await Promise.all([
      one.agent.post(`/api/email-confirmations/${token}`).set('X-CSRF-Token', one.csrf),
      two.agent.post(`/api/email-confirmations/${token}`).set('X-CSRF-Token', two.csrf),
    ]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 410]);
  });
});
