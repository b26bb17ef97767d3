/**
 * The query client, with the levels kept on this phone persisted to IndexedDB
 * (@tanstack/react-query-persist-client + the async storage persister over idb-keyval).
 *
 * - Only the queries of kept levels are persisted (the dehydrate filter asks the list of kept
 *   levels), and only while the signed-in person is the one who kept them.
 * - The persisted cache is thrown away when the app's version or the kept format changes (the
 *   buster), and after KEPT_MAX_AGE without being brought up to date.
 * - Another person's session, or signing out, forgets everything kept (forgetKept): a second
 *   person on the same phone never sees the first one's levels or photos.
 * Nothing of the outbox lives here: paused mutations are not persisted.
 */
import { createAsyncStoragePersister } from '@tanstack/query-async-storage-persister';
import { dehydrate, hashKey, onlineManager, QueryClientProvider, type QueryClient, type QueryKey } from '@tanstack/react-query';
import { PersistQueryClientProvider, type PersistQueryClientOptions } from '@tanstack/react-query-persist-client';
import Constants from 'expo-constants';
import { createContext, useContext, useEffect, useMemo, useState, type ReactNode } from 'react';
import type { SessionResponse } from '../../shared/schemas/session';
import { ApiError } from '../api/client';
import { sessionKeys } from '../queries/session';
import { onWalkStarted } from '../queries/walks';
import { forgetKept, keepLevel, stopKeeping, type KeepInput } from './keepLevel';
import { isKeptQueryHash, keptState, loadKeptState, subscribeKept, type KeptLevel } from './registry';
import { hasIndexedDb, keptStores } from './storage';

/** Raised when what is kept changes shape; with the app's version it makes the buster. */
export const KEPT_FORMAT = 1;
/** A kept cache not brought up to date for this long is not restored. */
export const KEPT_MAX_AGE = 7 * 24 * 60 * 60 * 1000;
export const KEPT_CACHE_KEY = 'queries';

export function keptBuster(): string {
  return `${Constants.expoConfig?.version ?? '0'}:${KEPT_FORMAT}`;
}

function sessionUser(client: QueryClient): string | null {
  return client.getQueryData<SessionResponse>(sessionKeys.all)?.user?.id ?? null;
}

/** The persisted queries: a kept level's, fetched, and only while its owner is signed in. */
export function shouldPersistQuery(client: QueryClient, query: { queryHash: string; state: { status: string } }): boolean {
  const owner = keptState().owner;
  return Boolean(owner) && query.state.status === 'success' && isKeptQueryHash(query.queryHash) && sessionUser(client) === owner;
}

export function keptPersistOptions(client: QueryClient): Omit<PersistQueryClientOptions, 'queryClient'> {
  const store = keptStores().cache;
  const persister = createAsyncStoragePersister({
    storage: {
      getItem: (key) => store.get<string>(key).then((v) => v ?? null),
      setItem: (key, value) => store.set(key, value),
      removeItem: (key) => store.del(key),
    },
    key: KEPT_CACHE_KEY,
    throttleTime: 1000,
  });
  return {
    persister,
    maxAge: KEPT_MAX_AGE,
    buster: keptBuster(),
    dehydrateOptions: { shouldDehydrateQuery: (q) => shouldPersistQuery(client, q), shouldDehydrateMutation: () => false },
    // Restored data is the kept levels' only: never collected while the app runs.
    hydrateOptions: { defaultOptions: { queries: { gcTime: Infinity } } },
  };
}

/**
 * A kept query that cannot reach the server keeps its data and tries again in the background
 * (with react-query's growing delay, paused while the browser says it is offline), instead of
 * turning into an error that would hide the kept data. Other refusals count as usual.
 */
export function keptRetry(failureCount: number, error: unknown): boolean {
  if (error instanceof ApiError && (error.status === 0 || error.status >= 500)) return true;
  return !(error instanceof ApiError && error.status >= 400 && error.status < 500) && failureCount < 2;
}

/**
 * Gives every kept key its defaults (never collected; paused, not failed, while the browser is
 * offline; kept retry); a key no longer kept gets none. A kept query must not end in an error:
 * the screens show an error instead of data, and only fetched data is persisted.
 */
