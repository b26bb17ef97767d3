/**
 * Multipart uploads of photos and plans, for the upload routes ONLY (never mounted globally).
 *
 * Order on every upload route (security.md: authorise before reading the body):
 *   policy (401/403/404) → `guard.rate` (429, per user) → the route's target check (the finding
 *   or level exists and is the caller's: 404/403/409) → the multipart parser → processing.
 * A request refused before the parser is answered at once; its body is never parsed, buffered or
 * written anywhere. Node discards what the client still sends (so the client reads the answer
 * instead of a reset connection), and `closeUnreadBodies` closes the connection if that takes
 * longer than UNREAD_BODY_LINGER_MS.
 *
 * The parser is multer with explicit limits (its defaults are unlimited): at most 15 MB per file,
 * 10 files and 20 other fields per request, short field names and values. Files are streamed to
 * a private temporary folder made for the request (never memory) and hashed (SHA-256) on the
 * way, for the idempotency fingerprint; the folder is removed when the response is done, in
 * every outcome (answered, refused, failed, client gone). A refused upload leaves nothing behind.
 *
 * Every error raised while reading the body becomes a JSON error from server/errors.ts,
 * classified by multer's error code (never by message text):
 *   file over 15 MB → 413 file_too_large;  an 11th file → 413 too_many_files;
 *   too many fields/parts, long names/values, an unexpected file field, a malformed or
 *   truncated multipart body → 400.
 * The request body is drained before the answer (multer does this), so the client gets the
 * JSON answer instead of a reset connection, and the server keeps serving.
 *
 * Per user (`createUploadGuard`, in memory per server node like the sign-in limits): at most
 * `requestsPerWindow` upload requests and `pixelsPerWindow` decoded pixels per window; over
 * either → 429 with Retry-After. The per-request pixel budget and the decode slots are in
 * server/services/photos.ts.
 */
