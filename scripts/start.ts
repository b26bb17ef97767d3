/**
 * `npm start`: PostgreSQL (installed from Debian when missing) in .pgdata on 127.0.0.1,
 * migrations, the demo seed the first time, the web app built when its sources changed,
 * the local S3 fake for photos (s3rver on 127.0.0.1:S3_PORT, data in .data/s3) unless S3_ENDPOINT
 * is set, then the server. Ctrl-C stops the server, the S3 fake and the database cleanly.
 */
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { connect, migrate } from '../server/db';
import { upgradeBuiltinCatalogues } from '../server/services/catalogueUpgrade';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from '../server/seed/demo';
import { startServer } from '../server/index';
import { envSchema } from '../server/env';
import { createObjectStore } from '../server/storage';
import { startLocalObjectStore, type LocalObjectStore } from '../server/storage/local';
import { ensureDatabase, startCluster } from './lib/postgres';
import { say } from './lib/run';
import { ensurePdfTools } from './lib/poppler';
import { buildWebIfStale } from './lib/web';
import { ROLE_LABELS } from '../shared/words';

const root = path.resolve(__dirname, '..');

/**
 * A local try-out is development, said explicitly (the server alone defaults to production and
 * then refuses to start without PUBLIC_URL and a real secret). The development secret is random,
 * made once and kept in the git-ignored .data folder, so sessions survive a restart and nobody
 * can read it in the source to forge session cookies or unsubscribe links.
 */
function developmentSecret(): string {
  const file = path.join(root, '.data', 'session-secret');
  if (!fs.existsSync(file)) {
    fs.mkdirSync(path.dirname(file), { recursive: true });
    fs.writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 });
  }
  return fs.readFileSync(file, 'utf8').trim();
}

async function main() {
  const pgPort = Number(process.env.TRIMOUT_PG_PORT ?? 54329);
  const cluster = await startCluster({ dataDir: path.join(root, '.pgdata'), port: pgPort });
  let stopping = false;
  let photoStorage: LocalObjectStore | undefined;
  const stopDatabase = () => {
    try {
      cluster.stop();
      say('database stopped.');
    } catch (err) {
      console.error('Could not stop the database cleanly:', err instanceof Error ? err.message : err);
    }
  };
  try {
    await ensureDatabase(cluster, 'trimout');
    const databaseUrl = process.env.DATABASE_URL ?? cluster.url('trimout');
    const db = connect(databaseUrl);
    const ran = await migrate(db.sequelize);
    if (ran.length) say(`ran ${ran.length} migration(s).`);
    // After the migrations, before the seed: existing jobs get the built-in catalogue this code ships.
    const upgraded = await upgradeBuiltinCatalogues(db.sequelize);
    if (upgraded.added || upgraded.updated) say(`catalogues: ${upgraded.added} defect type(s) added, ${upgraded.updated} brought up to date.`);
    // Photo storage first: the demo seed stores its fix photos there, like uploads.
    const s3 = envSchema.pick({ S3_ENDPOINT: true, S3_PORT: true, S3_BUCKET: true }).parse(process.env);
    if (!s3.S3_ENDPOINT) {
      photoStorage = await startLocalObjectStore({
        directory: path.join(root, '.data', 's3'),
        port: s3.S3_PORT,
        bucket: s3.S3_BUCKET,
        log: say,
      });
    }
    const storageEnv = envSchema
      .pick({ NODE_ENV: true, S3_ENDPOINT: true, S3_BUCKET: true, S3_REGION: true, S3_ACCESS_KEY_ID: true, S3_SECRET_ACCESS_KEY: true, S3_FORCE_PATH_STYLE: true, S3_PORT: true, STORAGE_DISK_DIR: true })
      .parse({ NODE_ENV: 'development', ...process.env, ...photoStorage?.env });
    const seedStore = photoStorage?.store ?? createObjectStore(storageEnv);
    const { created } = await seedDemo(db, { store: seedStore });
    if (created) say('demo data created.');
    await db.close();

    await buildWebIfStale(path.join(root, 'dist'));
    ensurePdfTools();

    say(`photos are stored in ${photoStorage ? `${photoStorage.store.location} (data in ${path.relative(root, photoStorage.directory)})` : `s3://${s3.S3_BUCKET} at ${s3.S3_ENDPOINT}`}.`);

    const server = await startServer({
      NODE_ENV: 'development',
      SESSION_SECRET: process.env.SESSION_SECRET ?? developmentSecret(),
      ...process.env,
      ...photoStorage?.env,
      DATABASE_URL: databaseUrl,
      WEB_DIST: path.join(root, 'dist'),
    });
    const width = Math.max(...DEMO_ACCOUNTS.map((a) => a.email.length));
    console.log(`
Trimout is running at ${server.url}${server.mailboxUrl ? `\nCaught mail: ${server.mailboxUrl}` : ''}

Demo sign-ins (password for all: ${DEMO_PASSWORD})
${DEMO_ACCOUNTS.map((a) => `  ${a.email.padEnd(width)}  ${ROLE_LABELS[a.role]}`).join('\n')}

Press Ctrl-C to stop.`);

    const shutdown = async () => {
      if (stopping) return;
      stopping = true;
      say('stopping ...');
      await server.stop().catch(() => undefined);
      await photoStorage?.close().catch(() => undefined);
      stopDatabase();
      process.exit(0);
    };
    process.on('SIGINT', shutdown);
    process.on('SIGTERM', shutdown);
  } catch (err) {
    await photoStorage?.close().catch(() => undefined);
    stopDatabase();
    throw err;
  }
}

main().catch((err: unknown) => {
  console.error(`\nTrimout could not start: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
