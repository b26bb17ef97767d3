/**
 * Where the outbox lives on the phone: IndexedDB through idb-keyval (one database of its own, one
 * store), one record per queued write. A write's photos are kept as the Blobs the browser gave
 * us, inside the record (IndexedDB stores Blobs as they are, never as base64 text); a multipart
 * body is kept as its text fields and those Blobs, and made into a FormData again at send time,
 * byte for byte the same, so a resend matches the first request's fingerprint on the server.
 *
 * Every record names the user who made it: a list is always asked for one user, so a second
 * person signed in on the same phone never sees nor sends another's writes.
 * Where there is no IndexedDB (native builds, tests without it) the records live in memory.
 */
import { createStore, del, entries, get, set, type UseStore } from 'idb-keyval';
import { isFormData } from '../api/client';
import type { Write } from '../api/mutations';

/** A write's body as it is kept: JSON, or the parts of a multipart form. */
export type KeptBody =
  | { kind: 'none' }
  | { kind: 'json'; value: unknown }
  | { kind: 'form'; fields: { name: string; value: string }[]; files: { name: string; fileName: string; type: string; blob: Blob }[] };

export interface KeptWrite {
  method: Write['method'];
  path: string;
  body: KeptBody;
  idempotencyKey?: string;
  ifMatch?: string;
}

/** waiting: not sent yet (or to be tried again); sending: on its way; attention: refused, the person decides. */
export type OutboxState = 'waiting' | 'sending' | 'attention';

/** What kind of work a write is, for the words on the screen and the screens it refreshes. */
export type OutboxKind = 'check' | 'finding' | 'fix' | 'reinspection' | 'change' | 'comment' | 'pin' | 'photos' | 'walk' | 'test' | 'other';

export interface OutboxItem {
  id: string;
  userId: string;
  jobId: string;
  /** Order of creation on this phone: writes go in this order. */
  seq: number;
  createdAt: string;
  kind: OutboxKind;
  /** Plain words for the sync screen: "Finding on unit IU-L3-04". */
  label: string;
  /**
   * The record the write changes (`finding:<id>`, `unit:<id>`): writes on one record go strictly in
   * order, and one that needs attention holds back the later ones on that record only.
   */
  record: string | null;
  /** Where what the server holds now can be read (GET, with its ETag), to show beside a refused write. */
  readPath: string | null;
  write: KeptWrite;
  state: OutboxState;
  attempts: number;
  /** Not tried again before this time (ms since 1970): backoff after network trouble. */
  notBefore: number;
  /**
   * The server's answer when it asked to wait (429 too many uploads, 5xx): the write is tried again
   * by itself at `notBefore`; shown on the sync screen so a stuck queue says why. None after a
   * plain network failure.
   */
  delay?: { status: number; message: string };
  /** The server's answer to a refused write. */
  refusal?: { status: number; id: string; message: string; fields?: Record<string, string> };
  /** What the server held when the write was refused (null: nothing, e.g. 404). */
  serverNow?: { data: unknown; etag: string | null; readAt: string } | null;
  /** Total bytes of the photos kept with the write. */
  bytes: number;
}

export interface OutboxStorage {
  list(userId: string): Promise<OutboxItem[]>;
  get(id: string): Promise<OutboxItem | undefined>;
  put(item: OutboxItem): Promise<void>;
  remove(id: string): Promise<void>;
}

/** A write as the outbox keeps it. Native FormData parts ({ uri, name, type }) are not kept. */
export function keepWrite(write: Write): KeptWrite {
  let body: KeptBody = { kind: 'none' };
  if (isFormData(write.body)) {
    const fields: { name: string; value: string }[] = [];
    const files: { name: string; fileName: string; type: string; blob: Blob }[] = [];
    write.body.forEach((value, name) => {
      if (typeof value === 'string') fields.push({ name, value });
      else files.push({ name, fileName: (value as File).name ?? 'photo', type: value.type, blob: value });
    });
    body = { kind: 'form', fields, files };
  } else if (write.body !== undefined) {
    body = { kind: 'json', value: write.body };
  }
  return { method: write.method, path: write.path, body, idempotencyKey: write.idempotencyKey, ifMatch: write.ifMatch };
}

/** The write again, ready for sendWrite: the same key, the same If-Match, the same bytes. */
export function writeOf(kept: KeptWrite): Write {
  let body: unknown;
  if (kept.body.kind === 'json') body = kept.body.value;
  if (kept.body.kind === 'form') {
    const form = new FormData();
    for (const f of kept.body.fields) form.append(f.name, f.value);
    for (const f of kept.body.files) form.append(f.name, f.blob, f.fileName);
    body = form;
  }
  return { method: kept.method, path: kept.path, body, idempotencyKey: kept.idempotencyKey, ifMatch: kept.ifMatch };
}

export function bytesOf(kept: KeptWrite): number {
  return kept.body.kind === 'form' ? kept.body.files.reduce((n, f) => n + f.blob.size, 0) : 0;
}

function isItem(v: unknown): v is OutboxItem {
  const o = v as Partial<OutboxItem> | null;
  return Boolean(o && typeof o.id === 'string' && typeof o.userId === 'string' && typeof o.seq === 'number' && o.write);
}

const bySeq = (a: OutboxItem, b: OutboxItem) => a.seq - b.seq;

/** The outbox in IndexedDB (database `trimout-outbox`, store `writes`). */
export function indexedDbStorage(dbName = 'trimout-outbox'): OutboxStorage {
  let store: UseStore | null = null;
  const s = () => (store ??= createStore(dbName, 'writes'));
  return {
    async list(userId) {
      const all = await entries<string, unknown>(s());
      return all.map(([, v]) => v).filter((v): v is OutboxItem => isItem(v) && v.userId === userId).sort(bySeq);
    },
    async get(id) {
      const v = await get<unknown>(id, s());
      return isItem(v) ? v : undefined;
    },
    put: (item) => set(item.id, item, s()),
    remove: (id) => del(id, s()),
  };
}

export function memoryOutboxStorage(): OutboxStorage {
  const map = new Map<string, OutboxItem>();
  return {
    list: async (userId) => [...map.values()].filter((v) => v.userId === userId).sort(bySeq),
    get: async (id) => map.get(id),
    put: async (item) => {
      map.set(item.id, item);
    },
    remove: async (id) => {
      map.delete(id);
    },
  };
}

/** IndexedDB where the platform has it; memory otherwise (native builds until a store is wired in). */
export function defaultOutboxStorage(): OutboxStorage {
  return typeof globalThis.indexedDB !== 'undefined' ? indexedDbStorage() : memoryOutboxStorage();
}
