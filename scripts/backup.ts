/**
 * `npm run backup [-- --out <folder>]`: the database (pg_dump -Fc) and every stored photo into
 * backups/<timestamp>/ (git-ignored), with a manifest. Uses DATABASE_URL and the photo store
 * settings of the server (S3_* or, in development, the local S3 fake / STORAGE_DISK_DIR):
 * with the local S3 fake, run it while `npm start` is running. See scripts/lib/backup.ts.
 */
import path from 'node:path';
import { loadEnv } from '../server/env';
import { createObjectStore } from '../server/storage';
import { backup, timestampFolder } from './lib/backup';

async function main() {
  const args = process.argv.slice(2);
  const outIndex = args.indexOf('--out');
  const env = loadEnv();
  const outDir = outIndex >= 0 && args[outIndex + 1] ? args[outIndex + 1]! : path.join('backups', timestampFolder());
  await backup({ databaseUrl: env.DATABASE_URL, store: createObjectStore(env), outDir, log: (m) => console.log(m) });
}

main().catch((err: unknown) => {
  console.error(`Backup failed: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
