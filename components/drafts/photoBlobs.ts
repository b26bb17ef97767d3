/**
 * Photos of a half-filled finding, kept as blobs in IndexedDB (too big for the JSON store):
 * a photo the inspector took survives a reload or a browser the phone killed. Keyed by the
 * finding draft's store key. Where there is no IndexedDB (native builds, tests) nothing is kept
 * and nothing fails.
 *
 * Through idb-keyval, the same small wrapper as the outbox (components/outbox/storage.ts); the
 * database and store names are the ones drafts always used, so photos kept before stay readable.
 */
import { createStore, del, get, set, type UseStore } from 'idb-keyval';

export interface KeptPhoto {
  key: string;
  name: string;
  type: string;
  blob: Blob;
}

let store: UseStore | null = null;

function drafts(): UseStore | null {
  if (typeof globalThis.indexedDB === 'undefined') return null;
  store ??= createStore('trimout-drafts', 'photos');
  return store;
}

/** Runs a storage step; a storage that refuses (private mode, full, blocked) keeps nothing and fails nothing. */
async function quietly<T>(act: (s: UseStore) => Promise<T>): Promise<T | null> {
  const s = drafts();
  if (!s) return null;
  try {
    return await act(s);
  } catch {
    return null;
  }
}

export function keepPhotos(draftKey: string, photos: readonly KeptPhoto[]): Promise<unknown> {
  return photos.length ? quietly((s) => set(draftKey, photos.map((p) => ({ ...p })), s)) : dropPhotos(draftKey);
}

export async function keptPhotos(draftKey: string): Promise<KeptPhoto[]> {
  const found = await quietly((s) => get<unknown>(draftKey, s));
  return Array.isArray(found) ? (found as KeptPhoto[]).filter((p) => p && typeof p.key === 'string' && p.blob) : [];
}

export function dropPhotos(draftKey: string): Promise<unknown> {
  return quietly((s) => del(draftKey, s));
}