function applyKeptDefaults(client: QueryClient, applied: Map<string, QueryKey>) {
  const now = new Map<string, QueryKey>();
  for (const level of keptState().levels) for (const key of level.queryKeys) now.set(hashKey(key), key);
  for (const [hash, key] of applied) if (!now.has(hash)) client.setQueryDefaults(key, {});
  for (const [hash, key] of now) if (!applied.has(hash)) client.setQueryDefaults(key, { gcTime: Infinity, retry: keptRetry, networkMode: 'online' });
  applied.clear();
  for (const [hash, key] of now) applied.set(hash, key);
}

export interface KeptActions {
  keep(input: KeepInput): Promise<KeptLevel>;
  stop(jobId: string, levelId: string): Promise<void>;
}

const KeptContext = createContext<KeptActions | null>(null);

/** keep / stop for a screen; null where nothing can be kept (no IndexedDB). */
export function useKeptActions(): KeptActions | null {
  return useContext(KeptContext);
}

/**
 * Wires a client to its kept levels: saving, forgetting on another session, keeping the level
 * of a walk that starts. Answers the actions and an unsubscribe.
 */
export function connectKept(client: QueryClient, options: Omit<PersistQueryClientOptions, 'queryClient'>): { actions: KeptActions; disconnect: () => void } {
  // Written at once, past the persister's throttle: a keep ends with its data on the device.
  const save = async () => {
    const clientState = dehydrate(client, options.dehydrateOptions as never);
    await keptStores().cache.set(KEPT_CACHE_KEY, JSON.stringify({ buster: options.buster, timestamp: Date.now(), clientState }));
  };
  const forget = () => forgetKept(client, () => Promise.resolve(options.persister.removeClient()));
  const actions: KeptActions = {
    keep: (input) => keepLevel(client, input, save),
    stop: (jobId, levelId) => stopKeeping(client, jobId, levelId, save),
  };
  // react-query learns of the network from the online/offline events only; a page opened with no
  // network never gets one. With a level kept, it starts from what the browser says, so the kept
  // queries wait for the network instead of failing (a failed one would hide its data). With
  // nothing kept, a read fails at once and the screen says there is no connection.
  const nav = (globalThis as { navigator?: { onLine?: boolean } }).navigator;
  if (keptState().levels.length > 0 && nav?.onLine === false) onlineManager.setOnline(false);
  const applied = new Map<string, QueryKey>();
  applyKeptDefaults(client, applied);
  const unsubscribeKept = subscribeKept(() => applyKeptDefaults(client, applied));
  const sessionHash = hashKey(sessionKeys.all);
  const unsubscribeCache = client.getQueryCache().subscribe((event) => {
    if (event.type !== 'updated' || event.query.queryHash !== sessionHash || event.action.type !== 'success') return;
    const owner = keptState().owner;
    const user = (event.query.state.data as SessionResponse | undefined)?.user?.id ?? null;
    // Signed out, or someone else signed in: what the first person kept goes.
    if (owner && user !== owner) void forget();
  });
  const unsubscribeWalks = onWalkStarted((jobId, levelId) => {
    const userId = sessionUser(client);
    if (userId) actions.keep({ jobId, levelId, userId }).catch(() => undefined);
  });
  return {
    actions,
    disconnect: () => {
      unsubscribeCache();
      unsubscribeWalks();
      unsubscribeKept();
    },
  };
}

export function KeptQueryProvider({ client, children }: { client: QueryClient; children: ReactNode }) {
  const enabled = hasIndexedDb();
  const [loaded, setLoaded] = useState(false);
  const options = useMemo(() => (enabled ? keptPersistOptions(client) : null), [client, enabled]);
  const [actions, setActions] = useState<KeptActions | null>(null);
  useEffect(() => {
    if (!options) return;
    let live = true;
    let disconnect: (() => void) | undefined;
    void loadKeptState().then(() => {
      if (!live) return;
      const wired = connectKept(client, options);
      disconnect = wired.disconnect;
      setActions(wired.actions);
      setLoaded(true);
    });
    return () => {
      live = false;
      disconnect?.();
    };
  }, [client, options]);
  if (!options) return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
  // The list of kept levels is read before the cache is restored, so the filter knows them.
  if (!loaded) return null;
  return (
    // A session restored from the device is asked of the server again at once (when there is a
    // network): if it has ended, what was kept goes before anyone sees it.
    <PersistQueryClientProvider client={client} persistOptions={options} onSuccess={() => client.invalidateQueries({ queryKey: sessionKeys.all })}>
      <KeptContext.Provider value={actions}>{children}</KeptContext.Provider>
    </PersistQueryClientProvider>
  );
}
