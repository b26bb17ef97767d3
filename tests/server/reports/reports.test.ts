/**
 * PDF reports read back with poppler and compared with the database: the close-out report, the
 * crew punch list, the unit sheet, the background build with its progress, file and mail, and
 * who may have which report. The demo job (its own database) gives every status, severity,
 * company and test-record state; photos as found are drawn for a few findings of each company.
 */
import fs from 'node:fs/promises';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import sharp from 'sharp';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { PHOTO_BOX } from '../../../server/reports/closeOut';
import { pixelsFor } from '../../../server/reports/photos';
import { createReportQueue, type ReportQueue } from '../../../server/reports/queue';
import { DEMO_ACCOUNTS, DEMO_JOBS, DEMO_PASSWORD, seedDemo } from '../../../server/seed/demo';
import { GOVERNS, NOT_CERTIFIED } from '../../../shared/deferral';
import { FINDING_STATUS_LABELS, type FindingStatus } from '../../../shared/words';
import { buildTestApp, signIn, testEnv, type SignedIn } from '../../support/app';
import { connectOwnDb } from '../../support/db';
import { startFakeSmtp, testMailService, type FakeSmtp } from '../../support/mail';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { testDatabaseUrl } from '../../support/db';
import { waitFor } from '../../support/wait';
import { addFindingPhotos, pagesWith, pdfImages, pdfPages, pdfText, recordingStore, renderPage, writeTemp } from './support';

jest.setTimeout(240_000);

let own: Awaited<ReturnType<typeof connectOwnDb>>;
let db: Database;
let s3: FakeS3;
let store: ReturnType<typeof recordingStore>;
let smtp: FakeSmtp;
let queue: ReportQueue;
let trimout: TrimoutApp;
let jobId: string;
const who: Record<'gc' | 'inspector' | 'mechanical' | 'electrical', SignedIn> = {} as never;
const artifacts = path.join(process.env.TRIMOUT_ARTIFACTS ?? path.resolve(__dirname, '../../../.artifacts'), 'reports');

function ownUrl(): string {
  const url = new URL(testDatabaseUrl());
  url.pathname = `${url.pathname}_reports`.replace(/[^a-z0-9_/]/gi, '_');
  return url.toString();
}

async function sql<T extends object>(text: string, bind: unknown[] = []): Promise<T[]> {
  return db.sequelize.query<T>(text, { bind, type: QueryTypes.SELECT });
}

async function getPdf(agent: TestAgent | ReturnType<typeof request>, url: string, status = 200) {
  const res = await agent
    .get(url)
    .buffer(true)
    .parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
  if (res.status !== status) throw new Error(`${url}: ${res.status} ${(res.body as Buffer).toString('utf8').slice(0, 300)}`);
  return res;
}

async function pdfOf(agent: TestAgent, url: string, name: string) {
  const res = await getPdf(agent, url);
  expect(res.headers['content-type']).toBe('application/pdf');
  expect(res.headers['content-disposition']).toMatch(/^attachment; filename="[A-Za-z0-9_.-]+\.pdf"$/);
  const file = await writeTemp(name, res.body as Buffer);
  return { file, text: await pdfText(file), bytes: (res.body as Buffer).length };
}

const api = (rest: string) => `/api/jobs/${jobId}${rest}`;

beforeAll(async () => {
  own = await connectOwnDb('reports');
  db = own.db;
  s3 = await startFakeS3();
  store = recordingStore(s3.store);
  await seedDemo(db, { store: s3.store });
  jobId = (await sql<{ id: string }>(`SELECT id FROM jobs WHERE name = $1`, [DEMO_JOBS[0]!.name]))[0]!.id;
  await addFindingPhotos(db, jobId, s3.store, 8);
  smtp = await startFakeSmtp();
  const env = testEnv({ DATABASE_URL: ownUrl() });
  queue = createReportQueue({ connectionString: ownUrl(), log: () => undefined });
  const mail = testMailService(smtp, { env });
  await queue.startWorker({ sequelize: db.sequelize, store, mail, log: () => undefined }, { pollingIntervalSeconds: 0.5 });
  trimout = buildTestApp(db, { env, objectStore: store, reportQueue: queue, mail });
  const email = (role: string, company?: string) => DEMO_ACCOUNTS.find((a) => a.role === role && (!company || a.company === company))!.email;
  who.gc = await signIn(trimout.app, email('gc_manager'), DEMO_PASSWORD);
  who.inspector = await signIn(trimout.app, email('inspector'), DEMO_PASSWORD);
  who.mechanical = await signIn(trimout.app, email('subcontractor', 'mechanical'), DEMO_PASSWORD);
  who.electrical = await signIn(trimout.app, email('subcontractor', 'electrical'), DEMO_PASSWORD);
  await fs.mkdir(artifacts, { recursive: true });
});

