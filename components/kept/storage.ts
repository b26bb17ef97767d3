/**
 * Where a kept level lives on the device: IndexedDB through idb-keyval, two stores of our own
 * (the persisted query cache with the list of kept levels, and the photo thumbnails as Blobs:
 * Blobs do not survive a JSON persister, IndexedDB stores them as they are).
 * Where there is no IndexedDB (native builds, jest) a store in memory stands in, so nothing fails
 * and nothing survives a reload.
 */
import { clear, createStore, del, get, keys, set, type UseStore } from 'idb-keyval';

export interface KeyValueStore {
  get<T>(key: string): Promise<T | undefined>;
  set(key: string, value: unknown): Promise<void>;
  del(key: string): Promise<void>;
  keys(): Promise<string[]>;
  clear(): Promise<void>;
}

function idbStore(dbName: string, storeName: string): KeyValueStore {
  let store: UseStore | null = null;
  const opened = () => (store ??= createStore(dbName, storeName));
  return {
    get: (key) => get(key, opened()),
    set: (key, value) => set(key, value, opened()),
    del: (key) => del(key, opened()),
    keys: async () => (await keys(opened())).map(String),
    clear: () => clear(opened()),
  };
}

export function memoryStore(): KeyValueStore {
  const map = new Map<string, unknown>();
  return {
    get: async <T,>(key: string) => map.get(key) as T | undefined,
    set: async (key, value) => void map.set(key, value),
    del: async (key) => void map.delete(key),
    keys: async () => [...map.keys()],
    clear: async () => map.clear(),
  };
}

export function hasIndexedDb(): boolean {
  return typeof globalThis !== 'undefined' && typeof (globalThis as { indexedDB?: unknown }).indexedDB !== 'undefined';
}

export const KEPT_DB = 'trimout-kept';
export const KEPT_PHOTOS_DB = 'trimout-kept-photos';

let stores: { cache: KeyValueStore; photos: KeyValueStore } | null = null;

/** The two stores; tests hand in their own with setKeptStores. */
export function keptStores(): { cache: KeyValueStore; photos: KeyValueStore } {
  stores ??= hasIndexedDb()
    ? { cache: idbStore(KEPT_DB, 'cache'), photos: idbStore(KEPT_PHOTOS_DB, 'thumbnails') }
    : { cache: memoryStore(), photos: memoryStore() };
  return stores;
}

export function setKeptStores(next: { cache: KeyValueStore; photos: KeyValueStore } | null) {
  stores = next;
}
