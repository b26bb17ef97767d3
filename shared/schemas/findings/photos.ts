/**
 * Photos added to a finding after it was logged (POST /findings/:findingId/photos).
 */
import { z } from 'zod';
import { note } from './fields';

/**
 * POST /findings/:findingId/photos (inspector, GC manager) → 201 FindingDetail (ETag).
 * multipart/form-data: `data` = this JSON, and 1 to 10 files in `photos` (same rules as a finding's).
 * Only while the finding is open (returned included): 409 otherwise. A finding carries at most
 * MAX_PHOTOS_PER_REQUEST photos of the defect (shared/rules/photos.ts): more → 409 `photo_limit`.
 * Idempotency-Key honoured. `note` (optional): what the photos add, kept in the history.
 */
export const addFindingPhotosSchema = z.object({ note: note.optional() }).strict();
export type AddFindingPhotosInput = z.input<typeof addFindingPhotosSchema>;
