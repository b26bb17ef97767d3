/**
 * The outbox: every write of the walk and of the correction loop is kept on the phone first, then
 * sent, in order, exactly once.
 *
 * - Saved at once: `submit` puts the write in IndexedDB before anything goes on the network, with the
 *   Idempotency-Key and If-Match it was made with; the same key goes with every resend.
 * - Sent in order of creation. Writes on one record (a finding: its creation, then its fix, pin,
 *   comments) go strictly one after another; one that needs attention holds back the later writes
 *   on that record only, never the rest of the queue.
 * - Network trouble and 5xx: the write waits and is tried again with backoff (with jitter), on the
 *   'online' event, on app start and every minute while writes wait. A write found 'sending' on
 *   start (a reload or a crash mid-send) is sent again under the same key: the server answers the
 *   first answer, never a second record.
 * - 401: the session ended. Everything is kept; sending stops until the same person signs in again.
 *   Before sending, the outbox asks who is signed in: it never sends one person's writes with
 *   another's session.
 * - A refusal that will not change by itself (400, 403, 404, 409, 412, 422 ...): the write needs
 *   attention. The server's answer and what it holds now (GET of the record) are kept beside it;
 *   the person applies it again on the new version (fresh If-Match) or discards it. Never dropped
 *   silently.
 * - A write submitted from a form while the queue is clear and the server answers at once behaves as
 *   a plain send: the answer comes back, and a refusal comes back to the form (and leaves the outbox)
 *   so its fields can be corrected there.
 */
import { ApiError } from '../api/client';
import { newClientId, type Write } from '../api/mutations';
import { markKept } from './marks';
import { bytesOf, keepWrite, writeOf, type OutboxItem, type OutboxKind, type OutboxStorage } from './storage';

/** What a submit answers when the write is kept to be sent later. */
export interface Queued {
  queued: true;
  itemId: string;
}

export function isQueued(x: unknown): x is Queued {
  return Boolean(x && typeof x === 'object' && (x as Queued).queued === true);
}

export interface WriteMeta {
  jobId: string;
  kind: OutboxKind;
  label: string;
  record?: string | null;
  readPath?: string | null;
}

/** A write that reached the server during this visit (shown as "sent" on the sync screen). */
export interface SentItem {
  id: string;
  jobId: string;
  kind: OutboxKind;
  label: string;
  record: string | null;
  sentAt: number;
}

/** idle: nothing to do; sending; offline: no network (or the server failing), waiting to try again; signed-out: waits for its person. */
export type SyncStatus = 'idle' | 'sending' | 'offline' | 'signed-out';

export interface OutboxSnapshot {
  loaded: boolean;
  items: readonly OutboxItem[];
  sent: readonly SentItem[];
  status: SyncStatus;
}

export interface OutboxDeps {
  storage: OutboxStorage;
  send: (write: Write) => Promise<unknown>;
  /** GET with the ETag: what the server holds now. */
  read: (path: string) => Promise<{ data: unknown; etag: string | null }>;
  /** The id of the person the server's session belongs to (null: signed out); throws offline. */
  signedInUser: () => Promise<string | null>;
  /** After a write reached the server: refresh the screens it changes. */
  onSent?: (item: OutboxItem, answer: unknown) => void;
  now?: () => number;
  random?: () => number;
  /** Timers (tests pass their own, or none). */
  setTimer?: (fn: () => void, ms: number) => unknown;
  clearTimer?: (handle: unknown) => void;
}

/** Statuses that say "try again later": network, the server failing, too many requests, a twin in flight. */
function isPassing(e: ApiError): boolean {
  return e.status === 0 || e.status >= 500 || e.status === 408 || e.status === 429 || (e.status === 409 && e.id === 'idempotency_in_flight') || (e.status === 403 && e.id === 'csrf');
}

const SECOND = 1000;
/** Backoff: 2 s, 4 s, 8 s ... at most 5 minutes, each between half and all of it (jitter). */
export function backoffMs(attempts: number, random: () => number = Math.random): number {
  const full = Math.min(5 * 60 * SECOND, 2 * SECOND * 2 ** Math.max(0, attempts - 1));
  return Math.round(full * (0.5 + random() / 2));
}

const SENT_KEPT = 50;

