/**
 * Object storage, made from the environment:
 * - STORAGE_DISK_DIR set (development only, written by `npm start` when s3rver cannot run):
 *   the plain-disk fallback.
 * - otherwise S3 through @aws-sdk/client-s3 at S3_ENDPOINT (outside production it defaults to
 *   the local fake at http://127.0.0.1:S3_PORT with s3rver's key pair); in production an unset
 *   S3_ENDPOINT means AWS itself and unset keys mean the SDK's default credential chain.
 */
import type { Env } from '../env';
import { DiskObjectStore } from './disk';
import { FAKE_S3_ACCESS_KEY_ID, FAKE_S3_REGION, FAKE_S3_SECRET_ACCESS_KEY } from './local';
import { S3ObjectStore } from './s3';
import type { ObjectStore } from './types';

export type { ObjectStore, StoredObject } from './types';
export { assertObjectKey, InvalidObjectKeyError } from './types';
export { DiskObjectStore } from './disk';
export { S3ObjectStore, type S3StoreConfig } from './s3';
export { startLocalObjectStore, type LocalObjectStore } from './local';

type StorageEnv = Pick<
  Env,
  | 'NODE_ENV'
  | 'S3_ENDPOINT'
  | 'S3_BUCKET'
  | 'S3_REGION'
  | 'S3_ACCESS_KEY_ID'
  | 'S3_SECRET_ACCESS_KEY'
  | 'S3_FORCE_PATH_STYLE'
  | 'S3_PORT'
  | 'STORAGE_DISK_DIR'
>;

export function createObjectStore(env: StorageEnv): ObjectStore {
  const production = env.NODE_ENV === 'production';
  if (env.STORAGE_DISK_DIR) {
    if (production) throw new Error('Trimout cannot start: STORAGE_DISK_DIR is for development only; set S3_* in production.');
    return new DiskObjectStore(env.STORAGE_DISK_DIR);
  }
  if (Boolean(env.S3_ACCESS_KEY_ID) !== Boolean(env.S3_SECRET_ACCESS_KEY)) {
    throw new Error('Trimout cannot start: set both S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY, or neither.');
  }
  const useLocalFake = !production && !env.S3_ENDPOINT;
  const endpoint = env.S3_ENDPOINT ?? (useLocalFake ? `http://127.0.0.1:${env.S3_PORT}` : undefined);
  return new S3ObjectStore({
    bucket: env.S3_BUCKET,
    endpoint,
    region: env.S3_REGION ?? FAKE_S3_REGION,
    accessKeyId: env.S3_ACCESS_KEY_ID ?? (useLocalFake ? FAKE_S3_ACCESS_KEY_ID : undefined),
    secretAccessKey: env.S3_SECRET_ACCESS_KEY ?? (useLocalFake ? FAKE_S3_SECRET_ACCESS_KEY : undefined),
    forcePathStyle: env.S3_FORCE_PATH_STYLE ?? Boolean(endpoint),
  });
}
