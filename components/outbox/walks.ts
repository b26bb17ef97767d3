/**
 * The person's open walk on a level, remembered on the phone when the server names it, so a unit
 * check saved with no signal still belongs to it (every check belongs to a walk). Kept in the
 * draft store under the person's own key.
 */
import { readEntry, removeEntry, storeKey, writeEntry } from '../drafts/store';

const key = (userId: string, jobId: string, levelId: string) => storeKey('outbox', userId, jobId, 'walk', levelId);
const isId = (d: unknown): d is string => typeof d === 'string' && d.length > 0;

export function rememberOpenWalk(userId: string, jobId: string, levelId: string, walkId: string | null | undefined): void {
  if (walkId) writeEntry(key(userId, jobId, levelId), walkId);
}

export function rememberedOpenWalk(userId: string, jobId: string, levelId: string): string | null {
  return readEntry(key(userId, jobId, levelId), isId)?.data ?? null;
}

/** The walk ended (or is ending, waiting to send): the next check on the level starts another. */
export function forgetOpenWalk(userId: string, jobId: string, levelId: string): void {
  removeEntry(key(userId, jobId, levelId));
}
