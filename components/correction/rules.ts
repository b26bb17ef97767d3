/**
 * What the screens offer, by role and status: the same status machine the server runs
 * (shared/findingStatus.ts). The server stays the authority: a refusal shows its message.
 */
import { decide, decideAddPhotos, decidePin } from '../../shared/findingStatus';
import type { FindingAction } from '../../shared/schemas/findings';
import type { FindingStatus, Role } from '../../shared/words';
import { ApiError } from '../api/client';
import type { Write } from '../api/mutations';
import type { WriteErrorWords } from '../api/writeErrors';

/** True when this role may take this action on a finding in this status. */
export function mayDo(action: FindingAction, status: FindingStatus, role: Role, isLogger: boolean): boolean {
  return decide(status, action, role, isLogger).allowed;
}

/** True when this role may place, move or remove this finding's pin on the plan (the server's rule). */
export function mayPin(status: FindingStatus, role: Role): boolean {
  return decidePin(status, role).allowed;
}

/** True when this role may add photos of the defect to this finding now (the server's rule). */
export function mayAddPhotos(status: FindingStatus, role: Role): boolean {
  return decideAddPhotos(status, role).allowed;
}

/** GC managers and inspectors change many findings at once from the table. */
export function mayBulkChange(role: Role | undefined): boolean {
  return role === 'gc_manager' || role === 'inspector';
}

export const STALE_MESSAGE = 'Someone changed this finding while you were looking at it. It is shown as it is now: check it and try again.';

/**
 * The words for a refused write on a finding (components/api/writeErrors.ts): the finding's own
 * 412 sentence, and a 409 as the server says it ("This finding is closed; it cannot be accepted."
 * already names the state the screen reloads to).
 */
export const FINDING_WRITE_WORDS: WriteErrorWords = { stale: STALE_MESSAGE, afterConflict: '' };

/** True when the screen should reload the finding (someone else changed it first). */
export function isStale(err: unknown): boolean {
  return err instanceof ApiError && (err.status === 412 || err.status === 409);
}

/**
 * One write per user action: a retry after a lost connection or a server failure re-sends the
 * same write (same Idempotency-Key); a refusal (4xx) or a success lets the next press make a new one.
 */
export class ActionWrite {
  private current: Write | null = null;
  take(make: () => Write): Write {
    this.current ??= make();
    return this.current;
  }
  settled(err?: unknown) {
    if (!err || (err instanceof ApiError && err.status >= 400 && err.status < 500)) this.current = null;
  }
}
