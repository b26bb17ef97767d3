/**
 * `npm run restore -- <backup folder> [--database-url <url>]`: restores a backup made by
 * `npm run backup` into an EMPTY database (created when missing; default DATABASE_URL) and puts
 * every photo back into the configured photo store (S3_* / STORAGE_DISK_DIR, as the server).
 * Refuses a database that already has tables. See scripts/lib/backup.ts.
 */
import { loadEnv } from '../server/env';
import { createObjectStore } from '../server/storage';
import { restore } from './lib/backup';

async function main() {
  const args = process.argv.slice(2);
  const urlIndex = args.indexOf('--database-url');
  const databaseUrl = urlIndex >= 0 ? args[urlIndex + 1] : undefined;
  const backupDir = args.find((a, i) => !a.startsWith('--') && (urlIndex < 0 || i !== urlIndex + 1));
  if (!backupDir) {
    console.error('Usage: npm run restore -- <backup folder> [--database-url postgres://…/new_database]');
    process.exit(2);
  }
  const env = loadEnv();
  await restore({ backupDir, databaseUrl: databaseUrl ?? env.DATABASE_URL, store: createObjectStore(env), log: (m) => console.log(m) });
}

main().catch((err: unknown) => {
  console.error(`Restore failed: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
