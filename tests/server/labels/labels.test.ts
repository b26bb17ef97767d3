/**
 * Unit labels (GET /api/jobs/:jobId/labels.pdf): the PDF is rendered with pdftoppm (poppler) and
 * every label's QR code decoded with jsQR; the codes give back the units' addresses on PUBLIC_URL,
 * in level and tag order, with the page and label counts the sheet settings ask for. Bad settings
 * → 400 naming the field; another job's level, system or unit → 404; a subcontractor → 403.
 */
import { execFile } from 'node:child_process';
import { copyFile, mkdir, mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import jsQR from 'jsqr';
import sharp from 'sharp';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { LABEL_PAGE_MM, labelSheetOf, type LabelSheet } from '../../../shared/schemas/labels';
import { buildTestApp, signIn, testEnv, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildSystem, buildUnit } from '../../support/factories';
import { buildWalkJob, type WalkJob } from '../../support/findings';

jest.setTimeout(120_000);

const run = promisify(execFile);
const ORIGIN = 'https://trimout.example.test';
const DPI = 200;

let db: Database;
let trimout: TrimoutApp;
let w: WalkJob;
let other: WalkJob;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let tmp: string;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db, { env: testEnv({ PUBLIC_URL: ORIGIN, COOKIE_SECURE: 'false' }) });
  w = await buildWalkJob();
  other = await buildWalkJob();
  gc = await signIn(trimout.app, w.gcManager.email);
  inspector = await signIn(trimout.app, w.inspector.email);
  subA = await signIn(trimout.app, w.subA.email);
  tmp = await mkdtemp(path.join(os.tmpdir(), 'trimout-labels-'));
});
afterAll(async () => {
  await rm(tmp, { recursive: true, force: true });
  await trimout.close();
  await db.close();
});

const addressOf = (jobId: string, unitId: string) => `${ORIGIN}/jobs/${jobId}/units/${unitId}/check`;

async function getPdf(who: SignedIn, query: string) {
  return who.agent
    .get(`/api/jobs/${w.job.id}/labels.pdf?${query}`)
    .buffer(true)
    .parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
}

let n = 0;
/** Every page of the PDF as PNG (pdftoppm), then every label cell of the sheet decoded; null where a cell holds no code. */
async function decodeSheet(pdf: Buffer, sheet: LabelSheet): Promise<{ pages: number; codes: (string | null)[] }> {
  const base = path.join(tmp, `sheet-${++n}`);
  await writeFile(`${base}.pdf`, pdf);
  await run('pdftoppm', ['-r', String(DPI), '-png', `${base}.pdf`, base]);
  const pngs = (await readdir(tmp)).filter((f) => f.startsWith(`sheet-${n}-`) && f.endsWith('.png')).sort();
  const px = (mm: number) => Math.round((mm / 25.4) * DPI);
  const codes: (string | null)[] = [];
  for (const png of pngs) {
    const file = path.join(tmp, png);
    const meta = await sharp(file).metadata();
    expect(meta.width).toBe(px(LABEL_PAGE_MM[sheet.page].width));
    for (let r = 0; r < sheet.rows; r++) {
      for (let c = 0; c < sheet.columns; c++) {
        const left = px(sheet.left + c * (sheet.width + sheet.gapX));
        const top = px(sheet.top + r * (sheet.height + sheet.gapY));
        const { data, info } = await sharp(file)
          .extract({ left, top, width: Math.min(px(sheet.width), meta.width! - left), height: Math.min(px(sheet.height), meta.height! - top) })
          .ensureAlpha()
          .raw()
          .toBuffer({ resolveWithObject: true });
        const code = jsQR(new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), info.width, info.height);
        codes.push(code?.data ?? null);
      }
    }
  }
  return { pages: pngs.length, codes };
}

