import type { AddressInfo } from 'node:net';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import { parseHash, SCRYPT_PARAMS } from '../../../server/auth/passwords';
import type { Database } from '../../../server/db';
import { User } from '../../../server/models';
import { buildTestApp, csrfFor, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, buildUser, TEST_PASSWORD } from '../../support/factories';

let db: Database;
let trimout: TrimoutApp;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
});

afterAll(async () => {
  await trimout.close();
  await db.close();
});

function cookieOf(res: request.Response): string {
  const raw = res.headers['set-cookie'] as unknown as string[] | undefined;
  const cookie = raw?.find((c) => c.startsWith('trimout.sid='));
  if (!cookie) throw new Error('no session cookie set');
  return cookie;
}

describe('GET /api/session', () => {
  it('answers a signed-out caller with no user and an anonymous CSRF token, writing no session', async () => {
    const res = await request(trimout.app).get('/api/session').expect(200);
    expect(res.body).toEqual({ user: null, jobs: [], csrfToken: expect.any(String) });
    expect(res.headers['set-cookie']).toBeUndefined();
    expect(res.headers['cache-control']).toBe('no-store');
  });

  it('lists my jobs with my role on each, and only mine', async () => {
    const crew = await buildJobWithCrew();
    const other = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew.inspector.email);
    const res = await agent.get('/api/session').expect(200);
    expect(res.body.user).toMatchObject({ id: crew.inspector.id, email: crew.inspector.email });
    expect(res.body.jobs).toEqual([expect.objectContaining({ id: crew.job.id, role: 'inspector' })]);
    expect(JSON.stringify(res.body)).not.toContain(other.job.id);
  });
});