afterAll(async () => {
  await trimout?.close();
  await queue?.stop();
  await smtp?.close();
  await s3?.close();
  await own?.drop();
});

interface FindingFact {
  id: string;
  number: number;
  tag: string | null;
  status: FindingStatus;
  company_id: string;
  level_id: string;
  /** The print copies (photos.print_key) of the photos a report prints: what it reads. */
  defect_key: string | null;
  fix_key: string | null;
}

/** Every finding of the job with the photos a report prints for it (first as found, first of the latest fix), as their print copies. */
async function findingFacts(): Promise<FindingFact[]> {
  return sql<FindingFact>(
    `SELECT f.id, f.number, u.tag, f.status, f.company_id, f.level_id,
            (SELECT p.print_key FROM photos p WHERE p.finding_id = f.id AND p.stage = 'finding' ORDER BY p.created_at, p.id LIMIT 1) AS defect_key,
            (SELECT p.print_key FROM photos p WHERE p.fix_id = (SELECT x.id FROM fixes x WHERE x.finding_id = f.id ORDER BY x.submitted_at DESC, x.id DESC LIMIT 1)
              ORDER BY p.created_at, p.id LIMIT 1) AS fix_key
       FROM findings f LEFT JOIN units u ON u.id = f.unit_id WHERE f.job_id = $1 ORDER BY f.number`,
    [jobId],
  );
}

const printed = (f: FindingFact) => f.status !== 'voided';
/** A finding's heading line in the report: "#12  VRF-3-04  ·  ...". */
const headingOf = (f: FindingFact) => new RegExp(`#${f.number}\\s+${(f.tag ?? 'No unit').replace(/[.*+?^${}()|[\]\\-]/g, '\\$&')}\\s+·`);

async function companyIdOf(key: 'mechanical' | 'electrical'): Promise<string> {
  const email = DEMO_ACCOUNTS.find((a) => a.company === key)!.email;
  return (await sql<{ company_id: string }>(`SELECT m.company_id FROM job_members m JOIN users u ON u.id = m.user_id WHERE m.job_id = $1 AND u.email = $2`, [jobId, email]))[0]!
    .company_id;
}

/** The level with the most printed findings that still fits a direct download. */
async function busyLevel(): Promise<{ id: string; name: string }> {
  const rows = await sql<{ id: string; name: string; n: string }>(
    `SELECT l.id, l.name, count(f.id) AS n FROM levels l JOIN findings f ON f.level_id = l.id AND f.status <> 'voided'
      WHERE l.job_id = $1 GROUP BY l.id ORDER BY count(f.id) DESC`,
    [jobId],
  );
  return rows.find((r) => Number(r.n) <= 200)!;
}

