/**
 * A level kept on the phone: keeping fills the walk screens' own query keys (each screen's hook
 * finds its data with no network), only kept queries of the person who kept them are persisted,
 * another person's session forgets everything kept, and over the budget the level brought up to
 * date longest ago goes first.
 */
import { InfiniteQueryObserver, QueryClient, QueryClientProvider, QueryObserver } from '@tanstack/react-query';
import { renderHook } from '@testing-library/react-native';
import type { ReactNode } from 'react';
import { forgetKept, keepLevel, pruneKept, stopKeeping } from '../../components/kept/keepLevel';
import { connectKept, keptPersistOptions, shouldPersistQuery } from '../../components/kept/KeptQueryProvider';
import { formatBytes, keptSentence } from '../../components/kept/format';
import { keptState, loadKeptState, saveKeptState } from '../../components/kept/registry';
import { memoryStore, setKeptStores, keptStores } from '../../components/kept/storage';
import { useCatalogueQuery } from '../../components/queries/catalogue';
import { useUnitChecksQuery, useUnitModelQuery, useUnitRecordQuery } from '../../components/queries/checks';
import { useFindingQuery, useFindingsQuery } from '../../components/queries/findings';
import { useJobQuery } from '../../components/queries/jobs';
import { useLevelsQuery } from '../../components/queries/levels';
import { sessionKeys } from '../../components/queries/session';
import { useSpacesQuery } from '../../components/queries/spaces';
import { useSystemsQuery } from '../../components/queries/systems';
import { useUnitsQuery } from '../../components/queries/units';
import { announceWalkStarted, useLevelCoverageQuery, useOpenWalkQuery, useWalkUnitsQuery, walkKeys } from '../../components/queries/walks';
import { useUnresolvedFindingsQuery, useWalkOrderQuery } from '../../components/walk/walkData';
import { sampleJob, SAMPLE_JOB_ID } from '../support/components';

const JOB = SAMPLE_JOB_ID;
const LEVEL = '00000000-0000-4000-8000-0000000000b1';
const OTHER_LEVEL = '00000000-0000-4000-8000-0000000000b2';
const UNIT = '00000000-0000-4000-8000-0000000000c1';
const MODEL = '00000000-0000-4000-8000-0000000000d1';
const FINDING = '00000000-0000-4000-8000-0000000000e1';
const USER = '00000000-0000-4000-8000-0000000000f1';
const THUMB = `/api/jobs/${JOB}/photos/p1/thumb`;
/** A photo sent with the fix: on the finding's own page only, not on its card. */
const FIX_THUMB = `/api/jobs/${JOB}/photos/p2/thumb`;

const unit = { id: UNIT, tag: 'FC-301', kind: 'ceiling_cassette', levelId: LEVEL, modelId: MODEL, spaceId: null, systemId: null, version: 1 };
const walkUnit = { id: UNIT, tag: 'FC-301', kind: 'ceiling_cassette', state: 'not_checked', openFindings: 1, worstSeverity: 'major', lastCheck: null };
const finding = { id: FINDING, number: 1, label: '#1', levelId: LEVEL, unitId: UNIT, status: 'open', thumbUrl: THUMB, catalogueItemId: 'x' };
const coverage = { total: 1, checked: 0, inProgress: 0, withOpenFindings: 1 };

