/**
 * Backup and restore of everything Trimout keeps: the PostgreSQL database (pg_dump custom
 * format, restored with pg_restore) and the photo store (every object, read through the
 * ObjectStore: the S3 bucket or the development disk folder).
 *
 * A backup is one folder, backups/<timestamp>/ by default (git-ignored):
 *   database.dump     pg_dump -Fc of DATABASE_URL
 *   objects/<key>     each stored object's bytes
 *   manifest.json     when, from where, table row counts, per object its content type, size
 *                     and SHA-256 (restore checks them), and `uploads`: pending uploads (stored
 *                     objects whose write has not committed; older ones are orphans the server's
 *                     reaper removes) and objects no photo or plan references
 * Restore writes into a database that is empty (created when missing) and puts every object
 * back into the configured store; it refuses a database that already has Trimout's tables.
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { ListObjectsV2Command } from '@aws-sdk/client-s3';
import pg from 'pg';
import { DiskObjectStore } from '../../server/storage/disk';
import { S3ObjectStore } from '../../server/storage/s3';
import type { ObjectStore } from '../../server/storage/types';
import { keyReferencedSql, PENDING_UPLOAD_MAX_AGE_MINUTES } from '../../server/services/pendingUploads';
import { ensurePostgresInstalled } from './postgres';

export interface ObjectEntry {
  key: string;
  contentType: string;
  bytes: number;
  sha256: string;
}

/** What the backup found of uploads that no committed row references (server/services/pendingUploads.ts). */
export interface UploadsReport {
  /** Rows in pending_uploads: objects stored by a write that has not committed (yet). */
  pending: number;
  /** Of those, rows older than the reaper's age: writes that never committed (orphans). */
  pendingOrphans: number;
  /** Objects in the store that no photo row (full, thumbnail, print copy), marked copy or level's plan references (pending or not). */
  unreferencedObjects: number;
}

export interface Manifest {
  format: 'trimout-backup-1';
  createdAt: string;
  database: string;
  store: string;
  tables: Record<string, number>;
  objects: ObjectEntry[];
  /** Absent in backups made before pending uploads were recorded. */
  uploads?: UploadsReport;
}

/** pg_dump / pg_restore of the installed server version (scripts/lib/postgres.ts finds it). */
function pgTool(tool: 'pg_dump' | 'pg_restore'): string {
  try {
    const exe = path.join(ensurePostgresInstalled(), tool);
    if (fs.existsSync(exe)) return exe;
  } catch {
    // fall back to PATH
  }
  return tool;
}

/** The database name of a URL, for messages (never the password). */
export function databaseName(url: string): string {
  return decodeURIComponent(new URL(url).pathname.slice(1));
}

function withDatabase(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${encodeURIComponent(name)}`;
  return u.toString();
}

/** Every key in the store. */
export async function listObjectKeys(store: ObjectStore): Promise<string[]> {
  if (store instanceof DiskObjectStore) {
    const root = path.join(store.root, 'objects');
    const walk = (dir: string, prefix: string): string[] =>
      fs.existsSync(dir)
        ? fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
            e.isDirectory() ? walk(path.join(dir, e.name), `${prefix}${e.name}/`) : e.name.endsWith('.tmp') ? [] : [`${prefix}${e.name}`],
          )
        : [];
    return walk(root, '').sort();
  }
  if (store instanceof S3ObjectStore) {
    const keys: string[] = [];
    let token: string | undefined;
    do {
      const page = await store.client.send(new ListObjectsV2Command({ Bucket: store.bucket, ContinuationToken: token }));
      for (const o of page.Contents ?? []) if (o.Key) keys.push(o.Key);
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (token);
    return keys.sort();
  }
  throw new Error(`Cannot list the objects of ${store.location}.`);
}

async function readAll(stream: NodeJS.ReadableStream): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk as string));
  return Buffer.concat(chunks);
}

/** Row counts of the app's tables (public schema), for the manifest and for checks. */
export async function tableCounts(databaseUrl: string): Promise<Record<string, number>> {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    const { rows } = await client.query<{ name: string }>(
      `SELECT table_name AS name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY 1`,
    );
    const out: Record<string, number> = {};
    for (const { name } of rows) {
      const res = await client.query<{ n: string }>(`SELECT count(*) AS n FROM "${name.replace(/"/g, '""')}"`);
      out[name] = Number(res.rows[0]!.n);
    }
    return out;
  } finally {
    await client.end();
  }
}

/** Pending uploads, and which of `keys` no photo row or level plan references. */
export async function uploadsReport(databaseUrl: string, keys: readonly string[]): Promise<UploadsReport> {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    const pending = await client.query<{ pending: string; orphans: string }>(
      `SELECT count(*) AS pending, count(*) FILTER (WHERE created_at < now() - make_interval(mins => $1)) AS orphans FROM pending_uploads`,
      [PENDING_UPLOAD_MAX_AGE_MINUTES],
    );
    const referenced = await client.query<{ key: string }>(
      `SELECT k AS key FROM unnest($1::text[]) AS k WHERE ${keyReferencedSql('k')}`,
      [keys],
    );
    return {
      pending: Number(pending.rows[0]!.pending),
      pendingOrphans: Number(pending.rows[0]!.orphans),
      unreferencedObjects: keys.length - referenced.rows.length,
    };
  } finally {
    await client.end();
  }
}