describe('close-out report', () => {
  it("holds every finding of a level with its status, the summary's counts, the test records, photos and page furniture", async () => {
    const level = await busyLevel();
    const facts = (await findingFacts()).filter((f) => f.level_id === level.id);
    const shown = facts.filter(printed);
    store.reset();
    const { file, text } = await pdfOf(who.gc.agent, api(`/reports/close-out.pdf?levelId=${level.id}`), 'close-out-level.pdf');

    expect(text).toContain('Close-out report');
    expect(text).toContain(`Findings (${shown.length})`);
    for (const f of shown) {
      const pages = pagesWith(text, headingOf(f));
      expect(pages.length).toBeGreaterThan(0);
      // Its status is printed on the page that carries its heading.
      const page = text.split('\f')[pages[0]! - 1]!;
      expect(page).toContain(FINDING_STATUS_LABELS[f.status]);
    }
    // Voided findings are counted, never printed.
    for (const f of facts.filter((x) => !printed(x))) expect(text).not.toMatch(headingOf(f));

    // Summary row of the level: open, fix submitted, closed, voided as in the database.
    const [counts] = await sql<Record<FindingStatus, string>>(
      `SELECT count(*) FILTER (WHERE status = 'open') AS open, count(*) FILTER (WHERE status = 'fix_submitted') AS fix_submitted,
              count(*) FILTER (WHERE status = 'closed') AS closed, count(*) FILTER (WHERE status = 'voided') AS voided
         FROM findings WHERE job_id = $1 AND level_id = $2`,
      [jobId, level.id],
    );
    const row = new RegExp(`^\\s*${level.name}\\s+${counts!.open}\\s+${counts!.fix_submitted}\\s+${counts!.closed}\\s+${counts!.voided}\\s`, 'm');
    expect(text).toMatch(row);
    // Open items at the end: every unresolved finding once more, by company.
    const openPart = text.slice(text.lastIndexOf('Open items by company'));
    expect(openPart).toContain(`Open items by company (${shown.filter((f) => f.status !== 'closed').length})`);
    for (const f of shown.filter((x) => x.status !== 'closed')) expect(openPart).toMatch(new RegExp(`#${f.number}\\s`));

    // Photos: exactly the photos as found and of the latest fixes of these findings, each read as
    // its print copy made at upload; no full photo is read (nor decoded).
    const expectedKeys = shown.flatMap((f) => [f.defect_key, f.fix_key]).filter((k): k is string => k !== null);
    expect(expectedKeys.length).toBeGreaterThan(0);
    expect(expectedKeys.every((k) => k.endsWith('-print.jpg'))).toBe(true);
    const images = await pdfImages(file);
    expect(images).toHaveLength(expectedKeys.length);
    // 150 dpi at the printed size: PHOTO_BOX, 255 × 191.25 pt, is 531 × 398 px (pt / 72 × 150), never the stored 4096 px.
    // The demo's pictures are 960 × 720 (4:3), so each fills it exactly.
    for (const img of images) expect([img.width, img.height]).toEqual([pixelsFor(PHOTO_BOX.width), pixelsFor(PHOTO_BOX.height)]);
    expect(new Set(store.reads)).toEqual(new Set(expectedKeys));

    // Page furniture: page numbers in order, the deferral on every page, the job in the header.
    const pages = await pdfPages(file);
    expect(pages).toBeGreaterThanOrEqual(4);
    expect(pages).toBeLessThanOrEqual(4 + shown.length);
    const pageTexts = text.split('\f').slice(0, pages);
    pageTexts.forEach((t, i) => {
      expect(t).toMatch(new RegExp(`Page ${i + 1}\\b`));
      expect(t.replace(/\s+/g, ' ')).toContain(NOT_CERTIFIED.slice(0, 40));
      expect(t).toContain(DEMO_JOBS[0]!.name);
    });
    expect(text.replace(/\s+/g, ' ')).toContain(GOVERNS);
    expect(text).toMatch(/Test records \(\d+\)/);
  });

  it('draws a cover and a finding page with both photos that are not blank', async () => {
    const level = await busyLevel();
    const { file, text } = await pdfOf(who.gc.agent, api(`/reports/close-out.pdf?levelId=${level.id}`), 'close-out-render.pdf');
    const facts = (await findingFacts()).filter((f) => f.level_id === level.id && f.defect_key && f.fix_key);
    expect(facts.length).toBeGreaterThan(0);
    const photoPage = pagesWith(text, headingOf(facts[0]!))[0]!;
    for (const [page, name] of [
      [1, 'cover'],
      [photoPage, 'finding-page'],
    ] as const) {
      const png = await renderPage(file, page, path.join(artifacts, `close-out-${name}`), 70);
      const stats = await sharp(png).stats();
      // Not blank: dark ink somewhere, and the page varies (a blank page has one value everywhere).
      expect(stats.channels[0]!.min).toBeLessThan(60);
      expect(stats.channels[0]!.stdev).toBeGreaterThan(10);
    }
    // The finding page carries two photos (as found and corrected).
    expect((await pdfImages(file)).filter((i) => i.page === photoPage).length).toBeGreaterThanOrEqual(2);
  });

  it("gives a subcontractor their own company's findings and photos only", async () => {
    const mine = await companyIdOf('mechanical');
    const facts = await findingFacts();
    const level = (
      await sql<{ id: string }>(
        `SELECT level_id AS id FROM findings WHERE job_id = $1 AND company_id = $2 AND status <> 'voided' GROUP BY level_id
          HAVING count(*) <= 200 ORDER BY count(*) DESC LIMIT 1`,
        [jobId, mine],
      )
    )[0]!;
    store.reset();
    const { file, text } = await pdfOf(who.mechanical.agent, api(`/reports/close-out.pdf?levelId=${level.id}`), 'close-out-sub.pdf');
    const onLevel = facts.filter((f) => f.level_id === level.id && printed(f));
    const own = onLevel.filter((f) => f.company_id === mine);
    const others = onLevel.filter((f) => f.company_id !== mine);
    expect(others.length).toBeGreaterThan(0);
    expect(text).toContain(`Findings (${own.length})`);
    for (const f of own) expect(text).toMatch(headingOf(f));
    for (const f of others) expect(text).not.toMatch(new RegExp(`#${f.number}\\b`));
    // Tags of units where only other companies have findings never appear.
    const ownTags = new Set(own.map((f) => f.tag));
    for (const tag of new Set(others.map((f) => f.tag).filter((t): t is string => t !== null && !ownTags.has(t)))) {
      const inTests = (await sql(`SELECT 1 FROM test_records r JOIN units u ON u.id = r.unit_id WHERE r.job_id = $1 AND u.tag = $2`, [jobId, tag])).length > 0;
      if (!inTests) expect(text).not.toContain(tag);
    }
    // Only own photos were read, and exactly those are in the file.
    const ownKeys = own.flatMap((f) => [f.defect_key, f.fix_key]).filter((k): k is string => k !== null);
    const otherKeys = new Set(others.flatMap((f) => [f.defect_key, f.fix_key]).filter(Boolean));
    expect(store.reads.filter((k) => otherKeys.has(k))).toEqual([]);
    expect(new Set(store.reads)).toEqual(new Set(ownKeys));
    expect(await pdfImages(file)).toHaveLength(ownKeys.length);
  });

  it('is built in the background when large: 202, progress, the file for its asker only, and a mail with the link', async () => {
    smtp.clear();
    const started = await who.gc.agent.post(api('/reports')).set('X-CSRF-Token', who.gc.csrf).set('Idempotency-Key', 'report-test-0001').send({ kind: 'close-out' });
    expect(started.status).toBe(202);
    const id = started.body.id as string;
    expect(started.body).toMatchObject({ kind: 'close-out', scopeLabel: 'Whole job', download: null });
    const done = await waitFor(
      async () => {
        const r = await who.gc.agent.get(api(`/reports/${id}`)).expect(200);
        expect(['queued', 'running', 'done']).toContain(r.body.status);
        return r.body.status === 'done' ? r.body : null;
      },
      { timeout: 180_000, interval: 500, what: 'the report to be built' },
    );
    const printedCount = (await findingFacts()).filter(printed).length;
    expect(done).toMatchObject({ findingsTotal: printedCount, findingsDone: printedCount, download: `/api/jobs/${jobId}/reports/${id}/report.pdf` });
    const res = await getPdf(who.gc.agent, done.download);
    const file = await writeTemp('background.pdf', res.body as Buffer);
    expect(await pdfText(file)).toContain(`Findings (${printedCount})`);
    expect(res.headers['content-type']).toBe('application/pdf');
    // Kept in the photo store; nobody else gets it, not even on the same job.
    expect(await s3.store.exists(`reports/${id}.pdf`)).toBe(true);
    await who.inspector.agent.get(api(`/reports/${id}`)).expect(404);
    await getPdf(who.inspector.agent, api(`/reports/${id}/report.pdf`), 404);
    const mail = await smtp.waitFor((m) => m.subject.startsWith('Close-out report ready'));
    expect(mail.links.some((l) => new URL(l).pathname === `/jobs/${jobId}/reports/${id}`)).toBe(true);
  });

  it('refuses a large scope as a direct download (409) and names the background build', async () => {
    const total = (await findingFacts()).filter(printed).length;
    const photos = (await findingFacts()).filter(printed).reduce((n, f) => n + (f.defect_key ? 1 : 0) + (f.fix_key ? 1 : 0), 0);
    const res = await who.gc.agent.get(api('/reports/close-out.pdf'));
    if (total > 200 || photos > 100) {
      expect(res.status).toBe(409);
      expect(res.body.error.id).toBe('report_too_large');
    } else {
      expect(res.status).toBe(200);
    }
  });
});

