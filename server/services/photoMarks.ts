/**
 * Marks on a photo (shared/schemas/photoMarks.ts): kept as data in photo_marks beside the untouched
 * original, plus a flattened copy (the marks drawn onto the photo as an SVG composited by sharp,
 * then re-encoded at the usual full, thumbnail and print sizes) that the photo's addresses serve while
 * marks exist. `?original=1` on those addresses serves the photo as taken.
 *
 * Who: reading the marks is seeing the photo (services/findingQueries.ts visiblePhoto, with the
 * caller's membership of the photo's job; 404 otherwise). Writing them follows the photo-add
 * rules: a finding's photos as adding photos to that finding (GC manager and inspectors, while it
 * is open: shared/findingStatus.ts decideAddPhotos); a fix's photos as submitting that fix (the
 * responsible subcontractor or a GC manager) while the fix waits for review; a test record's
 * photos are not marked (403).
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import sharp from 'sharp';
import { decideAddPhotos } from '../../shared/findingStatus';
import { MARK_PAINT, markSizes, type Mark, type PhotoMarks } from '../../shared/schemas/photoMarks';
import type { FindingStatus, Role } from '../../shared/words';
import { conflict, forbidden, notFound } from '../errors';
import { Job, JobMember } from '../models';
import type { ObjectStore } from '../storage/types';
import { visiblePhoto, type FindingScope } from './findingQueries';
import { refusalError } from './findingStatus';
import type { PendingUploads } from './pendingUploads';
import {
  decodeSlots,
  FULL_JPEG_QUALITY,
  PHOTO_CONTENT_TYPE,
  PHOTO_PIXEL_LIMIT,
  printCopyOf,
  THUMB_EDGE,
  THUMB_JPEG_QUALITY,
  type ServablePhoto,
} from './photos';
import { checkVersion } from './versioning';

export interface PhotoAccess {
  photoId: string;
  scope: FindingScope;
  role: Role;
}

/**
 * The caller's view of a photo named without its job: the caller's membership of the photo's job
 * and the same visibility as the photo's own address. Null (answer 404) when either is missing.
 */
export async function photoAccessFor(sequelize: Sequelize, userId: string, photoId: string): Promise<PhotoAccess | null> {
  const [row] = await sequelize.query<{ job_id: string }>(`SELECT job_id FROM photos WHERE id = $1`, { bind: [photoId], type: QueryTypes.SELECT });
  if (!row) return null;
  const member = await JobMember.findOne({ where: { jobId: row.job_id, userId }, include: [{ model: Job, as: 'job', required: true }] });
  if (!member || !member.role || !member.companyId || !member.job) return null;
  const role = member.role;
  const scope: FindingScope = {
    jobId: member.job.id,
    timeZone: member.job.timeZone || 'UTC',
    companyId: role === 'subcontractor' ? member.companyId : null,
  };
  return (await visiblePhoto(sequelize, scope, photoId)) ? { photoId, scope, role } : null;
}

interface MarksRow {
  marks: Mark[];
  version: number;
  marked_key: string | null;
  marked_thumb_key: string | null;
  marked_print_key: string | null;
  updated_at: Date | null;
}

async function marksRow(sequelize: Sequelize, photoId: string, transaction?: Transaction, lock = false): Promise<MarksRow | null> {
  const [row] = await sequelize.query<MarksRow>(
    `SELECT marks, version, marked_key, marked_thumb_key, marked_print_key, updated_at FROM photo_marks WHERE photo_id = $1${lock ? ' FOR UPDATE' : ''}`,
    { bind: [photoId], type: QueryTypes.SELECT, transaction },
  );
  return row ?? null;
}

function present(photoId: string, row: MarksRow | null): PhotoMarks {
  return {
    photoId,
    marks: row?.marks ?? [],
    version: row?.version ?? 0,
    updatedAt: row?.updated_at ? new Date(row.updated_at).toISOString() : null,
  };
}

export async function readPhotoMarks(sequelize: Sequelize, photoId: string): Promise<PhotoMarks> {
  return present(photoId, await marksRow(sequelize, photoId));
}

/**
 * What a photo's address serves: the flattened copy while marks exist, else the original; with
 * the marks' version, so a browser asks again after the marks change (the address stays the same).
 */
export async function servedPhoto(sequelize: Sequelize, photo: ServablePhoto): Promise<{ photo: ServablePhoto; etag: string }> {
  const row = await marksRow(sequelize, photo.id);
  const etag = `"photo-${row?.version ?? 0}"`;
  if (!row?.marked_key || !row.marked_thumb_key) return { photo, etag };
  return { photo: { ...photo, storageKey: row.marked_key, thumbKey: row.marked_thumb_key }, etag };
}

// ---------------------------------------------------------------------------------------------
// Drawing

const num = (n: number) => (Math.round(n * 10) / 10).toString();
const xml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');