import { nulField, nulRefusal } from './nul';
import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs';
import { lstat, mkdir, mkdtemp, readdir, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type { Request, RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import multer from 'multer';
import { PHOTO_LIMITS } from '../../shared/rules/photos';
import { badRequest, HttpError, tooManyRequests } from '../errors';

/** The limits live in shared/rules/photos.ts: the photo pickers show the same numbers. */
export { PHOTO_LIMITS };

/** Largest body worth reading: every file at its limit, every field at its limit, and headers. */
export const MAX_UPLOAD_BODY_BYTES =
  PHOTO_LIMITS.files * (PHOTO_LIMITS.fileSize + 4096) + PHOTO_LIMITS.fields * (PHOTO_LIMITS.fieldSize + 4096);

const MB = 1024 * 1024;

function mapMulterError(err: multer.MulterError): HttpError {
  switch (err.code) {
    case 'LIMIT_FILE_SIZE':
      return new HttpError(413, 'file_too_large', `Each photo must be at most ${PHOTO_LIMITS.fileSize / MB} MB.`);
    case 'LIMIT_FILE_COUNT':
      return new HttpError(413, 'too_many_files', `At most ${PHOTO_LIMITS.files} photos per request.`);
    case 'LIMIT_FIELD_COUNT':
    case 'LIMIT_PART_COUNT':
      return new HttpError(400, 'too_many_fields', `The form has too many fields (at most ${PHOTO_LIMITS.fields} besides the photos).`);
    case 'LIMIT_FIELD_KEY':
      return new HttpError(400, 'bad_request', `A form field name is longer than ${PHOTO_LIMITS.fieldNameSize} characters.`);
    case 'LIMIT_FIELD_VALUE':
      return new HttpError(400, 'bad_request', `A form field is longer than ${PHOTO_LIMITS.fieldSize / 1024} KB.`);
    case 'LIMIT_UNEXPECTED_FILE':
      return new HttpError(400, 'bad_request', 'Photos must be sent in the "photos" field.');
    default:
      return new HttpError(400, 'malformed_upload', 'The upload could not be read: the form data is malformed or incomplete.');
  }
}

// ---------------------------------------------------------------------------------------------
// Temporary files

/** Where request folders are made (each request gets its own, removed after the response). */
export const UPLOAD_TEMP_ROOT = path.join(os.tmpdir(), 'trimout-uploads');

/** An uploaded file as the routes see it: on disk, with its size and SHA-256. */
export type UploadedFile = Express.Multer.File & { sha256: string };

const requestFolders = new WeakMap<Request, Promise<string>>();

/**
 * Makes the root (owner-only) and refuses one that someone else owns or can write to: in a
 * shared temporary folder another account could have made it first, to read or swap uploads.
 */
async function ensureRoot(root: string): Promise<void> {
  await mkdir(root, { recursive: true, mode: 0o700 });
  const stat = await lstat(root);
  const ours = typeof process.getuid !== 'function' || stat.uid === process.getuid();
  if (!stat.isDirectory() || !ours || (stat.mode & 0o022) !== 0) {
    throw new Error(`The upload folder ${root} is not a private folder of this server's account.`);
  }
}

/** The request's private folder, made on its first file; removed once the response is over. */
function requestFolder(req: Request, root: string): Promise<string> {
  let folder = requestFolders.get(req);
  if (!folder) {
    folder = ensureRoot(root).then(() => mkdtemp(path.join(root, 'req-')));
    requestFolders.set(req, folder);
    const remove = () => void folder!.then((dir) => rm(dir, { recursive: true, force: true })).catch(() => undefined);
    const res = req.res;
    if (!res || res.writableFinished || res.destroyed) remove();
    else res.once('close', remove);
  }
  return folder;
}

/** The request's temporary folder could not be made: the server's fault (500), not the upload's. */
export class UploadFolderError extends Error {
  constructor(cause: unknown) {
    super('The temporary folder for an upload could not be made.', { cause });
    this.name = 'UploadFolderError';
  }
}

/**
 * multer storage engine: streams each file into the request's folder under a random name
 * (never the client's file name) and computes its SHA-256 while it passes.
 */
class TempFileStorage implements multer.StorageEngine {
  constructor(private readonly root: string) {}

  _handleFile(req: Request, file: Express.Multer.File, cb: (error?: unknown, info?: Partial<UploadedFile>) => void): void {
    requestFolder(req, this.root)
      .catch((err: unknown) => {
        throw new UploadFolderError(err);
      })
      .then(async (dir) => {
        const target = path.join(dir, randomUUID());
        const hash = createHash('sha256');
        let size = 0;
        const hasher = new Transform({
          transform(chunk: Buffer, _enc, done) {
            hash.update(chunk);
            size += chunk.length;
            done(null, chunk);
          },
        });
        await pipeline(file.stream, hasher, fs.createWriteStream(target, { flags: 'wx', mode: 0o600 }));
        cb(null, { path: target, size, sha256: hash.digest('hex') });
      })
      .catch((err: unknown) => cb(err));
  }

  _removeFile(_req: Request, file: Express.Multer.File, cb: (error: Error | null) => void): void {
    if (!file.path) return cb(null);
    fs.rm(file.path, { force: true }, () => cb(null));
  }
}

/**
 * Removes request folders older than `maxAgeMs` under `root`: left behind only when the process
 * died mid-request (the folder of a finished request is removed with its response). Run at
 * server start and with the upload reaper.
 */
export async function sweepUploadFolders(root: string = UPLOAD_TEMP_ROOT, maxAgeMs = 60 * 60 * 1000): Promise<number> {
  const entries = await readdir(root, { withFileTypes: true }).catch(() => []);
  let removed = 0;
  for (const e of entries) {
    if (!e.isDirectory() || !e.name.startsWith('req-')) continue;
    const dir = path.join(root, e.name);
    const stat = await lstat(dir).catch(() => null);
    if (stat && Date.now() - stat.mtimeMs > maxAgeMs) {
      await rm(dir, { recursive: true, force: true });
      removed += 1;
    }
  }
  return removed;
}

/** A multer instance writing to temporary files under `root`. */
export function tempFileMulter(root: string, limits: multer.Options['limits']): multer.Multer {
  return multer({ storage: new TempFileStorage(root), limits });
}

// ---------------------------------------------------------------------------------------------
// Photos

export interface UploadPhotosOptions {
  /** The multipart field that carries the photos. */
  field?: string;
  /** Where the request's temporary folder is made (default UPLOAD_TEMP_ROOT). */
  tempRoot?: string;
}

/**
 * Reads `multipart/form-data` with up to 10 photos in `field` (default "photos") into
 * `req.files` (temporary files, see UploadedFile) and the other fields into `req.body`. A
 * request that is not multipart is refused with 415. A request that declares a body larger
 * than every limit allows together is refused with 413 before reading it.
 */
export function uploadPhotos(options: UploadPhotosOptions = {}): RequestHandler {
  const field = options.field ?? 'photos';
  const parser = tempFileMulter(options.tempRoot ?? UPLOAD_TEMP_ROOT, {
    fileSize: PHOTO_LIMITS.fileSize,
    files: PHOTO_LIMITS.files,
    fields: PHOTO_LIMITS.fields,
    fieldSize: PHOTO_LIMITS.fieldSize,
    fieldNameSize: PHOTO_LIMITS.fieldNameSize,
    parts: PHOTO_LIMITS.files + PHOTO_LIMITS.fields,
  }).array(field, PHOTO_LIMITS.files);

  return (req, res, next) => {
    if (!req.is('multipart/form-data')) {
      return next(new HttpError(415, 'unsupported_media_type', 'Send the photos as multipart/form-data.'));
    }
    const declared = Number(req.get('content-length') ?? 0);
    if (declared > MAX_UPLOAD_BODY_BYTES) {
      // Not read at all: close the connection after answering rather than drain it.
      res.set('Connection', 'close');
      return next(new HttpError(413, 'too_large', `The upload is too large (at most ${PHOTO_LIMITS.files} photos of ${PHOTO_LIMITS.fileSize / MB} MB each).`));
    }
    parser(req, res, (err?: unknown) => {
      if (!err) return next();
      if (err instanceof UploadFolderError) return next(err);
      if (err instanceof multer.MulterError) return next(mapMulterError(err));
      // Anything else raised while parsing comes from busboy reading the body (a truncated or
      // malformed multipart body, a missing boundary) or from the client going away.
      next(new HttpError(400, 'malformed_upload', 'The upload could not be read: the form data is malformed or incomplete.'));
    });
  };
}

/** The photos read by uploadPhotos(), in the order sent. */
export function uploadedFiles(req: Express.Request): UploadedFile[] {
  return (Array.isArray(req.files) ? req.files : []) as UploadedFile[];
}

/**
 * What the idempotency fingerprint knows of a request's files: field, size and SHA-256 of each,
 * in the order sent (empty without files). The same Idempotency-Key with another file is then
 * "another request" (422), never a silent replay of the first answer.
 */
export function uploadDigests(req: Express.Request): Array<{ field: string; bytes: number; sha256: string }> {
  const files: Express.Multer.File[] = Array.isArray(req.files)
    ? req.files
    : req.files
      ? Object.values(req.files).flat()
      : req.file
        ? [req.file]
        : [];
  return files.map((f) => ({ field: f.fieldname, bytes: f.size, sha256: (f as Partial<UploadedFile>).sha256 ?? '' }));
}

/**
 * A write with photos: multipart/form-data with `photos` files and one `data` field holding the
 * JSON body, which becomes req.body. Any other form field is refused by name (400). `what` names
 * the record in the messages ("finding", "fix"). A request that is not multipart goes on as it is
 * (`otherwise: 'next'`, a JSON body without photos) or is refused with `otherwise` (400).
 */
export function photosWithJsonData(what: string, otherwise: 'next' | (() => HttpError), options: { tempRoot?: string } = {}): RequestHandler {
  const parse = uploadPhotos({ field: 'photos', tempRoot: options.tempRoot });
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) return next(otherwise === 'next' ? undefined : otherwise());
    parse(req, res, (err?: unknown) => {
      if (err) return next(err);
      const fields = (req.body ?? {}) as Record<string, unknown>;
      const extra = Object.keys(fields).find((k) => k !== 'data');
      if (extra !== undefined) {
        return next(badRequest(`${extra}: Unknown form field; send the ${what} as JSON in "data".`, { [extra]: 'Unknown form field.' }));
      }
      if (typeof fields.data !== 'string') {
        return next(badRequest(`data: Send the ${what} as JSON in the "data" field.`, { data: `Send the ${what} as JSON.` }));
      }
      try {
        req.body = JSON.parse(fields.data) as unknown;
      } catch {
        return next(badRequest('data: The "data" field is not valid JSON.', { data: 'Not valid JSON.' }));
      }
      const nul = nulField(req.body);
      if (nul) return next(nulRefusal(nul));
      next();
    });
  };
}