describe('crew punch list', () => {
  it("lists one company's unresolved findings on a level by space, in black and white", async () => {
    const company = await companyIdOf('mechanical');
    const rows = await sql<{ level_id: string; n: string }>(
      `SELECT level_id, count(*) AS n FROM findings WHERE job_id = $1 AND company_id = $2 AND status IN ('open', 'fix_submitted')
        GROUP BY level_id ORDER BY count(*) DESC LIMIT 1`,
      [jobId, company],
    );
    const levelId = rows[0]!.level_id;
    const expected = await sql<{ number: number; tag: string | null; space: string | null }>(
      `SELECT f.number, u.tag, s.name AS space FROM findings f JOIN levels l ON l.id = f.level_id LEFT JOIN units u ON u.id = f.unit_id
         LEFT JOIN spaces s ON s.id = coalesce(f.space_id, u.space_id)
        WHERE f.job_id = $1 AND f.company_id = $2 AND f.level_id = $3 AND f.status IN ('open', 'fix_submitted')
        ORDER BY s.name NULLS LAST, u.tag NULLS LAST, f.number`,
      [jobId, company, levelId],
    );
    const { file, text } = await pdfOf(who.gc.agent, api(`/reports/crew-list.pdf?companyId=${company}&levelId=${levelId}`), 'crew-list.pdf');
    expect(text).toContain(`${expected.length} item${expected.length === 1 ? '' : 's'} to fix`);
    // In space order: each finding's label appears after the one before it.
    let at = 0;
    for (const f of expected) {
      const i = text.indexOf(`#${f.number} `, at);
      expect(i).toBeGreaterThan(at - 1);
      at = i;
    }
    const others = await sql<{ number: number }>(`SELECT number FROM findings WHERE job_id = $1 AND level_id = $2 AND company_id <> $3`, [jobId, levelId, company]);
    for (const f of others) expect(text).not.toMatch(new RegExp(`#${f.number}\\s`));
    // Black and white: the rendered page has no colour (red, green and blue agree everywhere).
    const png = await renderPage(file, 1, path.join(artifacts, 'crew-list-page'), 70);
    const { data, info } = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    let coloured = 0;
    for (let i = 0; i < data.length; i += info.channels) {
      if (Math.max(data[i]!, data[i + 1]!, data[i + 2]!) - Math.min(data[i]!, data[i + 1]!, data[i + 2]!) > 40) coloured += 1;
    }
    // Photos are the only colour on the page; the rest is black, white and grey.
    const photoPixels = (await pdfImages(file)).filter((i) => i.page === 1).length * (92 * 69 * (70 / 72) ** 2);
    expect(coloured).toBeLessThanOrEqual(photoPixels + 1);
  });

  it("takes a subcontractor's own company when none is named, and refuses another company (404)", async () => {
    const level = await busyLevel();
    const res = await getPdf(who.electrical.agent, api(`/reports/crew-list.pdf?levelId=${level.id}`));
    expect(await pdfText(await writeTemp('crew-el.pdf', res.body as Buffer))).toContain('Crew punch list');
    const other = await companyIdOf('mechanical');
    const refused = await who.electrical.agent.get(api(`/reports/crew-list.pdf?levelId=${level.id}&companyId=${other}`));
    expect(refused.status).toBe(404);
  });

  it('lists a walk', async () => {
    const [walk] = await sql<{ id: string; level_id: string }>(`SELECT id, level_id FROM walks WHERE job_id = $1 ORDER BY started_at LIMIT 1`, [jobId]);
    const company = await companyIdOf('mechanical');
    const [n] = await sql<{ n: string }>(
      `SELECT count(*) AS n FROM findings WHERE walk_id = $1 AND company_id = $2 AND status IN ('open', 'fix_submitted')`,
      [walk!.id, company],
    );
    const res = await getPdf(who.inspector.agent, api(`/reports/crew-list.pdf?companyId=${company}&walkId=${walk!.id}`));
    const text = await pdfText(await writeTemp('crew-walk.pdf', res.body as Buffer));
    expect(text).toContain(`${n!.n} item${n!.n === '1' ? '' : 's'} to fix`);
    expect(text).toContain('Found on the walk of');
  });
});