/** How hard a sync pushes: false waits for every retry time; true skips the outbox's own backoff; 'asked' skips the server's too. */
export type SyncForce = boolean | 'asked';
function strongerForce(a: SyncForce, b: SyncForce): SyncForce {
  return a === 'asked' || b === 'asked' ? 'asked' : a || b;
}
/** A Retry-After longer than this is not waited out: the write is tried again by then anyway. */
export const MAX_RETRY_AFTER_MS = 15 * 60 * SECOND;


interface Waiter {
  resolve: (v: unknown) => void;
  reject: (e: unknown) => void;
}

export class Outbox {
  private items = new Map<string, OutboxItem>();
  private sent: SentItem[] = [];
  private status: SyncStatus = 'idle';
  private loaded = false;
  private loading: Promise<void> | null = null;
  private draining: Promise<void> | null = null;
  private again = false;
  private againForce: SyncForce = false;
  private stopped = false;
  private lastSeq = 0;
  private waiters = new Map<string, Waiter>();
  /** Answers of writes sent before their form asked (kept early, then a pass ran): for submitKept. */
  private answered = new Map<string, unknown>();
  /** Writes kept by `keep` whose submitKept has not come yet. */
  private early = new Set<string>();
  private listeners = new Set<() => void>();
  private snap: OutboxSnapshot = { loaded: false, items: [], sent: [], status: 'idle' };
  private timer: unknown = null;
  private readonly now: () => number;
  private readonly random: () => number;

  constructor(
    readonly userId: string,
    private readonly deps: OutboxDeps,
  ) {
    this.now = deps.now ?? Date.now;
    this.random = deps.random ?? Math.random;
  }

  // ---- what screens read -------------------------------------------------------------------

  subscribe = (fn: () => void): (() => void) => {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  };

  snapshot = (): OutboxSnapshot => this.snap;

  private notify() {
    this.snap = {
      loaded: this.loaded,
      items: [...this.items.values()].sort((a, b) => a.seq - b.seq),
      sent: [...this.sent],
      status: this.status,
    };
    for (const fn of this.listeners) fn();
  }

  // ---- start and stop ----------------------------------------------------------------------

  /** Reads the kept writes; one left 'sending' by a reload or a crash waits to be sent again (same key). */
  load(): Promise<void> {
    this.loading ??= (async () => {
      const kept = await this.deps.storage.list(this.userId);
      for (const item of kept) {
        const resumed = item.state === 'sending' ? { ...item, state: 'waiting' as const, notBefore: 0 } : item;
        if (resumed !== item) await this.deps.storage.put(resumed);
        this.items.set(item.id, resumed);
        this.lastSeq = Math.max(this.lastSeq, item.seq);
      }
      this.loaded = true;
      this.notify();
    })();
    return this.loading;
  }

  /** Stops timers and sending (sign-out, another person, the app closing); what is kept stays kept. */
  stop() {
    this.stopped = true;
    if (this.timer !== null) this.deps.clearTimer?.(this.timer);
    this.timer = null;
    for (const [id, w] of this.waiters) {
      w.resolve({ queued: true, itemId: id } satisfies Queued);
    }
    this.waiters.clear();
  }

  // ---- adding ------------------------------------------------------------------------------

  /**
   * Keeps the write on the phone (IndexedDB) and returns the kept item once it is written; sending
   * starts after. With the queue already read, the record is handed to IndexedDB in the same turn
   * as the call (no await before it): a screen re-rendering meanwhile cannot hold the save back.
   */
  async add(write: Write, meta: WriteMeta): Promise<OutboxItem> {
    if (!this.loaded) await this.load();
    const kept = keepWrite(write);
    this.lastSeq = Math.max(this.now() * 1000, this.lastSeq + 1);
    const item: OutboxItem = {
      id: newClientId(),
      userId: this.userId,
      jobId: meta.jobId,
      seq: this.lastSeq,
      createdAt: new Date(this.now()).toISOString(),
      kind: meta.kind,
      label: meta.label,
      record: meta.record ?? null,
      readPath: meta.readPath ?? null,
      write: kept,
      state: 'waiting',
      attempts: 0,
      notBefore: 0,
      bytes: bytesOf(kept),
    };
    await this.deps.storage.put(item);
    // On the device from here (a reload keeps it): the moment the bench times "saved".
    markKept();
    this.items.set(item.id, item);
    this.notify();
    return item;
  }

