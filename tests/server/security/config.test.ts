/**
 * Configuration rules from security.md: secrets required in production, Secure + __Host-
 * cookies under TLS, trust proxy as a hop count, the demo seed never in production, and an
 * anonymous GET writing no session row.
 */
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { loadEnv } from '../../../server/env';
import { seedDemo } from '../../../server/seed/demo';
import { buildTestApp, testEnv } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser, TEST_PASSWORD } from '../../support/factories';

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

describe('environment', () => {
  it('refuses to start in production without SESSION_SECRET', () => {
    expect(() => loadEnv({ NODE_ENV: 'production' })).toThrow(/SESSION_SECRET is required/);
  });

  it('refuses a short secret in production', () => {
    expect(() => loadEnv({ NODE_ENV: 'production', SESSION_SECRET: 'short' })).toThrow(/at least 32/);
  });

  it('takes several comma-separated secrets for rotation', () => {
    const env = loadEnv({ SESSION_SECRET: 'a'.repeat(32) + ',' + 'b'.repeat(32), PUBLIC_URL: 'https://punch.example.org' });
    expect(env.sessionSecrets).toHaveLength(2);
  });

  it('reports a bad value with its name', () => {
    expect(() => loadEnv({ NODE_ENV: 'development', PORT: 'eighty' })).toThrow(/PORT/);
  });

  it('is production unless development or test is said: then it refuses to start without PUBLIC_URL and a real secret', () => {
    expect(() => loadEnv({})).toThrow(/SESSION_SECRET is required/);
    expect(() => loadEnv({ SESSION_SECRET: 'x'.repeat(40) })).toThrow(/PUBLIC_URL is required/);
    expect(loadEnv({ SESSION_SECRET: 'x'.repeat(40), PUBLIC_URL: 'https://punch.example.org/app' })).toMatchObject({
      NODE_ENV: 'production',
      publicOrigin: 'https://punch.example.org',
    });
  });

  it('in development without a secret, makes a random one per process (no constant anyone could read and forge with)', () => {
    const a = loadEnv({ NODE_ENV: 'development' });
    const b = loadEnv({ NODE_ENV: 'development' });
    expect(a.sessionSecrets[0]).toHaveLength(43);
    expect(a.sessionSecrets[0]).not.toBe(b.sessionSecrets[0]);
    expect(a.publicOrigin).toBe('http://127.0.0.1:3000');
  });
});

describe('cookies under TLS', () => {
  it('uses the __Host- prefix and Secure when PUBLIC_URL is https', async () => {
    const trimout = buildTestApp(db, {
      env: testEnv({ PUBLIC_URL: 'https://punch.test.example', TRUST_PROXY: '1' }),
    });
    try {
      const user = await buildUser();
      const agent = request.agent(trimout.app);
      const csrf = (await agent.get('/api/session').set('X-Forwarded-Proto', 'https')).body.csrfToken;
      const res = await agent
        .post('/api/session')
        .set('X-Forwarded-Proto', 'https')
        .set('X-CSRF-Token', csrf)
        .send({ email: user.email, password: TEST_PASSWORD })
        .expect(200);
      const cookies = res.headers['set-cookie'] as unknown as string[];
      // the session cookie and the device cookie (sign-in limits) alike
      for (const name of ['__Host-trimout.sid=', '__Host-trimout.device=']) {
        const cookie = cookies.find((c) => c.startsWith(name));
        expect(cookie).toBeDefined();
        expect(cookie).toMatch(/; Secure/);
        expect(cookie).toMatch(/; HttpOnly/);
        expect(cookie).toMatch(/Path=\//);
        expect(cookie).not.toMatch(/Domain=/i);
      }
      expect(res.headers['strict-transport-security']).toBeDefined();
    } finally {
      await trimout.close();
    }
  });
});

describe('sessions', () => {
  it('writes no session row for anonymous requests', async () => {
    const trimout = buildTestApp(db);
    try {
      const count = async () =>
        (await db.sequelize.query<{ n: string }>('SELECT count(*) AS n FROM sessions', { type: QueryTypes.SELECT }))[0]!.n;
      const before = await count();
      await request(trimout.app).get('/api/session').expect(200);
      await request(trimout.app).get('/api/jobs').expect(401);
      expect(await count()).toBe(before);
    } finally {
      await trimout.close();
    }
  });
});

describe('demo seed', () => {
  it('refuses to run in production', async () => {
    const previous = process.env.NODE_ENV;
    process.env.NODE_ENV = 'production';
    try {
      await expect(seedDemo(db)).rejects.toThrow(/never runs in production/);
    } finally {
      process.env.NODE_ENV = previous;
    }
  });
});
