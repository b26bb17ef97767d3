/**
 * Object storage in tests: each test file starts its own local S3 fake (s3rver on 127.0.0.1,
 * a free port, data in a temporary folder that close() removes) with the photos bucket made,
 * and gets an ObjectStore on it. `keys()` lists what is stored, to check that a refused
 * upload left nothing behind.
 */
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { ListObjectsV2Command } from '@aws-sdk/client-s3';
import { startLocalObjectStore } from '../../server/storage/local';
import { S3ObjectStore } from '../../server/storage/s3';
import type { ObjectStore } from '../../server/storage/types';

export interface FakeS3 {
  /** http://127.0.0.1:<port>, or undefined when s3rver could not run and the disk fallback is in use. */
  endpoint: string | undefined;
  bucket: string;
  store: ObjectStore;
  /** Every stored key, sorted. */
  keys(): Promise<string[]>;
  close(): Promise<void>;
}

async function walk(dir: string, prefix = ''): Promise<string[]> {
  const entries = await fs.readdir(dir, { withFileTypes: true }).catch(() => []);
  const out: string[] = [];
  for (const e of entries) {
    const rel = prefix ? `${prefix}/${e.name}` : e.name;
    if (e.isDirectory()) out.push(...(await walk(path.join(dir, e.name), rel)));
    else out.push(rel);
  }
  return out;
}

export async function startFakeS3(options: { bucket?: string } = {}): Promise<FakeS3> {
  const directory = await fs.mkdtemp(path.join(os.tmpdir(), 'trimout-s3-'));
  const local = await startLocalObjectStore({
    directory,
    port: 0,
    bucket: options.bucket ?? 'trimout-photos',
    log: (m) => console.warn(m),
  });
  const keys = async (): Promise<string[]> => {
    if (local.store instanceof S3ObjectStore) {
      const s3 = local.store;
      const found: string[] = [];
      let token: string | undefined;
      do {
        const page = await s3.client.send(new ListObjectsV2Command({ Bucket: s3.bucket, ContinuationToken: token }));
        for (const o of page.Contents ?? []) if (o.Key) found.push(o.Key);
        token = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (token);
      return found.sort();
    }
    return (await walk(path.join(local.directory, 'objects'))).sort();
  };
  return {
    endpoint: local.endpoint,
    bucket: local.bucket,
    store: local.store,
    keys,
    close: async () => {
      await local.close();
      await fs.rm(directory, { recursive: true, force: true });
    },
  };
}
