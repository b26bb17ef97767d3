/**
 * Sign-in guessing is slowed per account and per address, in PostgreSQL so that every server node
 * counts against the same limits, and a stranger cannot lock the owner out: a device that signed
 * in to the account before keeps its own budget (device cookie).
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { PostgresRateLimitStore, pruneRateLimitHits } from '../../../server/services/rateLimitStore';
import { buildTestApp, csrfFor } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser, TEST_PASSWORD } from '../../support/factories';

jest.setTimeout(120_000);

let db: Database;
const apps: TrimoutApp[] = [];
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  for (const a of apps) await a.close();
  await db.close();
});

/** A server node; nodes built with one namespace are one deployment. */
function node(namespace: string, perAccount = 3): TrimoutApp {
  const app = buildTestApp(db, { signInLimits: { perAccount, perAddress: 10_000, windowMs: 60_000 }, rateLimitNamespace: namespace });
  apps.push(app);
  return app;
}

async function attempt(agent: TestAgent, email: string, password: string): Promise<number> {
  const csrf = await csrfFor(agent);
  const res = await agent.post('/api/session').set('X-CSRF-Token', csrf).send({ email, password });
  return res.status;
}

it('counts failed sign-ins in the database: nodes of one deployment share the account\'s budget', async () => {
  const ns = `limits-${randomUUID()}:`;
  const one = node(ns);
  const two = node(ns);
  const user = await buildUser();
  expect(await attempt(request.agent(one.app), user.email, 'wrong password 1')).toBe(401);
  expect(await attempt(request.agent(two.app), user.email, 'wrong password 2')).toBe(401);
  expect(await attempt(request.agent(one.app), user.email, 'wrong password 3')).toBe(401);
  // the budget (3) is spent, whichever node is asked
  expect(await attempt(request.agent(two.app), user.email, 'wrong password 4')).toBe(429);
  expect(await attempt(request.agent(one.app), user.email, 'wrong password 5')).toBe(429);
  const rows = await db.sequelize.query<{ hits: number }>(`SELECT hits FROM rate_limit_hits WHERE key = $1`, {
    bind: [`${ns}sign-in-account:account:${user.email}`],
    type: QueryTypes.SELECT,
  });
  expect(rows[0]!.hits).toBeGreaterThanOrEqual(3);
});

it('a stranger who spends the account\'s budget does not lock the owner out of a device they signed in on before', async () => {
  const app = node(`limits-${randomUUID()}:`).app;
  const owner = await buildUser();
  const phone = request.agent(app);
  expect(await attempt(phone, owner.email, TEST_PASSWORD)).toBe(200);
  await phone.delete('/api/session').set('X-CSRF-Token', await csrfFor(phone)).expect(204);
  // the stranger guesses until refused, and is refused even with the right password
  const stranger = request.agent(app);
  for (let i = 0; i < 3; i++) expect(await attempt(stranger, owner.email, `guess ${i}`)).toBe(401);
  expect(await attempt(stranger, owner.email, TEST_PASSWORD)).toBe(429);
  // a device without the cookie waits too (a password reset link signs in by itself)
  expect(await attempt(request.agent(app), owner.email, TEST_PASSWORD)).toBe(429);
  // the owner's phone still signs in
  expect(await attempt(phone, owner.email, TEST_PASSWORD)).toBe(200);
});

it('a known device has its own budget, not an endless one; a forged or another account\'s device cookie counts for nothing', async () => {
  const app = node(`limits-${randomUUID()}:`).app;
  const owner = await buildUser();
  const other = await buildUser();
  const phone = request.agent(app);
  expect(await attempt(phone, owner.email, TEST_PASSWORD)).toBe(200);
  for (let i = 0; i < 3; i++) expect(await attempt(phone, owner.email, `slip ${i}`)).toBe(401);
  expect(await attempt(phone, owner.email, TEST_PASSWORD)).toBe(429);
  // the account's own budget was not touched by the phone's slips: another device may still try
  expect(await attempt(request.agent(app), owner.email, TEST_PASSWORD)).toBe(200);

  // a cookie for another account, and a forged one, both fall back to the account's budget
  const otherPhone = request.agent(app);
  expect(await attempt(otherPhone, other.email, TEST_PASSWORD)).toBe(200);
  const stranger = request.agent(app);
  for (let i = 0; i < 3; i++) expect(await attempt(stranger, other.email, `guess ${i}`)).toBe(401);
  const forged = request.agent(app).set('Cookie', `trimout.device=${'a'.repeat(32)}.${'b'.repeat(22)}.${'c'.repeat(32)}`);
  expect(await attempt(forged, other.email, TEST_PASSWORD)).toBe(429);
  const wrongAccount = request.agent(app);
  expect(await attempt(wrongAccount, owner.email, TEST_PASSWORD)).toBe(200); // a device cookie for owner
  expect(await attempt(wrongAccount, other.email, TEST_PASSWORD)).toBe(429);
  expect(await attempt(otherPhone, other.email, TEST_PASSWORD)).toBe(200);
});

it('the store starts a key again once its window has passed, and old rows are pruned', async () => {
  const store = new PostgresRateLimitStore(db.sequelize, `store-${randomUUID()}:`);
  store.init({ windowMs: 60_000 } as never);
  expect((await store.increment('k')).totalHits).toBe(1);
  expect((await store.increment('k')).totalHits).toBe(2);
  await store.decrement('k');
  expect((await store.get('k'))!.totalHits).toBe(1);
  await db.sequelize.query(`UPDATE rate_limit_hits SET reset_at = now() - interval '2 days' WHERE key = $1`, { bind: [`${store.prefix}k`] });
  expect(await store.get('k')).toBeUndefined();
  expect((await store.increment('k')).totalHits).toBe(1);
  await db.sequelize.query(`UPDATE rate_limit_hits SET reset_at = now() - interval '2 days' WHERE key = $1`, { bind: [`${store.prefix}k`] });
  expect(await pruneRateLimitHits(db.sequelize)).toBeGreaterThanOrEqual(1);
  expect(await store.get('k')).toBeUndefined();
});
