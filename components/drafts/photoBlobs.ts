/**
 * Photos of a half-filled finding, kept as blobs in IndexedDB (too big for the JSON store):
 * a photo the inspector took survives a reload or a browser the phone killed. Keyed by the
 * finding draft's store key. Where there is no IndexedDB (native builds, tests) nothing is kept
 * and nothing fails.
 */

export interface KeptPhoto {
  key: string;
  name: string;
  type: string;
  blob: Blob;
}

const DB = 'trimout-drafts';
const STORE = 'photos';

type IdbFactory = {
  open(name: string, version: number): {
    result: IdbDatabase;
    error: unknown;
    onupgradeneeded: (() => void) | null;
    onsuccess: (() => void) | null;
    onerror: (() => void) | null;
  };
};
type IdbRequest<T> = { result: T; onsuccess: (() => void) | null; onerror: (() => void) | null };
type IdbDatabase = {
  objectStoreNames: { contains(name: string): boolean };
  createObjectStore(name: string): unknown;
  transaction(store: string, mode: 'readonly' | 'readwrite'): {
    objectStore(name: string): { get(key: string): IdbRequest<unknown>; put(value: unknown, key: string): IdbRequest<unknown>; delete(key: string): IdbRequest<unknown> };
  };
};

let opening: Promise<IdbDatabase | null> | null = null;

function db(): Promise<IdbDatabase | null> {
  const factory = (globalThis as { indexedDB?: IdbFactory }).indexedDB;
  if (!factory) return Promise.resolve(null);
  opening ??= new Promise((resolve) => {
    try {
      const req = factory.open(DB, 1);
      req.onupgradeneeded = () => {
        if (!req.result.objectStoreNames.contains(STORE)) req.result.createObjectStore(STORE);
      };
      req.onsuccess = () => resolve(req.result);
      req.onerror = () => resolve(null);
    } catch {
      resolve(null);
    }
  });
  return opening;
}

function run<T>(mode: 'readonly' | 'readwrite', act: (store: ReturnType<ReturnType<IdbDatabase['transaction']>['objectStore']>) => IdbRequest<T>): Promise<T | null> {
  return db().then(
    (d) =>
      new Promise<T | null>((resolve) => {
        if (!d) return resolve(null);
        try {
          const req = act(d.transaction(STORE, mode).objectStore(STORE));
          req.onsuccess = () => resolve(req.result);
          req.onerror = () => resolve(null);
        } catch {
          resolve(null);
        }
      }),
  );
}

export function keepPhotos(draftKey: string, photos: readonly KeptPhoto[]): Promise<unknown> {
  return photos.length ? run('readwrite', (s) => s.put(photos.map((p) => ({ ...p })), draftKey)) : dropPhotos(draftKey);
}

export async function keptPhotos(draftKey: string): Promise<KeptPhoto[]> {
  const found = await run<unknown>('readonly', (s) => s.get(draftKey));
  return Array.isArray(found) ? (found as KeptPhoto[]).filter((p) => p && typeof p.key === 'string' && p.blob) : [];
}

export function dropPhotos(draftKey: string): Promise<unknown> {
  return run('readwrite', (s) => s.delete(draftKey));
}