describe('unit sheet', () => {
  it("holds the unit's checks, findings with their steps, and test records; a subcontractor sees their own findings only", async () => {
    const [unit] = await sql<{ id: string; tag: string; companies: string }>(
      `SELECT u.id, u.tag, count(DISTINCT f.company_id) AS companies FROM units u JOIN findings f ON f.unit_id = u.id
        WHERE u.job_id = $1 GROUP BY u.id ORDER BY count(DISTINCT f.company_id) DESC, count(*) DESC LIMIT 1`,
      [jobId],
    );
    const findings = await sql<{ number: number; company_id: string }>(`SELECT number, company_id FROM findings WHERE unit_id = $1`, [unit!.id]);
    const [checks] = await sql<{ n: string }>(`SELECT count(*) AS n FROM unit_checks WHERE unit_id = $1`, [unit!.id]);
    const gc = await pdfOf(who.gc.agent, api(`/units/${unit!.id}/sheet.pdf`), 'unit-gc.pdf');
    expect(gc.text).toContain(unit!.tag);
    expect(gc.text).toContain(`Unit checks (${checks!.n})`);
    expect(gc.text).toContain(`Findings (${findings.length})`);
    for (const f of findings) expect(gc.text).toMatch(new RegExp(`#${f.number}\\s`));
    expect(gc.text).toContain('Logged');
    const mine = await companyIdOf('mechanical');
    const sub = await pdfOf(who.mechanical.agent, api(`/units/${unit!.id}/sheet.pdf`), 'unit-sub.pdf');
    expect(sub.text).toContain(`Findings (${findings.filter((f) => f.company_id === mine).length})`);
    for (const f of findings.filter((x) => x.company_id !== mine)) expect(sub.text).not.toMatch(new RegExp(`#${f.number}\\s`));
  });
});

