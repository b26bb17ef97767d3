/**
 * Work kept on this device before it is saved (a unit check's marks and measurements, a
 * half-filled finding). One module, one key scheme and one versioned envelope, so the outbox of
 * saved-but-unsent writes can keep its entries in the same storage beside the drafts.
 *
 * Keys: `trimout:v1:<area>:<userId>:<jobId>:<rest…>`, e.g. `trimout:v1:check:u1:j1:unit9`.
 * The user's id is part of every key: a phone shared by two inspectors never offers one person's
 * marks to the other. Values: `{ v: 1, savedAt, data }` as JSON; a value of another version or
 * that does not parse is ignored (and removed), never half-read.
 *
 * On the web the storage is localStorage: writes are synchronous, so a mark survives a reload,
 * a closed tab or a browser the phone killed the moment after it was made. Where there is none
 * (native builds until a persistent store is wired in, private modes that refuse writes) it
 * falls back to memory for the life of the app.
 */

export const STORE_VERSION = 1;
const ROOT = `trimout:v${STORE_VERSION}`;

/** What this module needs of a storage: the part of the Web Storage API it uses. */
export interface KeyValueStorage {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
  removeItem(key: string): void;
  key(index: number): string | null;
  readonly length: number;
}

export interface Stored<T> {
  v: typeof STORE_VERSION;
  /** ISO time of the last change. */
  savedAt: string;
  data: T;
}

/** Areas of the store: drafts now; the outbox of unsent writes shares the same scheme. */
export type StoreArea = 'check' | 'finding' | 'outbox';

export function storeKey(area: StoreArea, userId: string, jobId: string, ...rest: string[]): string {
  return [ROOT, ...[area, userId, jobId, ...rest].map((part) => part.replace(/:/g, '_'))].join(':');
}

class MemoryStorage implements KeyValueStorage {
  private map = new Map<string, string>();
  getItem(key: string) {
    return this.map.has(key) ? this.map.get(key)! : null;
  }
  setItem(key: string, value: string) {
    this.map.set(key, value);
  }
  removeItem(key: string) {
    this.map.delete(key);
  }
  key(index: number) {
    return [...this.map.keys()][index] ?? null;
  }
  get length() {
    return this.map.size;
  }
}

let storage: KeyValueStorage | null = null;

function defaultStorage(): KeyValueStorage {
  try {
    const ls = (globalThis as { localStorage?: KeyValueStorage }).localStorage;
    if (ls) {
      const probe = `${ROOT}:probe`;
      ls.setItem(probe, '1');
      ls.removeItem(probe);
      return ls;
    }
  } catch {
    // Refused (private mode, storage full, blocked): memory is better than losing the marks at once.
  }
  return new MemoryStorage();
}

function current(): KeyValueStorage {
  if (!storage) storage = defaultStorage();
  return storage;
}

/** Tests (and a future native store) put their own storage in; null goes back to the default. */
export function setStorage(next: KeyValueStorage | null): void {
  storage = next;
}

export function memoryStorage(): KeyValueStorage {
  return new MemoryStorage();
}

/** The entry under `key`, or null when there is none or it is unreadable (then it is removed). */
export function readEntry<T>(key: string, isData: (data: unknown) => data is T): Stored<T> | null {
  const s = current();
  let raw: string | null;
  try {
    raw = s.getItem(key);
  } catch {
    return null;
  }
  if (raw === null) return null;
  try {
    const parsed = JSON.parse(raw) as Partial<Stored<unknown>>;
    if (parsed && parsed.v === STORE_VERSION && typeof parsed.savedAt === 'string' && isData(parsed.data)) {
      return parsed as Stored<T>;
    }
  } catch {
    // fall through: unreadable
  }
  removeEntry(key);
  return null;
}

/** Writes `data` under `key` now; false when the storage refused it (full), so the screen can say so. */
export function writeEntry<T>(key: string, data: T, now: Date = new Date()): boolean {
  const entry: Stored<T> = { v: STORE_VERSION, savedAt: now.toISOString(), data };
  try {
    current().setItem(key, JSON.stringify(entry));
    return true;
  } catch {
    return false;
  }
}

export function removeEntry(key: string): void {
  try {
    current().removeItem(key);
  } catch {
    // nothing to do: a storage that cannot remove cannot have kept it either
  }
}

/** Every key that starts with `prefix` (e.g. a user's drafts on a job, `storeKey('check', u, j)`). */
export function keysUnder(prefix: string): string[] {
  const s = current();
  const out: string[] = [];
  try {
    for (let i = 0; i < s.length; i++) {
      const k = s.key(i);
      if (k !== null && (k === prefix || k.startsWith(`${prefix}:`))) out.push(k);
    }
  } catch {
    return [];
  }
  return out;
}
