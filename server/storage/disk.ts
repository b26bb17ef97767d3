/**
 * ObjectStore on a plain folder: the fallback used only when the local S3 fake cannot run
 * (never in production). Bodies live under `<root>/objects/<key>`, their content types under
 * `<root>/types/<key>`; writes go to a temporary file first and are renamed into place, so a
 * reader never sees half an object.
 */
import { randomUUID } from 'node:crypto';
import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import { assertObjectKey, type ObjectStore, type StoredObject } from './types';

function isNotFound(err: unknown): boolean {
  return typeof err === 'object' && err !== null && (err as NodeJS.ErrnoException).code === 'ENOENT';
}

export class DiskObjectStore implements ObjectStore {
  readonly root: string;
  readonly location: string;

  constructor(root: string) {
    this.root = path.resolve(root);
    this.location = `disk:${this.root}`;
  }

  private paths(key: string) {
    const safe = assertObjectKey(key);
    return {
      body: path.join(this.root, 'objects', ...safe.split('/')),
      type: path.join(this.root, 'types', ...safe.split('/')),
    };
  }

  private async writeAtomically(file: string, data: Buffer | string): Promise<void> {
    await fs.mkdir(path.dirname(file), { recursive: true, mode: 0o700 });
    const tmp = `${file}.${randomUUID()}.tmp`;
    try {
      await fs.writeFile(tmp, data, { mode: 0o600 });
      await fs.rename(tmp, file);
    } catch (err) {
      await fs.rm(tmp, { force: true });
      throw err;
    }
  }

  async put(key: string, body: Buffer, contentType: string): Promise<void> {
    const p = this.paths(key);
    await this.writeAtomically(p.type, contentType);
    await this.writeAtomically(p.body, body);
  }

  async get(key: string): Promise<StoredObject | null> {
    const p = this.paths(key);
    try {
      const [stat, contentType] = await Promise.all([fs.stat(p.body), fs.readFile(p.type, 'utf8')]);
      return { body: createReadStream(p.body), length: stat.size, contentType };
    } catch (err) {
      if (isNotFound(err)) return null;
      throw err;
    }
  }

  async delete(keys: readonly string[]): Promise<void> {
    for (const key of keys) {
      const p = this.paths(key);
      await fs.rm(p.body, { force: true });
      await fs.rm(p.type, { force: true });
    }
  }

  async exists(key: string): Promise<boolean> {
    try {
      return (await fs.stat(this.paths(key).body)).isFile();
    } catch (err) {
      if (isNotFound(err)) return false;
      throw err;
    }
  }
}
