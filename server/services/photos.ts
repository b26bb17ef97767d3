/**
 * Photos: read from the bytes, re-encoded, stored, served.
 *
 * THE CONTRACT FOR CALLERS (a finding or a fix with photos is saved all or nothing):
 *   1. `processPhotos(files, { charge })` first. It reads every file's type and dimensions
 *      from its first bytes and header, refuses the whole request (400/413/415 with a clear
 *      message) if any one file is not an acceptable photo or all of them together exceed
 *      PHOTO_REQUEST_PIXEL_BUDGET, charges the total to the caller (`charge`, the per-user
 *      window: 429), and only then decodes them, one at a time, each in one of the process's
 *      DECODE_CONCURRENCY decode slots. Nothing is stored before it returns.
 *   2. `withStoredPhotos(store, processed, work, { pending })`: records the keys it is about to
 *      write as pending uploads (server/services/pendingUploads.ts, committed first), stores
 *      every photo (full + thumbnail + print copy) under those fresh server-made keys, then runs
 *      `work(stored, claim)`, which writes the finding and its `photos` rows in ONE database
 *      transaction and calls `claim(transaction)` in it (the pending rows go with the commit).
 *      If storing fails, or `work` throws (the transaction rolled back), every stored object is
 *      deleted again and then its pending rows. A crash in between leaves the pending rows, and
 *      the reaper deletes those objects later.
 *   So a failed upload never leaves a finding pointing at a missing photo, and no photo is left
 *   in the store that nothing names. (Deleting the objects of a row that is later removed is the
 *   caller's job: `removeStoredPhotos` after its transaction commits.) `storePhotos` and
 *   `removeStoredPhotos` are the two halves, for callers that need them apart.
 *
 * Processing (`processPhoto`):
 * - The type is decided from the bytes (magic numbers), never from the name or the declared
 *   Content-Type: JPEG, PNG, WebP and HEIC/HEIF are accepted; SVG, GIF, AVIF, text, empty
 *   files and everything else are refused.
 * - Dimensions are read from the header and anything over PHOTO_PIXEL_LIMIT (40 MP, well under
 *   sharp's default of 268 MP) is refused before it is decoded (a pixel flood); sharp's
 *   `limitInputPixels` is set to the same value as a second guard. A request's images together
 *   may have at most PHOTO_REQUEST_PIXEL_BUDGET (100 MP): a small, flat PNG declaring 40 MP
 *   costs little to send and a lot to decode, and ten of them must not be decoded at all.
 * - JPEG, PNG and WebP are decoded by sharp with `failOn: 'truncated'` (a cut-off file is
 *   refused). HEIC is decoded by `heic-decode` (libheif compiled to WebAssembly, no download):
 *   sharp's prebuilt libvips reads HEIF containers but has no HEVC decoder.
 * - EXIF orientation is applied (`.rotate()`), transparency is flattened onto white, the long
 *   edge is capped at FULL_MAX_EDGE, and the result is re-encoded as a fresh sRGB JPEG with no
 *   metadata at all (no EXIF, no GPS, no XMP, no ICC), plus a THUMB_EDGE thumbnail and a print
 *   copy (`makePrintCopy`: the size of the largest box a report prints a photo in, at PRINT_DPI),
 *   so a report reads a small JPEG and never decodes the full photo.
 */
import { createHash, randomUUID } from 'node:crypto';
import { open, readFile } from 'node:fs/promises';
import { pipeline } from 'node:stream/promises';
import type { Response } from 'express';
import type { Transaction } from 'sequelize';
import sharp from 'sharp';
import { HttpError, notFound } from '../errors';
import type { ObjectStore } from '../storage/types';
import type { PendingUploads } from './pendingUploads';
import { createSlots } from './slots';
import type { PhotoStage } from '../../shared/schemas/findings';

/** Largest accepted photo in pixels (width × height): 40 MP, above any phone camera's 12–24 MP default. */
export const PHOTO_PIXEL_LIMIT = 40_000_000;
/** Pixels of all the images of one request together: 100 MP, eight 12 MP phone photos, two at 40 MP. */
export const PHOTO_REQUEST_PIXEL_BUDGET = 100_000_000;
/**
 * Images decoded at once in this process (photos and plans). Decoding a 40 MP image takes about
 * a second of CPU and well over 100 MB; more requests wait their turn instead of adding to that.
 */