  /**
   * Keeps the write, then sends the queue. Resolves with the server's answer when it got through
   * now, or with Queued when it waits (no network, signed out, held behind an earlier write);
   * rejects with the ApiError when the server refused this very write (it leaves the outbox: the
   * form it came from shows why).
   */
  /** `add`, for a write whose submitKept follows (the form keeps it first, then hands it on). */
  async keep(write: Write, meta: WriteMeta): Promise<OutboxItem> {
    const item = await this.add(write, meta);
    this.early.add(item.id);
    return item;
  }

  async submit<T>(write: Write, meta: WriteMeta): Promise<T | Queued> {
    return this.submitKept<T>(await this.add(write, meta));
  }

  /**
   * Sends a write already kept by `add` (a form keeps it at the press, before its screen changes),
   * with the same answers as `submit`. If a pass sent it meanwhile, that answer comes back.
   */
  submitKept<T>(item: OutboxItem): Promise<T | Queued> {
    this.early.delete(item.id);
    if (this.answered.has(item.id)) {
      const answer = this.answered.get(item.id);
      this.answered.delete(item.id);
      return Promise.resolve(answer as T);
    }
    if (!this.items.has(item.id)) return Promise.resolve({ queued: true, itemId: item.id });
    const answer = new Promise<unknown>((resolve, reject) => this.waiters.set(item.id, { resolve, reject }));
    void this.sync(true);
    return answer as Promise<T | Queued>;
  }

  // ---- the person's choices ----------------------------------------------------------------

  /** "Apply again on the new version": read the record's ETag now, resend with it as If-Match. */
  async applyAgain(id: string): Promise<void> {
    const item = this.items.get(id);
    if (!item) return;
    let ifMatch = item.write.ifMatch;
    if (ifMatch && item.readPath) {
      const now = await this.deps.read(item.readPath);
      ifMatch = now.etag ?? ifMatch;
    }
    const next: OutboxItem = { ...item, write: { ...item.write, ifMatch }, state: 'waiting', attempts: 0, notBefore: 0, refusal: undefined, serverNow: undefined };
    await this.deps.storage.put(next);
    this.items.set(id, next);
    this.notify();
    await this.sync(true);
  }

  /** Discards one kept write (the screen asked first). */
  async discard(id: string): Promise<void> {
    await this.deps.storage.remove(id);
    this.items.delete(id);
    this.waiters.get(id)?.resolve({ queued: true, itemId: id } satisfies Queued);
    this.waiters.delete(id);
    this.notify();
  }

  /** Discards every kept write of this person (sign-out, after an explicit confirmation). */
  async discardAll(): Promise<void> {
    await this.load();
    for (const id of [...this.items.keys()]) await this.discard(id);
  }

  // ---- sending -----------------------------------------------------------------------------

  /**
   * Sends what waits, in order. `force` ignores the outbox's own backoff (the app's start, the
   * 'online' event, a new write), but not a wait the server asked for (Retry-After on a 429/503);
   * 'asked' (the person pressed "Send now") ignores that too. Only one pass runs at a time; a call
   * during one asks for another after it.
   */
  sync(force: SyncForce = false): Promise<void> {
    if (this.stopped) return Promise.resolve();
    if (this.draining) {
      this.again = true;
      this.againForce = strongerForce(this.againForce, force);
      return this.draining;
    }
    this.draining = (async () => {
      await this.load();
      let f = force;
      do {
        this.again = false;
        this.againForce = false;
        await this.pass(f);
        f = this.againForce;
      } while (this.again && !this.stopped);
    })()
      .catch(() => {
        // a storage failure: keep what is kept, try later
        this.status = 'offline';
      })
      .finally(() => {
        this.draining = null;
        // Whatever did not get through now waits: its form goes on.
        for (const [id, w] of this.waiters) w.resolve({ queued: true, itemId: id } satisfies Queued);
        this.waiters.clear();
        if (this.status === 'sending') this.status = 'idle';
        this.schedule();
        this.notify();
      });
    return this.draining;
  }

  /** Waiting writes, soonest retry first: a timer for it (the minute timer and 'online' also call sync). */
  private schedule() {
    if (this.timer !== null) this.deps.clearTimer?.(this.timer);
    this.timer = null;
    if (this.stopped || !this.deps.setTimer || this.status === 'signed-out') return;
    const waiting = [...this.items.values()].filter((i) => i.state === 'waiting');
    if (waiting.length === 0) return;
    const soonest = Math.min(...waiting.map((i) => i.notBefore));
    this.timer = this.deps.setTimer(() => {
      this.timer = null;
      void this.sync(false);
    }, Math.max(SECOND, soonest - this.now()));
  }

