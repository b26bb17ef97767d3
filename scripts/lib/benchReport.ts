/**
 * The close-out report figure of `npm run bench` (called by scripts/bench.ts; also on its own:
 * `npx tsx scripts/lib/benchReport.ts <database url> [job id]`): the time and the memory growth
 * of building the close-out report of the job's busiest level with BENCH_REPORT_PHOTOS (500)
 * photos, next to the time to just read the same rows and the same photos' bytes.
 *
 * The report runs in this process (server/reports/closeOut.ts writeCloseOut, exactly what the
 * route and the background worker run) into a sink that reads as fast as a local client, so the
 * memory figure is the report's own: peak RSS and heap above the figure before it started,
 * sampled every 20 ms. Photos are phone-sized JPEGs (2016 x 1512) made here in a temporary disk
 * store and attached to findings of the level for the run (rows removed afterwards); the bench
 * seed has no photos. Each gets its print copy, as an upload does (server/services/photos.ts
 * makePrintCopy); with `printCopies: false` none, as for photos stored before print copies
 * existed, and the report makes them (`reportAgainSeconds` is then the next report, reading them).
 * The reading pass reads what the report prints: the print copy where there is one.
 */
import { randomUUID, createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Writable } from 'node:stream';
import { QueryTypes } from 'sequelize';
import sharp from 'sharp';
import { connect } from '../../server/db';
import { CLOSE_OUT_STATUSES, writeCloseOut } from '../../server/reports/closeOut';
import { findingIds, findingRows, resolveScope } from '../../server/reports/data';
import { makePrintCopy } from '../../server/services/photos';
import { DiskObjectStore } from '../../server/storage';

export interface BenchReportResult {
  findings: number;
  photos: number;
  /** Photos read in the reading-only pass (the same ones the report prints). */
  photosRead: number;
  /** Reading the rows (same statements, same batches) and every printed photo's bytes. */
  readSeconds: number;
  reportSeconds: number;
  /** With `printCopies: false`: the same report once more, after the first made the print copies. */
  reportAgainSeconds: number | null;
  /** reportSeconds / readSeconds. */
  ratio: number;
  megabytes: number;
  pages: number | null;
  rssGrowthMB: number;
  heapGrowthMB: number;
}

const mb = (n: number) => Math.round((n / 1_048_576) * 10) / 10;

async function phonePhoto(seed: number): Promise<Buffer> {
  // A busy picture (noise over a gradient) so the JPEG is as large as a real site photo.
  const w = 2016;
  const h = 1512;
  const raw = Buffer.alloc(w * h * 3);
  let x = seed * 2654435761;
  for (let i = 0; i < raw.length; i += 3) {
    x = (x * 1103515245 + 12345) >>> 0;
    const p = i / 3;
    raw[i] = ((p % w) * 255) / w + ((x >>> 24) % 40);
    raw[i + 1] = (Math.floor(p / w) * 255) / h;
    raw[i + 2] = (x >>> 16) % 255;
  }
  return sharp(raw, { raw: { width: w, height: h, channels: 3 } }).jpeg({ quality: 85 }).toBuffer();
}