export const DECODE_CONCURRENCY = 2;
/** The process's decode slots (server/services/slots.ts). */
export const decodeSlots = createSlots(DECODE_CONCURRENCY);
/** Long edge of the stored full-size photo, in pixels (a 12 MP phone photo, 4032 px, is kept as is). */
export const FULL_MAX_EDGE = 4096;
/** Long edge of the thumbnail, in pixels. */
export const THUMB_EDGE = 320;
export const FULL_JPEG_QUALITY = 85;
export const THUMB_JPEG_QUALITY = 75;
/** Resolution a report prints photos at: enough for a photo on paper, far below a phone's. */
export const PRINT_DPI = 150;
/** Pixels for `points` (1/72 in) printed at PRINT_DPI: points / 72 × 150. */
export function pixelsFor(points: number): number {
  return Math.round((points / 72) * PRINT_DPI);
}
/**
 * The largest box, in points, a report prints a photo in: the close-out report's pair across the
 * page (server/reports/closeOut.ts PHOTO_BOX: half of the 524 pt text width less the 14 pt gap, 4:3).
 * The unit sheet's and the close-out report's three across (THIRD_BOX) are smaller; a test keeps
 * them in step.
 */
export const PRINT_BOX_POINTS = { width: 255, height: 191.25 } as const;
/** The print copy fits inside this many pixels: 531 × 398 (255 pt and 191.25 pt at 150 dpi). */
export const PRINT_SIZE = { width: pixelsFor(PRINT_BOX_POINTS.width), height: pixelsFor(PRINT_BOX_POINTS.height) } as const;
/** Plain for print: the photos are often printed in grey, where a higher quality shows nothing more. */
export const PRINT_JPEG_QUALITY = 72;
/** What every stored photo is. */
export const PHOTO_CONTENT_TYPE = 'image/jpeg';
/** Photos never change under an id: browsers may keep them, privately, for a day. */
export const PHOTO_MAX_AGE_SECONDS = 24 * 60 * 60;

export const ACCEPTED_PHOTO_TYPES = ['image/jpeg', 'image/png', 'image/webp', 'image/heic'] as const;
export type PhotoType = (typeof ACCEPTED_PHOTO_TYPES)[number];

export interface ProcessedPhoto {
  /** The re-encoded photo (JPEG, no metadata). */
  full: Buffer;
  /** The thumbnail (JPEG, long edge THUMB_EDGE or less). */
  thumb: Buffer;
  /** The print copy (JPEG, inside PRINT_SIZE): what a report embeds. */
  print: Buffer;
  /** Of `full`, after orientation. */
  width: number;
  height: number;
  /** The type of the uploaded bytes. */
  detectedType: PhotoType;
  /** Hex SHA-256 of `full`, the stored object. */
  sha256: string;
}

export interface StoredPhoto {
  /** The photo's id: the UUID in its keys, to be used as the `photos` row id. */
  id: string;
  key: string;
  thumbKey: string;
  printKey: string;
  contentType: typeof PHOTO_CONTENT_TYPE;
  byteSize: number;
  width: number;
  height: number;
  sha256: string;
  sourceType: PhotoType;
}

const ACCEPTED_LIST = 'JPEG, PNG, WebP or HEIC';

const refusedType = (what: string) =>
  new HttpError(415, 'unsupported_photo_type', `${what}. Photos must be ${ACCEPTED_LIST} images.`);
const unreadable = () =>
  new HttpError(400, 'unreadable_photo', 'The photo could not be read: the file is damaged or incomplete. Take or pick it again.');

// ---------------------------------------------------------------------------------------------
// Type from the bytes

type Detection = { type: PhotoType } | { refused: string };

function ascii(buf: Buffer, start: number, end: number): string {
  return buf.subarray(start, Math.min(end, buf.length)).toString('latin1');
}

