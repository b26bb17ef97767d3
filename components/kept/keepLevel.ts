/**
 * Keeping a level on the phone: everything the walk screens of that level read (the level's
 * units, spaces, systems, unit models with their limits, the catalogue, the job and its settings,
 * each unit's checks and unresolved findings with their own pages, the level's findings list) is fetched once and put
 * in the query cache under the screens' own keys, with the open findings' thumbnails as Blobs.
 * The persisted cache (persistence.tsx) then holds exactly those keys, so the screens open with no
 * network after a reload, and measured checks evaluate on the phone (shared/calc).
 *
 * Limits: KEPT_BUDGET_BYTES for all kept levels together; over it, the level brought up to date
 * longest ago goes first. Nothing is kept when the device is nearly full (deviceStorage.ts).
 */
import { QueryObserver, type QueryClient, type QueryKey } from '@tanstack/react-query';
import type { FindingDetail, FindingDto, FindingListResponse, UnitChecksResponse, WalkDto, WalkUnitDto, WalkUnitsResponse } from '../../shared/schemas/findings';
import type { SessionResponse } from '../../shared/schemas/session';
import type { CatalogueItemDto, JobCompanyDto, JobDetail, LevelDto, ListResponse, SpaceDto, SystemDto, UnitDto, UnitModelDto } from '../../shared/schemas/setup';
import { apiGet, apiGetBlob } from '../api/client';
import { fetchAll, jobPath, queryString } from '../api/lists';
import { askForPersistentStorage, checkRoomFor } from '../photos/deviceStorage';
import { catalogueKeys } from '../queries/catalogue';
import { checkKeys } from '../queries/checks';
import { companyKeys } from '../queries/companies';
import { FINDINGS_PAGE_SIZE, findingKeys } from '../queries/findings';
import { jobKeys } from '../queries/jobs';
import { levelKeys } from '../queries/levels';
import { modelKeys } from '../queries/models';
import { sessionKeys } from '../queries/session';
import { spaceKeys } from '../queries/spaces';
import { systemKeys } from '../queries/systems';
import { unitKeys } from '../queries/units';
import { WALK_UNITS_PAGE_SIZE, walkKeys } from '../queries/walks';
import { walkDataKeys } from '../walk/walkData';
import { keptLevelOf, keptState, keptTotalBytes, saveKeptState, setKeepProgress, type KeptLevel, type KeptState } from './registry';
import { keptStores } from './storage';

const MB = 1024 * 1024;
/** All kept levels together (data and thumbnails). A level of 40 units with 30 open findings is about 2-5 MB. */
export const KEPT_BUDGET_BYTES = 150 * MB;
/** Pages of the level's findings list kept (FINDINGS_PAGE_SIZE each), newest first. */
export const KEPT_FINDING_PAGES = 8;
/** The register list the findings list screen reads for its unit filter (its page size). */
export const FINDINGS_UNITS_PAGE_SIZE = 200;
const PARALLEL = 4;

export class KeepError extends Error {}

type Infinite<T> = { pages: T[]; pageParams: (string | null)[] };

async function allPages<T extends { nextCursor: string | null }>(get: (cursor: string | null) => Promise<T>, maxPages = 50): Promise<Infinite<T>> {
  const out: Infinite<T> = { pages: [], pageParams: [] };
  let cursor: string | null = null;
  do {
    const page = await get(cursor);
    out.pages.push(page);
    out.pageParams.push(cursor);
    cursor = page.nextCursor;
  } while (cursor && out.pages.length < maxPages);
  return out;
}

async function inParallel<T, R>(items: readonly T[], work: (item: T) => Promise<R>, onDone?: () => void): Promise<R[]> {
  const results: R[] = new Array(items.length);
  let next = 0;
  const lanes = Array.from({ length: Math.min(PARALLEL, items.length) }, async () => {
    while (next < items.length) {
      const i = next++;
      results[i] = await work(items[i]!);
      onDone?.();
    }
  });
  await Promise.all(lanes);
  return results;
}

function sizeOf(data: unknown): number {
  try {
    return JSON.stringify(data)?.length ?? 0;
  } catch {
    return 0;
  }
}

