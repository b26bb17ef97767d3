/** `npm run db:migrate` and `npm run db:seed` against DATABASE_URL (default: the local cluster). */
import { connect, migrate } from '../server/db';
import { upgradeBuiltinCatalogues } from '../server/services/catalogueUpgrade';
import { loadEnv } from '../server/env';
import path from 'node:path';
import { seedDemo } from '../server/seed/demo';
import { createObjectStore } from '../server/storage';
import { startLocalObjectStore } from '../server/storage/local';

async function main() {
  const command = process.argv[2];
  const env = loadEnv();
  const db = connect(env.DATABASE_URL);
  try {
    if (command === 'migrate') {
      const ran = await migrate(db.sequelize);
      console.log(ran.length ? `Ran ${ran.length} migration(s):\n  ${ran.join('\n  ')}` : 'No migrations to run.');
      // Existing jobs get the built-in catalogue this code ships (server/services/catalogueUpgrade.ts).
      const upgraded = await upgradeBuiltinCatalogues(db.sequelize);
      console.log(`Catalogues: ${upgraded.added} defect type(s) added, ${upgraded.updated} brought up to date.`);
    } else if (command === 'seed') {
      // The fix photos go where `npm start` keeps photos: the local S3 fake's folder unless S3_ENDPOINT is set.
      const local =
        env.S3_ENDPOINT || env.STORAGE_DISK_DIR
          ? null
          : await startLocalObjectStore({ directory: path.resolve(__dirname, '..', '.data', 's3'), port: 0, bucket: env.S3_BUCKET, log: console.log });
      try {
        const { created } = await seedDemo(db, { store: local?.store ?? createObjectStore(env) });
        console.log(created ? 'Demo data created.' : 'Demo data already present; nothing changed.');
      } finally {
        await local?.close();
      }
    } else {
      console.error('Usage: tsx scripts/db.ts migrate|seed');
      process.exitCode = 2;
    }
  } finally {
    await db.close();
  }
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
