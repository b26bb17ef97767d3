/**
 * Photos for print: each photo's print copy, stored beside it at upload (server/services/photos.ts
 * PRINT_SIZE: the largest box a report prints a photo in, at PRINT_DPI = 150 dpi), read from the
 * photo store and embedded as it is: no decoding, no resizing. A stored photo is up to 4096 px on
 * its long side; embedded as it is, a 500-photo report would be a few hundred MB, and downsizing
 * each costs about 40 ms of CPU.
 *
 * A photo stored before print copies were made (no print key) is read in full and downsized once
 * to the print size; the copy is printed and handed to the prefetch's `keep` (services/printCopies.ts),
 * which stores it and records it, so the next report reads the copy.
 *
 * Photos are fetched a few ahead of the page being written (`PhotoPrefetch`), so reading the
 * store overlaps with drawing, and no more than `ahead` are held at once.
 */
import sharp from 'sharp';
import { makePrintCopy, pixelsFor, PRINT_DPI } from '../services/photos';
import type { KeepPrintCopy } from '../services/printCopies';
import type { ObjectStore } from '../storage';

export { pixelsFor, PRINT_DPI };
/** sharp refuses anything larger; stored photos are already at most 4096 px on a side. */
const INPUT_PIXEL_LIMIT = 40_000_000;

export interface PrintPhoto {
  jpeg: Buffer;
  width: number;
  height: number;
}

async function readAll(store: ObjectStore, key: string): Promise<Buffer | null> {
  const obj = await store.get(key);
  if (!obj) return null;
  const chunks: Buffer[] = [];
  for await (const chunk of obj.body) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

/**
 * Width and height of a baseline or progressive JPEG from its frame header (SOFn), without
 * decoding it (ITU-T T.81, B.2.2: after the marker and the segment length, one byte of sample
 * precision, then the height and the width, two bytes each). Null when there is no frame header.
 */
export function jpegSize(bytes: Buffer): { width: number; height: number } | null {
  if (bytes.length < 4 || bytes[0] !== 0xff || bytes[1] !== 0xd8) return null;
  let i = 2;
  while (i + 9 < bytes.length) {
    if (bytes[i] !== 0xff) return null;
    const marker = bytes[i + 1]!;
    if (marker === 0xff) {
      i += 1; // fill byte
      continue;
    }
    const length = bytes.readUInt16BE(i + 2);
    // SOF0–SOF15, except DHT (C4), JPG (C8) and DAC (CC), which share the range.
    if (marker >= 0xc0 && marker <= 0xcf && marker !== 0xc4 && marker !== 0xc8 && marker !== 0xcc) {
      return { height: bytes.readUInt16BE(i + 5), width: bytes.readUInt16BE(i + 7) };
    }
    i += 2 + length;
  }
  return null;
}

/**
 * The photo under `key`, fitted inside a box of `boxPt` points at PRINT_DPI; null when the
 * store has no such object or it cannot be read (the report says "photo not available").
 */
export async function printPhoto(store: ObjectStore, key: string, boxPt: { width: number; height: number }): Promise<PrintPhoto | null> {
  if (!key) return null;
  const bytes = await readAll(store, key).catch(() => null);
  if (!bytes) return null;
  try {
    const { data, info } = await sharp(bytes, { limitInputPixels: INPUT_PIXEL_LIMIT, failOn: 'error' })
      .rotate()
      .resize({ width: pixelsFor(boxPt.width), height: pixelsFor(boxPt.height), fit: 'inside', withoutEnlargement: true })
      .jpeg({ quality: 72 })
      .toBuffer({ resolveWithObject: true });
    return { jpeg: data, width: info.width, height: info.height };
  } catch {
    return null;
  }
}

/** A stored print copy, embedded as it is; null when it is missing or not a JPEG. */
async function storedPrintCopy(store: ObjectStore, printKey: string): Promise<PrintPhoto | null> {
  const bytes = await readAll(store, printKey).catch(() => null);
  const size = bytes ? jpegSize(bytes) : null;
  return bytes && size ? { jpeg: bytes, ...size } : null;
}

/**
 * A photo of a request: its print copy when it has one; otherwise the photo read in full and
 * downsized, once, to the print size, and the copy handed to `keep` (the next report reads it).
 * A request without a photo id (the crew list's thumbnails) is fitted to its own box as before.
 */
async function requestedPhoto(store: ObjectStore, r: PhotoRequest, keep: KeepPrintCopy | undefined): Promise<PrintPhoto | null> {
  if (r.printKey) {
    const copy = await storedPrintCopy(store, r.printKey);
    if (copy) return copy;
    // The copy is named but missing (a restore from a backup taken mid-write): print from the photo.
  }
  if (!r.photoId) return printPhoto(store, r.key, r.box);
  const bytes = await readAll(store, r.key).catch(() => null);
  if (!bytes) return null;
  let jpeg: Buffer;
  try {
    jpeg = await makePrintCopy(bytes);
  } catch {
    return null;
  }
  const size = jpegSize(jpeg);
  if (!size) return null;
  if (!r.printKey && keep) await keep({ photoId: r.photoId, sourceKey: r.key }, jpeg);
  return { jpeg, ...size };
}

export interface PhotoRequest {
  /** The photo's key (its marked copy when it has marks); '' for "no photo" (taken at once as null, never read). */
  key: string;
  box: { width: number; height: number };
  /** The photo's id, when `key` is a photo that has (or should get) a print copy. */
  photoId?: string | null;
  /** Its print copy (of the marked copy when it has marks); null when none was made yet. */
  printKey?: string | null;
}

/**
 * Photos asked for in the order they will be drawn; `take(i)` resolves the i-th while the next
 * `ahead` photos are already being read (and, for a photo without a print copy, downsized: sharp
 * runs on libuv's thread pool, so several at once use the cores while the page is laid out). Requests may be added as later rows
 * arrive, so the window runs on across batches. Each is released once taken; at most `ahead` + 1
 * are held.
 */
export class PhotoPrefetch {
  private readonly requests: PhotoRequest[] = [];
  private readonly pending = new Map<number, Promise<PrintPhoto | null>>();
  private next = 0;
  private held = 0;
  constructor(
    private readonly store: ObjectStore,
    requests: readonly PhotoRequest[] = [],
    private readonly ahead = 8,
    /** Keeps a print copy made for a photo that had none (services/printCopies.ts printCopyKeeper). */
    private readonly keep?: KeepPrintCopy,
  ) {
    this.add(requests);
  }

  /** Appends requests; returns the index of the first (what `take` is called with). */
  add(requests: readonly PhotoRequest[]): number {
    const first = this.requests.length;
    this.requests.push(...requests);
    return first;
  }

  private fill(upTo: number): void {
    while (this.next < this.requests.length && (this.next <= upTo || this.held < this.ahead)) {
      const r = this.requests[this.next]!;
      if (r.key) {
        const photo = requestedPhoto(this.store, r, this.keep);
        this.pending.set(this.next, photo);
        this.held += 1;
      }
      this.next += 1;
    }
  }

  async take(i: number): Promise<PrintPhoto | null> {
    this.fill(i);
    const p = this.pending.get(i);
    if (!p) return null;
    this.pending.delete(i);
    this.held -= 1;
    this.fill(i);
    return p;
  }
}
