import type { CheckMark } from '../../shared/words';
import { readEntry, removeEntry, storeKey, writeEntry, type Stored } from './store';

/** A unit check as it stands on the phone before "Save": what differs from the unit's saved check. */
export interface CheckDraft {
  unitTag: string;
  /** The saved check the marks started from (null: the unit had none), to say when it has changed since. */
  baseCheckId: string | null;
  marks: Record<string, CheckMark>;
  /** Measured values as typed, by catalogue item id. */
  texts: Record<string, string>;
  /** Findings logged from this check on this visit ("#214"), by catalogue item id. */
  logged: Record<string, string[]>;
  /** The finding form that was open (an item id, or "other"), to open it again on "Continue". */
  openFinding: string | null;
}

const MARKS = new Set<string>(['ok', 'defect', 'not_applicable']);

function isRecordOf(value: unknown, check: (v: unknown) => boolean): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value) && Object.values(value).every(check);
}

export function isCheckDraft(data: unknown): data is CheckDraft {
  if (typeof data !== 'object' || data === null) return false;
  const d = data as Record<string, unknown>;
  return (
    typeof d.unitTag === 'string' &&
    (d.baseCheckId === null || typeof d.baseCheckId === 'string') &&
    isRecordOf(d.marks, (m) => typeof m === 'string' && MARKS.has(m)) &&
    isRecordOf(d.texts, (t) => typeof t === 'string') &&
    isRecordOf(d.logged, (l) => Array.isArray(l) && l.every((x) => typeof x === 'string')) &&
    (d.openFinding === null || typeof d.openFinding === 'string')
  );
}

export function checkDraftKey(userId: string, jobId: string, unitId: string): string {
  return storeKey('check', userId, jobId, unitId);
}

export function readCheckDraft(key: string): Stored<CheckDraft> | null {
  return readEntry(key, isCheckDraft);
}

export function writeCheckDraft(key: string, draft: CheckDraft): boolean {
  return writeEntry(key, draft);
}

export function clearCheckDraft(key: string): void {
  removeEntry(key);
}

/** True when the draft holds anything the saved check does not: marks, values or logged findings. */
export function draftDiffers(
  draft: Pick<CheckDraft, 'marks' | 'texts' | 'logged'>,
  base: { marks: Record<string, CheckMark>; texts: Record<string, string> },
): boolean {
  const same = (a: Record<string, string>, b: Record<string, string>) => {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)].filter((k) => (a[k] ?? '') !== '' || (b[k] ?? '') !== ''));
    for (const k of keys) if ((a[k] ?? '') !== (b[k] ?? '')) return false;
    return true;
  };
  return !same(draft.marks, base.marks) || !same(draft.texts, base.texts) || Object.values(draft.logged).some((l) => l.length > 0);
}
