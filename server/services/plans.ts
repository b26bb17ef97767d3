/**
 * Level plans: one plan image per level, read from the bytes, normalised, stored,
 * served. The route is server/routes/plans.ts; the metadata lives on the `levels` row.
 *
 * Processing (`processPlan`):
 * - The type is decided from the bytes (magic numbers), never from the name or the declared
 *   Content-Type: PNG, JPEG, or PDF (`%PDF-` at the start). Anything else is refused (415).
 * - A PDF's first page is rasterised by poppler's `pdftoppm` (Debian package poppler-utils),
 *   run with execFile (never a shell), in a fresh private temporary directory, with a timeout,
 *   a SIGKILL on expiry and at most PDF_CONCURRENCY conversions at once. The resolution is
 *   PLAN_PDF_DPI, lowered for large sheets so the page's long edge is at most PLAN_MAX_EDGE
 *   pixels (the page size comes from `pdfinfo`, same package, before anything is drawn): a
 *   PDF declaring a huge page cannot make the server draw a gigapixel image.
 * - Images (and the rasterised page) go through sharp like photos do: the header's pixel count
 *   is checked against PLAN_PIXEL_LIMIT before decoding (413), EXIF orientation applied,
 *   transparency flattened onto white, the long edge capped at PLAN_MAX_EDGE, converted to
 *   sRGB and re-encoded with no metadata at all. PNG stays PNG (line drawings stay crisp and
 *   small), JPEG stays JPEG, a PDF page becomes PNG.
 * - Stored under `plans/<level id>/<uuid>.png|jpg` (server-made; the file name never reaches a
 *   key). A new upload's key is recorded as a pending upload first (server/services/pendingUploads.ts),
 *   then it is stored before the database write, which claims the pending row; it is removed
 *   again if the write fails (or by the reaper after a crash). The replaced object is removed
 *   after the write commits.
 * - Decoding runs in the process's decode slots (server/services/photos.ts decodeSlots), shared
 *   with photos.
 */
import { execFile } from 'node:child_process';
import { createHash, randomUUID } from 'node:crypto';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Response } from 'express';
import sharp from 'sharp';
import { HttpError, notFound } from '../errors';
import type { Transaction } from 'sequelize';
import { PHOTO_LIMITS } from '../../shared/rules/photos';
import { Level } from '../models';
import type { ObjectStore } from '../storage/types';
import type { PendingUploads } from './pendingUploads';
import { decodeSlots, detectPhotoType, PHOTO_PIXEL_LIMIT } from './photos';
import { levelDto } from './levels';
import { lockVersioned } from './records';
import { createSlots } from './slots';
import { checkVersion } from './versioning';

/** Bytes per plan upload: the same limit as one photo (security.md: 15 MB). */
export const PLAN_MAX_BYTES = PHOTO_LIMITS.fileSize;
/** Largest accepted image in pixels (width × height), as for photos: 40 MP. */
export const PLAN_PIXEL_LIMIT = PHOTO_PIXEL_LIMIT;
/** Long edge of the stored plan, in pixels: readable when zoomed on a phone, and under the
 * ~16 MP a phone browser will draw in one image (4096 × 2896 for an ANSI D / ARCH D sheet). */
export const PLAN_MAX_EDGE = 4096;
/** Resolution a PDF page is drawn at, unless that would exceed PLAN_MAX_EDGE. */
export const PLAN_PDF_DPI = 150;
/** How long pdfinfo / pdftoppm may run on one upload. */
export const PDF_TIMEOUT_MS = 20_000;
/** PDF conversions running at once (each is a separate process using a core). */
export const PDF_CONCURRENCY = 2;
export const PLAN_JPEG_QUALITY = 85;
/** The tools, found on PATH (Debian installs them in /usr/bin). */
export const PDFTOPPM = 'pdftoppm';
export const PDFINFO = 'pdfinfo';

export type PlanContentType = 'image/png' | 'image/jpeg';
export type PlanSourceType = PlanContentType | 'application/pdf';

export interface ProcessedPlan {
  data: Buffer;
  contentType: PlanContentType;
  sourceType: PlanSourceType;
  width: number;
  height: number;
  sha256: string;
}

const ACCEPTED = 'PNG, JPEG or PDF';
const refusedType = (what: string) => new HttpError(415, 'unsupported_plan_type', `${what}. A plan must be a ${ACCEPTED} file.`);
const unreadable = (what = 'The plan could not be read: the file is damaged or incomplete.') =>
  new HttpError(400, 'unreadable_plan', what);

// ---------------------------------------------------------------------------------------------
// Type from the bytes

