/**
 * Test database access: the throwaway cluster that scripts/test.ts started and migrated.
 * Each test file connects once and closes in afterAll; no test uses sync().
 */
import pg from 'pg';
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

/**
 * A database of its own, made empty and migrated, for a test whose checks read a whole shared
 * fixture (the demo job) that other test files also change. The models are bound to it (one
 * database per process: use it instead of connectTestDb in that file). `drop()` removes it.
 */
export async function connectOwnDb(name: string): Promise<{ db: Database; drop: () => Promise<void> }> {
  const base = new URL(testDatabaseUrl());
  const dbName = `${base.pathname.slice(1)}_${name}`.replace(/[^a-z0-9_]/gi, '_');
  const admin = async (sql: string) => {
    const client = new pg.Client({ connectionString: base.toString() });
    await client.connect();
    try {
      await client.query(sql);
    } finally {
      await client.end();
    }
  };
  await admin(`DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`);
  await admin(`CREATE DATABASE "${dbName}"`);
  const url = new URL(base.toString());
  url.pathname = `/${dbName}`;
  const db = connect(url.toString(), { poolMax: 5 });
  await migrate(db.sequelize);
  return {
    db,
    drop: async () => {
      await db.close();
      await admin(`DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`);
    },
  };
}

/** The `n` of a `SELECT count(*) AS n ...` statement, as a number. */
export async function countRows(db: Database, sql: string, bind: unknown[] = []): Promise<number> {
  const [rows] = await db.sequelize.query(sql, { bind });
  return Number((rows as { n: string }[])[0]!.n);
}
