/**
 * Room on the device. The browser may evict storage that is not marked persistent, so the app
 * asks for persistent storage when it first keeps something that matters (a photo, a kept level).
 * When storage is nearly full a new photo is refused with a clear message, instead of the
 * browser dropping something already kept.
 */

/** Under this much free room (or over FULL_FRACTION of the quota) the device counts as full. */
export const LOW_ROOM_BYTES = 50 * 1024 * 1024;
export const FULL_FRACTION = 0.95;

export interface StorageFigures {
  usage?: number;
  quota?: number;
}

export type RoomVerdict = { ok: true } | { ok: false; message: string };

const MB = 1024 * 1024;

/**
 * Whether `incoming` more bytes may be stored. Unknown figures (no estimate API) allow it:
 * refusing every photo on a browser that cannot tell would be worse than the risk.
 */
export function roomVerdict(figures: StorageFigures | null, incoming = 0, what = 'this photo'): RoomVerdict {
  if (!figures || !figures.quota || figures.usage === undefined) return { ok: true };
  const after = figures.usage + incoming;
  const free = figures.quota - after;
  if (free >= LOW_ROOM_BYTES && after <= figures.quota * FULL_FRACTION) return { ok: true };
  const freeMb = Math.max(0, Math.floor((figures.quota - figures.usage) / MB));
  return {
    ok: false,
    message:
      `This phone is nearly out of room for Trimout (${freeMb} MB free), so ${what} was not kept. ` +
      'Nothing already on the phone was removed. Send what is waiting or stop keeping a level, then try again.',
  };
}

type StorageManagerLike = {
  estimate?: () => Promise<StorageFigures>;
  persist?: () => Promise<boolean>;
  persisted?: () => Promise<boolean>;
};

function storageManager(): StorageManagerLike | null {
  const nav = (globalThis as { navigator?: { storage?: StorageManagerLike } }).navigator;
  return nav?.storage ?? null;
}

export async function storageFigures(): Promise<StorageFigures | null> {
  const sm = storageManager();
  if (!sm?.estimate) return null;
  try {
    return await sm.estimate();
  } catch {
    return null;
  }
}

export async function checkRoomFor(incoming: number, what?: string): Promise<RoomVerdict> {
  return roomVerdict(await storageFigures(), incoming, what);
}

let asked: Promise<boolean | null> | null = null;

/**
 * Asks once per page for persistent storage (the browser may grant it silently, ask, or refuse);
 * null where the API is missing.
 */
export function askForPersistentStorage(): Promise<boolean | null> {
  asked ??= (async () => {
    const sm = storageManager();
    if (!sm?.persist) return null;
    try {
      if (sm.persisted && (await sm.persisted())) return true;
      return await sm.persist();
    } catch {
      return null;
    }
  })();
  return asked;
}

/** For tests: forget that persistence was asked for. */
export function resetPersistentStorageAsk() {
  asked = null;
}
