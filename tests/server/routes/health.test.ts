import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import { Sequelize } from 'sequelize';
import type { Database } from '../../../server/db';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';

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

describe('GET /api/health', () => {
  it('answers 200 with the server and database state, without a session', async () => {
    const res = await request(trimout.app).get('/api/health').expect(200);
    expect(res.body).toMatchObject({ server: 'ok', database: 'ok' });
  });

  it('answers 503 naming the database when it cannot be reached', async () => {
    // a port nothing listens on
    const sequelize = new Sequelize('postgres://trimout@127.0.0.1:1/none', { dialect: 'postgres', logging: false });
    const unreachable: Database = { sequelize, models: db.models, close: () => sequelize.close() };
    const app = buildTestApp(unreachable);
    try {
      const res = await request(app.app).get('/api/health').expect(503);
      expect(res.body).toMatchObject({ server: 'ok', database: 'unreachable' });
    } finally {
      await app.close();
      await unreachable.close();
    }
  });
});

describe('security headers', () => {
  it('sends a content security policy with base-uri, object-src and frame-ancestors locked', async () => {
    const res = await request(trimout.app).get('/api/health');
    const csp = String(res.headers['content-security-policy']);
    expect(csp).toContain("base-uri 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});