describe('POST /api/session (sign in)', () => {
  it('signs in with the right password, sets an httpOnly SameSite cookie and returns the user', async () => {
    const user = await buildUser();
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    const res = await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: user.email, password: TEST_PASSWORD }).expect(200);
    expect(res.body.user.email).toBe(user.email);
    const cookie = cookieOf(res);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(res.body.csrfToken).not.toBe(csrf);
  });

  it('accepts the e-mail in any case and with spaces around it', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, `  ${user.email.toUpperCase()} `);
    const res = await agent.get('/api/session').expect(200);
    expect(res.body.user.id).toBe(user.id);
  });

  it('gives a new session id at sign-in: a cookie from before sign-in is not the signed-in one', async () => {
    const user = await buildUser();
    const first = await signIn(trimout.app, user.email);
    const before = await first.agent.get('/api/session');
    // sign in again on the same agent: the id must change
    const res = await first.agent.post('/api/session').set('X-CSRF-Token', first.csrf).send({ email: user.email, password: TEST_PASSWORD }).expect(200);
    expect(cookieOf(res)).not.toBe(before.headers['set-cookie']?.[0]);
  });

  it('refuses a wrong password and an unknown e-mail with the same status and the same body', async () => {
    const user = await buildUser();
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    const wrong = await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: user.email, password: 'not the password' });
    const unknown = await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: 'nobody-here@test.trimout.example', password: 'not the password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.message).toMatch(/do not match/);
    expect(wrong.headers['set-cookie']).toBeUndefined();
  });

  it('takes about as long for an unknown e-mail as for a wrong password (a dummy hash is checked)', async () => {
    const user = await buildUser();
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    const time = async (email: string) => {
      const t = process.hrtime.bigint();
      await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email, password: 'wrong password here' }).expect(401);
      return Number(process.hrtime.bigint() - t) / 1e6;
    };
    await time('warm-up@test.trimout.example'); // the dummy hash is made once
    const wrong = await time(user.email);
    const unknown = await time('nobody-else@test.trimout.example');
    // Both run one scrypt at N=2^17; neither should be a quick short-circuit.
    expect(unknown).toBeGreaterThan(wrong * 0.4);
    expect(wrong).toBeGreaterThan(unknown * 0.4);
  });

  it.each([
    [{}, 'email'],
    [{ email: 'not-an-address', password: 'x' }, 'email'],
    [{ email: 'a@b.example' }, 'password'],
    [{ email: ['a@b.example'], password: 'x' }, 'email'],
    [{ email: 'a@b.example', password: 'x', role: 'gc_manager' }, 'body'],
  ])('refuses the malformed body %j with 400 and a message for %s', async (body, field) => {
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    const res = await agent.post('/api/session').set('X-CSRF-Token', csrf).send(body).expect(400);
    expect(res.body.error.id).toBe('bad_request');
    expect(Object.keys(res.body.error.fields).join(' ')).toContain(field === 'body' ? '' : field);
    expect(res.body.error.message).toMatch(/:/);
  });

  it('refuses a body that is not JSON with 415, and broken JSON with 400', async () => {
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    await agent.post('/api/session').set('X-CSRF-Token', csrf).type('form').send('email=a@b.example&password=x').expect(415);
    const res = await agent.post('/api/session').set('X-CSRF-Token', csrf).set('Content-Type', 'application/json').send('{"email":').expect(400);
    expect(res.body.error.message).toMatch(/not valid JSON/);
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts|SyntaxError/);
  });

  it('stores the password as scrypt with OWASP parameters (N=2^17, r=8, p=1)', async () => {
    const user = await buildUser();
    const stored = await User.findByPk(user.id);
    const parsed = parseHash(stored!.passwordHash!);
    expect(parsed).toMatchObject({ N: 2 ** 17, r: 8, p: 1 });
    expect(parsed!.salt.length).toBe(16);
    expect(parsed!.key.length).toBe(SCRYPT_PARAMS.keyLength);
  });

  it('throttles failed sign-ins per account with 429 and Retry-After', async () => {
    const limited = buildTestApp(db, { signInLimits: { perAccount: 3, perAddress: 1000, windowMs: 60_000 } });
    try {
      const user = await buildUser();
      const agent = request.agent(limited.app);
      const csrf = await csrfFor(agent);
      for (let i = 0; i < 3; i++) {
        await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: user.email, password: 'wrong password' }).expect(401);
      }
      const res = await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: user.email, password: TEST_PASSWORD }).expect(429);
      expect(res.headers['retry-after']).toBeDefined();
      expect(res.body.error.message).toMatch(/Too many/);
      // another account from the same address is not blocked by the first one's failures
      const other = await buildUser();
      await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: other.email, password: TEST_PASSWORD }).expect(200);
    } finally {
      await limited.close();
    }
  });

  it('throttles sign-in attempts per address', async () => {
    const limited = buildTestApp(db, { signInLimits: { perAccount: 1000, perAddress: 2, windowMs: 60_000 } });
    try {
      const agent = request.agent(limited.app);
      const csrf = await csrfFor(agent);
      const a = await buildUser();
      await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: a.email, password: 'wrong one' }).expect(401);
      await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: 'x@test.trimout.example', password: 'wrong one' }).expect(401);
      await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email: a.email, password: TEST_PASSWORD }).expect(429);
    } finally {
      await limited.close();
    }
  });
});

describe('CSRF', () => {
  it('refuses a state-changing request without the token', async () => {
    const user = await buildUser();
    const res = await request(trimout.app).post('/api/session').send({ email: user.email, password: TEST_PASSWORD }).expect(403);
    expect(res.body.error.id).toBe('csrf');
  });

  it('refuses a cross-site HTML form post even with a valid session cookie', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, user.email);
    const res = await agent
      .delete('/api/session')
      .set('Origin', 'https://evil.example')
      .set('Sec-Fetch-Site', 'cross-site')
      .expect(403);
    expect(res.body.error.id).toBe('cross_site');
    await agent.get('/api/session').expect(200).expect((r) => expect(r.body.user).not.toBeNull());
  });

  it('refuses another Origin even when the token is right', async () => {
    const user = await buildUser();
    const { agent, csrf } = await signIn(trimout.app, user.email);
    await agent.delete('/api/session').set('X-CSRF-Token', csrf).set('Origin', 'http://other.example:3000').expect(403);
  });

  it('lets a script with the right Origin, token and cookie through', async () => {
    const user = await buildUser();
    const server = trimout.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    try {
      const { port } = server.address() as AddressInfo;
      const origin = `http://127.0.0.1:${port}`;
      const agent = request.agent(origin);
      const anon = (await agent.get('/api/session').expect(200)).body.csrfToken;
      const signedIn = await agent
        .post('/api/session')
        .set('Origin', origin)
        .set('X-CSRF-Token', anon)
        .send({ email: user.email, password: TEST_PASSWORD })
        .expect(200);
      await agent.delete('/api/session').set('Origin', origin).set('X-CSRF-Token', signedIn.body.csrfToken).expect(204);
    } finally {
      await new Promise((r) => server.close(r));
    }
  });

  it('does not accept the anonymous token once signed in', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, user.email);
    const anonymous = (await request(trimout.app).get('/api/session')).body.csrfToken;
    await agent.delete('/api/session').set('X-CSRF-Token', anonymous).expect(403);
  });
});