export async function benchReport(options: { databaseUrl: string; jobId: string; photos?: number; printCopies?: boolean }): Promise<BenchReportResult> {
  const printCopies = options.printCopies ?? true;
  const photoCount = options.photos ?? Number(process.env.BENCH_REPORT_PHOTOS ?? 500);
  const db = connect(options.databaseUrl);
  const sequelize = db.sequelize;
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-bench-report-'));
  const store = new DiskObjectStore(dir);
  const added: string[] = [];
  try {
    const [job] = await sequelize.query<{ time_zone: string }>(`SELECT time_zone FROM jobs WHERE id = $1`, { bind: [options.jobId], type: QueryTypes.SELECT });
    const [level] = await sequelize.query<{ level_id: string }>(
      `SELECT level_id FROM findings WHERE job_id = $1 AND status <> 'voided' GROUP BY level_id ORDER BY count(*) DESC LIMIT 1`,
      { bind: [options.jobId], type: QueryTypes.SELECT },
    );
    const scope = { jobId: options.jobId, timeZone: job!.time_zone, companyId: null };
    const place = await resolveScope(sequelize, scope, { levelId: level!.level_id });
    const ids = await findingIds(sequelize, scope, place, CLOSE_OUT_STATUSES);

    // Photos: as found on the first half, of the latest fix on the second (or as found when a finding has no fix).
    const sources = await Promise.all([1, 2, 3, 4].map(phonePhoto));
    const prints = await Promise.all(sources.map(makePrintCopy));
    const targets = ids.slice(0, photoCount);
    for (const [i, findingId] of targets.entries()) {
      const id = randomUUID();
      const bytes = sources[i % sources.length]!;
      const key = `photos/${id}.jpg`;
      await store.put(key, bytes, 'image/jpeg');
      await store.put(`photos/${id}-thumb.jpg`, bytes, 'image/jpeg');
      const printKey = printCopies ? `photos/${id}-print.jpg` : null;
      if (printKey) await store.put(printKey, prints[i % prints.length]!, 'image/jpeg');
      const [fix] =
        i % 2 === 1
          ? await sequelize.query<{ id: string }>(`SELECT id FROM fixes WHERE finding_id = $1 ORDER BY submitted_at DESC, id DESC LIMIT 1`, {
              bind: [findingId],
              type: QueryTypes.SELECT,
            })
          : [];
      await sequelize.query(
        `INSERT INTO photos (id, job_id, storage_key, thumb_key, print_key, content_type, source_type, byte_size, width, height, sha256, uploaded_by, finding_id, fix_id, stage, created_at)
         SELECT $1, f.job_id, $2, $3, $10, 'image/jpeg', 'image/jpeg', $4, 2016, 1512, $5, f.logged_by, $6, $7, $8, now() FROM findings f WHERE f.id = $9`,
        {
          bind: [
            id,
            key,
            `photos/${id}-thumb.jpg`,
            bytes.length,
            createHash('sha256').update(id).digest('hex'),
            fix ? null : findingId,
            fix?.id ?? null,
            fix ? 'fix' : 'finding',
            findingId,
            printKey,
          ],
        },
      );
      added.push(id);
    }

    // Reading only: the same batches of rows, and every photo the report prints (its print copy where it has one), bytes read in full.
    const readStart = process.hrtime.bigint();
    let photos = 0;
    for (let start = 0; start < ids.length; start += 50) {
      const rows = await findingRows(sequelize, scope, ids.slice(start, start + 50));
      for (const r of rows) {
        for (const key of [r.defect_print_key ?? r.defect_photo_key, r.fix_print_key ?? r.fix_photo_key]) {
          if (!key) continue;
          const obj = await store.get(key);
          // A photo row an interrupted earlier run left without its file: the report prints it as missing too.
          if (!obj) continue;
          for await (const _chunk of obj.body) void _chunk;
          photos += 1;
        }
      }
    }
    const readSeconds = Number(process.hrtime.bigint() - readStart) / 1e9;

    // The report, into a sink that takes every chunk at once.
    (globalThis as { gc?: () => void }).gc?.();
    const before = process.memoryUsage();
    let peakRss = before.rss;
    let peakHeap = before.heapUsed;
    const sampler = setInterval(() => {
      const m = process.memoryUsage();
      peakRss = Math.max(peakRss, m.rss);
      peakHeap = Math.max(peakHeap, m.heapUsed);
    }, 20);
    let bytes = 0;
    const sink = () =>
      new Writable({
        write(chunk: Buffer, _enc, done) {
          bytes += chunk.length;
          done();
        },
      });
    const reportStart = process.hrtime.bigint();
    const report = () => writeCloseOut(sink(), { sequelize, store, scope, place, author: { name: 'Bench', role: 'gc_manager' }, now: new Date() });
    const result = await report();
    const megabytes = mb(bytes);
    const reportSeconds = Number(process.hrtime.bigint() - reportStart) / 1e9;
    clearInterval(sampler);
    let reportAgainSeconds: number | null = null;
    if (!printCopies) {
      const againStart = process.hrtime.bigint();
      await report();
      reportAgainSeconds = Math.round((Number(process.hrtime.bigint() - againStart) / 1e9) * 100) / 100;
    }
    return {
      findings: result.findings,
      photos: result.photos,
      photosRead: photos,
      readSeconds: Math.round(readSeconds * 100) / 100,
      reportSeconds: Math.round(reportSeconds * 100) / 100,
      reportAgainSeconds,
      ratio: Math.round((reportSeconds / readSeconds) * 10) / 10,
      megabytes,
      pages: null,
      rssGrowthMB: mb(peakRss - before.rss),
      heapGrowthMB: mb(peakHeap - before.heapUsed),
    };
  } finally {
    if (added.length) await sequelize.query(`DELETE FROM photos WHERE id = ANY ($1::uuid[])`, { bind: [added] });
    await db.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

export function describeReportBench(r: BenchReportResult): string {
  return (
    `close-out report: ${r.findings} findings, ${r.photos} photos, ${r.megabytes} MB in ${r.reportSeconds} s; ` +
    `reading the same rows and photos ${r.readSeconds} s (x${r.ratio}); memory growth RSS ${r.rssGrowthMB} MB, heap ${r.heapGrowthMB} MB` +
    (r.reportAgainSeconds !== null ? `; without print copies at first, the next report ${r.reportAgainSeconds} s` : '')
  );
}

if (require.main === module) {
  const [url, jobId] = process.argv.slice(2);
  if (!url) throw new Error('usage: tsx scripts/lib/benchReport.ts <database url> [job id]');
  void (async () => {
    let id = jobId;
    if (!id) {
      const db = connect(url);
      const [row] = await db.sequelize.query<{ job_id: string }>(`SELECT job_id FROM findings GROUP BY job_id ORDER BY count(*) DESC LIMIT 1`, { type: QueryTypes.SELECT });
      await db.close();
      id = row!.job_id;
    }
    const r = await benchReport({ databaseUrl: url, jobId: id });
    console.log(describeReportBench(r));
    console.log(JSON.stringify(r));
  })().catch((err: unknown) => {
    console.error(err);
    process.exit(1);
  });
}
