/**
 * Object storage for photos: one small interface with two implementations, S3 (through
 * @aws-sdk/client-s3, against AWS or any S3-compatible endpoint such as the local s3rver fake)
 * and a plain-disk fallback used only when the fake cannot run.
 *
 * Keys are made by the server (`photos/<uuid>.jpg`, `photos/<uuid>-thumb.jpg`); a file name
 * sent by a client never reaches a key. Both implementations still refuse any key outside a
 * strict pattern, so a bug upstream cannot turn into a path traversal.
 */
import type { Readable } from 'node:stream';

export interface StoredObject {
  body: Readable;
  /** Bytes in the body. */
  length: number;
  contentType: string;
}

export interface ObjectStore {
  /** Where the objects live, for logs (`s3://bucket at http://127.0.0.1:4569`, `disk:/path`). */
  readonly location: string;
  put(key: string, body: Buffer, contentType: string): Promise<void>;
  /** The object, or null when there is no object under that key. */
  get(key: string): Promise<StoredObject | null>;
  /** Deletes every key given; keys that do not exist are not an error. */
  delete(keys: readonly string[]): Promise<void>;
  exists(key: string): Promise<boolean>;
}

/** Lower-case letters, digits, `-`, `_`, `.` in `/`-separated segments; no `.`/`..` segment, no leading `/`. */
const KEY_PATTERN = /^(?:[a-z0-9][a-z0-9_.-]{0,127}\/){0,4}[a-z0-9][a-z0-9_.-]{0,127}$/;

export class InvalidObjectKeyError extends Error {
  constructor(key: string) {
    super(`Not a valid object key: ${JSON.stringify(key.slice(0, 200))}`);
    this.name = 'InvalidObjectKeyError';
  }
}

export function assertObjectKey(key: string): string {
  if (typeof key !== 'string' || !KEY_PATTERN.test(key) || key.split('/').some((s) => s === '.' || s === '..')) {
    throw new InvalidObjectKeyError(String(key));
  }
  return key;
}