/**
 * Puts data in the cache under a screen's key so that it is never collected while kept: a query
 * nobody watches is otherwise dropped after 5 minutes, and with it from the persisted cache.
 * setQueryData, not fetchQuery: an infinite list's query would take the data for one page. A
 * disabled observer held for a moment lifts the query's gcTime (and clears a removal already
 * scheduled with the old one).
 */
function seed(client: QueryClient, key: QueryKey, data: unknown, readFrom?: number): void {
  // A screen that read this key after the keep began reading (the walk's first check, saved while
  // the keep fetched) has newer data than the keep's copy: the copy is kept, and the screen reads
  // again, so it never goes back in time (a walk banner stuck at no unit checked).
  const newer = readFrom !== undefined && (client.getQueryState(key)?.dataUpdatedAt ?? 0) >= readFrom;
  client.setQueryData(key, data);
  if (newer) void client.invalidateQueries({ queryKey: key, exact: true });
  const hold = new QueryObserver(client, { queryKey: key, enabled: false, gcTime: Infinity });
  hold.subscribe(() => undefined)();
}

export interface KeepInput {
  jobId: string;
  levelId: string;
  userId: string;
}

/** Everything one level's walk reads, fetched from the server: each entry a key and its data. */
async function fetchLevel(input: KeepInput, progress: (done: number, total: number) => void) {
  const { jobId, levelId, userId } = input;
  const [job, levels, spaces, allSpaces, systems, models, catalogue, withRetired, companies] = await Promise.all([
    apiGet<JobDetail>(jobPath(jobId)),
    fetchAll<LevelDto>(jobPath(jobId, 'levels')).then((l) => l.sort((a, b) => a.position - b.position)),
    fetchAll<SpaceDto>(jobPath(jobId, 'spaces'), { levelId }),
    fetchAll<SpaceDto>(jobPath(jobId, 'spaces'), { levelId: undefined }),
    fetchAll<SystemDto>(jobPath(jobId, 'systems')),
    fetchAll<UnitModelDto>(jobPath(jobId, 'models'), { unitKind: undefined }),
    fetchAll<CatalogueItemDto>(jobPath(jobId, 'catalogue'), { unitKind: undefined, includeRetired: undefined }),
    // The level's findings list filters by these (and names retired items of old findings).
    fetchAll<CatalogueItemDto>(jobPath(jobId, 'catalogue'), { unitKind: undefined, includeRetired: 'true' }),
    fetchAll<JobCompanyDto>(jobPath(jobId, 'companies')),
  ]);
  const level = levels.find((l) => l.id === levelId);
  if (!level) throw new KeepError('This level is not on the job any more.');
  const [walkUnits, register, unresolved, findingList, openWalk] = await Promise.all([
    allPages((cursor) =>
      apiGet<WalkUnitsResponse>(`${jobPath(jobId, 'levels', levelId, 'walk-units')}${queryString({ limit: WALK_UNITS_PAGE_SIZE, cursor })}`),
    ),
    allPages((cursor) => apiGet<ListResponse<UnitDto>>(`${jobPath(jobId, 'units')}${queryString({ levelId, limit: FINDINGS_UNITS_PAGE_SIZE, cursor })}`)),
    allPages((cursor) =>
      apiGet<FindingListResponse>(`${jobPath(jobId, 'findings')}${queryString({ levelId, status: 'open,fix_submitted', limit: 200, cursor })}`),
    ),
    allPages(
      (cursor) => apiGet<FindingListResponse>(`${jobPath(jobId, 'findings')}${queryString({ levelId, limit: FINDINGS_PAGE_SIZE, cursor })}`),
      KEPT_FINDING_PAGES,
    ),
    apiGet<ListResponse<WalkDto>>(`${jobPath(jobId, 'walks')}${queryString({ levelId, inspectorId: userId, open: 'true', limit: 1 })}`).then(
      (r) => r.items[0] ?? null,
    ),
  ]);
  const order: WalkUnitDto[] = walkUnits.pages.flatMap((p) => p.items);
  const units: UnitDto[] = register.pages.flatMap((p) => p.items);
  const open: FindingDto[] = unresolved.pages.flatMap((p) => p.items);
  const listed: FindingDto[] = findingList.pages.flatMap((p) => p.items);
  const cardThumbs = [...open, ...listed].map((f) => f.thumbUrl).filter((u): u is string => Boolean(u));
  // Each unresolved finding's own page is kept too, so a fix can be returned or accepted, or a
  // comment added, with no signal after a reload. Its photos' thumbnails come with it.
  let total = units.length + open.length + cardThumbs.length;
  let done = 0;
  const tick = () => progress(++done, total);
  const checks = await inParallel(units, (u) => apiGet<UnitChecksResponse>(`${jobPath(jobId, 'units', u.id, 'checks')}${queryString({ limit: 10 })}`), tick);
  const details = await inParallel(
    open,
    (f) => apiGet<FindingDetail>(jobPath(jobId, 'findings', f.id)).catch(() => null), // resolved or gone meanwhile: not kept
    tick,
  );
  const photos = [...new Set([...cardThumbs, ...details.flatMap((d) => (d ? d.photos.map((p) => p.thumbUrl) : []))])];
  total = units.length + open.length + photos.length;

  const entries: [QueryKey, unknown][] = [
    [jobKeys.detail(jobId), job],
    [levelKeys.list(jobId), levels],
    [spaceKeys.list(jobId, levelId), spaces],
    [spaceKeys.list(jobId), allSpaces],
    [catalogueKeys.list(jobId, { includeRetired: true }), withRetired],
    [companyKeys.list(jobId), companies],
    [systemKeys.list(jobId), systems],
    [modelKeys.list(jobId), models],
    [catalogueKeys.list(jobId, {}), catalogue],
    [walkKeys.units(jobId, levelId, {}), walkUnits],
    [walkDataKeys.order(jobId, levelId), order],
    [[...walkKeys.job(jobId), 'coverage', levelId], walkUnits.pages[0]?.coverage],
    [walkKeys.open(jobId, levelId, userId), openWalk],
    [[...unitKeys.list(jobId, { levelId }), FINDINGS_UNITS_PAGE_SIZE], register],
    [findingKeys.list(jobId, { levelId }), findingList],
  ];
  const usedModels = new Set(units.map((u) => u.modelId).filter(Boolean));
  for (const m of models) if (usedModels.has(m.id)) entries.push([checkKeys.model(jobId, m.id), m]);
  units.forEach((u, i) => {
    entries.push([checkKeys.unitRecord(jobId, u.id), u]);
    entries.push([checkKeys.unit(jobId, u.id), checks[i]]);
    entries.push([walkDataKeys.unresolved(jobId, u.id), open.filter((f) => f.unitId === u.id)]);
  });
  for (const d of details) if (d) entries.push([findingKeys.detail(jobId, d.id), d]);
  return { level, entries, photos, tick };
}

