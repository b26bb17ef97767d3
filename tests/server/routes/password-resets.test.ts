/**
 * Password reset by mail: the same 202 whatever the address, a one-hour single-use link, a new
 * password that ends every other session. And the mail seam: a broken SMTP server never fails
 * the API write.
 */
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { createMailService, type MailService } from '../../../server/mail';
import { createOutbox } from '../../../server/mail/outbox';
import { AuthToken, User } from '../../../server/models';
import { hashToken } from '../../../server/services/tokens';
import { buildTestApp, csrfFor, signIn, testEnv } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser, TEST_PASSWORD } from '../../support/factories';
import { linkTo, startFakeSmtp, testMailService, tokenOf, type FakeSmtp } from '../../support/mail';
import { waitFor } from '../../support/wait';

// Several scrypt hashes per test (N=2^17): generous on a busy shared machine.
jest.setTimeout(60_000);

let db: Database;
let trimout: TrimoutApp;
let smtp: FakeSmtp;
let mailer: MailService;

beforeAll(async () => {
  db = await connectTestDb();
  smtp = await startFakeSmtp();
  mailer = testMailService(smtp);
  trimout = buildTestApp(db, { mail: mailer });
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await smtp.close();
});

const NEW_PASSWORD = 'a brand new password';

async function anonymous() {
  const agent = request.agent(trimout.app);
  return { agent, csrf: await csrfFor(agent) };
}

async function requestReset(email: string) {
  const { agent, csrf } = await anonymous();
  return agent.post('/api/password-resets').set('X-CSRF-Token', csrf).send({ email });
}

async function resetToken(email: string): Promise<string> {
  const before = smtp.messages().filter((m) => m.to.includes(email)).length;
  expect((await requestReset(email)).status).toBe(202);
  const mail = await smtp.waitFor((m) => m.to.includes(email) && smtp.messages().filter((x) => x.to.includes(email)).length > before);
  return tokenOf(smtp.messages().filter((m) => m.to.includes(email)).at(-1) ?? mail, '/reset/');
}

describe('POST /api/password-resets', () => {
  it('answers the same 202 for a known and an unknown address; only the known one gets a mail', async () => {
    const user = await buildUser();
    const unknown = `nobody-${Date.now()}@test.trimout.example`;
    // The answer comes before the lookup: note when the server has looked each address up.
    const lookedUp: unknown[] = [];
    User.addHook('afterFind', 'reset-lookups', (_found, options) => {
      lookedUp.push((options.where as { email?: unknown } | undefined)?.email);
    });
    const a = await requestReset(user.email);
    const b = await requestReset(unknown);
    expect(a.status).toBe(202);
    expect(b.status).toBe(202);
    expect(a.body).toEqual(b.body);
    const mail = await smtp.waitFor((m) => m.to.includes(user.email));
    expect(mail.subject).toBe('Reset your Trimout password');
    expect(mail.text).toMatch(/1 hour/);
    const row = await AuthToken.findOne({ where: { userId: user.id, purpose: 'password_reset' } });
    expect(row!.tokenHash).toBe(hashToken(tokenOf(mail, '/reset/')));
    expect((row!.expiresAt.getTime() - row!.createdAt.getTime()) / 60_000).toBeCloseTo(60, 0);
    // An unknown address ends its work at the lookup: once looked up, no mail can follow.
    try {
      await waitFor(() => lookedUp.includes(unknown.toLowerCase()), { what: 'the unknown address to be looked up' });
    } finally {
      User.removeHook('afterFind', 'reset-lookups');
    }
    await mailer.outbox.idle();
    expect(smtp.messages().some((m) => m.to.includes(unknown))).toBe(false);
  });

  it('answers before looking the address up, so its time cannot tell a known address from an unknown one', async () => {
    const user = await buildUser();
    const unknown = `nobody-${Date.now()}@test.trimout.example`;
    // Hold every read of the users table: an answer that waited on the lookup could not arrive.
    const hold = await db.sequelize.transaction();
    let released = false;
    try {
      await db.sequelize.query('LOCK TABLE users IN ACCESS EXCLUSIVE MODE', { transaction: hold });
      const [a, b] = await Promise.all([requestReset(user.email), requestReset(unknown)]);
      expect([a.status, b.status]).toEqual([202, 202]);
      expect(a.body).toEqual(b.body);
      expect(smtp.messages().some((m) => m.to.includes(user.email))).toBe(false);
      await hold.commit();
      released = true;
    } finally {
      if (!released) await hold.rollback();
    }
    // the work happens after the answer: the mail still goes out
    const mail = await smtp.waitFor((m) => m.to.includes(user.email));
    expect(mail.subject).toBe('Reset your Trimout password');
  });

  it('builds the mailed link on the public URL, never on the Host header the request came with', async () => {
    const user = await buildUser();
    const { agent, csrf } = await anonymous();
    await agent.post('/api/password-resets').set('Host', 'attacker.example').set('X-CSRF-Token', csrf).send({ email: user.email }).expect(202);
    const mail = await smtp.waitFor((m) => m.to.includes(user.email));
    const link = linkTo(mail, '/reset/');
    expect(new URL(link).origin).toBe(testEnv().publicOrigin);
    expect(mail.text).not.toContain('attacker.example');
  });

  it('refuses a malformed body with 400 and no CSRF token with 403', async () => {
    const bad = await requestReset('not-an-address');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/email: Enter a valid e-mail/);
    await request(trimout.app).post('/api/password-resets').send({ email: 'a@b.example' }).expect(403);
  });

  it('limits the mails sent to one address (429)', async () => {
    const limited = buildTestApp(db, { mail: testMailService(smtp), signInLimits: { perAccount: 2, perAddress: 100, windowMs: 60_000 } });
    try {
      const user = await buildUser();
      const agent = request.agent(limited.app);
      const csrf = await csrfFor(agent);
      await agent.post('/api/password-resets').set('X-CSRF-Token', csrf).send({ email: user.email }).expect(202);
      await agent.post('/api/password-resets').set('X-CSRF-Token', csrf).send({ email: user.email }).expect(202);
      await agent.post('/api/password-resets').set('X-CSRF-Token', csrf).send({ email: user.email }).expect(429);
    } finally {
      await limited.close();
    }
  });
});

