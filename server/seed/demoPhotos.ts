/**
 * The demo's photos: simple drawn images of our own (a ceiling grid, the unit, a caption naming
 * the unit tag, the finding and what the photo shows), made with sharp at seed time. They go
 * through the same path as an upload: processPhoto (type from the bytes, re-encoded, thumbnail and
 * print copy), then withStoredPhotos (pending keys, the object store, rows written in one
 * transaction that claims them), so a demo photo is served, printed, exported and reaped like any other.
 *
 * Deterministic: the same fix always gets the same picture. Only fixes without a photo get one,
 * so running it again adds nothing.
 */
import { QueryTypes } from 'sequelize';
import sharp from 'sharp';
import type { Database } from '../db';
import { Photo } from '../models';
import { pendingUploads } from '../services/pendingUploads';
import { photoRowValues, processPhoto, withStoredPhotos, type ProcessedPhoto } from '../services/photos';
import type { ObjectStore } from '../storage/types';

const WIDTH = 960;
const HEIGHT = 720;

export interface DemoPhotoSpec {
  stage: 'finding' | 'fix';
  findingNumber: number;
  /** Unit tag, or null for a finding on a space. */
  tag: string | null;
  code: string;
  title: string;
  /** 1 for the first fix of a finding, 2 for the fix after a return, ... */
  attempt: number;
}

const xml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** Cuts a caption line to what fits the picture's width at the caption's size. */
const fit = (s: string, max: number) => (s.length <= max ? s : `${s.slice(0, max - 1)}…`);