// ---------------------------------------------------------------------------------------------
// Bodies refused before they were read

/** How long a refused request may go on sending a body nobody reads before its connection is closed. */
export const UNREAD_BODY_LINGER_MS = 30_000;

/**
 * For a request answered before its body was read (refused by the policy, the rate limit or the
 * target check): Node discards the rest of the body as it arrives, without buffering it, so the
 * client gets to read the answer; if the client is still sending after `lingerMs`, the
 * connection is closed. Mounted once on /api.
 */
export function closeUnreadBodies(lingerMs = UNREAD_BODY_LINGER_MS): RequestHandler {
  return (req, res, next) => {
    res.once('finish', () => {
      if (req.complete || req.destroyed) return;
      const timer = setTimeout(() => req.socket?.destroy(), lingerMs);
      timer.unref();
      req.once('end', () => clearTimeout(timer));
      req.once('close', () => clearTimeout(timer));
    });
    next();
  };
}

// ---------------------------------------------------------------------------------------------
// Per-user limits

export interface UploadLimits {
  /** Upload requests (multipart) per user per window. */
  requestsPerWindow: number;
  /** Pixels (width × height, summed over images) a user may have decoded per window. */
  pixelsPerWindow: number;
  windowMs: number;
}

/**
 * 300 uploads and 2,000 megapixels per person per 10 minutes. A floor walked without signal is
 * sent in one burst when the phone is back online, one request per finding or fix: a walk of 150
 * findings with a photo or two each must go through in one sync, not stall on 429 half way (60
 * did: the outbox then waited out the window). The app sends photos at most 2560 px on the long
 * side (about 4.9 MP at 4:3), so 2,000 MP is about 400 photos; it bounds the decoding work one
 * account can ask for (about a second of CPU per 40 MP, so under a minute per 10 minutes).
 */