describe('GET /api/password-resets/:token', () => {
  it('says whether the link is still good: 200, 404 unknown, 400 malformed, 410 expired', async () => {
    const user = await buildUser();
    const token = await resetToken(user.email);
    const ok = await request(trimout.app).get(`/api/password-resets/${token}`).expect(200);
    expect(ok.body).toEqual({ valid: true, expiresAt: expect.any(String) });
    await request(trimout.app).get(`/api/password-resets/${'B'.repeat(43)}`).expect(404);
    await request(trimout.app).get('/api/password-resets/abc').expect(400);
    await AuthToken.update({ expiresAt: new Date(Date.now() - 1) }, { where: { tokenHash: hashToken(token) } });
    const gone = await request(trimout.app).get(`/api/password-resets/${token}`).expect(410);
    expect(gone.body.error.message).toBe('This link has expired. Ask for a new one.');
  });
});

describe('POST /api/password-resets/:token', () => {
  it('sets the new password, ends every other session, signs in with a new session, and works once', async () => {
    const user = await buildUser();
    const elsewhere = await signIn(trimout.app, user.email);
    await elsewhere.agent.get('/api/jobs').expect(200);
    const token = await resetToken(user.email);
    const { agent, csrf } = await anonymous();
    const res = await agent.post(`/api/password-resets/${token}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD }).expect(200);
    expect(res.body.user.id).toBe(user.id);
    await agent.get('/api/jobs').expect(200);
    await elsewhere.agent.get('/api/jobs').expect(401);
    await signIn(trimout.app, user.email, NEW_PASSWORD);
    const old = await anonymous();
    await old.agent.post('/api/session').set('X-CSRF-Token', old.csrf).send({ email: user.email, password: TEST_PASSWORD }).expect(401);
    const again = await agent.post(`/api/password-resets/${token}`).set('X-CSRF-Token', res.body.csrfToken).send({ password: 'yet another password' }).expect(410);
    expect(again.body.error.message).toMatch(/already used/);
  });

  it('kills the other reset links of the user', async () => {
    const user = await buildUser();
    const first = await resetToken(user.email);
    const second = await resetToken(user.email);
    const { agent, csrf } = await anonymous();
    await agent.post(`/api/password-resets/${second}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD }).expect(200);
    const dead = await request(trimout.app).get(`/api/password-resets/${first}`).expect(410);
    // said for what it is: a reset link, not an invitation
    expect(dead.body.error.id).toBe('link_revoked');
    expect(dead.body.error.message).toMatch(/password reset link was replaced/);
    expect(dead.body.error.message).not.toMatch(/invitation/i);
  });

  it('confirms an unconfirmed address (the link came to it)', async () => {
    const user = await buildUser();
    await User.update({ emailConfirmedAt: null }, { where: { id: user.id } });
    const token = await resetToken(user.email);
    const { agent, csrf } = await anonymous();
    await agent.post(`/api/password-resets/${token}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD }).expect(200);
    expect((await User.findByPk(user.id))!.emailConfirmedAt).toBeInstanceOf(Date);
  });

  it('refuses a short password (400) and an expired link (410), leaving the password as it was', async () => {
    const user = await buildUser();
    const token = await resetToken(user.email);
    const { agent, csrf } = await anonymous();
    const short = await agent.post(`/api/password-resets/${token}`).set('X-CSRF-Token', csrf).send({ password: 'short' }).expect(400);
    expect(short.body.error.message).toMatch(/password: Use at least 8/);
    await agent.post(`/api/password-resets/${token}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD, extra: true }).expect(400);
    await AuthToken.update({ expiresAt: new Date(Date.now() - 1) }, { where: { tokenHash: hashToken(token) } });
    await agent.post(`/api/password-resets/${token}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD }).expect(410);
    await signIn(trimout.app, user.email, TEST_PASSWORD);
  });

  it('does not take an invitation or confirmation token (wrong purpose → 404)', async () => {
    const user = await buildUser();
    await User.update({ emailConfirmedAt: null }, { where: { id: user.id } });
    const { agent, csrf } = await anonymous();
    await agent.post('/api/signup').set('X-CSRF-Token', csrf).send({ companyName: 'C', name: 'N', email: user.email, password: NEW_PASSWORD }).expect(202);
    const confirm = tokenOf(await smtp.waitFor((m) => m.to.includes(user.email) && m.subject.startsWith('Confirm')), '/confirm/');
    await agent.post(`/api/password-resets/${confirm}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD }).expect(404);
  });
});

