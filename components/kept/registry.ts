/**
 * The list of levels kept on this phone, and whose they are. It is stored beside the persisted
 * query cache and read once when the app starts; screens follow it with useKeptLevel.
 *
 * Each kept level names the query keys that hold its data (the same keys the walk screens read)
 * and the thumbnails kept for it: only those queries are persisted, and stopping keeping a level
 * drops exactly what no other kept level still needs.
 */
import { hashKey, type QueryKey } from '@tanstack/react-query';
import { useSyncExternalStore } from 'react';
import { keptStores } from './storage';

export interface KeptLevel {
  jobId: string;
  levelId: string;
  levelName: string;
  /** ISO times: first kept, last brought up to date. */
  keptAt: string;
  updatedAt: string;
  /** Bytes on the device for this level: its data as stored (JSON) and its thumbnails. */
  bytes: number;
  photoBytes: number;
  /** The query keys of this level's data (the walk screens' own keys). */
  queryKeys: QueryKey[];
  /** Thumbnail addresses kept as Blobs for this level. */
  photos: string[];
}

export interface KeptState {
  /** The user the kept data belongs to; null when nothing is kept. */
  owner: string | null;
  levels: KeptLevel[];
}

const REGISTRY_KEY = 'registry';
const EMPTY: KeptState = { owner: null, levels: [] };

let state: KeptState = EMPTY;
let hashes = new Set<string>();
const listeners = new Set<() => void>();

function setState(next: KeptState) {
  state = next;
  hashes = new Set(next.levels.flatMap((l) => l.queryKeys.map((k) => hashKey(k))));
  for (const l of listeners) l();
}

export function keptState(): KeptState {
  return state;
}

/** True when the query with this hash holds data of a kept level. */
export function isKeptQueryHash(queryHash: string): boolean {
  return hashes.has(queryHash);
}

export function subscribeKept(listener: () => void): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

function isKeptState(v: unknown): v is KeptState {
  const s = v as KeptState | undefined;
  return Boolean(s && (s.owner === null || typeof s.owner === 'string') && Array.isArray(s.levels));
}

/** Reads the list from the device (once, at start). */
export async function loadKeptState(): Promise<KeptState> {
  try {
    const found = await keptStores().cache.get<unknown>(REGISTRY_KEY);
    setState(isKeptState(found) ? found : EMPTY);
  } catch {
    setState(EMPTY);
  }
  return state;
}

export async function saveKeptState(next: KeptState): Promise<void> {
  setState(next);
  if (next.owner === null && next.levels.length === 0) await keptStores().cache.del(REGISTRY_KEY);
  else await keptStores().cache.set(REGISTRY_KEY, next);
}

export function keptLevelOf(jobId: string, levelId: string): KeptLevel | undefined {
  return state.levels.find((l) => l.jobId === jobId && l.levelId === levelId);
}

export function keptTotalBytes(s: KeptState = state): number {
  return s.levels.reduce((sum, l) => sum + l.bytes, 0);
}

/** The kept level of a screen, kept current as levels are kept, updated or dropped. */
export function useKeptLevel(jobId: string, levelId: string): KeptLevel | undefined {
  const current = useSyncExternalStore(subscribeKept, keptState, keptState);
  return current.levels.find((l) => l.jobId === jobId && l.levelId === levelId);
}

/** Every kept thumbnail address (for images shown from the device). */
export function useKeptState(): KeptState {
  return useSyncExternalStore(subscribeKept, keptState, keptState);
}

/** A keep under way: units and photos done of the total (0 of 0 while the lists load). */
export interface KeepProgress {
  done: number;
  total: number;
}

let progress: Record<string, KeepProgress> = {};
const progressListeners = new Set<() => void>();

export function setKeepProgress(jobId: string, levelId: string, p: KeepProgress | null) {
  const key = `${jobId}:${levelId}`;
  const next = { ...progress };
  if (p) next[key] = p;
  else delete next[key];
  progress = next;
  for (const l of progressListeners) l();
}

function subscribeProgress(listener: () => void): () => void {
  progressListeners.add(listener);
  return () => progressListeners.delete(listener);
}

export function useKeepProgress(jobId: string, levelId: string): KeepProgress | undefined {
  const all = useSyncExternalStore(subscribeProgress, () => progress, () => progress);
  return all[`${jobId}:${levelId}`];
}
