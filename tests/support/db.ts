/**
 * Test database access: the throwaway cluster that scripts/test.ts started and migrated.
 * Each test file connects once and closes in afterAll; no test uses sync().
 */
import { connect, migrate, type Database } from '../../server/db';

export function testDatabaseUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set: run the tests with `npm test`.');
  return url;
}

export async function connectTestDb(): Promise<Database> {
  const db = connect(testDatabaseUrl(), { poolMax: 5 });
  await migrate(db.sequelize); // already migrated by npm test; a no-op then, kept for `npx jest` runs
  return db;
}
