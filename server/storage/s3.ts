/**
 * ObjectStore on S3 (or any S3-compatible endpoint) through @aws-sdk/client-s3.
 * The bucket is private: objects are written without any ACL and read back only by the server,
 * which serves them through authorized routes.
 */
import type { Readable } from 'node:stream';
import {
  CreateBucketCommand,
  DeleteObjectsCommand,
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { serviceUnavailable } from '../errors';
import { assertObjectKey, type ObjectStore, type StoredObject } from './types';

export interface S3StoreConfig {
  bucket: string;
  /** Omit for AWS itself; set for S3-compatible services and the local fake. */
  endpoint?: string;
  region: string;
  /** Omit both to use the SDK's default credential chain (instance roles, env, profile). */
  accessKeyId?: string;
  secretAccessKey?: string;
  /** Path-style URLs (`http://host/bucket/key`), needed by most S3-compatible services. */
  forcePathStyle: boolean;
}

/** S3 allows 1000 keys per DeleteObjects request. */
const DELETE_BATCH = 1000;

function isMissing(err: unknown): boolean {
  if (!(err instanceof S3ServiceException)) return false;
  return err.name === 'NoSuchKey' || err.name === 'NotFound' || err.$metadata.httpStatusCode === 404;
}

/**
 * The store gave no HTTP answer at all (refused, reset, timed out, name not found): an outage,
 * answered 503. The SDK puts `$metadata` on every error of `send()`; a service error has an
 * HTTP status in it, a network failure has none (after the SDK's own retries).
 */
export function isStoreUnreachable(err: unknown): boolean {
  if (err instanceof S3ServiceException) return false;
  const meta = (err as { $metadata?: { httpStatusCode?: number } } | null)?.$metadata;
  return Boolean(meta) && meta!.httpStatusCode === undefined;
}

export class S3ObjectStore implements ObjectStore {
  readonly client: S3Client;
  readonly bucket: string;
  readonly location: string;

  constructor(config: S3StoreConfig) {
    this.bucket = config.bucket;
    this.location = `s3://${config.bucket}${config.endpoint ? ` at ${config.endpoint}` : ` (AWS, ${config.region})`}`;
    this.client = new S3Client({
      region: config.region,
      endpoint: config.endpoint,
      forcePathStyle: config.forcePathStyle,
      credentials:
        config.accessKeyId && config.secretAccessKey
          ? { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey }
          : undefined,
      // Checksums only where the S3 API requires them: S3-compatible services (the local fake
      // among them) do not all understand the SDK's default flexible checksums.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      maxAttempts: 3,
    });
  }

  /** Creates the bucket when it does not exist (the local fake; real buckets are made by operations). */
  async ensureBucket(): Promise<void> {
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.bucket }));
    } catch (err) {
      if (!isMissing(err)) throw err;
      await this.client.send(new CreateBucketCommand({ Bucket: this.bucket }));
    }
  }

  async put(key: string, body: Buffer, contentType: string): Promise<void> {
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.bucket,
        Key: assertObjectKey(key),
        Body: body,
        ContentType: contentType,
        ContentLength: body.length,
      }),
    );
  }

  async get(key: string): Promise<StoredObject | null> {
    try {
      const out = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: assertObjectKey(key) }));
      if (!out.Body) return null;
      return {
        // In Node.js the SDK's body is an http.IncomingMessage (a Readable) with SDK mixins.
        body: out.Body as unknown as Readable,
        length: out.ContentLength ?? 0,
        contentType: out.ContentType ?? 'application/octet-stream',
      };
    } catch (err) {
      if (isMissing(err)) return null;
      if (isStoreUnreachable(err)) throw serviceUnavailable('Photo storage cannot be reached just now. Try again in a moment.');
      throw err;
    }
  }

  async delete(keys: readonly string[]): Promise<void> {
    const unique = Array.from(new Set(keys.map(assertObjectKey)));
    for (let i = 0; i < unique.length; i += DELETE_BATCH) {
      const batch = unique.slice(i, i + DELETE_BATCH);
      const out = await this.client.send(
        new DeleteObjectsCommand({
          Bucket: this.bucket,
          Delete: { Objects: batch.map((Key) => ({ Key })), Quiet: true },
        }),
      );
      const failed = (out.Errors ?? []).filter((e) => e.Code !== 'NoSuchKey');
      if (failed.length) {
        throw new Error(`Could not delete ${failed.length} object(s): ${failed.map((e) => `${e.Key} (${e.Code})`).join(', ')}`);
      }
    }
  }

  async exists(key: string): Promise<boolean> {
    try {
      await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: assertObjectKey(key) }));
      return true;
    } catch (err) {
      if (isMissing(err)) return false;
      throw err;
    }
  }

  close(): void {
    this.client.destroy();
  }
}