/** The marks as one SVG the size of the image: each shape in its contrasting outline, then in its colour. */
export function marksSvg(marks: readonly Mark[], width: number, height: number): string {
  const { stroke, outline, font } = markSizes(width, height);
  const X = (f: number) => num(f * width);
  const Y = (f: number) => num(f * height);
  const parts: string[] = [];
  for (const m of marks) {
    const paint = MARK_PAINT[m.colour];
    const line = (c: string, w: number) => `fill="none" stroke="${c}" stroke-width="${w}" stroke-linecap="round" stroke-linejoin="round"`;
    const both = (shape: (attrs: string) => string) => shape(line(paint.outline, stroke + 2 * outline)) + shape(line(paint.fill, stroke));
    switch (m.kind) {
      case 'arrow': {
        const x1 = m.from.x * width, y1 = m.from.y * height, x2 = m.to.x * width, y2 = m.to.y * height;
        const a = Math.atan2(y2 - y1, x2 - x1);
        const head = stroke * 4;
        const wing = (s: number) => `${num(x2 - head * Math.cos(a + s * 0.5))},${num(y2 - head * Math.sin(a + s * 0.5))}`;
        const head3 = `${wing(1)} ${num(x2)},${num(y2)} ${wing(-1)}`;
        parts.push(both((attrs) => `<line x1="${num(x1)}" y1="${num(y1)}" x2="${num(x2)}" y2="${num(y2)}" ${attrs}/><polyline points="${head3}" ${attrs}/>`));
        break;
      }
      case 'ellipse':
        parts.push(both((attrs) => `<ellipse cx="${X(m.center.x)}" cy="${Y(m.center.y)}" rx="${X(m.rx)}" ry="${Y(m.ry)}" ${attrs}/>`));
        break;
      case 'rect':
        parts.push(both((attrs) => `<rect x="${X(m.x)}" y="${Y(m.y)}" width="${X(m.w)}" height="${Y(m.h)}" ${attrs}/>`));
        break;
      case 'freehand': {
        const pts = m.points.map((p) => `${X(p.x)},${Y(p.y)}`).join(' ');
        parts.push(both((attrs) => `<polyline points="${pts}" ${attrs}/>`));
        break;
      }
      case 'text':
        // `at` is the label's top-left corner; the baseline sits 0.8 of the size below it.
        parts.push(
          `<text x="${X(m.at.x)}" y="${num(m.at.y * height + font * 0.8)}" font-family="DejaVu Sans, Arial, sans-serif" font-weight="bold" font-size="${font}" fill="${paint.fill}" stroke="${paint.outline}" stroke-width="${num(font * 0.16)}" stroke-linejoin="round" paint-order="stroke">${xml(m.text)}</text>`,
        );
        break;
    }
  }
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">${parts.join('')}</svg>`;
}

/** The original with the marks drawn on it, as the stored full photo, thumbnail and print copy (JPEG, no metadata). */
export async function flattenMarks(original: Buffer, marks: readonly Mark[]): Promise<{ full: Buffer; thumb: Buffer; print: Buffer }> {
  return decodeSlots.run(async () => {
    const meta = await sharp(original, { limitInputPixels: PHOTO_PIXEL_LIMIT }).metadata();
    const width = meta.width ?? 0;
    const height = meta.height ?? 0;
    const raw = await sharp(original, { limitInputPixels: PHOTO_PIXEL_LIMIT })
      .composite([{ input: Buffer.from(marksSvg(marks, width, height)), top: 0, left: 0 }])
      .removeAlpha()
      .raw()
      .toBuffer({ resolveWithObject: true });
    const input = () => sharp(raw.data, { raw: { width: raw.info.width, height: raw.info.height, channels: raw.info.channels } });
    const [full, thumb, print] = await Promise.all([
      input().jpeg({ quality: FULL_JPEG_QUALITY }).toBuffer(),
      input().resize({ width: THUMB_EDGE, height: THUMB_EDGE, fit: 'inside', withoutEnlargement: true }).jpeg({ quality: THUMB_JPEG_QUALITY }).toBuffer(),
      printCopyOf(input()),
    ]);
    return { full, thumb, print };
  });
}

// ---------------------------------------------------------------------------------------------
// Writing

interface PhotoForMarks {
  id: string;
  storage_key: string;
  finding_id: string | null;
  fix_id: string | null;
  test_record_id: string | null;
  status: FindingStatus | null;
}

function refuseUnlessMayMark(photo: PhotoForMarks, role: Role): void {
  if (photo.finding_id && photo.status) {
    const decision = decideAddPhotos(photo.status, role);
    if (!decision.allowed) throw refusalError(decision);
    return;
  }
  if (photo.fix_id && photo.status) {
    if (role !== 'subcontractor' && role !== 'gc_manager') throw forbidden('Only the responsible company or a GC manager marks the photos of a fix.');
    if (photo.status !== 'fix_submitted') throw conflict('This fix has been reviewed; its photos can be marked only while it waits for the inspector.', 'invalid_transition');
    return;
  }
  throw forbidden('Marks are drawn on the photos of findings and fixes.');
}