export function detectPlanType(buf: Buffer): { type: PlanSourceType } | { refused: string } {
  if (buf.length === 0) return { refused: 'The file is empty (0 bytes)' };
  if (buf.subarray(0, 5).toString('latin1') === '%PDF-') return { type: 'application/pdf' };
  const photo = detectPhotoType(buf);
  if ('type' in photo) {
    if (photo.type === 'image/png' || photo.type === 'image/jpeg') return { type: photo.type };
    return { refused: `This file is a ${photo.type === 'image/webp' ? 'WebP' : 'HEIC'} image` };
  }
  if (photo.refused.includes('PDF')) return { refused: 'This file is not a readable PDF' };
  return { refused: photo.refused };
}

// ---------------------------------------------------------------------------------------------
// PDF → PNG (first page)

const conversionSlots = createSlots(PDF_CONCURRENCY);
const withConversionSlot = <T>(work: () => Promise<T>): Promise<T> => conversionSlots.run(work);

interface ToolError extends Error {
  code?: string | number;
  killed?: boolean;
  signal?: string | null;
}

function run(cmd: string, args: string[], cwd: string): Promise<string> {
  return new Promise((resolve, reject) => {
    execFile(
      cmd,
      args,
      {
        cwd,
        timeout: PDF_TIMEOUT_MS,
        killSignal: 'SIGKILL',
        maxBuffer: 256 * 1024,
        windowsHide: true,
        // No shell, no inherited secrets: only what the tool needs to run.
        env: { PATH: process.env.PATH ?? '/usr/bin:/bin', LANG: 'C', HOME: cwd },
      },
      (err, stdout) => (err ? reject(err) : resolve(String(stdout))),
    );
  });
}

function toolFailure(err: unknown, tool: string): HttpError {
  const e = err as ToolError;
  if (e.code === 'ENOENT') {
    return new HttpError(503, 'pdf_unavailable', `PDF plans cannot be converted on this server (${tool} is missing). Upload the plan as PNG or JPEG.`);
  }
  if (e.killed || e.signal === 'SIGKILL') {
    return unreadable('The PDF took too long to convert. Export the plan page as PNG or JPEG and upload that.');
  }
  return unreadable('The PDF could not be read: it is damaged, incomplete or password-protected.');
}

/** The first page's size in PDF points (1/72 in), from `pdfinfo` (crop box, as viewers show it). */
export function parsePageSize(info: string): { width: number; height: number } | null {
  const m = /^Page(?:\s+1)?\s+size:\s+([\d.]+)\s+x\s+([\d.]+)\s+pts/m.exec(info);
  if (!m) return null;
  const width = Number(m[1]);
  const height = Number(m[2]);
  return width > 0 && height > 0 && Number.isFinite(width) && Number.isFinite(height) ? { width, height } : null;
}

/** The resolution that draws a page of this size at PLAN_PDF_DPI, or less so its long edge fits PLAN_MAX_EDGE. */
export function pdfDpiFor(page: { width: number; height: number }): number {
  const longInches = Math.max(page.width, page.height) / 72;
  return Math.max(1, Math.min(PLAN_PDF_DPI, Math.floor(PLAN_MAX_EDGE / longInches)));
}

