/**
 * The User Timing mark the outbox sets the moment a write is on the device (its IndexedDB
 * transaction completed: a reload keeps it). scripts/lib/benchLocalSave.ts times "saved" by it.
 * No imports: the bench (node) reads the name from here.
 */
export const KEPT_MARK = 'trimout:outbox-kept';

export function markKept(): void {
  (globalThis as { performance?: { mark?: (name: string) => unknown } }).performance?.mark?.(KEPT_MARK);
}
