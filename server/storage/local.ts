/**
 * The local S3 fake for development and tests: s3rver on 127.0.0.1, its data in a folder
 * (`.data/s3` for `npm start`, a temporary folder in tests), the bucket made at start.
 * Only when s3rver itself cannot run (the package fails to load or to serve) does this fall
 * back to a plain-disk store in the same folder, and it says so in the log. A port already in
 * use is a configuration error, not a reason to fall back: it stops with a clear message.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import fs from 'node:fs/promises';
import path from 'node:path';
import { DiskObjectStore } from './disk';
import { S3ObjectStore } from './s3';
import type { ObjectStore } from './types';

/** s3rver's fixed account: it checks request signatures against this key pair. */
export const FAKE_S3_ACCESS_KEY_ID = 'S3RVER';
export const FAKE_S3_SECRET_ACCESS_KEY = 'S3RVER';
export const FAKE_S3_REGION = 'us-east-1';

/** The part of s3rver's API used here (the package ships no types). */
interface S3rverInstance {
  /** Makes the configured buckets in its folder. */
  configureBuckets(): Promise<unknown>;
  /** The Koa request listener (s3rver is a Koa app). */
  callback(): http.RequestListener;
}
type S3rverConstructor = new (options: {
  address: string;
  port: number;
  directory: string;
  silent: boolean;
  configureBuckets: { name: string }[];
  allowMismatchedSignatures: boolean;
  vhostBuckets: boolean;
}) => S3rverInstance;

export interface LocalObjectStore {
  kind: 's3rver' | 'disk';
  /** http://127.0.0.1:<port> for s3rver; undefined for the disk fallback. */
  endpoint?: string;
  bucket: string;
  /** The folder that holds the data. */
  directory: string;
  store: ObjectStore;
  /** Environment that points the server at this store: S3_* for s3rver, STORAGE_DISK_DIR for the fallback. */
  env: Record<string, string>;
  close(): Promise<void>;
}

export interface LocalObjectStoreOptions {
  directory: string;
  /** 0 picks a free port (tests). */
  port: number;
  bucket: string;
  host?: string;
  log?: (message: string) => void;
  /** Tests only: pretend s3rver cannot be loaded, to exercise the fallback. */
  loadS3rver?: () => S3rverConstructor;
}

function defaultLoad(): S3rverConstructor {
  // require, not import: s3rver is CommonJS without types; loaded only when the fake is wanted.
  return require('s3rver') as S3rverConstructor;
}

export async function startLocalObjectStore(options: LocalObjectStoreOptions): Promise<LocalObjectStore> {
  const host = options.host ?? '127.0.0.1';
  const log = options.log ?? ((m: string) => console.log(m));
  const directory = path.resolve(options.directory);
  await fs.mkdir(directory, { recursive: true, mode: 0o700 });

  let server: http.Server;
  let address: AddressInfo;
  try {
    const S3rver = (options.loadS3rver ?? defaultLoad)();
    const fake = new S3rver({
      address: host,
      port: options.port,
      directory,
      silent: true,
      configureBuckets: [{ name: options.bucket }],
      allowMismatchedSignatures: false,
      vhostBuckets: false,
    });
    await fake.configureBuckets();
    // Our own listener rather than s3rver's run(), which never settles when listen fails.
    server = http.createServer(fake.callback());
    address = await new Promise<AddressInfo>((resolve, reject) => {
      server.once('error', reject);
      server.listen(options.port, host, () => {
        server.off('error', reject);
        resolve(server.address() as AddressInfo);
      });
    });
  } catch (err) {
    if ((err as NodeJS.ErrnoException | undefined)?.code === 'EADDRINUSE') {
      throw new Error(
        `The local S3 fake cannot listen on ${host}:${options.port}: the port is in use. Set S3_PORT to a free port, or S3_ENDPOINT to a running S3-compatible service.`,
      );
    }
    const reason = err instanceof Error ? err.message : String(err);
    const diskRoot = path.join(directory, 'disk-fallback');
    log(`the local S3 fake (s3rver) could not run (${reason}); photos are stored on plain disk in ${diskRoot} instead.`);
    const store = new DiskObjectStore(diskRoot);
    return {
      kind: 'disk',
      bucket: options.bucket,
      directory: diskRoot,
      store,
      env: { STORAGE_DISK_DIR: diskRoot },
      close: async () => undefined,
    };
  }

  const endpoint = `http://${host}:${address.port}`;
  const store = new S3ObjectStore({
    bucket: options.bucket,
    endpoint,
    region: FAKE_S3_REGION,
    accessKeyId: FAKE_S3_ACCESS_KEY_ID,
    secretAccessKey: FAKE_S3_SECRET_ACCESS_KEY,
    forcePathStyle: true,
  });
  await store.ensureBucket();
  return {
    kind: 's3rver',
    endpoint,
    bucket: options.bucket,
    directory,
    store,
    env: {
      S3_ENDPOINT: endpoint,
      S3_BUCKET: options.bucket,
      S3_REGION: FAKE_S3_REGION,
      S3_ACCESS_KEY_ID: FAKE_S3_ACCESS_KEY_ID,
      S3_SECRET_ACCESS_KEY: FAKE_S3_SECRET_ACCESS_KEY,
      S3_FORCE_PATH_STYLE: 'true',
    },
    close: async () => {
      store.close();
      const closed = new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeAllConnections();
      await closed;
    },
  };
}
