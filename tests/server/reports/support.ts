/**
 * Reports tests: the demo job in a database of its own, with its fix photos and a drawn "as found"
 * photo on some findings of every company, a photo store on the S3 fake that records which keys a
 * report read, and the PDF read back with poppler (pdftotext, pdfinfo, pdfimages, pdftoppm).
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { Photo } from '../../../server/models';
import { demoPhotoBytes } from '../../../server/seed/demoPhotos';
import { processPhoto, photoRowValues, storePhotos } from '../../../server/services/photos';
import type { ObjectStore } from '../../../server/storage';

const run = promisify(execFile);

/** The store, and every key read from it since the last `reset()`. */
export function recordingStore(inner: ObjectStore): ObjectStore & { reads: string[]; reset(): void } {
  const reads: string[] = [];
  return {
    get location() {
      return inner.location;
    },
    reads,
    reset() {
      reads.length = 0;
    },
    put: (k, b, t) => inner.put(k, b, t),
    delete: (k) => inner.delete(k),
    exists: (k) => inner.exists(k),
    async get(key) {
      reads.push(key);
      return inner.get(key);
    },
  };
}

/** Gives up to `perCompany` findings of each company a drawn photo as found (stage finding). Returns how many. */
export async function addFindingPhotos(db: Database, jobId: string, store: ObjectStore, perCompany: number): Promise<number> {
  const rows = await db.sequelize.query<{ id: string; number: number; tag: string | null; code: string; title: string; logged_by: string }>(
    `SELECT id, number, tag, code, title, logged_by FROM (
       SELECT f.id, f.number, u.tag, ci.code, ci.title, f.logged_by,
              row_number() OVER (PARTITION BY f.company_id ORDER BY f.number) AS n
         FROM findings f JOIN catalogue_items ci ON ci.id = f.catalogue_item_id LEFT JOIN units u ON u.id = f.unit_id
        WHERE f.job_id = $1 AND f.status <> 'voided'
          AND NOT EXISTS (SELECT 1 FROM photos p WHERE p.finding_id = f.id AND p.stage = 'finding')) x
      WHERE n <= $2`,
    { bind: [jobId, perCompany], type: QueryTypes.SELECT },
  );
  for (const r of rows) {
    const processed = await processPhoto(await demoPhotoBytes({ stage: 'finding', findingNumber: r.number, tag: r.tag, code: r.code, title: r.title, attempt: 1 }));
    const stored = await storePhotos(store, [processed]);
    await Photo.bulkCreate(photoRowValues(stored, { jobId, uploadedBy: r.logged_by, findingId: r.id }));
  }
  return rows.length;
}

export async function writeTemp(name: string, bytes: Buffer): Promise<string> {
  const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'trimout-report-test-'));
  const file = path.join(dir, name);
  await fs.writeFile(file, bytes);
  return file;
}

export async function pdfText(file: string, pages?: { first: number; last: number }): Promise<string> {
  const range = pages ? ['-f', String(pages.first), '-l', String(pages.last)] : [];
  const { stdout } = await run('pdftotext', ['-layout', ...range, file, '-'], { maxBuffer: 64 * 1024 * 1024 });
  return stdout;
}

export async function pdfPages(file: string): Promise<number> {
  const { stdout } = await run('pdfinfo', [file]);
  return Number(/^Pages:\s+(\d+)/m.exec(stdout)![1]);
}

/** Images embedded in the PDF (pdfimages -list: one line per image after two header lines). */
export async function pdfImages(file: string): Promise<{ page: number; width: number; height: number }[]> {
  const { stdout } = await run('pdfimages', ['-list', file]);
  return stdout
    .split('\n')
    .slice(2)
    .filter((l) => l.trim())
    .map((l) => {
      const c = l.trim().split(/\s+/);
      return { page: Number(c[0]), width: Number(c[3]), height: Number(c[4]) };
    });
}

/** Page `page` drawn to PNG at `dpi`; the file's path. */
export async function renderPage(file: string, page: number, out: string, dpi = 60): Promise<string> {
  await run('pdftoppm', ['-png', '-r', String(dpi), '-f', String(page), '-l', String(page), '-singlefile', file, out]);
  return `${out}.png`;
}

/** Pages (1-based) whose text contains `needle`, per form feed from pdftotext. */
export function pagesWith(text: string, needle: string | RegExp): number[] {
  return text
    .split('\f')
    .map((t, i) => ((typeof needle === 'string' ? t.includes(needle) : needle.test(t)) ? i + 1 : 0))
    .filter((n) => n > 0);
}