async function photoForMarks(sequelize: Sequelize, access: PhotoAccess, transaction?: Transaction): Promise<PhotoForMarks> {
  const [row] = await sequelize.query<PhotoForMarks>(
    `SELECT p.id, p.storage_key, p.finding_id, p.fix_id, p.test_record_id, f.status
       FROM photos p
       LEFT JOIN fixes x ON x.id = p.fix_id AND x.job_id = p.job_id
       LEFT JOIN findings f ON f.id = COALESCE(p.finding_id, x.finding_id) AND f.job_id = p.job_id
      WHERE p.id = $1 AND p.job_id = $2${transaction ? ' FOR UPDATE OF p' : ''}`,
    { bind: [access.photoId, access.scope.jobId], type: QueryTypes.SELECT, transaction },
  );
  if (!row) throw notFound('Photo not found.');
  return row;
}

/** Before the body matters: 403/409 when the caller may not mark this photo. */
export async function checkMayMark(sequelize: Sequelize, access: PhotoAccess): Promise<void> {
  refuseUnlessMayMark(await photoForMarks(sequelize, access), access.role);
}

export interface SaveMarksDeps {
  sequelize: Sequelize;
  store: ObjectStore;
  pending: PendingUploads;
  log: (message: string, err?: unknown) => void;
}

async function readAll(store: ObjectStore, key: string): Promise<Buffer> {
  const object = await store.get(key);
  if (!object) throw notFound('Photo not found.');
  const chunks: Buffer[] = [];
  for await (const chunk of object.body) chunks.push(Buffer.from(chunk as Buffer));
  return Buffer.concat(chunks);
}

/**
 * Replaces the photo's marks (If-Match with the marks' version: 428 missing, 412 stale) and its
 * flattened copy, in one transaction under the photo's row lock. The new copy is stored under
 * fresh keys recorded as pending first (a failed write removes it, a crash leaves it to the
 * reaper); the previous copy is deleted after the commit. An empty list removes the copy.
 */
export async function savePhotoMarks(
  deps: SaveMarksDeps,
  access: PhotoAccess,
  actorId: string,
  ifMatch: string | undefined,
  marks: Mark[],
): Promise<PhotoMarks> {
  const { sequelize, store, pending, log } = deps;
  let newKeys: string[] = [];
  let oldKeys: string[] = [];
  try {
    const result = await sequelize.transaction(async (transaction) => {
      const photo = await photoForMarks(sequelize, access, transaction);
      refuseUnlessMayMark(photo, access.role);
      const current = await marksRow(sequelize, photo.id, transaction, true);
      checkVersion(ifMatch, current?.version ?? 0, present(photo.id, current));
      let markedKey: string | null = null;
      let markedThumbKey: string | null = null;
      let markedPrintKey: string | null = null;
      if (marks.length > 0) {
        const flat = await flattenMarks(await readAll(store, photo.storage_key), marks);
        const n = randomUUID();
        markedKey = `photos/${photo.id}-marked-${n}.jpg`;
        markedThumbKey = `photos/${photo.id}-marked-${n}-thumb.jpg`;
        markedPrintKey = `photos/${photo.id}-marked-${n}-print.jpg`;
        newKeys = [markedKey, markedThumbKey, markedPrintKey];
        await pending.record(newKeys);
        await store.put(markedKey, flat.full, PHOTO_CONTENT_TYPE);
        await store.put(markedThumbKey, flat.thumb, PHOTO_CONTENT_TYPE);
        await store.put(markedPrintKey, flat.print, PHOTO_CONTENT_TYPE);
        await pending.claim(newKeys, transaction);
      }
      const [row] = await sequelize.query<MarksRow>(
        `INSERT INTO photo_marks (photo_id, job_id, marks, version, marked_key, marked_thumb_key, marked_print_key, updated_by, updated_at)
         VALUES ($1, $2, $3::jsonb, 1, $4, $5, $6, $7, now())
         ON CONFLICT (photo_id) DO UPDATE SET marks = EXCLUDED.marks, version = photo_marks.version + 1,
           marked_key = EXCLUDED.marked_key, marked_thumb_key = EXCLUDED.marked_thumb_key, marked_print_key = EXCLUDED.marked_print_key,
           updated_by = EXCLUDED.updated_by, updated_at = EXCLUDED.updated_at
         RETURNING marks, version, marked_key, marked_thumb_key, marked_print_key, updated_at`,
        {
          bind: [photo.id, access.scope.jobId, JSON.stringify(marks), markedKey, markedThumbKey, markedPrintKey, actorId],
          type: QueryTypes.SELECT,
          transaction,
        },
      );
      oldKeys = [current?.marked_key, current?.marked_thumb_key, current?.marked_print_key].filter((k): k is string => !!k);
      return present(photo.id, row ?? null);
    });
    if (oldKeys.length > 0) await store.delete(oldKeys).catch((err: unknown) => log(`could not remove replaced marked copies: ${oldKeys.join(', ')}`, err));
    return result;
  } catch (err) {
    if (newKeys.length > 0) {
      await store
        .delete(newKeys)
        .then(() => pending.release(newKeys))
        .catch((e: unknown) => log(`could not remove marked copies of a failed write (left for the reaper): ${newKeys.join(', ')}`, e));
    }
    throw err;
  }
}
