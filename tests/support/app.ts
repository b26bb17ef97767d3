/**
 * Builds the real Express app against the test database, and signs users in through the
 * real POST /api/session, returning a supertest agent that carries the cookie and CSRF token.
 */
import { randomUUID } from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import { createApp, type AppOptions, type TrimoutApp } from '../../server/app';
import type { Database } from '../../server/db';
import { loadEnv } from '../../server/env';
import { testDatabaseUrl } from './db';
import { TEST_PASSWORD } from './factories';

export function testEnv(overrides: Record<string, string> = {}) {
  return loadEnv({
    NODE_ENV: 'test',
    DATABASE_URL: testDatabaseUrl(),
    SESSION_SECRET: 'test-session-secret-0123456789abcdef0123456789',
    WEB_DIST: process.env.WEB_DIST ?? 'dist-not-built',
    ...overrides,
  });
}

export function buildTestApp(db: Database, options: Partial<AppOptions> = {}): TrimoutApp {
  return createApp({
    env: options.env ?? testEnv(),
    db,
    log: process.env.TEST_LOG ? (m: string, e?: unknown) => console.error(m, e) : () => undefined,
    signInLimits: { perAccount: 1000, perAddress: 10_000, windowMs: 60_000 },
    // Each test app counts its limits apart in the shared table (the nodes of one deployment share theirs).
    rateLimitNamespace: `test-${randomUUID()}:`,
    // Suites upload far more per user than a person would; the upload-attack test sets its own.
    uploadLimits: { requestsPerWindow: 10_000, pixelsPerWindow: 1e12, windowMs: 60_000 },
    ...options,
  });
}

export interface SignedIn {
  agent: TestAgent;
  csrf: string;
}

export async function csrfFor(agent: TestAgent): Promise<string> {
  const res = await agent.get('/api/session').expect(200);
  return res.body.csrfToken as string;
}

export async function signIn(app: TrimoutApp['app'], email: string, password = TEST_PASSWORD): Promise<SignedIn> {
  const agent = request.agent(app);
  const anon = await csrfFor(agent);
  const res = await agent
    .post('/api/session')
    .set('X-CSRF-Token', anon)
    .send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent, csrf: res.body.csrfToken as string };
}

/** A request handler served over real HTTP on a free loopback port (for tests that need the wire). */
export interface Listening {
  server: http.Server;
  url: string;
  port: number;
  /** Ends open connections and stops listening. */
  close(): Promise<void>;
}
export async function listenOnLoopback(handler: http.RequestListener): Promise<Listening> {
  const server = http.createServer(handler);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    server,
    port,
    url: `http://127.0.0.1:${port}`,
    close: async () => {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