/** HEIF family from the ISO-BMFF `ftyp` box: major brand and compatible brands. */
function heifBrands(buf: Buffer): string[] | null {
  if (buf.length < 16 || ascii(buf, 4, 8) !== 'ftyp') return null;
  const boxSize = buf.readUInt32BE(0);
  const end = Math.min(boxSize >= 16 ? boxSize : 16, buf.length, 4096);
  const brands = [ascii(buf, 8, 12)];
  for (let i = 16; i + 4 <= end; i += 4) brands.push(ascii(buf, i, i + 4));
  return brands;
}

const HEIC_BRANDS = new Set(['heic', 'heix', 'heim', 'heis', 'hevc', 'hevx', 'hevm', 'hevs']);
const AVIF_BRANDS = new Set(['avif', 'avis']);

/** Decides the type of an upload from its first bytes. */
export function detectPhotoType(buf: Buffer): Detection {
  if (buf.length === 0) return { refused: 'The file is empty (0 bytes)' };
  if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return { type: 'image/jpeg' };
  if (buf.length >= 8 && buf.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))) {
    return { type: 'image/png' };
  }
  if (buf.length >= 12 && ascii(buf, 0, 4) === 'RIFF' && ascii(buf, 8, 12) === 'WEBP') return { type: 'image/webp' };
  const brands = heifBrands(buf);
  if (brands) {
    if (brands.some((b) => HEIC_BRANDS.has(b))) return { type: 'image/heic' };
    if (brands.some((b) => AVIF_BRANDS.has(b))) return { refused: 'This file is an AVIF image, which is not accepted' };
    if (brands[0] === 'mif1' || brands[0] === 'msf1') return { type: 'image/heic' };
    return { refused: 'This file is a video or another ISO media file, not a photo' };
  }
  const head = ascii(buf, 0, 6);
  if (head === 'GIF87a' || head === 'GIF89a') return { refused: 'This file is a GIF image, which is not accepted' };
  const text = buf.subarray(0, 512).toString('utf8').replace(/^\uFEFF/, '').trimStart().toLowerCase();
  if (text.startsWith('<svg') || (text.startsWith('<?xml') && text.includes('<svg'))) {
    return { refused: 'This file is an SVG drawing, which is not accepted' };
  }
  if (head.startsWith('%PDF')) return { refused: 'This file is a PDF document, not a photo' };
  return { refused: 'This file is not an image' };
}

// ---------------------------------------------------------------------------------------------
// Decoding

interface RawImage {
  data: Buffer;
  info: { width: number; height: number; channels: 1 | 2 | 3 | 4 };
}

function assertPixels(width: number, height: number) {
  if (!(width > 0 && height > 0)) throw unreadable();
  if (width * height > PHOTO_PIXEL_LIMIT) {
    throw new HttpError(
      413,
      'too_many_pixels',
      `The photo is ${width} × ${height} pixels; at most ${PHOTO_PIXEL_LIMIT / 1_000_000} megapixels are accepted.`,
    );
  }
}

const SHARP_INPUT: sharp.SharpOptions = { limitInputPixels: PHOTO_PIXEL_LIMIT, failOn: 'truncated', sequentialRead: true };

/** Orientation applied, flattened onto white, long edge capped, 8-bit sRGB raw pixels. */
function normalise(image: sharp.Sharp): Promise<RawImage> {
  return image
    .rotate()
    .flatten({ background: '#ffffff' })
    .resize({ width: FULL_MAX_EDGE, height: FULL_MAX_EDGE, fit: 'inside', withoutEnlargement: true })
    .toColourspace('srgb')
    .raw({ depth: 'uchar' })
    .toBuffer({ resolveWithObject: true })
    .then(({ data, info }) => ({ data, info: { width: info.width, height: info.height, channels: info.channels } }));
}

const SHARP_FORMAT: Record<Exclude<PhotoType, 'image/heic'>, string> = {
  'image/jpeg': 'jpeg',
  'image/png': 'png',
  'image/webp': 'webp',
};