export function timestampFolder(now = new Date()): string {
  return now.toISOString().replace(/[:]/g, '-').replace(/\..+$/, 'Z');
}

export async function backup(options: { databaseUrl: string; store: ObjectStore; outDir: string; log?: (m: string) => void }): Promise<Manifest> {
  const log = options.log ?? (() => undefined);
  const outDir = path.resolve(options.outDir);
  if (fs.existsSync(outDir) && fs.readdirSync(outDir).length > 0) throw new Error(`${outDir} is not empty: choose a new folder.`);
  fs.mkdirSync(path.join(outDir, 'objects'), { recursive: true, mode: 0o700 });

  log(`Dumping database ${databaseName(options.databaseUrl)} …`);
  const tables = await tableCounts(options.databaseUrl);
  execFileSync(pgTool('pg_dump'), ['-Fc', '--no-owner', '--no-privileges', '-f', path.join(outDir, 'database.dump'), '-d', options.databaseUrl], {
    stdio: ['ignore', 'inherit', 'inherit'],
  });

  log(`Copying photos from ${options.store.location} …`);
  const objects: ObjectEntry[] = [];
  for (const key of await listObjectKeys(options.store)) {
    const found = await options.store.get(key);
    if (!found) continue; // deleted meanwhile
    const body = await readAll(found.body);
    const file = path.join(outDir, 'objects', ...key.split('/'));
    fs.mkdirSync(path.dirname(file), { recursive: true, mode: 0o700 });
    fs.writeFileSync(file, body, { mode: 0o600 });
    objects.push({ key, contentType: found.contentType, bytes: body.length, sha256: createHash('sha256').update(body).digest('hex') });
  }
  const uploads = await uploadsReport(options.databaseUrl, objects.map((o) => o.key));
  const manifest: Manifest = {
    format: 'trimout-backup-1',
    createdAt: new Date().toISOString(),
    database: databaseName(options.databaseUrl),
    store: options.store.location,
    tables,
    objects,
    uploads,
  };
  fs.writeFileSync(path.join(outDir, 'manifest.json'), `${JSON.stringify(manifest, null, 2)}\n`, { mode: 0o600 });
  log(`Backup written to ${outDir}: ${Object.values(tables).reduce((a, b) => a + b, 0)} rows in ${Object.keys(tables).length} tables, ${objects.length} objects.`);
  log(
    `Uploads: ${uploads.pending} pending (${uploads.pendingOrphans} older than ${PENDING_UPLOAD_MAX_AGE_MINUTES} minutes: orphans the server's reaper removes), ${uploads.unreferencedObjects} objects referenced by no photo or plan.`,
  );
  return manifest;
}

/** Creates the database when missing; refuses one that already holds tables. */
async function ensureEmptyDatabase(databaseUrl: string): Promise<void> {
  const name = databaseName(databaseUrl);
  const admin = new pg.Client({ connectionString: withDatabase(databaseUrl, 'postgres') });
  await admin.connect();
  try {
    const exists = await admin.query('SELECT 1 FROM pg_database WHERE datname = $1', [name]);
    if (exists.rowCount === 0) await admin.query(`CREATE DATABASE "${name.replace(/"/g, '""')}"`);
  } finally {
    await admin.end();
  }
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    const { rows } = await client.query<{ n: string }>(
      `SELECT count(*) AS n FROM information_schema.tables WHERE table_schema NOT IN ('pg_catalog', 'information_schema')`,
    );
    if (Number(rows[0]!.n) > 0) {
      throw new Error(`Database ${name} is not empty: restore into a new (or empty) database, then point DATABASE_URL at it.`);
    }
  } finally {
    await client.end();
  }
}

export async function restore(options: { backupDir: string; databaseUrl: string; store: ObjectStore; log?: (m: string) => void }): Promise<Manifest> {
  const log = options.log ?? (() => undefined);
  const dir = path.resolve(options.backupDir);
  const manifest = JSON.parse(fs.readFileSync(path.join(dir, 'manifest.json'), 'utf8')) as Manifest;
  if (manifest.format !== 'trimout-backup-1') throw new Error(`${dir} is not a Trimout backup.`);

  // Check every object before anything is written.
  const bodies = manifest.objects.map((o) => {
    const body = fs.readFileSync(path.join(dir, 'objects', ...o.key.split('/')));
    if (body.length !== o.bytes || createHash('sha256').update(body).digest('hex') !== o.sha256) {
      throw new Error(`The backup's copy of ${o.key} is damaged (size or SHA-256 differs from the manifest).`);
    }
    return body;
  });

  await ensureEmptyDatabase(options.databaseUrl);
  log(`Restoring database into ${databaseName(options.databaseUrl)} …`);
  execFileSync(pgTool('pg_restore'), ['--no-owner', '--no-privileges', '--exit-on-error', '-d', options.databaseUrl, path.join(dir, 'database.dump')], {
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  const counts = await tableCounts(options.databaseUrl);
  const differ = Object.keys(manifest.tables).filter((t) => counts[t] !== manifest.tables[t]);
  if (differ.length > 0) throw new Error(`Restored row counts differ from the backup in: ${differ.join(', ')}.`);

  log(`Restoring ${manifest.objects.length} objects into ${options.store.location} …`);
  for (const [i, o] of manifest.objects.entries()) await options.store.put(o.key, bodies[i]!, o.contentType);
  log('Restore finished.');
  return manifest;
}