/** The API as the walk reads it; `asked` counts the requests. */
function api() {
  const asked: string[] = [];
  const answer = (path: string): unknown => {
    const url = new URL(path, 'http://phone');
    const p = url.pathname;
    if (p === `/api/jobs/${JOB}`) return sampleJob({ role: 'inspector' });
    if (p.endsWith('/levels')) return { items: [{ id: LEVEL, name: 'Level 3', position: 3 }, { id: OTHER_LEVEL, name: 'Level 4', position: 4 }], nextCursor: null };
    if (p.endsWith('/spaces') || p.endsWith('/systems') || p.endsWith('/catalogue') || p.endsWith('/companies')) return { items: [], nextCursor: null };
    if (p.endsWith('/models')) return { items: [{ id: MODEL, name: 'CX-24', limits: {} }], nextCursor: null };
    if (p.endsWith('/walk-units')) return { items: [walkUnit], nextCursor: null, counts: { total: 1, checked: 0, notChecked: 1, inProgress: 0, withOpenFindings: 1 }, coverage };
    if (p.endsWith('/units')) return { items: [unit], nextCursor: null };
    if (p.endsWith('/findings')) return { items: [finding], nextCursor: null, total: 1 };
    if (p === `/api/jobs/${JOB}/findings/${FINDING}`) return { ...finding, photos: [{ id: 'p1', thumbUrl: THUMB }, { id: 'p2', thumbUrl: FIX_THUMB }], events: [] };
    if (p.endsWith('/walks')) return { items: [], nextCursor: null };
    if (p.endsWith('/checks')) return { state: 'not_checked', current: null, history: [], nextCursor: null };
    throw new Error(`unexpected ${path}`);
  };
  let online = true;
  const fetchMock = jest.fn(async (path: string) => {
    asked.push(String(path));
    if (!online) throw new TypeError('Failed to fetch');
    if (String(path) === THUMB) return { ok: true, status: 200, headers: new Map(), blob: async () => ({ size: 4_000, kind: 'thumb' }) };
    if (String(path) === FIX_THUMB) return { ok: true, status: 200, headers: new Map(), blob: async () => ({ size: 3_000, kind: 'fix thumb' }) };
    const body = answer(String(path));
    return { ok: true, status: 200, headers: { get: () => null }, json: async () => body };
  });
  (globalThis as { fetch?: unknown }).fetch = fetchMock;
  return { asked, offline: () => (online = false) };
}

function newClient() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  client.setQueryData(sessionKeys.all, { user: { id: USER, name: 'Ines' }, csrfToken: 't', jobs: [] });
  return client;
}

const save = jest.fn(async () => undefined);

beforeEach(async () => {
  setKeptStores({ cache: memoryStore(), photos: memoryStore() });
  await saveKeptState({ owner: null, levels: [] });
  save.mockClear();
});

it('fills every query the walk screens of the level read, so each hook has its data with no network', async () => {
  const net = api();
  const client = newClient();
  const kept = await keepLevel(client, { jobId: JOB, levelId: LEVEL, userId: USER }, save);
  expect(kept.levelName).toBe('Level 3');
  expect(kept.photos).toEqual([THUMB, FIX_THUMB]);
  expect(kept.photoBytes).toBe(7_000);
  expect(await keptStores().photos.get(FIX_THUMB)).toEqual({ size: 3_000, kind: 'fix thumb' });
  expect(await keptStores().photos.get(THUMB)).toEqual({ size: 4_000, kind: 'thumb' });
  expect(save).toHaveBeenCalled();

  net.offline();
  const before = net.asked.length;
  const wrapper = ({ children }: { children: ReactNode }) => <QueryClientProvider client={client}>{children}</QueryClientProvider>;
  const { result } = renderHook(
    () => ({
      job: useJobQuery(JOB),
      levels: useLevelsQuery(JOB),
      spaces: useSpacesQuery(JOB, LEVEL),
      systems: useSystemsQuery(JOB),
      units: useWalkUnitsQuery(JOB, LEVEL, {}),
      coverage: useLevelCoverageQuery(JOB, LEVEL),
      open: useOpenWalkQuery(JOB, LEVEL, USER),
      order: useWalkOrderQuery(JOB, LEVEL),
      checks: useUnitChecksQuery(JOB, UNIT),
      record: useUnitRecordQuery(JOB, UNIT),
      model: useUnitModelQuery(JOB, MODEL),
      catalogue: useCatalogueQuery(JOB, {}),
      unresolved: useUnresolvedFindingsQuery(JOB, UNIT),
      findings: useFindingsQuery(JOB, { levelId: LEVEL }),
      register: useUnitsQuery(JOB, { levelId: LEVEL }, 200),
      detail: useFindingQuery(JOB, FINDING),
    }),
    { wrapper },
  );
  // On the first render, before any request could answer: the data is there.
  const r = result.current;
  expect(r.job.data?.id).toBe(JOB);
  expect(r.levels.data?.map((l) => l.name)).toEqual(['Level 3', 'Level 4']);
  expect(r.spaces.data).toEqual([]);
  expect(r.systems.data).toEqual([]);
  expect(r.units.data?.pages[0]?.items.map((u) => u.tag)).toEqual(['FC-301']);
  expect(r.coverage.data).toEqual(coverage);
  expect(r.open.data).toBeNull();
  expect(r.order.data?.map((u) => u.id)).toEqual([UNIT]);
  expect(r.checks.data?.current).toBeNull();
  expect(r.record.data?.modelId).toBe(MODEL);
  expect(r.model.data?.id).toBe(MODEL);
  expect(r.catalogue.data).toEqual([]);
  expect(r.unresolved.data?.map((f) => f.id)).toEqual([FINDING]);
  expect(r.findings.data?.pages[0]?.items[0]?.thumbUrl).toBe(THUMB);
  expect(r.register.data?.pages[0]?.items[0]?.id).toBe(UNIT);
  expect(r.detail.data?.photos.map((p) => p.thumbUrl)).toEqual([THUMB, FIX_THUMB]);
  // Every one of those keys is persisted; a query of another level is not.
  const persisted = client
    .getQueryCache()
    .getAll()
    .filter((q) => shouldPersistQuery(client, q))
    .map((q) => q.queryHash);
  expect(persisted.length).toBe(kept.queryKeys.length);
  client.setQueryData(['walk', JOB, 'coverage', OTHER_LEVEL], coverage);
  expect(shouldPersistQuery(client, client.getQueryCache().find({ queryKey: ['walk', JOB, 'coverage', OTHER_LEVEL] })!)).toBe(false);
  expect(net.asked.length).toBeGreaterThanOrEqual(before);
  client.clear();
});

