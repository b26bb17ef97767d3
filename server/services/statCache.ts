/**
 * An exact in-process cache for the job's heavy figures (recurring defects, the history part of
 * the company scorecards, the trend's past days, readiness). Each figure names the topics it
 * depends on; triggers raise a topic's version in the same transaction as any change that can
 * alter it (migrations 20261202010100 and 20261203220000, table job_stat_versions). A figure is kept with the versions read
 * BEFORE it was computed and served again only while they are the same, so it is never older
 * than the versions say: a change committed before the read raised a version, and a change
 * committed during the computation at worst makes the entry fresher than its versions.
 *
 * Works with several server processes (each has its own cache; the versions live in the
 * database). Concurrent requests for the same figure and versions share one computation.
 * Values are shared between requests: callers must not change them.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import { QueryTypes, type Sequelize } from 'sequelize';

export type StatTopic = 'structure' | 'shape' | 'moved' | 'unresolved' | 'history' | 'past' | 'blockers' | 'tests';

/**
 * Entries kept (least recently used go first): a few figures per job and scope, and readiness per
 * scope and level (the bench job: 21 scopes x 21 answers besides the other figures).
 */
const MAX_ENTRIES = 1500;

interface Entry {
  stamp: string;
  value: Promise<unknown>;
}

const entries = new Map<string, Entry>();
const bypass = new AsyncLocalStorage<true>();
/** Values the cache handed out (shared and never changed: see above), and their JSON once written. */
const cachedValues = new WeakSet<object>();
const written = new WeakMap<object, Written>();

/** A value's JSON as UTF-8 bytes, and their entity tag when asked for. */
export interface Written {
  body: Buffer;
  etag?: string;
}

/**
 * The JSON of a value as bytes (and their entity tag, made by `etag`): written once for a value
 * from the cache, which every request for the same figure shares and nobody changes (readiness of
 * the whole job is about 3 MB of JSON on a large job; writing, encoding and hashing it took ~15 ms
 * of the event loop on every request); written afresh for any other value.
 */
export function writeJson(value: unknown, etag?: (body: Buffer) => string): Written {
  const shared = value !== null && typeof value === 'object' && cachedValues.has(value) ? value : null;
  let out = shared ? written.get(shared) : undefined;
  if (!out) {
    out = { body: Buffer.from(JSON.stringify(value) ?? 'null', 'utf8') };
    if (shared) written.set(shared, out);
  }
  if (etag && out.etag === undefined) out.etag = etag(out.body);
  return out;
}

/** Tests: run `fn` with every figure computed afresh (the cache is neither read nor written). */
export function withoutStatCache<T>(fn: () => Promise<T>): Promise<T> {
  return bypass.run(true, fn);
}

/** All the job's topic versions (one query; pass them to several cachedStat calls of one request). */
export async function readStatVersions(sequelize: Sequelize, jobId: string): Promise<StatVersions> {
  const rows = await sequelize.query<{ topic: string; version: string }>(`SELECT topic, version FROM job_stat_versions WHERE job_id = $1`, {
    bind: [jobId],
    type: QueryTypes.SELECT,
  });
  return new Map(rows.map((r) => [r.topic, String(r.version)]));
}
export type StatVersions = Map<string, string>;

/** The versions of `topics` as one string ("0" for a topic never raised). */
function stampOf(versions: StatVersions, topics: readonly StatTopic[]): string {
  return topics.map((t) => `${t}:${versions.get(t) ?? '0'}`).join(',');
}

/**
 * The figure `key` of the job: from the cache while the topics' versions are unchanged, else
 * computed by `compute` (once for all requests waiting on the same versions). `versions`, when
 * given, must have been read (readStatVersions) before any of the request's figures.
 */
export async function cachedStat<T>(
  sequelize: Sequelize,
  jobId: string,
  topics: readonly StatTopic[],
  key: string,
  compute: () => Promise<T>,
  versions?: StatVersions,
): Promise<T> {
  if (bypass.getStore()) return compute();
  const stamp = stampOf(versions ?? (await readStatVersions(sequelize, jobId)), topics);
  const id = `${jobId}|${key}`;
  const hit = entries.get(id);
  if (hit && hit.stamp === stamp) {
    // Least recently used goes first: move the entry to the end.
    entries.delete(id);
    entries.set(id, hit);
    return hit.value as Promise<T>;
  }
  const value = compute();
  void value.then(
    (v) => {
      if (v !== null && typeof v === 'object') cachedValues.add(v);
    },
    () => undefined,
  );
  const entry: Entry = { stamp, value };
  entries.delete(id);
  entries.set(id, entry);
  while (entries.size > MAX_ENTRIES) entries.delete(entries.keys().next().value as string);
  value.catch(() => {
    if (entries.get(id) === entry) entries.delete(id);
  });
  return value;
}
