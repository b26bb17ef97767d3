/**
 * `npm run backup` / `npm run restore` (scripts/lib/backup.ts) by a round trip: findings with
 * photos are made through the API, the database and the photo store are backed up, restored
 * into a NEW database and an empty photo store, and then every app table's rows (count and
 * md5 of all rows) and every photo's bytes are compared. The restored copy also serves a photo
 * through the real app. Restoring into a database that has tables is refused. The manifest counts
 * pending and orphaned uploads (a photo stored by a write that never committed).
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import pg from 'pg';
import { connect, type Database } from '../../../server/db';
import { DiskObjectStore } from '../../../server/storage/disk';
import { backup, listObjectKeys, restore, type Manifest } from '../../../scripts/lib/backup';
import { buildTestApp, signIn, testEnv } from '../../support/app';
import { connectTestDb, testDatabaseUrl } from '../../support/db';
import { buildWalkJob } from '../../support/findings';
import { startFakeS3 } from '../../support/storage';
import { phoneJpeg } from '../photos/fixtures';

jest.setTimeout(180_000);

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-backup-'));
const sourceStore = new DiskObjectStore(path.join(tmp, 'source-store'));
const targetStore = new DiskObjectStore(path.join(tmp, 'target-store'));
const targetName = `trimout_restore_${process.pid}_${Date.now()}`;
const targetUrl = (() => {
  const u = new URL(testDatabaseUrl());
  u.pathname = `/${targetName}`;
  return u.toString();
})();
let db: Database;
let restored: Database | undefined;

async function tableSums(url: string): Promise<Record<string, string>> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const { rows } = await client.query<{ name: string }>(
      `SELECT table_name AS name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY 1`,
    );
    const out: Record<string, string> = {};
    for (const { name } of rows) {
      const r = await client.query<{ s: string }>(`SELECT count(*)::text || ':' || md5(coalesce(string_agg(x::text, '|' ORDER BY x::text), '')) AS s FROM "${name}" x`);
      out[name] = r.rows[0]!.s;
    }
    return out;
  } finally {
    await client.end();
  }
}

beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await restored?.close();
  await db?.close();
  const admin = new pg.Client({ connectionString: testDatabaseUrl() });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS "${targetName}" WITH (FORCE)`).catch(() => undefined);
  await admin.end();
  fs.rmSync(tmp, { recursive: true, force: true });
});

it('backs up the database and the photos and restores both into a new database and store, row for row and byte for byte', async () => {
  // Seed: two findings with photos, through the real API onto the source store.
  const trimout = buildTestApp(db, { objectStore: sourceStore });
  const w = await buildWalkJob();
  const { agent, csrf } = await signIn(trimout.app, w.inspector.email);
  const jpeg = await phoneJpeg();
  const photoIds: string[] = [];
  for (const unit of [w.cassette, w.cassette2]) {
    const res = await agent
      .post(`/api/jobs/${w.job.id}/findings`)
      .set('X-CSRF-Token', csrf)
      .field('data', JSON.stringify({ catalogueItemId: w.byCode('DR-03').id, unitId: unit.id, companyId: w.subA.companyId }))
      .attach('photos', jpeg, { filename: 'a.jpg', contentType: 'image/jpeg' })
      .attach('photos', jpeg, { filename: 'b.jpg', contentType: 'image/jpeg' });
    expect([res.status, res.body.error]).toEqual([201, undefined]);
    photoIds.push(...res.body.photos.map((p: { id: string }) => p.id));
  }
  await trimout.close();
  // A crash between storing and committing: an object with an old pending row and no photo row.
  const orphan = `photos/${randomUUID()}.jpg`;
  await sourceStore.put(orphan, jpeg, 'image/jpeg');
  await db.sequelize.query(`INSERT INTO pending_uploads (key, created_at) VALUES ($1, now() - interval '2 hours')`, { bind: [orphan] });
  const sourceKeys = await listObjectKeys(sourceStore);
  expect(sourceKeys).toHaveLength(13); // 4 photos × (full + thumbnail + print copy), and the orphan
  const [pendingNow] = await db.sequelize.query<{ pending: string; old: string }>(
    `SELECT count(*) AS pending, count(*) FILTER (WHERE created_at < now() - interval '30 minutes') AS old FROM pending_uploads`,
    { type: 'SELECT' as never },
  );

  const before = await tableSums(testDatabaseUrl());
  const outDir = path.join(tmp, 'backups', '2026-12-01T00-00-00Z');
  const manifest: Manifest = await backup({ databaseUrl: testDatabaseUrl(), store: sourceStore, outDir });
  expect(manifest.objects.map((o) => o.key)).toEqual(sourceKeys);
  expect(manifest.uploads).toEqual({ pending: Number(pendingNow!.pending), pendingOrphans: Number(pendingNow!.old), unreferencedObjects: 1 });
  expect(manifest.uploads!.pendingOrphans).toBeGreaterThanOrEqual(1);
  expect(fs.existsSync(path.join(outDir, 'database.dump'))).toBe(true);
  // Nothing was written by the backup itself.
  expect(await tableSums(testDatabaseUrl())).toEqual(before);

  await restore({ backupDir: outDir, databaseUrl: targetUrl, store: targetStore });
  expect(await tableSums(targetUrl)).toEqual(before);
  expect(await listObjectKeys(targetStore)).toEqual(sourceKeys);
  for (const key of sourceKeys) {
    expect(fs.readFileSync(path.join(targetStore.root, 'objects', ...key.split('/')))).toEqual(
      fs.readFileSync(path.join(sourceStore.root, 'objects', ...key.split('/'))),
    );
  }

  // The restored copy works: the app on it signs in and serves a photo with the same bytes.
  restored = connect(targetUrl, { poolMax: 2 });
  const copy = buildTestApp(restored, { env: testEnv({ DATABASE_URL: targetUrl }), objectStore: targetStore });
  try {
    const signed = await signIn(copy.app, w.inspector.email);
    const photo = await signed.agent.get(`/api/jobs/${w.job.id}/photos/${photoIds[0]}`).buffer(true);
    expect(photo.status).toBe(200);
    const original = fs.readFileSync(path.join(sourceStore.root, 'objects', 'photos', `${photoIds[0]}.jpg`));
    expect(Buffer.compare(photo.body as Buffer, original)).toBe(0);
    // Every print copy a restored row names came back with it (a report reads those, not the photos).
    const printKeys = await restored.sequelize.query<{ print_key: string }>(`SELECT print_key FROM photos WHERE id = ANY($1::uuid[])`, {
      bind: [photoIds],
      type: 'SELECT' as never,
    });
    expect(printKeys).toHaveLength(4);
    for (const { print_key } of printKeys) expect(await targetStore.exists(print_key)).toBe(true);
  } finally {
    await copy.close();
  }

  // A second restore into the same (now full) database is refused and changes nothing.
  const full = await tableSums(targetUrl);
  await expect(restore({ backupDir: outDir, databaseUrl: targetUrl, store: targetStore })).rejects.toThrow(/not empty/);
  expect(await tableSums(targetUrl)).toEqual(full);
  await db.sequelize.query(`DELETE FROM pending_uploads WHERE key = $1`, { bind: [orphan] });
});

it('backs up and restores an S3 bucket (the production store) through the S3 API', async () => {
  const source = await startFakeS3({ bucket: 'backup-source' });
  const target = await startFakeS3({ bucket: 'backup-target' });
  const name2 = `${targetName}_s3`;
  const url2 = targetUrl.replace(targetName, name2);
  try {
    const jpeg = await phoneJpeg();
    const keys = [`photos/${randomUUID()}.jpg`, `photos/${randomUUID()}-thumb.jpg`, `plans/${randomUUID()}.png`].sort();
    for (const [i, key] of keys.entries()) await source.store.put(key, Buffer.concat([jpeg, Buffer.from([i])]), i === 2 ? 'image/png' : 'image/jpeg');
    const outDir = path.join(tmp, 'backups', 's3');
    const manifest = await backup({ databaseUrl: testDatabaseUrl(), store: source.store, outDir });
    expect(manifest.objects.map((o) => o.key)).toEqual(keys);
    await restore({ backupDir: outDir, databaseUrl: url2, store: target.store });
    expect(await target.keys()).toEqual(keys);
    for (const [i, key] of keys.entries()) {
      const got = await target.store.get(key);
      const chunks: Buffer[] = [];
      for await (const c of got!.body) chunks.push(c as Buffer);
      expect(Buffer.concat(chunks)).toEqual(Buffer.concat([jpeg, Buffer.from([i])]));
      expect(got!.contentType).toBe(i === 2 ? 'image/png' : 'image/jpeg');
    }
  } finally {
    await source.close();
    await target.close();
    const admin = new pg.Client({ connectionString: testDatabaseUrl() });
    await admin.connect();
    await admin.query(`DROP DATABASE IF EXISTS "${name2}" WITH (FORCE)`).catch(() => undefined);
    await admin.end();
  }
});

it('npm run restore refuses a folder that is not a backup, with a message and exit code 1', () => {
  const root = path.resolve(__dirname, '../../..');
  let status = 0;
  let stderr = '';
  try {
    execFileSync(path.join(root, 'node_modules/.bin/tsx'), ['scripts/restore.ts', tmp, '--database-url', targetUrl], {
      cwd: root,
      env: { ...process.env, STORAGE_DISK_DIR: path.join(tmp, 'unused-store') },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
  } catch (err) {
    status = (err as { status: number }).status;
    stderr = String((err as { stderr: Buffer }).stderr);
  }
  expect(status).toBe(1);
  expect(stderr).toMatch(/Restore failed: .*manifest\.json/);
});