it('a kept query is never collected, even when no screen watches it; a list a screen holds open gets its pages as they are', async () => {
  api();
  const client = newClient();
  // Screens had the level open before keeping (queries with the usual 5-minute lifetime).
  const observer = new QueryObserver(client, { queryKey: ['walk', JOB, 'coverage', LEVEL], queryFn: async () => coverage });
  const off = observer.subscribe(() => undefined);
  // The screens read what the server answers (the keep reads them again when they read meanwhile).
  const list = new InfiniteQueryObserver(client, {
    queryKey: walkKeys.units(JOB, LEVEL, {}),
    queryFn: async () => ({ items: [walkUnit], nextCursor: null, coverage }),
    initialPageParam: null as string | null,
    getNextPageParam: () => null,
  });
  const offList = list.subscribe(() => undefined);
  await keepLevel(client, { jobId: JOB, levelId: LEVEL, userId: USER }, save);
  off();
  offList();
  const pages = client.getQueryData<{ pages: { items: { tag: string }[] }[] }>(walkKeys.units(JOB, LEVEL, {}))?.pages;
  expect(pages?.[0]?.items.map((u) => u.tag)).toEqual(['FC-301']);
  expect(client.getQueryCache().find({ queryKey: ['walk', JOB, 'coverage', LEVEL] })?.gcTime).toBe(Infinity);
  expect(client.getQueryCache().find({ queryKey: ['jobs', 'detail', JOB] })?.gcTime).toBe(Infinity);
  client.clear();
});

it('persists nothing of a kept level while someone else is signed in, and forgets it all when another person signs in or the owner signs out', async () => {
  api();
  const client = newClient();
  const { disconnect } = connectKept(client, keptPersistOptions(client));
  await keepLevel(client, { jobId: JOB, levelId: LEVEL, userId: USER }, save);
  const jobQuery = client.getQueryCache().find({ queryKey: ['jobs', 'detail', JOB] })!;
  expect(shouldPersistQuery(client, jobQuery)).toBe(true);

  // Another person's session arrives (their sign-in, or the server's answer after the first one's session ended).
  client.setQueryData(sessionKeys.all, { user: { id: 'someone-else', name: 'B' }, csrfToken: 't', jobs: [] });
  expect(shouldPersistQuery(client, jobQuery)).toBe(false);
  for (let i = 0; i < 50 && keptState().owner !== null; i++) await new Promise((r) => setTimeout(r, 5));
  for (let i = 0; i < 50 && (await keptStores().photos.keys()).length > 0; i++) await new Promise((r) => setTimeout(r, 5));
  expect(keptState()).toEqual({ owner: null, levels: [] });
  expect(await keptStores().photos.keys()).toEqual([]);
  expect(client.getQueryData(['jobs', 'detail', JOB])).toBeUndefined();
  // The list read back from the device is empty too.
  expect(await loadKeptState()).toEqual({ owner: null, levels: [] });
  disconnect();
  client.clear();
});