async function decodeWithSharp(buf: Buffer, type: Exclude<PhotoType, 'image/heic'>): Promise<RawImage> {
  let meta: sharp.Metadata;
  try {
    // Header only, no pixels decoded: read without the pixel limit so an oversized image gets
    // the clear 413 below rather than a generic decoding error.
    meta = await sharp(buf, { limitInputPixels: false }).metadata();
  } catch {
    throw unreadable();
  }
  if (meta.format !== SHARP_FORMAT[type]) throw unreadable();
  assertPixels(meta.width ?? 0, meta.height ?? 0);
  try {
    return await normalise(sharp(buf, SHARP_INPUT));
  } catch {
    throw unreadable();
  }
}

/** The part of heic-decode's API used here (the package ships no types). */
interface HeicImage {
  width: number;
  height: number;
  decode(): Promise<{ width: number; height: number; data: Uint8ClampedArray }>;
}
type HeicDecodeAll = (input: { buffer: Uint8Array }) => Promise<HeicImage[] & { dispose(): void }>;

let heicDecoder: HeicDecodeAll | undefined;
function loadHeicDecoder(): HeicDecodeAll {
  // Loaded on first use: it compiles libheif's WebAssembly (a few MB) when required.
  heicDecoder ??= (require('heic-decode') as { all: HeicDecodeAll }).all;
  return heicDecoder;
}

async function decodeHeic(buf: Buffer): Promise<RawImage> {
  let images: Awaited<ReturnType<HeicDecodeAll>>;
  try {
    images = await loadHeicDecoder()({ buffer: buf });
  } catch {
    throw unreadable();
  }
  try {
    const primary = images[0];
    if (!primary) throw unreadable();
    // Header dimensions first: nothing is decoded for a pixel flood.
    assertPixels(primary.width, primary.height);
    let decoded: Awaited<ReturnType<HeicImage['decode']>>;
    try {
      decoded = await primary.decode();
    } catch {
      throw unreadable();
    }
    // libheif has already applied the file's rotation and mirroring (irot/imir).
    const pixels = Buffer.from(decoded.data.buffer, decoded.data.byteOffset, decoded.data.byteLength);
    return await normalise(
      sharp(pixels, { raw: { width: decoded.width, height: decoded.height, channels: 4 }, limitInputPixels: PHOTO_PIXEL_LIMIT }),
    );
  } finally {
    images.dispose();
  }
}

/** The print copy of an image: fitted inside PRINT_SIZE (never enlarged), plain JPEG, no metadata. */
export function printCopyOf(image: sharp.Sharp): Promise<Buffer> {
  return image
    .resize({ width: PRINT_SIZE.width, height: PRINT_SIZE.height, fit: 'inside', withoutEnlargement: true })
    .jpeg({ quality: PRINT_JPEG_QUALITY })
    .toBuffer();
}

/**
 * The print copy of a stored photo (a JPEG this module wrote: already upright, sRGB, no metadata),
 * for photos stored before print copies were made. Throws when the bytes are not a readable image.
 */
export function makePrintCopy(stored: Buffer): Promise<Buffer> {
  return printCopyOf(sharp(stored, { limitInputPixels: PHOTO_PIXEL_LIMIT, failOn: 'error' }).rotate());
}

async function encode(raw: RawImage): Promise<Pick<ProcessedPhoto, 'full' | 'thumb' | 'print' | 'width' | 'height'>> {
  const input = () => sharp(raw.data, { raw: raw.info });
  // No withMetadata()/keepExif(): sharp writes no EXIF, XMP or ICC into these JPEGs.
  const [full, thumb, print] = await Promise.all([
    input().jpeg({ quality: FULL_JPEG_QUALITY }).toBuffer(),
    input()
      .resize({ width: THUMB_EDGE, height: THUMB_EDGE, fit: 'inside', withoutEnlargement: true })
      .jpeg({ quality: THUMB_JPEG_QUALITY })
      .toBuffer(),
    printCopyOf(input()),
  ]);
  return { full, thumb, print, width: raw.info.width, height: raw.info.height };
}

/**
 * Reads one upload and returns the re-encoded photo and its thumbnail, or throws an HttpError:
 * 400 empty_photo / unreadable_photo, 413 too_many_pixels, 415 unsupported_photo_type.
 */
