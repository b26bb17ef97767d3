/**
 * Deny by default (OWASP ASVS 5.0 V8.1.1 / V8.2.1): every API route declares exactly one policy
 * as its first handler, and every route that is not public answers 401 to a signed-out caller.
 * The routes are read from the router itself, so a new route cannot be forgotten.
 */
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp, csrfFor } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { listRoutes } from '../../support/routes';

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

const FILLER_ID = '00000000-0000-4000-8000-000000000000';

describe('route policies', () => {
  const routesOf = () => listRoutes(trimout.api);

  it('finds the routes', () => {
    const paths = routesOf().map((r) => `${r.method} ${r.path}`);
    expect(paths).toEqual(expect.arrayContaining(['GET /api/health', 'GET /api/session', 'POST /api/session', 'GET /api/jobs']));
  });

  it('gives every route exactly one policy, as its first handler', () => {
    const offenders = routesOf()
      .filter((r) => r.handlers.filter((h) => h.policy).length !== 1 || !r.handlers[0]?.policy)
      .map((r) => `${r.method} ${r.path}`);
    expect(offenders).toEqual([]);
  });

  it('answers 401 to a signed-out caller on every route that is not public', async () => {
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    const results: string[] = [];
    for (const route of routesOf()) {
      if (route.handlers[0]?.policy === 'public') continue;
      const path = route.path.replace(/:[A-Za-z]+/g, FILLER_ID).replace(/\{\*[A-Za-z]+\}/g, 'x');
      const res = await agent[route.method.toLowerCase() as 'get' | 'post' | 'patch' | 'put' | 'delete'](path)
        .set('X-CSRF-Token', csrf)
        .set('Content-Type', 'application/json')
        .send(route.method === 'GET' ? undefined : {});
      if (res.status !== 401) results.push(`${route.method} ${route.path} → ${res.status}`);
    }
    expect(results).toEqual([]);
  });
});