export const DEFAULT_UPLOAD_LIMITS: UploadLimits = {
  requestsPerWindow: 300,
  pixelsPerWindow: 2_000_000_000,
  windowMs: 10 * 60 * 1000,
};

export interface UploadGuard {
  readonly limits: UploadLimits;
  /** Where request folders are made. */
  readonly tempRoot: string;
  /** Rate limit per signed-in user on multipart requests (429); place it right after the policy. */
  rate: RequestHandler;
  /** Adds `pixels` to the user's window before they are decoded; 429 when that goes over. */
  chargePixels(userId: string, pixels: number): void;
}

const minutesText = (ms: number) => (Math.round(ms / 60_000) === 1 ? '1 minute' : `${Math.round(ms / 60_000)} minutes`);

export function createUploadGuard(options: { limits?: Partial<UploadLimits>; tempRoot?: string } = {}): UploadGuard {
  const limits: UploadLimits = { ...DEFAULT_UPLOAD_LIMITS, ...options.limits };
  const retryAfter = Math.ceil(limits.windowMs / 1000);
  const rate = rateLimit({
    windowMs: limits.windowMs,
    limit: limits.requestsPerWindow,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    // A finding sent as JSON (no photos) is not an upload.
    skip: (req) => !req.is('multipart/form-data'),
    keyGenerator: (req) => `upload:${req.user?.id ?? 'anonymous'}`,
    handler: (_req, _res, next) =>
      next(
        tooManyRequests(
          `Too many uploads: at most ${limits.requestsPerWindow} in ${minutesText(limits.windowMs)} per person. Wait a few minutes and send them again.`,
          retryAfter,
        ),
      ),
  });

  // userId → [when, pixels] charged within the window, oldest first.
  const spent = new Map<string, Array<{ at: number; pixels: number }>>();
  let charges = 0;
  function chargePixels(userId: string, pixels: number): void {
    const now = Date.now();
    const since = now - limits.windowMs;
    if (++charges % 1000 === 0) {
      for (const [id, list] of spent) if (list.every((e) => e.at <= since)) spent.delete(id);
    }
    const list = (spent.get(userId) ?? []).filter((e) => e.at > since);
    const used = list.reduce((sum, e) => sum + e.pixels, 0);
    if (used + pixels > limits.pixelsPerWindow) {
      spent.set(userId, list);
      // Wait until enough of the window has passed for this request to fit.
      let freed = limits.pixelsPerWindow - used;
      let wait = limits.windowMs;
      for (const e of list) {
        freed += e.pixels;
        if (freed >= pixels) {
          wait = e.at + limits.windowMs - now;
          break;
        }
      }
      throw tooManyRequests(
        `Too many photo pixels: at most ${Math.round(limits.pixelsPerWindow / 1_000_000)} megapixels in ${minutesText(limits.windowMs)} per person. Send these again later.`,
        Math.max(1, Math.ceil(wait / 1000)),
      );
    }
    list.push({ at: now, pixels });
    spent.set(userId, list);
  }

  return { limits, tempRoot: options.tempRoot ?? UPLOAD_TEMP_ROOT, rate, chargePixels };
}
