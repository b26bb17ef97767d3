/**
 * The signed-in person's outbox, for the write hooks and the screens. `submitWrite` is how a
 * walk or correction write goes out: kept on the phone first, then sent (see engine.ts). Where no
 * outbox is running (signed-out screens, component tests) it is a plain sendWrite.
 */
import { useSyncExternalStore } from 'react';
import { sendWrite, type Write } from '../api/mutations';
import { describeWrite } from './describe';
import type { Outbox, OutboxSnapshot, Queued } from './engine';
import type { OutboxItem } from './storage';

export { isQueued, type Queued, type WriteMeta } from './engine';

let current: Outbox | null = null;
const changed = new Set<() => void>();

export function setCurrentOutbox(next: Outbox | null) {
  current = next;
  for (const fn of changed) fn();
}

export function currentOutbox(): Outbox | null {
  return current;
}

const labels = new WeakMap<Write, string>();

/** Names what a write is about on the sync screen ("unit IU-L3-04"); returns the same write. */
export function labelWrite(write: Write, label: string): Write {
  labels.set(write, label);
  return write;
}

/** Where the label of a finding already on the screen is read from ("#12"); set by OutboxProvider. */
type FindingLabelLookup = (jobId: string, findingId: string) => string | undefined;
let findingLabels: FindingLabelLookup = () => undefined;

export function setFindingLabelLookup(lookup: FindingLabelLookup | null) {
  findingLabels = lookup ?? (() => undefined);
}

/**
 * The label a write goes into the outbox with: the one given, else the one it was made with
 * (labelWrite), else for a write on a finding the finding's label as the screens hold it, so the
 * sync screen names the finding whichever form made the write.
 */
function labelOf(write: Write, label: string | undefined): string | undefined {
  const given = label ?? labels.get(write);
  if (given !== undefined) return given;
  const [api, jobs, jobId, resource, findingId] = write.path.split('?')[0]!.split('/').filter(Boolean).map(decodeURIComponent);
  if (api !== 'api' || jobs !== 'jobs' || !jobId || resource !== 'findings' || !findingId || findingId === 'bulk') return undefined;
  const known = findingLabels(jobId, findingId);
  // Only a number the server gave ("#12"): a finding still waiting to send has none yet.
  return known && /^#\d+$/.test(known) ? known : undefined;
}

/** Writes kept on the phone at the press (keepNow), waiting for their submitWrite. */
const keptEarly = new WeakMap<Write, { outbox: Outbox; item: Promise<OutboxItem> }>();

/**
 * Keeps the write on the phone now, before the screen reacts to the press: resolves once it is in
 * IndexedDB (a reload keeps it). The same write handed to submitWrite after is sent, not kept
 * twice; pressing again while it is being kept keeps it once. Without an outbox it does nothing.
 */
export async function keepNow(write: Write, label?: string): Promise<void> {
  if (!current) return;
  let early = keptEarly.get(write);
  if (!early || early.outbox !== current) {
    early = { outbox: current, item: current.keep(write, describeWrite(write, labelOf(write, label))) };
    keptEarly.set(write, early);
  }
  // A write that could not be kept here is tried again by submitWrite, whose failure the form shows.
  await early.item.then(
    () => undefined,
    () => undefined,
  );
}

/**
 * Keeps the write in the outbox and sends it: the server's answer, or Queued when it waits.
 * `label` names what it is about on the sync screen ("unit IU-L3-04", "#214").
 */
export async function submitWrite<T>(write: Write, label?: string): Promise<T | Queued> {
  const early = keptEarly.get(write);
  if (early) {
    keptEarly.delete(write);
    const item = await early.item.catch(() => null);
    // Kept for a person who has since left: it stays theirs, in their queue.
    if (item && early.outbox !== current) return { queued: true, itemId: item.id };
    if (item) return early.outbox.submitKept<T>(item);
  }
  return current ? current.submit<T>(write, describeWrite(write, labelOf(write, label))) : sendWrite<T>(write);
}

const EMPTY: OutboxSnapshot = { loaded: false, items: [], sent: [], status: 'idle' };

function subscribe(fn: () => void) {
  changed.add(fn);
  let inner = current?.subscribe(fn);
  const onChange = () => {
    inner?.();
    inner = current?.subscribe(fn);
  };
  changed.add(onChange);
  return () => {
    changed.delete(fn);
    changed.delete(onChange);
    inner?.();
  };
}

/** The queue as it is now (re-renders on every change). */
export function useOutboxSnapshot(): OutboxSnapshot {
  return useSyncExternalStore(
    subscribe,
    () => current?.snapshot() ?? EMPTY,
    () => EMPTY,
  );
}

/** Kept writes not yet on the server (waiting, sending or needing attention), optionally of one job. */
export function useWaitingItems(jobId?: string): readonly OutboxItem[] {
  const snap = useOutboxSnapshot();
  return jobId ? snap.items.filter((i) => i.jobId === jobId) : snap.items;
}

/** The record key writes on a finding share (its creation, fix, pin, comments, changes). */
export const findingRecord = (findingId: string) => `finding:${findingId}`;
/** The record key of a unit's checks. */
export const unitRecord = (unitId: string) => `unit:${unitId}`;

/** "6 waiting to send", "1 waiting to send". */
export function waitingWords(n: number): string {
  return `${n} waiting to send`;
}

/** "6 items have not been sent", "1 item has not been sent". */
export function notSentWords(n: number): string {
  return n === 1 ? '1 item has not been sent' : `${n} items have not been sent`;
}
