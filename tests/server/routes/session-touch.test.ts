/**
 * The idle timeout with a throttled touch (server/auth/sessionStore.ts): requests keep a session
 * alive past the idle timeout, yet the stored expiry is written at most once per touch interval
 * (a tenth of the idle timeout), never on every request; an idle session still ends.
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { buildTestApp, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser } from '../../support/factories';

let db: Database;

beforeAll(async () => {
  db = await connectTestDb();
});

afterAll(async () => {
  await db.close();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function storedExpiry(userId: string): Promise<number> {
  const rows = await db.sequelize.query<{ expire: Date }>(
    `SELECT expire FROM sessions WHERE sess->'passport'->'user'->>'id' = $1`,
    { bind: [userId], type: QueryTypes.SELECT },
  );
  expect(rows).toHaveLength(1);
  return new Date(rows[0]!.expire).getTime();
}

describe('session idle timeout with a throttled touch', () => {
  it('writes the stored expiry at most once per touch interval, not on every request', async () => {
    const app = buildTestApp(db, { sessionIdleMs: 20_000 }); // touch interval: 2 s
    try {
      const user = await buildUser();
      const { agent } = await signIn(app.app, user.email);
      const atSignIn = await storedExpiry(user.id);
      await agent.get('/api/jobs').expect(200); // right after sign-in: not written
      expect(await storedExpiry(user.id)).toBe(atSignIn);
      // The stored expiry is whole seconds rounded up (up to 1 s ahead), so wait for the touch
      // interval plus that second: 3.2 s later it must have moved.
      await sleep(3200);
      await agent.get('/api/jobs').expect(200); // 3.2 s later: moved
      const moved = await storedExpiry(user.id);
      expect(moved).toBeGreaterThanOrEqual(atSignIn + 2000); // stored in whole seconds
      await agent.get('/api/jobs').expect(200); // right after: not written again
      await agent.get('/api/jobs').expect(200);
      expect(await storedExpiry(user.id)).toBe(moved);
    } finally {
      await app.close();
    }
  }, 60_000);

  it('keeps a used session alive past the idle timeout and still ends an idle one', async () => {
    const idleMs = 3000; // touch interval: 300 ms
    const app = buildTestApp(db, { sessionIdleMs: idleMs });
    try {
      const user = await buildUser();
      const { agent } = await signIn(app.app, user.email);
      // Used about every second for longer than the idle timeout: still signed in.
      const until = Date.now() + idleMs + 1500;
      while (Date.now() < until) {
        await sleep(1000);
        await agent.get('/api/jobs').expect(200);
      }
      // Then idle for longer than the timeout: signed out.
      await sleep(idleMs + 300);
      await agent.get('/api/jobs').expect(401);
    } finally {
      await app.close();
    }
  }, 60_000);
});