describe('mail never fails a write', () => {
  it('answers 202 and logs when the SMTP server is down, after retrying', async () => {
    const down = await startFakeSmtp();
    const port = down.port;
    await down.close(); // nothing listens there now
    const logged: string[] = [];
    const mail = createMailService({ env: testEnv({ SMTP_URL: `smtp://127.0.0.1:${port}` }), log: (m) => logged.push(m), backoffMs: 1 });
    const broken = buildTestApp(db, { mail });
    try {
      const user = await buildUser();
      const agent = request.agent(broken.app);
      const csrf = await csrfFor(agent);
      await agent.post('/api/password-resets').set('X-CSRF-Token', csrf).send({ email: user.email }).expect(202);
      // the link is made after the answer: wait for its row, then for the outbox
      await waitFor(async () => (await AuthToken.count({ where: { userId: user.id, purpose: 'password_reset' } })) > 0, {
        what: 'the reset link to be made',
        timeout: 5_000,
        interval: 25,
      });
      await mail.outbox.idle();
      expect(logged.join('\n')).toMatch(/not sent after 4 attempts/);
      // the token row was still written
      expect(await AuthToken.count({ where: { userId: user.id, purpose: 'password_reset' } })).toBe(1);
    } finally {
      await broken.close();
    }
  });

  it('retries 3 times with growing waits and succeeds when the server comes back', async () => {
    let calls = 0;
    const outbox = createOutbox({
      transport: {
        sendMail: (async () => {
          calls++;
          if (calls < 3) throw new Error('421 try again later');
          return {};
        }) as never,
      },
      from: 'Trimout <no-reply@trimout.local>',
      log: () => undefined,
      backoffMs: 1,
    });
    await expect(outbox.sendMail({ to: { address: 'a@b.example' }, subject: 'S', text: 'T', html: '<p>T</p>' })).resolves.toBe(true);
    expect(calls).toBe(3);
  });

  it('sends nothing when the transaction rolls back', async () => {
    const before = smtp.messages().length;
    const mail = testMailService(smtp);
    await expect(
      db.sequelize.transaction(async (transaction) => {
        mail.outbox.sendAfterCommit(transaction, { to: { address: 'rollback@test.trimout.example' }, subject: 'S', text: 'T', html: 'H' });
        throw new Error('roll back');
      }),
    ).rejects.toThrow('roll back');
    await mail.outbox.idle();
    expect(smtp.messages().length).toBe(before);
  });
});

describe('GET /api/dev/mail', () => {
  it('lists caught mails (newest first) while the fake SMTP server is in use', async () => {
    const user = await buildUser();
    await requestReset(user.email);
    await smtp.waitFor((m) => m.to.includes(user.email));
    const res = await request(trimout.app).get('/api/dev/mail').expect(200);
    expect(res.body.items[0]).toMatchObject({ to: [user.email], subject: 'Reset your Trimout password', links: [expect.stringMatching(/\/reset\//)] });
    expect(res.body.items[0].raw).toBeUndefined();
  });

  it('refuses to start in production without SMTP_URL or PUBLIC_URL', () => {
    const prod = { NODE_ENV: 'production', SESSION_SECRET: 'x'.repeat(40) };
    expect(() => createMailService({ env: testEnv({ ...prod, PUBLIC_URL: 'https://punch.example.org' }), log: () => undefined })).toThrow(/SMTP_URL is required/);
    expect(() => createMailService({ env: testEnv({ ...prod, SMTP_URL: smtp.url }), log: () => undefined })).toThrow(/PUBLIC_URL is required/);
  });

  it('is a 404 without the fake, and in production', async () => {
    const plain = buildTestApp(db);
    try {
      await request(plain.app).get('/api/dev/mail').expect(404);
    } finally {
      await plain.close();
    }
    const prod = buildTestApp(db, {
      mail: createMailService({
        env: testEnv({ NODE_ENV: 'production', SMTP_URL: smtp.url, PUBLIC_URL: 'https://punch.example.org', SESSION_SECRET: 'x'.repeat(40) }),
        fake: smtp,
        log: () => undefined,
      }),
    });
    try {
      await request(prod.app).get('/api/dev/mail').expect(404);
    } finally {
      await prod.close();
    }
  });
});