  private async pass(force: SyncForce) {
    const pending = [...this.items.values()].filter((i) => i.state !== 'attention').sort((a, b) => a.seq - b.seq);
    if (pending.length === 0) {
      this.status = 'idle';
      return;
    }
    // Whose session is it? Never send one person's writes with another's.
    let who: string | null;
    try {
      who = await this.deps.signedInUser();
    } catch {
      this.status = 'offline';
      return;
    }
    if (who !== this.userId) {
      this.status = 'signed-out';
      return;
    }
    this.status = 'sending';
    this.notify();
    const held = new Set<string>();
    for (const { id } of pending) {
      if (this.stopped) return;
      const item = this.items.get(id);
      if (!item) continue;
      const blockedBy = [...this.items.values()].find((o) => o.seq < item.seq && o.record !== null && o.record === item.record && o.state === 'attention');
      if (item.record && (held.has(item.record) || blockedBy)) continue;
      const early = item.notBefore > this.now();
      if (early && (!force || (item.delay && force !== 'asked'))) {
        if (item.record) held.add(item.record);
        continue;
      }
      const outcome = await this.sendItem(item);
      if (outcome === 'stop') return;
      if (outcome === 'held' && item.record) held.add(item.record);
    }
    this.status = 'idle';
  }

  private async save(item: OutboxItem) {
    this.items.set(item.id, item);
    await this.deps.storage.put(item);
    this.notify();
  }

  private async sendItem(item: OutboxItem): Promise<'next' | 'held' | 'stop'> {
    const sending: OutboxItem = { ...item, state: 'sending', attempts: item.attempts + 1 };
    await this.save(sending);
    let answer: unknown;
    try {
      answer = await this.deps.send(writeOf(sending.write));
    } catch (err) {
      const e = err instanceof ApiError ? err : new ApiError(0, 'offline', 'No connection to Trimout.');
      if (e.status === 401) {
        await this.save({ ...sending, state: 'waiting', notBefore: 0 });
        this.status = 'signed-out';
        return 'stop';
      }
      if (isPassing(e)) {
        await this.save({
          ...sending,
          state: 'waiting',
          // The server's Retry-After when it gave one (a rate limit's window), else the backoff.
          notBefore: this.now() + Math.max(backoffMs(sending.attempts, this.random), Math.min(e.retryAfterMs ?? 0, MAX_RETRY_AFTER_MS)),
          delay: e.status ? { status: e.status, message: e.message } : undefined,
        });
        this.status = 'offline';
        return 'stop';
      }
      const waiter = this.waiters.get(item.id);
      if (waiter) {
        // Refused the moment it was made: the form it came from shows why; nothing is kept.
        await this.deps.storage.remove(item.id);
        this.items.delete(item.id);
        this.waiters.delete(item.id);
        this.notify();
        waiter.reject(e);
        return 'held';
      }
      const serverNow = await this.readNow(sending);
      await this.save({
        ...sending,
        state: 'attention',
        refusal: { status: e.status, id: e.id, message: e.message, ...(Object.keys(e.fields).length ? { fields: e.fields } : {}) },
        serverNow,
      });
      return 'held';
    }
    await this.deps.storage.remove(item.id);
    this.items.delete(item.id);
    this.sent = [{ id: item.id, jobId: item.jobId, kind: item.kind, label: item.label, record: item.record, sentAt: this.now() }, ...this.sent].slice(0, SENT_KEPT);
    this.notify();
    this.deps.onSent?.(sending, answer);
    const waiter = this.waiters.get(item.id);
    if (waiter) waiter.resolve(answer);
    else if (this.early.has(item.id)) this.answered.set(item.id, answer);
    this.early.delete(item.id);
    this.waiters.delete(item.id);
    return 'next';
  }

  /** What the server holds now, to show beside a refused write; null when it has nothing (404). */
  private async readNow(item: OutboxItem): Promise<OutboxItem['serverNow']> {
    if (!item.readPath) return undefined;
    try {
      const { data, etag } = await this.deps.read(item.readPath);
      return { data, etag, readAt: new Date(this.now()).toISOString() };
    } catch (err) {
      if (err instanceof ApiError && (err.status === 404 || err.status === 403)) return null;
      return undefined;
    }
  }
}