/** Draws the first page of a PDF as PNG with pdftoppm (see the header comment). */
export async function rasterisePdfFirstPage(pdf: Buffer): Promise<Buffer> {
  return withConversionSlot(async () => {
    const dir = await mkdtemp(path.join(os.tmpdir(), 'trimout-plan-'));
    try {
      // Fixed names inside our own directory: nothing from the client reaches a path or an argument.
      await writeFile(path.join(dir, 'plan.pdf'), pdf, { mode: 0o600 });
      let info: string;
      try {
        info = await run(PDFINFO, ['-f', '1', '-l', '1', 'plan.pdf'], dir);
      } catch (err) {
        throw toolFailure(err, PDFINFO);
      }
      const page = parsePageSize(info);
      if (!page) throw unreadable('The PDF has no readable first page.');
      const dpi = pdfDpiFor(page);
      try {
        await run(PDFTOPPM, ['-f', '1', '-l', '1', '-singlefile', '-cropbox', '-png', '-r', String(dpi), 'plan.pdf', 'page'], dir);
      } catch (err) {
        throw toolFailure(err, PDFTOPPM);
      }
      try {
        return await readFile(path.join(dir, 'page.png'));
      } catch {
        throw unreadable('The PDF has no readable first page.');
      }
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });
}

// ---------------------------------------------------------------------------------------------
// Normalising

async function normaliseImage(buf: Buffer, type: PlanContentType): Promise<{ data: Buffer; width: number; height: number }> {
  let meta: sharp.Metadata;
  try {
    meta = await sharp(buf, { limitInputPixels: false }).metadata();
  } catch {
    throw unreadable();
  }
  if (meta.format !== (type === 'image/png' ? 'png' : 'jpeg')) throw unreadable();
  const width = meta.width ?? 0;
  const height = meta.height ?? 0;
  if (!(width > 0 && height > 0)) throw unreadable();
  if (width * height > PLAN_PIXEL_LIMIT) {
    throw new HttpError(
      413,
      'too_many_pixels',
      `The plan is ${width} × ${height} pixels; at most ${PLAN_PIXEL_LIMIT / 1_000_000} megapixels are accepted.`,
    );
  }
  try {
    const pipelined = sharp(buf, { limitInputPixels: PLAN_PIXEL_LIMIT, failOn: 'truncated', sequentialRead: true })
      .rotate()
      .flatten({ background: '#ffffff' })
      .resize({ width: PLAN_MAX_EDGE, height: PLAN_MAX_EDGE, fit: 'inside', withoutEnlargement: true })
      .toColourspace('srgb');
    // No withMetadata()/keepExif(): sharp writes no EXIF, XMP or ICC.
    const encoded = type === 'image/png' ? pipelined.png({ compressionLevel: 9 }) : pipelined.jpeg({ quality: PLAN_JPEG_QUALITY });
    const { data, info } = await encoded.toBuffer({ resolveWithObject: true });
    return { data, width: info.width, height: info.height };
  } catch {
    throw unreadable();
  }
}

/**
 * Reads one upload and returns the normalised plan image, or throws an HttpError:
 * 400 empty_plan / unreadable_plan, 413 too_many_pixels, 415 unsupported_plan_type,
 * 503 pdf_unavailable (poppler-utils missing).
 */
export async function processPlan(buffer: Buffer): Promise<ProcessedPlan> {
  if (buffer.length === 0) throw new HttpError(400, 'empty_plan', 'The file is empty (0 bytes). Pick the plan again.');
  const detected = detectPlanType(buffer);
  if ('refused' in detected) throw refusedType(detected.refused);
  const sourceType = detected.type;
  const contentType: PlanContentType = sourceType === 'application/pdf' ? 'image/png' : sourceType;
  const image = sourceType === 'application/pdf' ? await rasterisePdfFirstPage(buffer) : buffer;
  const out = await decodeSlots.run(() => normaliseImage(image, contentType));
  return { ...out, contentType, sourceType, sha256: createHash('sha256').update(out.data).digest('hex') };
}

// ---------------------------------------------------------------------------------------------
// Storage

/** A fresh object key for a level's plan: server-made from ids, never from a file name. */
export function planKey(levelId: string, contentType: PlanContentType): string {
  return `plans/${levelId.toLowerCase()}/${randomUUID()}.${contentType === 'image/png' ? 'png' : 'jpg'}`;
}

/**
 * Records the key as a pending upload, stores the plan, runs `work` (the caller's database
 * transaction that points the level at it and calls `claim(transaction)` in it), and deletes the
 * stored object and its pending row again if storing or `work` throws. Returns what `work`
 * returns. If the object cannot be deleted, the pending row stays for the reaper.
 */
export async function withStoredPlan<T>(
  store: ObjectStore,
  levelId: string,
  plan: ProcessedPlan,
  work: (key: string, claim: (transaction: Transaction) => Promise<void>) => Promise<T>,
  options: { pending: PendingUploads; log: (message: string, err?: unknown) => void },
): Promise<T> {
  const { pending, log } = options;
  const key = planKey(levelId, plan.contentType);
  const discard = async () => {
    try {
      await store.delete([key]);
    } catch (cleanupError) {
      log(`could not remove the stored plan ${key} after a failed write (left for the reaper)`, cleanupError);
      return;
    }
    await pending.release([key]).catch((e: unknown) => log(`could not release the pending plan ${key}`, e));
  };
  await pending.record([key]);
  try {
    await store.put(key, plan.data, plan.contentType);
    return await work(key, (transaction) => pending.claim([key], transaction));
  } catch (err) {
    await discard();
    throw err;
  }
}

/** Removes a replaced or deleted plan's object after the write committed; a failure is logged only. */
export async function removePlanObject(store: ObjectStore, key: string | null, log: (message: string, err?: unknown) => void): Promise<void> {
  if (!key) return;
  await store.delete([key]).catch((err) => log(`could not remove the old plan ${key}`, err));
}

// ---------------------------------------------------------------------------------------------
// Serving

/** Cache lifetime when the URL names the current version (`?v=`): the bytes under it never change. */
export const PLAN_VERSIONED_MAX_AGE_SECONDS = 365 * 24 * 60 * 60;

export interface ServablePlan {
  levelId: string;
  key: string;
  contentType: PlanContentType;
  version: number;
}

export function planEtag(version: number): string {
  return `"plan-v${version}"`;
}

/**
 * Streams the plan. Call it only after the route's policy allowed the caller to see the level.
 * With `?v=` equal to the current version the answer may be kept privately for a year (the
 * version is in the URL); otherwise the browser must revalidate (ETag, 304).
 */
export async function sendPlan(
  store: ObjectStore,
  res: Response,
  plan: ServablePlan,
  requestedVersion: number | undefined,
  ifNoneMatch: string | undefined,
): Promise<void> {
  const etag = planEtag(plan.version);
  const cacheControl =
    requestedVersion === plan.version ? `private, max-age=${PLAN_VERSIONED_MAX_AGE_SECONDS}, immutable` : 'private, no-cache';
  if (ifNoneMatch && ifNoneMatch.split(',').some((t) => t.trim() === etag || t.trim() === '*')) {
    res.status(304).set({ ETag: etag, 'Cache-Control': cacheControl, 'X-Content-Type-Options': 'nosniff' }).end();
    return;
  }
  const object = await store.get(plan.key);
  if (!object) throw notFound('This level has no plan.');
  const ext = plan.contentType === 'image/png' ? 'png' : 'jpg';
  res.status(200).set({
    'Content-Type': plan.contentType,
    'Content-Length': String(object.length),
    'X-Content-Type-Options': 'nosniff',
    'Content-Disposition': `inline; filename="plan-${plan.levelId}-v${plan.version}.${ext}"`,
    'Cache-Control': cacheControl,
    ETag: etag,
  });
  try {
    await pipeline(object.body, res);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ERR_STREAM_PREMATURE_CLOSE' && res.destroyed) return;
    throw err;
  }
}

// ------------------------------------------------------------------------------------------------
// The level's plan fields (routes/plans.ts)
// ------------------------------------------------------------------------------------------------

/** True when the level is on the job (checked before an upload's body is read). */
export async function levelIsOnJob(jobId: string, levelId: string): Promise<boolean> {
  return (await Level.findOne({ where: { id: levelId, jobId }, attributes: ['id'] })) !== null;
}

/** The level's plan as stored, or 404 when the level has none (or is not on this job). */
export async function storedPlanOf(jobId: string, levelId: string): Promise<ServablePlan> {
  const level = await Level.findOne({ where: { id: levelId, jobId } });
  if (!level || !level.planKey || !level.planContentType) throw notFound('This level has no plan.');
  return { levelId: level.id, key: level.planKey, contentType: level.planContentType, version: level.planVersion };
}

export interface PlanWrite {
  transaction: Transaction;
  jobId: string;
  /** Optional on upload (refuses replacing a newer plan), required on delete. */
  ifMatch?: string;
}

/**
 * Points the level at a stored plan object (claimed in this transaction); returns the level and
 * the key of the plan it replaced, to remove after the commit.
 */
export async function attachPlan(
  { transaction, jobId, ifMatch }: PlanWrite,
  upload: { levelId: string; key: string; plan: ProcessedPlan; uploadedBy: string; at: Date; claim: (transaction: Transaction) => Promise<void> },
): Promise<{ level: Level; replacedKey: string | null }> {
  const level = await Level.findOne({ where: { id: upload.levelId, jobId }, transaction, lock: transaction.LOCK.UPDATE });
  if (!level) throw notFound('Level not found.');
  if (ifMatch) checkVersion(ifMatch, level.version, await levelDto(level, transaction));
  await upload.claim(transaction);
  const replacedKey = level.planKey;
  const { plan } = upload;
  level.planKey = upload.key;
  level.planContentType = plan.contentType;
  level.planSourceType = plan.sourceType;
  level.planWidth = plan.width;
  level.planHeight = plan.height;
  level.planByteSize = plan.data.length;
  level.planUploadedAt = upload.at;
  level.planUploadedBy = upload.uploadedBy;
  level.planVersion += 1;
  level.version += 1;
  await level.save({ transaction });
  return { level, replacedKey };
}

/** Clears the level's plan (If-Match); returns the removed object's key, to delete after the commit. */
export async function detachPlan({ transaction, jobId, ifMatch }: PlanWrite, levelId: string): Promise<string> {
  const level = await lockVersioned(Level, { id: levelId, jobId }, transaction, 'Level not found.', ifMatch, (l) => levelDto(l, transaction));
  if (!level.planKey) throw notFound('This level has no plan.');
  const key = level.planKey;
  level.planKey = null;
  level.planContentType = null;
  level.planSourceType = null;
  level.planWidth = null;
  level.planHeight = null;
  level.planByteSize = null;
  level.planUploadedAt = null;
  level.planUploadedBy = null;
  level.version += 1;
  await level.save({ transaction });
  return key;
}
