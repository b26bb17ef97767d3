/**
 * Multipart uploads of photos, for the upload routes ONLY (never mounted globally).
 *
 * multer with memory storage and explicit limits (its defaults are unlimited): at most
 * 15 MB per file, 10 files and 20 other fields per request, short field names and values.
 * Files stay in memory only until the handler has processed them (server/services/photos.ts);
 * nothing reaches a disk or the object store here, so a refused upload leaves nothing behind.
 *
 * Every error raised while reading the body becomes a JSON error from server/errors.ts,
 * classified by multer's error code (never by message text):
 *   file over 15 MB → 413 file_too_large;  an 11th file → 413 too_many_files;
 *   too many fields/parts, long names/values, an unexpected file field, a malformed or
 *   truncated multipart body → 400.
 * The request body is drained before the answer (multer does this), so the client gets the
 * JSON answer instead of a reset connection, and the server keeps serving.
 */
import type { RequestHandler } from 'express';
import multer from 'multer';
import { badRequest, HttpError } from '../errors';

export const PHOTO_LIMITS = {
  /** Bytes per photo (security.md: 15 MB). */
  fileSize: 15 * 1024 * 1024,
  /** Photos per request. */
  files: 10,
  /** Non-file fields per request. */
  fields: 20,
  /** Bytes per non-file field value (a finding's note fits easily). */
  fieldSize: 64 * 1024,
  /** Bytes per field name. */
  fieldNameSize: 100,
} as const;

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

export interface UploadPhotosOptions {
  /** The multipart field that carries the photos. */
  field?: string;
}

/**
 * Reads `multipart/form-data` with up to 10 photos in `field` (default "photos") into
 * `req.files` (memory buffers) and the other fields into `req.body`. A request that is not
 * multipart is refused with 415. A request that declares a body larger than every limit
 * allows together is refused with 413 before reading it.
 */
export function uploadPhotos(options: UploadPhotosOptions = {}): RequestHandler {
  const field = options.field ?? 'photos';
  const parser = multer({
    storage: multer.memoryStorage(),
    limits: {
      fileSize: PHOTO_LIMITS.fileSize,
      files: PHOTO_LIMITS.files,
      fields: PHOTO_LIMITS.fields,
      fieldSize: PHOTO_LIMITS.fieldSize,
      fieldNameSize: PHOTO_LIMITS.fieldNameSize,
      parts: PHOTO_LIMITS.files + PHOTO_LIMITS.fields,
    },
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
      if (err instanceof multer.MulterError) return next(mapMulterError(err));
      // Anything else raised while parsing comes from busboy reading the body (a truncated or
      // malformed multipart body, a missing boundary) or from the client going away.
      next(new HttpError(400, 'malformed_upload', 'The upload could not be read: the form data is malformed or incomplete.'));
    });
  };
}

/** The photos read by uploadPhotos(), in the order sent. */
export function uploadedFiles(req: Express.Request): Express.Multer.File[] {
  return Array.isArray(req.files) ? req.files : [];
}

/**
 * A write with photos: multipart/form-data with `photos` files and one `data` field holding the
 * JSON body, which becomes req.body. Any other form field is refused by name (400). `what` names
 * the record in the messages ("finding", "fix"). A request that is not multipart goes on as it is
 * (`otherwise: 'next'`, a JSON body without photos) or is refused with `otherwise` (400).
 */
export function photosWithJsonData(what: string, otherwise: 'next' | (() => HttpError)): RequestHandler {
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) return next(otherwise === 'next' ? undefined : otherwise());
    uploadPhotos({ field: 'photos' })(req, res, (err?: unknown) => {
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
      next();
    });
  };
}