export async function processPhoto(buffer: Buffer): Promise<ProcessedPhoto> {
  if (buffer.length === 0) throw new HttpError(400, 'empty_photo', 'The photo is empty (0 bytes). Take or pick it again.');
  const detected = detectPhotoType(buffer);
  if ('refused' in detected) throw refusedType(detected.refused);
  const raw = detected.type === 'image/heic' ? await decodeHeic(buffer) : await decodeWithSharp(buffer, detected.type);
  const out = await encode(raw);
  return { ...out, detectedType: detected.type, sha256: createHash('sha256').update(out.full).digest('hex') };
}

/** An upload to process: bytes in memory, or a temporary file (server/middleware/upload.ts). */
export type PhotoInput = { buffer: Buffer } | { path: string };

const HEAD_BYTES = 4096;

async function headOf(input: PhotoInput): Promise<Buffer> {
  if ('buffer' in input) return input.buffer.subarray(0, HEAD_BYTES);
  const handle = await open(input.path, 'r');
  try {
    const buf = Buffer.alloc(HEAD_BYTES);
    const { bytesRead } = await handle.read(buf, 0, HEAD_BYTES, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await handle.close();
  }
}

const bytesOf = (input: PhotoInput): Promise<Buffer> => ('buffer' in input ? Promise.resolve(input.buffer) : readFile(input.path));

/** Width × height from the header only (nothing decoded), or an HttpError as processPhoto would give. */
async function headerPixels(input: PhotoInput): Promise<number> {
  const head = await headOf(input);
  if (head.length === 0) throw new HttpError(400, 'empty_photo', 'The photo is empty (0 bytes). Take or pick it again.');
  const detected = detectPhotoType(head);
  if ('refused' in detected) throw refusedType(detected.refused);
  let meta: sharp.Metadata | undefined;
  try {
    meta = await sharp('buffer' in input ? input.buffer : input.path, { limitInputPixels: false }).metadata();
  } catch {
    // libvips could not read the header: the decoder says so (HEIC goes through heic-decode).
    if (detected.type !== 'image/heic') throw unreadable();
  }
  if (detected.type === 'image/heic' && (!meta?.width || !meta?.height)) {
    // Read the container (no pixels decoded) when libvips cannot.
    let images: Awaited<ReturnType<HeicDecodeAll>>;
    try {
      images = await loadHeicDecoder()({ buffer: await bytesOf(input) });
    } catch {
      throw unreadable();
    }
    try {
      const primary = images[0];
      if (!primary) throw unreadable();
      assertPixels(primary.width, primary.height);
      return primary.width * primary.height;
    } finally {
      images.dispose();
    }
  }
  const width = meta?.width ?? 0;
  const height = meta?.height ?? 0;
  assertPixels(width, height);
  return width * height;
}

/** Names the photo in a refusal when the request has several. */
function labelled(err: unknown, i: number, n: number): unknown {
  if (err instanceof HttpError && n > 1) {
    return new HttpError(err.status, err.id, `Photo ${i + 1} of ${n}: ${err.message}`, err.fields, err.headers);
  }
  return err;
}

export interface ProcessPhotosOptions {
  /**
   * Called with the request's total pixels after every header was checked and before anything
   * is decoded: the per-user window (server/middleware/upload.ts UploadGuard.chargePixels),
   * which throws 429 when it is spent.
   */
  charge?: (pixels: number) => void;
}

/**
 * Processes every upload of a request before anything is stored. First every file's type and
 * dimensions are read from its first bytes and header (nothing decoded): one bad file, one
 * image over PHOTO_PIXEL_LIMIT or a total over PHOTO_REQUEST_PIXEL_BUDGET refuses the request.
 * Then the files are decoded one at a time, each in a decode slot (bounded memory and CPU
 * across the process). With several files a refusal's message names which.
 */
export async function processPhotos(files: readonly PhotoInput[], options: ProcessPhotosOptions = {}): Promise<ProcessedPhoto[]> {
  let total = 0;
  for (const [i, file] of files.entries()) {
    try {
      total += await headerPixels(file);
    } catch (err) {
      throw labelled(err, i, files.length);
    }
  }
  if (total > PHOTO_REQUEST_PIXEL_BUDGET) {
    throw new HttpError(
      413,
      'pixel_budget_exceeded',
      `These ${files.length} photos have ${Math.round(total / 1_000_000)} megapixels together; at most ${PHOTO_REQUEST_PIXEL_BUDGET / 1_000_000} megapixels are accepted in one request. Send fewer photos at a time.`,
    );
  }
  options.charge?.(total);
  const out: ProcessedPhoto[] = [];
  for (const [i, file] of files.entries()) {
    try {
      out.push(await decodeSlots.run(async () => processPhoto(await bytesOf(file))));
    } catch (err) {
      throw labelled(err, i, files.length);
    }
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Storage

/** The object keys of a photo: server-made from its UUID, never from a client's file name. */
export function photoKeys(id: string): { key: string; thumbKey: string; printKey: string } {
  return { key: `photos/${id}.jpg`, thumbKey: `photos/${id}-thumb.jpg`, printKey: `photos/${id}-print.jpg` };
}

/**
 * Keys of stored photos (every variant: full, thumbnail and print copy), for removeStoredPhotos.
 * A photo stored before print copies were made may have none yet (null).
 */
export function keysOf(photos: readonly { key: string; thumbKey: string; printKey?: string | null }[]): string[] {
  return photos.flatMap((p) => [p.key, p.thumbKey, ...(p.printKey ? [p.printKey] : [])]);
}

/**
 * Stores each processed photo (full, thumbnail and print copy) under a fresh UUID (or the ids given, one per
 * photo). All or nothing: if any write fails, whatever this call wrote is deleted before the
 * error is rethrown.
 */
export async function storePhotos(
  store: ObjectStore,
  processed: readonly ProcessedPhoto[],
  ids: readonly string[] = processed.map(() => randomUUID()),
): Promise<StoredPhoto[]> {
  const written: string[] = [];
  const stored: StoredPhoto[] = [];
  try {
    for (const [i, photo] of processed.entries()) {
      const id = ids[i]!;
      const { key, thumbKey, printKey } = photoKeys(id);
      written.push(key);
      await store.put(key, photo.full, PHOTO_CONTENT_TYPE);
      written.push(thumbKey);
      await store.put(thumbKey, photo.thumb, PHOTO_CONTENT_TYPE);
      written.push(printKey);
      await store.put(printKey, photo.print, PHOTO_CONTENT_TYPE);
      stored.push({
        id,
        key,
        thumbKey,
        printKey,
        contentType: PHOTO_CONTENT_TYPE,
        byteSize: photo.full.length,
        width: photo.width,
        height: photo.height,
        sha256: photo.sha256,
        sourceType: photo.detectedType,
      });
    }
  } catch (err) {
    await removeStoredPhotos(store, written).catch(() => undefined);
    throw err;
  }
  return stored;
}

/** The `photos` row values for stored photos (Photo.bulkCreate inside the caller's transaction). */
export function photoRowValues(
  stored: readonly StoredPhoto[],
  owner: { jobId: string; uploadedBy: string; findingId?: string | null; fixId?: string | null; stage?: PhotoStage },
) {
  return stored.map((p) => ({
    id: p.id,
    jobId: owner.jobId,
    storageKey: p.key,
    thumbKey: p.thumbKey,
    printKey: p.printKey,
    contentType: p.contentType,
    sourceType: p.sourceType,
    byteSize: p.byteSize,
    width: p.width,
    height: p.height,
    sha256: p.sha256,
    uploadedBy: owner.uploadedBy,
    findingId: owner.findingId ?? null,
    fixId: owner.fixId ?? null,
    // A fix's photos show the fix; a finding's show the defect unless the owner says otherwise (re-inspection).
    stage: owner.stage ?? (owner.fixId ? 'fix' : 'finding'),
  }));
}

/**
 * Deletes stored objects by key (keys that are already gone are fine). Rejects if the store
 * refuses; callers cleaning up after another error log this and rethrow the first one.
 */
export async function removeStoredPhotos(store: ObjectStore, keys: readonly string[]): Promise<void> {
  if (keys.length === 0) return;
  await store.delete(keys);
}

export interface StoredPhotosOptions {
  /** The pending-uploads record (server/services/pendingUploads.ts). */
  pending: PendingUploads;
  log?: (message: string, err?: unknown) => void;
}

/**
 * Deletes objects whose write failed or was not needed, then their pending rows. When the store
 * refuses, the rows stay (the reaper tries again later) and the failure is logged, not thrown.
 */
export async function discardStoredPhotos(
  store: ObjectStore,
  keys: readonly string[],
  options: StoredPhotosOptions,
  why: string,
): Promise<void> {
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  try {
    await removeStoredPhotos(store, keys);
  } catch (err) {
    log(`could not remove ${keys.length} stored object(s) ${why} (left for the reaper): ${keys.join(', ')}`, err);
    return;
  }
  await options.pending.release(keys).catch((err: unknown) => log(`could not release pending uploads ${why}`, err));
}

/**
 * Records the keys as pending, stores the photos, runs `work` (the caller's database transaction
 * that writes the rows that reference them; it must call `claim(transaction)` in it), and deletes
 * the stored objects and their pending rows again if storing or `work` throws. Returns what
 * `work` returns. A cleanup failure is logged (the pending rows then stay and the reaper deletes
 * those objects later: they are unreferenced, never referenced-but-missing) and the original
 * error is rethrown.
 */
export async function withStoredPhotos<T>(
  store: ObjectStore,
  processed: readonly ProcessedPhoto[],
  work: (stored: StoredPhoto[], claim: (transaction: Transaction) => Promise<void>) => Promise<T>,
  options: StoredPhotosOptions,
): Promise<T> {
  const ids = processed.map(() => randomUUID());
  const keys = keysOf(ids.map(photoKeys));
  // Committed before the first byte is stored: a crash from here on leaves a row naming each key.
  await options.pending.record(keys);
  let stored: StoredPhoto[];
  try {
    stored = await storePhotos(store, processed, ids);
  } catch (err) {
    await discardStoredPhotos(store, keys, options, 'after a failed store');
    throw err;
  }
  try {
    return await work(stored, (transaction) => options.pending.claim(keys, transaction));
  } catch (err) {
    await discardStoredPhotos(store, keys, options, 'after a failed write');
    throw err;
  }
}

// ---------------------------------------------------------------------------------------------
// Serving

export interface ServablePhoto {
  id: string;
  storageKey: string;
  thumbKey: string;
  contentType: string;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * Streams a photo (or its thumbnail) from the store. Call it only after the route's policy has
 * decided the caller may see this photo. Sends the stored Content-Type with `nosniff`, an
 * inline Content-Disposition named after the photo's id (never the uploaded file name), and a
 * private cache lifetime. A missing object answers 404.
 */
export async function sendPhoto(
  store: ObjectStore,
  res: Response,
  photo: ServablePhoto,
  variant: 'full' | 'thumb',
  options: { etag?: string } = {},
): Promise<void> {
  if (!UUID.test(photo.id)) throw notFound('Photo not found.');
  // An address whose picture can change (marks drawn or cleared) is checked again on every use.
  if (options.etag && res.req.get('if-none-match') === options.etag) {
    res.status(304).set({ ETag: options.etag, 'Cache-Control': 'private, no-cache' }).end();
    return;
  }
  const object = await store.get(variant === 'thumb' ? photo.thumbKey : photo.storageKey);
  if (!object) throw notFound('Photo not found.');
  res.status(200).set({
    'Content-Type': photo.contentType,
    'Content-Length': String(object.length),
    'X-Content-Type-Options': 'nosniff',
    'Content-Disposition': `inline; filename="${photo.id}${variant === 'thumb' ? '-thumb' : ''}.jpg"`,
    'Cache-Control': options.etag ? 'private, no-cache' : `private, max-age=${PHOTO_MAX_AGE_SECONDS}`,
    ...(options.etag ? { ETag: options.etag } : {}),
  });
  try {
    await pipeline(object.body, res);
  } catch (err) {
    // The client went away mid-photo: nothing to answer, nothing to log.
    if ((err as NodeJS.ErrnoException).code === 'ERR_STREAM_PREMATURE_CLOSE' && res.destroyed) return;
    throw err;
  }
}