/** Fetches the thumbnails not kept yet; answers the bytes of every one kept for the level. */
async function keepThumbnails(urls: readonly string[], tick: () => void): Promise<{ kept: string[]; bytes: number }> {
  const store = keptStores().photos;
  const sizes = await inParallel(
    urls,
    async (url) => {
      const have = await store.get<Blob>(url);
      if (have) return have.size;
      try {
        const blob = await apiGetBlob(url);
        await store.set(url, blob);
        return blob.size;
      } catch {
        return -1; // a photo removed meanwhile: the card shows no thumbnail, the rest is kept
      }
    },
    tick,
  );
  return { kept: urls.filter((_u, i) => sizes[i]! >= 0), bytes: sizes.reduce((s, b) => s + Math.max(b, 0), 0) };
}

let queue: Promise<unknown> = Promise.resolve();

/** Keeps (or brings up to date) one level on the phone. One keep runs at a time. */
export function keepLevel(client: QueryClient, input: KeepInput, save: () => Promise<void>): Promise<KeptLevel> {
  const run = queue.then(() => keepNow(client, input, save));
  queue = run.catch(() => undefined);
  return run;
}

async function keepNow(client: QueryClient, input: KeepInput, save: () => Promise<void>): Promise<KeptLevel> {
  const { jobId, levelId, userId } = input;
  const before = keptState();
  const room = await checkRoomFor(5 * MB, 'this level');
  if (!room.ok) throw new KeepError(room.message);
  void askForPersistentStorage();
  setKeepProgress(jobId, levelId, { done: 0, total: 0 });
  try {
    const readFrom = Date.now();
    const { level, entries, photos, tick } = await fetchLevel(input, (done, total) => setKeepProgress(jobId, levelId, { done, total }));
    const pictures = await keepThumbnails(photos, tick);
    const session = client.getQueryData<SessionResponse>(sessionKeys.all);
    const keys = [sessionKeys.all as QueryKey, ...entries.map(([k]) => k)];
    const now = new Date().toISOString();
    const existing = before.owner === userId ? keptLevelOf(jobId, levelId) : undefined;
    const kept: KeptLevel = {
      jobId,
      levelId,
      levelName: level.name,
      keptAt: existing?.keptAt ?? now,
      updatedAt: now,
      bytes: entries.reduce((s, [, d]) => s + sizeOf(d), sizeOf(session)) + pictures.bytes,
      photoBytes: pictures.bytes,
      queryKeys: keys,
      photos: pictures.kept,
    };
    const others = before.owner === userId ? keptState().levels.filter((l) => !(l.jobId === jobId && l.levelId === levelId)) : [];
    // The keys are listed before the data goes in, so every cache change from here on is persisted.
    await saveKeptState({ owner: userId, levels: [...others, kept] });
    for (const [key, data] of entries) seed(client, key, data, readFrom);
    if (session) seed(client, sessionKeys.all, session);
    await pruneKept(client, save, kept);
    await save();
    return keptLevelOf(jobId, levelId) ?? kept;
  } finally {
    setKeepProgress(jobId, levelId, null);
  }
}

