/**
 * A private PostgreSQL cluster in a git-ignored folder, listening on 127.0.0.1 only (TCP, no
 * socket file). PostgreSQL refuses to run as root: run as root, every PostgreSQL binary runs as
 * the unprivileged `postgres` OS user that Debian's package creates.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { aptInstall, isRoot, runSync, say, tryRun } from './run';

export interface Cluster {
  dataDir: string;
  port: number;
  user: string;
  url(database: string): string;
  stop(): void;
}

const PG_USER = 'trimout';

function findBinDir(): string | null {
  const base = '/usr/lib/postgresql';
  if (!fs.existsSync(base)) return null;
  const versions = fs
    .readdirSync(base)
    .filter((v) => fs.existsSync(path.join(base, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a));
  return versions[0] ? path.join(base, versions[0], 'bin') : null;
}

export function ensurePostgresInstalled(): string {
  let bin = findBinDir();
  if (!bin) {
    aptInstall(['postgresql']);
    bin = findBinDir();
    if (!bin) throw new Error('PostgreSQL was installed but initdb was not found under /usr/lib/postgresql.');
  }
  return bin;
}

/** Runs a PostgreSQL binary, as `postgres` when we are root. */
function pgRun(bin: string, tool: string, args: string[], quiet = true) {
  const exe = path.join(bin, tool);
  if (isRoot) return runSync('runuser', ['-u', 'postgres', '--', exe, ...args], { cwd: '/', quiet });
  return runSync(exe, args, { quiet });
}

function pgCanReach(dir: string): boolean {
  if (!isRoot) return true;
  return tryRun('runuser', ['-u', 'postgres', '--', 'test', '-x', dir, '-a', '-r', dir], { cwd: '/' });
}

/**
 * Where the cluster lives: the requested folder, unless (as root) the `postgres` user cannot
 * reach its parent; then a folder under the system temp dir, said out loud.
 */
function placeDataDir(requested: string): string {
  const parent = path.dirname(requested);
  fs.mkdirSync(parent, { recursive: true });
  if (pgCanReach(parent)) return requested;
  const alt = path.join(
    os.tmpdir(),
    `trimout-pg-${createHash('sha256').update(requested).digest('hex').slice(0, 12)}`,
    path.basename(requested),
  );
  say(`the postgres user cannot reach ${parent}; keeping the database in ${alt} instead (set PGDATA to choose).`);
  fs.mkdirSync(path.dirname(alt), { recursive: true, mode: 0o755 });
  return alt;
}

function isRunning(bin: string, dataDir: string): boolean {
  if (!fs.existsSync(path.join(dataDir, 'postmaster.pid'))) return false;
  try {
    pgRun(bin, 'pg_ctl', ['-D', dataDir, 'status']);
    return true;
  } catch {
    return false;
  }
}

export async function startCluster(options: {
  dataDir: string;
  port: number;
  throwaway?: boolean;
}): Promise<Cluster> {
  const bin = ensurePostgresInstalled();
  const dataDir = placeDataDir(path.resolve(process.env.PGDATA ?? options.dataDir));
  if (!fs.existsSync(path.join(dataDir, 'PG_VERSION'))) {
    say(`creating a PostgreSQL cluster in ${dataDir} ...`);
    fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 });
    if (isRoot) runSync('chown', ['-R', 'postgres:postgres', dataDir]);
    pgRun(bin, 'initdb', ['-D', dataDir, '--auth=trust', `--username=${PG_USER}`, '--encoding=UTF8', '--locale=C.UTF-8']);
    const conf = [
      '',
      '# Trimout: private cluster on loopback, TCP only',
      "listen_addresses = '127.0.0.1'",
      `port = ${options.port}`,
      "unix_socket_directories = ''",
      'max_connections = 100',
      ...(options.throwaway ? ['fsync = off', 'synchronous_commit = off', 'full_page_writes = off'] : []),
      '',
    ].join('\n');
    fs.appendFileSync(path.join(dataDir, 'postgresql.conf'), conf);
  }
  const log = path.join(dataDir, 'server.log');
  if (!isRunning(bin, dataDir)) {
    pgRun(bin, 'pg_ctl', ['-D', dataDir, '-l', log, '-w', '-t', '60', '-o', `-p ${options.port}`, 'start']);
  }
  const cluster: Cluster = {
    dataDir,
    port: options.port,
    user: PG_USER,
    url: (database) => `postgres://${PG_USER}@127.0.0.1:${options.port}/${database}`,
    stop: () => {
      if (isRunning(bin, dataDir)) pgRun(bin, 'pg_ctl', ['-D', dataDir, '-m', 'fast', '-w', 'stop']);
    },
  };
  return cluster;
}

export async function ensureDatabase(cluster: Cluster, name: string): Promise<void> {
  const client = new pg.Client({ connectionString: cluster.url('postgres') });
  await client.connect();
  try {
    const found = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', [name]);
    if (found.rowCount === 0) await client.query(`CREATE DATABASE "${name.replace(/"/g, '')}"`);
  } finally {
    await client.end();
  }
}

export function removeCluster(dataDir: string) {
  fs.rmSync(dataDir, { recursive: true, force: true });
}
