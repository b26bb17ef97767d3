/**
 * Every photo picked or taken goes through here before a form holds it: downscaled on the
 * device, then checked against the room left. Persistent storage is asked for with the first one.
 */
import type { UploadPhoto } from '../queries/findings';
import { askForPersistentStorage, checkRoomFor } from './deviceStorage';
import { downscalePhoto } from './downscale';

export interface PreparedPhotos<P> {
  photos: P[];
  /** Why the photos were not taken (the device is nearly full); null when they were. */
  refused: string | null;
}

export async function preparePhotos<P extends UploadPhoto>(picked: readonly P[]): Promise<PreparedPhotos<P>> {
  const out: P[] = [];
  // One at a time: a phone decoding several 12-megapixel photos at once runs out of memory.
  for (const p of picked) out.push(await downscalePhoto(p));
  const bytes = out.reduce((sum, p) => sum + (p.blob?.size ?? 0), 0);
  const room = await checkRoomFor(bytes, out.length === 1 ? 'this photo' : 'these photos');
  if (!room.ok) {
    const g = globalThis as { URL?: { revokeObjectURL?(u: string): void } };
    for (const p of out) if (p.uri.startsWith('blob:')) g.URL?.revokeObjectURL?.(p.uri);
    return { photos: [], refused: room.message };
  }
  void askForPersistentStorage();
  return { photos: out, refused: null };
}