it('signing out (the session answers no user) forgets what was kept', async () => {
  api();
  const client = newClient();
  const { disconnect } = connectKept(client, keptPersistOptions(client));
  await keepLevel(client, { jobId: JOB, levelId: LEVEL, userId: USER }, save);
  client.setQueryData(sessionKeys.all, { user: null, csrfToken: 't' });
  for (let i = 0; i < 50 && keptState().owner !== null; i++) await new Promise((r) => setTimeout(r, 5));
  expect(keptState().levels).toEqual([]);
  disconnect();
  client.clear();
});

it('starting a walk keeps its level', async () => {
  api();
  const client = newClient();
  const { disconnect } = connectKept(client, keptPersistOptions(client));
  announceWalkStarted(JOB, LEVEL);
  for (let i = 0; i < 200 && keptState().levels.length === 0; i++) await new Promise((r) => setTimeout(r, 5));
  expect(keptState().levels.map((l) => l.levelName)).toEqual(['Level 3']);
  disconnect();
  client.clear();
});

it('a screen that read newer data while the keep was fetching reads it again, not left with the keep\'s older copy', async () => {
  // The first check of a walk starts the walk and the keep of its level at once: the walk banner
  // read the walk with its check while the keep still held the walk as it was before the check.
  api();
  const client = newClient();
  const openKey = walkKeys.open(JOB, LEVEL, USER);
  const fetchMock = globalThis.fetch as jest.Mock;
  const answer = fetchMock.getMockImplementation()!;
  fetchMock.mockImplementation(async (path: string) => {
    // The screen's own read lands while the keep is fetching the level.
    if (String(path).includes('/walks?')) client.setQueryData(openKey, { id: 'w1', levelId: LEVEL, unitsChecked: 1 });
    return answer(path);
  });
  await keepLevel(client, { jobId: JOB, levelId: LEVEL, userId: USER }, save);
  expect(client.getQueryState(openKey)?.isInvalidated).toBe(true);
  // Keys no screen read meanwhile are kept as fetched, not read again.
  expect(client.getQueryState(walkKeys.units(JOB, LEVEL, {}))?.isInvalidated).toBe(false);
  expect(client.getQueryState(['walk', JOB, 'coverage', LEVEL])?.isInvalidated).toBe(false);
});

it('over the budget, drops the level brought up to date longest ago; stopping keeps thumbnails another kept level uses', async () => {
  api();
  const client = newClient();
  const first = await keepLevel(client, { jobId: JOB, levelId: LEVEL, userId: USER }, save);
  const second = await keepLevel(client, { jobId: JOB, levelId: OTHER_LEVEL, userId: USER }, save);
  expect(keptState().levels.map((l) => l.levelId)).toEqual([LEVEL, OTHER_LEVEL]);
  // Both levels show the same finding (the mock answers it for any level): one thumbnail, used twice.
  expect(second.photos).toEqual(first.photos);
  const dropped = await pruneKept(client, save, second, first.bytes + second.bytes - 1);
  expect(dropped).toEqual(['Level 3']);
  expect(keptState().levels.map((l) => l.levelId)).toEqual([OTHER_LEVEL]);
  expect(await keptStores().photos.get(THUMB)).toBeDefined();
  await stopKeeping(client, JOB, OTHER_LEVEL, save);
  expect(keptState()).toEqual({ owner: null, levels: [] });
  expect(await keptStores().photos.get(THUMB)).toBeUndefined();
  await forgetKept(client, async () => undefined);
  client.clear();
});

it('words what is kept the way the level screen shows it', () => {
  expect(formatBytes(14 * 1024 * 1024 + 300_000)).toBe('14 MB');
  expect(formatBytes(2.44 * 1024 * 1024)).toBe('2.4 MB');
  expect(formatBytes(380 * 1024)).toBe('380 KB');
  const now = new Date('2026-12-03T10:00:00Z');
  expect(keptSentence('Level 3', 14 * 1024 * 1024, '2026-12-03T08:12:00Z', 'UTC', now)).toBe('Level 3 kept on this phone, 14 MB, updated 08:12');
  expect(keptSentence('Level 3', 14 * 1024 * 1024, '2026-12-02T08:12:00Z', 'UTC', now)).toBe('Level 3 kept on this phone, 14 MB, updated 2 Dec 08:12');
});

