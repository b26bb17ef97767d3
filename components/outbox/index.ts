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

/**
 * Keeps the write in the outbox and sends it: the server's answer, or Queued when it waits.
 * `label` names what it is about on the sync screen ("unit IU-L3-04", "#214").
 */
export function submitWrite<T>(write: Write, label?: string): Promise<T | Queued> {
  return current ? current.submit<T>(write, describeWrite(write, label ?? labels.get(write))) : sendWrite<T>(write);
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