describe('DELETE /api/session (sign out)', () => {
  it('destroys the session: the old cookie is signed out afterwards', async () => {
    const crew = await buildJobWithCrew();
    const { agent, csrf } = await signIn(trimout.app, crew.gcManager.email);
    const before = await agent.get('/api/jobs').expect(200);
    const cookie = before.request.cookies;
    const res = await agent.delete('/api/session').set('X-CSRF-Token', csrf).expect(204);
    expect(String(res.headers['set-cookie'])).toMatch(/trimout\.sid=;/);
    await request(trimout.app).get('/api/jobs').set('Cookie', cookie).expect(401);
  });
});

describe('signed-out access', () => {
  it.each(['/api/jobs', '/api/jobs/00000000-0000-4000-8000-000000000000'])('GET %s answers 401 with a JSON message', async (path) => {
    const res = await request(trimout.app).get(path).expect(401);
    expect(res.body).toEqual({ error: { id: 'unauthorized', message: 'Sign in to continue.' } });
  });

  it('unknown API paths answer a JSON 404', async () => {
    const res = await request(trimout.app).get('/api/does-not-exist').expect(404);
    expect(res.body.error.id).toBe('not_found');
  });
});

describe('session lifetime', () => {
  it('survives a server restart: a new app with a new session store knows the cookie', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, user.email);
    const cookie = (await agent.get('/api/session')).request.cookies;
    await trimout.close(); // the first server's session store is gone
    trimout = buildTestApp(db);
    const res = await request(trimout.app).get('/api/session').set('Cookie', cookie).expect(200);
    expect(res.body.user?.id).toBe(user.id);
  });

  it('ends a session after the absolute lifetime even when it was used all along', async () => {
    const short = buildTestApp(db, { sessionAbsoluteMs: 300 });
    try {
      const user = await buildUser();
      const { agent } = await signIn(short.app, user.email);
      await agent.get('/api/jobs').expect(200);
      await new Promise((r) => setTimeout(r, 400));
      const res = await agent.get('/api/jobs').expect(401);
      expect(res.body.error.message).toMatch(/session has ended/);
    } finally {
      await short.close();
    }
  });

  it('ends a session left idle longer than the idle timeout', async () => {
    const short = buildTestApp(db, { sessionIdleMs: 1000 });
    try {
      const user = await buildUser();
      const { agent } = await signIn(short.app, user.email);
      await agent.get('/api/jobs').expect(200);
      await new Promise((r) => setTimeout(r, 1300));
      await agent.get('/api/jobs').expect(401);
    } finally {
      await short.close();
    }
  });

  it('ends every session of a user whose session epoch was raised (password change, removal)', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, user.email);
    await agent.get('/api/jobs').expect(200);
    await User.increment('sessionEpoch', { where: { id: user.id } });
    await agent.get('/api/jobs').expect(401);
  });

  it('ends the session of a disabled user', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, user.email);
    await User.update({ disabledAt: new Date() }, { where: { id: user.id } });
    await agent.get('/api/jobs').expect(401);
  });
});