/** The drawing as SVG: a grid ceiling seen from below, the unit, and a caption. */
export function demoPhotoSvg(p: DemoPhotoSpec): string {
  const fix = p.stage === 'fix';
  const tone = fix ? { sky: '#DCE8E1', band: '#2F6B4F', mark: '#2F6B4F' } : { sky: '#EFE2DA', band: '#9C2B1F', mark: '#C0392B' };
  // A small shift per finding so a list of thumbnails does not look like copies.
  const dx = ((p.findingNumber * 37) % 90) - 45;
  const dy = ((p.findingNumber * 53) % 50) - 25;
  const grid: string[] = [];
  for (let x = 0; x <= WIDTH; x += 120) grid.push(`<line x1="${x + dx / 3}" y1="0" x2="${x + dx / 3}" y2="${HEIGHT - 190}" stroke="#B9B4A8" stroke-width="6"/>`);
  for (let y = 0; y <= HEIGHT - 190; y += 120) grid.push(`<line x1="0" y1="${y}" x2="${WIDTH}" y2="${y}" stroke="#B9B4A8" stroke-width="6"/>`);
  const cx = WIDTH / 2 + dx;
  const cy = 260 + dy;
  // The four louvres of a cassette: top, bottom, left, right.
  const louvres = [
    [cx - 90, cy - 130, 180, 28],
    [cx - 90, cy + 102, 180, 28],
    [cx - 130, cy - 90, 28, 180],
    [cx + 102, cy - 90, 28, 180],
  ]
    .map(([x, y, w, h]) => `<rect x="${x}" y="${y}" width="${w}" height="${h}" rx="6" fill="#8E9A93"/>`)
    .join('');
  const marker = fix
    ? `<path d="M ${cx + 150} ${cy - 40} l 30 34 l 60 -74" fill="none" stroke="${tone.mark}" stroke-width="16" stroke-linecap="round" stroke-linejoin="round"/>`
    : `<circle cx="${cx + 170}" cy="${cy - 60}" r="52" fill="none" stroke="${tone.mark}" stroke-width="12"/>`;
  const heading = fix ? `FIX PHOTO · #${p.findingNumber}${p.attempt > 1 ? ` · fix ${p.attempt}` : ''}` : `DEFECT PHOTO · #${p.findingNumber}`;
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${WIDTH}" height="${HEIGHT}" viewBox="0 0 ${WIDTH} ${HEIGHT}">
<rect width="${WIDTH}" height="${HEIGHT}" fill="${tone.sky}"/>
${grid.join('')}
<rect x="${cx - 160}" y="${cy - 160}" width="320" height="320" rx="18" fill="#F7F6F2" stroke="#6F7A73" stroke-width="6"/>
<rect x="${cx - 70}" y="${cy - 70}" width="140" height="140" rx="10" fill="#E4E2DC" stroke="#9AA39D" stroke-width="4"/>
${louvres}
${marker}
<rect x="0" y="${HEIGHT - 190}" width="${WIDTH}" height="190" fill="${tone.band}"/>
<text x="32" y="${HEIGHT - 140}" font-family="DejaVu Sans, Arial, sans-serif" font-size="30" font-weight="bold" fill="#FFFFFF">${xml(heading)}</text>
<text x="32" y="${HEIGHT - 96}" font-family="DejaVu Sans, Arial, sans-serif" font-size="34" font-weight="bold" fill="#FFFFFF">${xml(p.tag ?? 'No unit')} · ${xml(p.code)}</text>
<text x="32" y="${HEIGHT - 56}" font-family="DejaVu Sans, Arial, sans-serif" font-size="28" fill="#FFFFFF">${xml(fit(p.title, 52))}</text>
<text x="32" y="${HEIGHT - 20}" font-family="DejaVu Sans, Arial, sans-serif" font-size="20" fill="#F4F1EA">Invented demo image · Trimout demo job</text>
</svg>`;
}

/** The picture as the JPEG a phone would send; the caller processes it like an upload. */
export async function demoPhotoBytes(p: DemoPhotoSpec): Promise<Buffer> {
  return sharp(Buffer.from(demoPhotoSvg(p))).jpeg({ quality: 80 }).toBuffer();
}

interface FixRow {
  fix_id: string;
  submitted_by: string;
  number: number;
  tag: string | null;
  code: string;
  title: string;
  attempt: number;
}

/**
 * Gives every fix of the job that has no photo its drawn fix photo, stored in `store`.
 * Returns how many photos were added.
 */
export async function seedDemoFixPhotos(db: Database, jobId: string, store: ObjectStore): Promise<number> {
  const sequelize = db.sequelize;
  const fixes = await sequelize.query<FixRow>(
    `SELECT fx.id AS fix_id, fx.submitted_by, f.number, u.tag, ci.code,
            CASE WHEN ci.is_other THEN coalesce(f.title, ci.title) ELSE ci.title END AS title,
            row_number() OVER (PARTITION BY fx.finding_id ORDER BY fx.submitted_at, fx.id)::int AS attempt
       FROM fixes fx
       JOIN findings f ON f.id = fx.finding_id
       JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
       LEFT JOIN units u ON u.id = f.unit_id
      WHERE fx.job_id = $1
      ORDER BY f.number, fx.submitted_at, fx.id`,
    { bind: [jobId], type: QueryTypes.SELECT },
  );
  const withPhoto = new Set(
    (
      await sequelize.query<{ fix_id: string }>(`SELECT DISTINCT fix_id FROM photos WHERE job_id = $1 AND fix_id IS NOT NULL`, {
        bind: [jobId],
        type: QueryTypes.SELECT,
      })
    ).map((r) => r.fix_id),
  );
  const missing = fixes.filter((f) => !withPhoto.has(f.fix_id));
  if (missing.length === 0) return 0;

  const processed: ProcessedPhoto[] = [];
  for (const f of missing) {
    processed.push(await processPhoto(await demoPhotoBytes({ stage: 'fix', findingNumber: f.number, tag: f.tag, code: f.code, title: f.title, attempt: f.attempt })));
  }
  await withStoredPhotos(
    store,
    processed,
    (stored, claim) =>
      sequelize.transaction(async (transaction) => {
        const rows = stored.flatMap((s, i) => photoRowValues([s], { jobId, uploadedBy: missing[i]!.submitted_by, fixId: missing[i]!.fix_id }));
        await Photo.bulkCreate(rows, { transaction });
        await claim(transaction);
      }),
    { pending: pendingUploads(sequelize) },
  );
  return missing.length;
}
