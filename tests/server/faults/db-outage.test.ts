/**
 * PostgreSQL stopped for a few seconds: the API answers 503 with a clear message (no stack,
 * no hang), and recovers by itself when the database is back. Runs its own small cluster so
 * the shared test database is never stopped.
 */
import os from 'node:os';
import path from 'node:path';
import fs from 'node:fs';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import { connect, migrate, type Database } from '../../../server/db';
import { ensureDatabase, removeCluster, startCluster, type Cluster } from '../../../scripts/lib/postgres';
import { buildTestApp, signIn, testEnv } from '../../support/app';
import { buildJobWithCrew } from '../../support/factories';
import { waitFor } from '../../support/wait';

jest.setTimeout(120_000);

let cluster: Cluster;
let db: Database;
let trimout: TrimoutApp;
const port = 54000 + Math.floor(Math.random() * 300);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-outage-'));

beforeAll(async () => {
  fs.chmodSync(dir, 0o755);
  cluster = await startCluster({ dataDir: path.join(dir, 'pg'), port, throwaway: true });
  await ensureDatabase(cluster, 'outage');
  const url = cluster.url('outage');
  db = connect(url);
  await migrate(db.sequelize);
  trimout = buildTestApp(db, { env: testEnv({ DATABASE_URL: url }) });
});

afterAll(async () => {
  await trimout?.close();
  await db?.close();
  cluster?.stop();
  removeCluster(dir);
});

it('answers 503 while the database is down and recovers without a restart', async () => {
  const crew = await buildJobWithCrew();
  const { agent } = await signIn(trimout.app, crew.gcManager.email);
  await agent.get(`/api/jobs/${crew.job.id}`).expect(200);

  cluster.stop();
  const down = await agent.get(`/api/jobs/${crew.job.id}`);
  expect(down.status).toBe(503);
  expect(down.body.error.message).toMatch(/database is not reachable/);
  expect(JSON.stringify(down.body)).not.toMatch(/ECONNREFUSED|at .*\.ts/);
  const health = await request(trimout.app).get('/api/health');
  expect(health.status).toBe(503);
  expect(health.body.database).toBe('unreachable');

  cluster = await startCluster({ dataDir: cluster.dataDir, port, throwaway: true });
  // Back without a restart of the app: the pool reconnects once the database answers again.
  await waitFor(async () => (await agent.get(`/api/jobs/${crew.job.id}`)).status === 200, {
    what: 'the API to answer again',
    timeout: 10_000,
    interval: 250,
  });
});
