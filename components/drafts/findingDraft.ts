import { useEffect, useMemo, useRef, useState } from 'react';
import { TRADE_KEYS, type TradeKey } from '../../shared/words';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { dropPhotos, keepPhotos, keptPhotos } from './photoBlobs';
import { keysUnder, readEntry, removeEntry, storeKey, writeEntry } from './store';

/** A half-filled finding as kept on the phone (photos apart, in IndexedDB). */
export interface FindingDraft {
  catalogueItemId?: string;
  /** "Something else": its title and trade instead of a defect type. */
  title?: string;
  trade?: TradeKey;
  severity?: 'critical' | 'major' | 'minor';
  companyId?: string;
  dueOn?: string;
  note?: string;
  measuredText?: string | null;
}

const SEVERITIES = new Set(['critical', 'major', 'minor']);
const optString = (v: unknown) => v === undefined || typeof v === 'string';

function isFindingDraft(data: unknown): data is FindingDraft {
  if (typeof data !== 'object' || data === null) return false;
  const d = data as Record<string, unknown>;
  return (
    optString(d.catalogueItemId) &&
    optString(d.title) &&
    (d.trade === undefined || (typeof d.trade === 'string' && TRADE_KEYS.includes(d.trade as TradeKey))) &&
    (d.severity === undefined || (typeof d.severity === 'string' && SEVERITIES.has(d.severity))) &&
    optString(d.companyId) &&
    optString(d.dueOn) &&
    optString(d.note) &&
    (d.measuredText === null || optString(d.measuredText))
  );
}

/** The key of the finding being written from a unit check's item ("other" for one not listed). */
export function findingDraftKey(userId: string, jobId: string, unitId: string, itemId: string | null): string {
  return storeKey('finding', userId, jobId, unitId, itemId ?? 'other');
}

/** Forgets every finding draft of a unit (its check's draft was discarded). */
export function clearFindingDrafts(userId: string, jobId: string, unitId: string): void {
  for (const key of keysUnder(storeKey('finding', userId, jobId, unitId))) {
    removeEntry(key);
    void dropPhotos(key);
  }
}

type FormValuesSeen = FindingDraft & { photos?: readonly (Partial<PickedPhoto> | undefined)[] };

export interface KeptFinding {
  key: string | undefined;
  /** The stored values to start the form from (empty without a draft). */
  initial: FindingDraft;
  /** Forgets the draft (the finding was logged, or the form cancelled): nothing is kept after. */
  clear(): void;
  cleared(): boolean;
}

/** Reads the kept finding once, when the form opens. */
export function useFindingDraft(key: string | undefined): KeptFinding {
  const [initial] = useState<FindingDraft>(() => (key ? (readEntry(key, isFindingDraft)?.data ?? {}) : {}));
  const cleared = useRef(false);
  return useMemo(
    () => ({
      key,
      initial,
      cleared: () => cleared.current,
      clear() {
        if (!key) return;
        cleared.current = true;
        removeEntry(key);
        void dropPhotos(key);
      },
    }),
    [initial, key],
  );
}

/**
 * Keeps the form's values on every change (note, severity, company, due date, measured value)
 * and its photos as blobs; puts kept photos back into the form once, when it opens.
 */
export function useKeepFindingDraft(
  kept: KeptFinding,
  subscribe: (cb: (values: FormValuesSeen) => void) => { unsubscribe(): void },
  restorePhotos: (photos: PickedPhoto[]) => void,
): void {
  const restore = useRef(restorePhotos);
  useEffect(() => {
    restore.current = restorePhotos;
  }, [restorePhotos]);
  const key = kept.key;
  useEffect(() => {
    if (!key) return;
    let alive = true;
    let photoKeys = '';
    void keptPhotos(key).then((photos) => {
      if (!alive || photos.length === 0) return;
      photoKeys = photos.map((p) => p.key).join(',');
      const url = (globalThis as { URL?: { createObjectURL?: (b: Blob) => string } }).URL?.createObjectURL;
      restore.current(photos.map((p) => ({ key: p.key, name: p.name, type: p.type, blob: p.blob, uri: url ? url(p.blob) : '' })));
    });
    const sub = subscribe(({ photos, ...values }) => {
      if (!alive || kept.cleared()) return;
      const { catalogueItemId, title, trade, severity, companyId, dueOn, note, measuredText } = values;
      writeEntry(key, { catalogueItemId, title, trade, severity, companyId, dueOn, note, measuredText } satisfies FindingDraft);
      const list = (photos ?? []).filter((p): p is PickedPhoto => Boolean(p?.key && p.blob));
      const keys = list.map((p) => p.key).join(',');
      if (keys !== photoKeys) {
        photoKeys = keys;
        void keepPhotos(key, list.map((p) => ({ key: p.key, name: p.name, type: p.type, blob: p.blob! })));
      }
    });
    return () => {
      alive = false;
      sub.unsubscribe();
    };
  }, [key, kept, subscribe]);
}