/** Drops the levels brought up to date longest ago while all kept levels are over the budget. */
export async function pruneKept(client: QueryClient, save: () => Promise<void>, keep?: KeptLevel, budget = KEPT_BUDGET_BYTES): Promise<string[]> {
  const dropped: string[] = [];
  let s: KeptState = keptState();
  while (keptTotalBytes(s) > budget) {
    const oldest = [...s.levels]
      .filter((l) => !(keep && l.jobId === keep.jobId && l.levelId === keep.levelId))
      .sort((a, b) => a.updatedAt.localeCompare(b.updatedAt))[0];
    if (!oldest) break;
    await stopKeeping(client, oldest.jobId, oldest.levelId, save);
    dropped.push(oldest.levelName);
    s = keptState();
  }
  return dropped;
}

/** Stops keeping one level: its data is no longer persisted and its thumbnails no other kept level needs are deleted. */
export async function stopKeeping(_client: QueryClient, jobId: string, levelId: string, save: () => Promise<void>): Promise<void> {
  const s = keptState();
  const gone = s.levels.find((l) => l.jobId === jobId && l.levelId === levelId);
  if (!gone) return;
  const levels = s.levels.filter((l) => l !== gone);
  const stillUsed = new Set(levels.flatMap((l) => l.photos));
  await saveKeptState({ owner: levels.length ? s.owner : null, levels });
  const store = keptStores().photos;
  for (const url of gone.photos) if (!stillUsed.has(url)) await store.del(url);
  await save();
}

/**
 * Forgets everything kept on this phone (sign-out, or another person's session): the list, the
 * thumbnails and the persisted cache, and the kept data still held in memory.
 */
export async function forgetKept(client: QueryClient, removePersisted: () => Promise<void>): Promise<void> {
  const s = keptState();
  const keys = s.levels.flatMap((l) => l.queryKeys).filter((k) => k[0] !== sessionKeys.all[0]);
  await saveKeptState({ owner: null, levels: [] });
  for (const key of keys) client.removeQueries({ queryKey: key, exact: true });
  await keptStores().photos.clear();
  await removePersisted();
}