describe('GET /api/jobs/:jobId/labels.pdf', () => {
  it("prints a level's units, one code each, that decode to the units' addresses in tag order", async () => {
    const res = await getPdf(inspector, `levelId=${w.level.id}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['x-label-count']).toBe('3');
    const { pages, codes } = await decodeSheet(res.body as Buffer, labelSheetOf({}));
    expect(pages).toBe(1);
    // A4 default: 3 × 7; the three units of Level 3 fill the first row, the rest of the sheet is blank.
    expect(codes).toHaveLength(21);
    expect(codes.slice(0, 3)).toEqual([w.cassette, w.cassette2, w.wall].map((u) => addressOf(w.job.id, u.id)));
    expect(codes.slice(3).every((c) => c === null)).toBe(true);
    // The page as printed, for a person to look at (browser-test screenshots go to the same folder).
    if (process.env.TRIMOUT_ARTIFACTS) {
      const dir = path.join(process.env.TRIMOUT_ARTIFACTS, 'screenshots');
      await mkdir(dir, { recursive: true });
      await copyFile(path.join(tmp, `sheet-${n}-1.png`), path.join(dir, 'unit-labels-a4.png'));
    }
  });

  it('lays out chosen units over several pages on Letter with the settings asked for', async () => {
    const extra = [];
    for (let i = 0; i < 5; i++) extra.push(await buildUnit(w.job.id, w.otherLevel.id, { tag: `IU-4-1${i}`, kind: 'wall_mounted' }));
    const units = [w.cassette, w.upstairs, ...extra];
    const settings = { page: 'letter', rows: 2, columns: 2, top: 20, left: 15, width: 90, height: 60, gapX: 5, gapY: 5 } as const;
    const q = new URLSearchParams({ unitIds: units.map((u) => u.id).join(','), ...Object.fromEntries(Object.entries(settings).map(([k, v]) => [k, String(v)])) });
    const res = await getPdf(gc, q.toString());
    expect(res.status).toBe(200);
    const { pages, codes } = await decodeSheet(res.body as Buffer, labelSheetOf(settings));
    expect(pages).toBe(2); // 7 labels, 4 a page
    // Level 3 before Level 4, then by tag.
    const expected = [w.cassette, ...[w.upstairs, ...extra].sort((a, b) => a.tag.localeCompare(b.tag))].map((u) => addressOf(w.job.id, u.id));
    expect(codes.slice(0, 7)).toEqual(expected);
    expect(codes[7]).toBeNull();
  });

  it("prints a system's units", async () => {
    const system = await buildSystem(w.job.id, { name: 'VRF-9' });
    const a = await buildUnit(w.job.id, w.level.id, { tag: 'IU-3-91', kind: 'cassette_4way', systemId: system.id });
    const res = await getPdf(gc, `systemId=${system.id}`);
    expect(res.status).toBe(200);
    const { codes } = await decodeSheet(res.body as Buffer, labelSheetOf({}));
    expect(codes.filter(Boolean)).toEqual([addressOf(w.job.id, a.id)]);
  });

  it.each([
    ['no selection', '', 'levelId'],
    ['two selections', () => `levelId=${w.level.id}&systemId=${w.level.id}`, 'levelId'],
    ['a bad page', () => `levelId=${w.level.id}&page=a3`, 'query.page'],
    ['zero rows', () => `levelId=${w.level.id}&rows=0`, 'query.rows'],
    ['a fraction of a column', () => `levelId=${w.level.id}&columns=2.5`, 'query.columns'],
    ['labels wider than the page', () => `levelId=${w.level.id}&columns=4&width=60`, 'width'],
    ['labels taller than the page', () => `levelId=${w.level.id}&page=letter&rows=11`, 'height'],
    ['a unit id that is not an id', () => `unitIds=${w.cassette.id},nope`, 'query.unitIds.1'],
    ['an unknown setting', () => `levelId=${w.level.id}&bleed=3`, 'query'],
  ])('400 naming the field for %s', async (_name, query, field) => {
    const res = await gc.agent.get(`/api/jobs/${w.job.id}/labels.pdf?${typeof query === 'function' ? query() : query}`);
    expect(res.status).toBe(400);
    expect(res.body.error.id).toBe('bad_request');
    expect(Object.keys(res.body.error.fields ?? {}).some((k) => k === field || k.startsWith(`${field}.`) || (field === 'levelId' && k.endsWith('levelId')))).toBe(true);
  });

  it("404 for another job's level, system or unit (nothing printed)", async () => {
    const otherSystem = await buildSystem(other.job.id);
    for (const q of [`levelId=${other.level.id}`, `systemId=${otherSystem.id}`, `unitIds=${w.cassette.id},${other.cassette.id}`]) {
      const res = await gc.agent.get(`/api/jobs/${w.job.id}/labels.pdf?${q}`);
      expect(res.status).toBe(404);
      expect(res.headers['content-type']).toMatch(/json/);
    }
    // And another job's path as someone who is not its member: 404 as well.
    expect((await gc.agent.get(`/api/jobs/${other.job.id}/labels.pdf?levelId=${other.level.id}`)).status).toBe(404);
  });

  it('403 for a subcontractor, 401 signed out', async () => {
    expect((await subA.agent.get(`/api/jobs/${w.job.id}/labels.pdf?levelId=${w.level.id}`)).status).toBe(403);
    expect((await request(trimout.app).get(`/api/jobs/${w.job.id}/labels.pdf?levelId=${w.level.id}`)).status).toBe(401);
  });
});
