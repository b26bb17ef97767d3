/** `npm run db:migrate` and `npm run db:seed` against DATABASE_URL (default: the local cluster). */
import { connect, migrate } from '../server/db';
import { loadEnv } from '../server/env';
import { seedDemo } from '../server/seed/demo';

async function main() {
  const command = process.argv[2];
  const env = loadEnv();
  const db = connect(env.DATABASE_URL);
  try {
    if (command === 'migrate') {
      const ran = await migrate(db.sequelize);
      console.log(ran.length ? `Ran ${ran.length} migration(s):\n  ${ran.join('\n  ')}` : 'No migrations to run.');
    } else if (command === 'seed') {
      const { created } = await seedDemo(db);
      console.log(created ? 'Demo data created.' : 'Demo data already present; nothing changed.');
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