describe('who may have a report', () => {
  const paths = () => [
    api('/reports/close-out.pdf'),
    api(`/reports/crew-list.pdf?levelId=${'0'.repeat(8)}-0000-4000-8000-${'0'.repeat(12)}`),
    api(`/units/${'0'.repeat(8)}-0000-4000-8000-${'0'.repeat(12)}/sheet.pdf`),
    api(`/reports/${'0'.repeat(8)}-0000-4000-8000-${'0'.repeat(12)}`),
  ];

  it('asks for a session (401)', async () => {
    for (const p of paths()) expect((await request(trimout.app).get(p)).status).toBe(401);
  });

  it('answers 404 for a level, system, company, walk, unit or report that is not on the job', async () => {
    const otherJob = (await sql<{ id: string }>(`SELECT id FROM jobs WHERE id <> $1 LIMIT 1`, [jobId]))[0]!.id;
    const foreign = {
      level: (await sql<{ id: string }>(`SELECT id FROM levels WHERE job_id = $1 LIMIT 1`, [otherJob]))[0]?.id ?? '00000000-0000-4000-8000-000000000001',
      system: (await sql<{ id: string }>(`SELECT id FROM systems WHERE job_id = $1 LIMIT 1`, [otherJob]))[0]?.id ?? '00000000-0000-4000-8000-000000000002',
      unit: (await sql<{ id: string }>(`SELECT id FROM units WHERE job_id = $1 LIMIT 1`, [otherJob]))[0]?.id ?? '00000000-0000-4000-8000-000000000003',
    };
    const company = await companyIdOf('mechanical');
    for (const p of [
      `/reports/close-out.pdf?levelId=${foreign.level}`,
      `/reports/close-out.pdf?systemId=${foreign.system}`,
      `/reports/close-out.pdf?companyId=00000000-0000-4000-8000-000000000009`,
      `/reports/crew-list.pdf?companyId=${company}&levelId=${foreign.level}`,
      `/reports/crew-list.pdf?companyId=${company}&walkId=00000000-0000-4000-8000-000000000004`,
      `/units/${foreign.unit}/sheet.pdf`,
      `/reports/00000000-0000-4000-8000-000000000005`,
      `/reports/00000000-0000-4000-8000-000000000005/report.pdf`,
    ]) {
      const res = await who.gc.agent.get(api(p));
      expect([p, res.status, res.body.error?.id]).toEqual([p, 404, 'not_found']);
    }
    // A job the caller is not on.
    expect((await who.gc.agent.get(`/api/jobs/00000000-0000-4000-8000-000000000006/reports/close-out.pdf`)).status).toBe(404);
    // Another company's name in a subcontractor's close-out.
    const other = await companyIdOf('electrical');
    expect((await who.mechanical.agent.get(api(`/reports/close-out.pdf?companyId=${other}`))).status).toBe(404);
  });

  it('answers 400 with the field for a bad query or body', async () => {
    const level = await busyLevel();
    const cases: [string, string][] = [
      ['/reports/close-out.pdf?levelId=nope', 'levelId'],
      ['/reports/close-out.pdf?colour=red', ''],
      [`/reports/crew-list.pdf?companyId=${await companyIdOf('mechanical')}`, 'levelId'],
      [`/reports/crew-list.pdf?levelId=${level.id}&walkId=${level.id}`, 'walkId'],
      [`/reports/crew-list.pdf?levelId=${level.id}`, 'companyId'],
      ['/units/not-a-unit/sheet.pdf', ''],
      ['/units/00000000-0000-4000-8000-000000000003/sheet.pdf?x=1', ''],
    ];
    for (const [p, field] of cases) {
      const res = await who.gc.agent.get(api(p));
      expect([p, res.status]).toEqual([p, 400]);
      if (field) expect(Object.keys(res.body.error.fields ?? {})).toContain(`query.${field}`);
    }
    const bad = await who.gc.agent.post(api('/reports')).set('X-CSRF-Token', who.gc.csrf).send({ kind: 'labels' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toContain('kind');
  });
});

/** Every page of the file says "Page N of M" in its footer, M the file's real page count. */
async function expectNumbered(file: string, text: string): Promise<number> {
  const total = await pdfPages(file);
  const pageTexts = text.split('\f').slice(0, total);
  expect(pageTexts).toHaveLength(total);
  pageTexts.forEach((t, i) => expect(t).toMatch(new RegExp(`Page ${i + 1} of ${total}\\b`)));
  // No page carries another page's number or another total.
  expect(text.match(/Page \d+ of \d+/g)).toHaveLength(total);
  return total;
}

describe('page numbers', () => {
  it('read "Page N of M" on every page of the close-out report, the crew punch list and the unit sheet', async () => {
    const level = await busyLevel();
    const closeOut = await pdfOf(who.gc.agent, api(`/reports/close-out.pdf?levelId=${level.id}`), 'numbered-close-out.pdf');
    expect(await expectNumbered(closeOut.file, closeOut.text)).toBeGreaterThan(4);

    const company = await companyIdOf('mechanical');
    const [crewLevel] = await sql<{ level_id: string }>(
      `SELECT level_id FROM findings WHERE job_id = $1 AND company_id = $2 AND status IN ('open', 'fix_submitted')
        GROUP BY level_id ORDER BY count(*) DESC LIMIT 1`,
      [jobId, company],
    );
    const crew = await pdfOf(who.gc.agent, api(`/reports/crew-list.pdf?companyId=${company}&levelId=${crewLevel!.level_id}`), 'numbered-crew.pdf');
    expect(await expectNumbered(crew.file, crew.text)).toBeGreaterThan(1);

    const [unit] = await sql<{ id: string }>(`SELECT unit_id AS id FROM findings WHERE job_id = $1 AND unit_id IS NOT NULL GROUP BY unit_id ORDER BY count(*) DESC LIMIT 1`, [jobId]);
    const sheet = await pdfOf(who.gc.agent, api(`/units/${unit!.id}/sheet.pdf`), 'numbered-unit.pdf');
    await expectNumbered(sheet.file, sheet.text);
  });
});

describe('re-inspection photos', () => {
  it('print in the close-out report beside the pair and under the steps on the unit sheet, captioned with the verdict', async () => {
    const level = await busyLevel();
    // A fix waiting on the busy level, on a unit: the inspector returns it with a photo of their own.
    const [f] = await sql<{ id: string; number: number; version: number; unit_id: string; tag: string; defect_key: string | null }>(
      `SELECT f.id, f.number, f.version, f.unit_id, u.tag,
              (SELECT p.storage_key FROM photos p WHERE p.finding_id = f.id AND p.stage = 'finding' LIMIT 1) AS defect_key
         FROM findings f JOIN units u ON u.id = f.unit_id
        WHERE f.job_id = $1 AND f.level_id = $2 AND f.status = 'fix_submitted'
        ORDER BY f.number LIMIT 1`,
      [jobId, level.id],
    );
    expect(f).toBeDefined();
    const shot = await sharp({ create: { width: 1600, height: 1200, channels: 3, background: { r: 30, g: 90, b: 160 } } }).jpeg().toBuffer();
    const res = await who.inspector.agent
      .post(api(`/findings/${f!.id}/reinspections`))
      .set('X-CSRF-Token', who.inspector.csrf)
      .set('If-Match', `"v${f!.version}"`)
      .field('data', JSON.stringify({ verdict: 'return', reason: 'Drain line still sags at the second hanger.' }))
      .attach('photos', shot, { filename: 'return.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(200);
    const [photo] = await sql<{ print_key: string }>(`SELECT print_key FROM photos WHERE finding_id = $1 AND stage = 'reinspection'`, [f!.id]);
    const [when] = await sql<{ on: string }>(
      `SELECT to_char(e.at AT TIME ZONE j.time_zone, 'YYYY-MM-DD') AS on FROM finding_events e JOIN jobs j ON j.id = e.job_id
        WHERE e.finding_id = $1 AND e.kind = 'returned' ORDER BY e.at DESC LIMIT 1`,
      [f!.id],
    );
    const inspectorName = DEMO_ACCOUNTS.find((a) => a.role === 'inspector')!.name;
    const caption = `Fix returned ${when!.on} by ${inspectorName}`;

    // Close-out report: the finding's page carries the photo, captioned, a third of the width across.
    store.reset();
    const closeOut = await pdfOf(who.gc.agent, api(`/reports/close-out.pdf?levelId=${level.id}`), 'reinspection-close-out.pdf');
    const page = pagesWith(closeOut.text, headingOf({ number: f!.number, tag: f!.tag } as FindingFact));
    expect(page.length).toBeGreaterThan(0);
    const photoPages = pagesWith(closeOut.text, 'Re-inspection photo');
    expect(photoPages.length).toBe(1);
    expect([page[0], page[0]! + 1]).toContain(photoPages[0]);
    expect(closeOut.text.split('\f')[photoPages[0]! - 1]!.replace(/\s+/g, ' ')).toContain(caption);
    expect(store.reads).toContain(photo!.print_key);
    const onPage = (await pdfImages(closeOut.file)).filter((i) => i.page === photoPages[0]);
    // Returned, so no fix photo of a later fix yet: as found (when drawn for it), the latest fix's, and the re-inspection's.
    // The one print copy of each photo (PHOTO_BOX at 150 dpi: 531 × 398) serves the smaller THIRD_BOX too, scaled by the PDF.
    expect(onPage.some((i) => i.width === pixelsFor(PHOTO_BOX.width) && i.height === pixelsFor(PHOTO_BOX.height))).toBe(true);
    await renderPage(closeOut.file, photoPages[0]!, path.join(artifacts, 'close-out-reinspection'), 70);

    // Unit sheet: the photo under the finding's steps, with the same caption; it is the sheet's only image.
    store.reset();
    const sheet = await pdfOf(who.gc.agent, api(`/units/${f!.unit_id}/sheet.pdf`), 'reinspection-unit.pdf');
    expect(sheet.text).toContain('Re-inspection photo');
    expect(sheet.text.replace(/\s+/g, ' ')).toContain(caption);
    expect(store.reads).toEqual([photo!.print_key]);
    const images = await pdfImages(sheet.file);
    expect(images).toHaveLength(1);
    expect([images[0]!.width, images[0]!.height]).toEqual([pixelsFor(PHOTO_BOX.width), pixelsFor(PHOTO_BOX.height)]);
  });
});
