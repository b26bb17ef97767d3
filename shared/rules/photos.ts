/**
 * Photo upload limits, applied by the server's multipart parser and shown by the photo pickers
 * (security.md: at most 15 MB per photo, 10 files and 20 fields per request).
 */
export const PHOTO_LIMITS = {
  /** Bytes per photo. */
  fileSize: 15 * 1024 * 1024,
  /** Photos per request (a finding's or a fix's photos travel in one request). */
  files: 10,
  /** Non-file fields per request. */
  fields: 20,
  /** Bytes per non-file field value (a finding's note fits easily). */
  fieldSize: 64 * 1024,
  /** Bytes per field name. */
  fieldNameSize: 100,
} as const;

/** Photos one finding or one fix may carry (one request's worth). */
export const MAX_PHOTOS_PER_REQUEST = PHOTO_LIMITS.files;
