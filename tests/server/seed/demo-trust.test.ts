/**
 * The demo earns trust: every fix has its own drawn photo in the object store (stored the way
 * uploads are), notes, fix notes and return reasons fit their defect type and vary, each level
 * shows checked, in-progress and unchecked units, the companies' scorecards differ (read through
 * the scorecards service itself), and there is one "Something else" finding with its own title.
 */
import { QueryTypes } from 'sequelize';
import sharp from 'sharp';
import type { Database } from '../../../server/db';
import { Job } from '../../../server/models';
import { DEMO_COMPANIES, seedDemo } from '../../../server/seed/demo';
import { DEMO_DEFECT_TEXT, DEMO_SOMETHING_ELSE } from '../../../server/seed/demoText';
import { loadScorecards } from '../../../server/services/board';
import { connectOwnDb } from '../../support/db';
import { startFakeS3, type FakeS3 } from '../../support/storage';

jest.setTimeout(180_000);

let db: Database;
let drop: () => Promise<void>;
let s3: FakeS3;
let jobId: string;
beforeAll(async () => {
  // Its own database: other test files add levels, fixes and photos to the shared demo job.
  ({ db, drop } = await connectOwnDb('demo_trust'));
  s3 = await startFakeS3();
  await seedDemo(db, { store: s3.store });
  jobId = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!.id;
});
afterAll(async () => {
  await drop();
  await s3.close();
});

const rows = <T extends object>(sql: string, bind: unknown[] = [jobId]) => db.sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT });

it('every fix has a fix photo stored like an upload: a JPEG naming its unit tag, with a thumbnail', async () => {
  const fixes = await rows<{ fix_id: string; photos: number }>(
    `SELECT fx.id AS fix_id, (SELECT count(*)::int FROM photos p WHERE p.fix_id = fx.id AND p.stage = 'fix') AS photos
       FROM fixes fx WHERE fx.job_id = $1`,
  );
  expect(fixes.length).toBeGreaterThan(20);
  expect(fixes.filter((f) => f.photos !== 1)).toEqual([]);

  const photos = await rows<{ storage_key: string; thumb_key: string; print_key: string; content_type: string; width: number; height: number; sha256: string }>(
    `SELECT p.storage_key, p.thumb_key, p.print_key, p.content_type, p.width, p.height, p.sha256 FROM photos p WHERE p.job_id = $1 AND p.fix_id IS NOT NULL`,
  );
  const stored = new Set(await s3.keys());
  for (const p of photos) {
    // Full, thumbnail and print copy, as an upload stores them.
    expect(stored.has(p.storage_key) && stored.has(p.thumb_key) && stored.has(p.print_key)).toBe(true);
    expect(p.content_type).toBe('image/jpeg');
  }
  // Two of them read back from the store: real JPEGs of the recorded size, each different.
  const [a, b] = photos;
  for (const p of [a!, b!]) {
    const object = (await s3.store.get(p.storage_key))!;
    const chunks: Buffer[] = [];
    for await (const chunk of object.body) chunks.push(Buffer.from(chunk as Buffer));
    const meta = await sharp(Buffer.concat(chunks)).metadata();
    expect(meta).toMatchObject({ format: 'jpeg', width: p.width, height: p.height });
    // The print copy of a 960 × 720 picture fills the 255 × 191.25 pt box at 150 dpi: 531 × 398 (pt / 72 × 150).
    const print = (await s3.store.get(p.print_key))!;
    const printChunks: Buffer[] = [];
    for await (const chunk of print.body) printChunks.push(Buffer.from(chunk as Buffer));
    expect(await sharp(Buffer.concat(printChunks)).metadata()).toMatchObject({ format: 'jpeg', width: 531, height: 398 });
  }
  expect(new Set(photos.map((p) => p.sha256)).size).toBe(photos.length);

  // Running the seed again adds nothing.
  const again = await seedDemo(db, { store: s3.store });
  expect(again.created).toBe(false);
  expect((await rows<{ n: number }>(`SELECT count(*)::int AS n FROM photos WHERE job_id = $1`))[0]!.n).toBe(photos.length);
});

it("notes, fix notes and return reasons come from their defect type's own sentences, and vary", async () => {
  const findings = await rows<{ id: string; code: string; is_other: boolean; note: string }>(
    `SELECT f.id, ci.code, ci.is_other, f.note FROM findings f JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
      WHERE f.job_id = $1 AND f.logged_by = (SELECT id FROM users WHERE email = 'inspector@demo.trimout.example')`,
  );
  const seeded = findings.filter((f) => !f.is_other && DEMO_DEFECT_TEXT[f.code]);
  expect(seeded.length).toBeGreaterThanOrEqual(60);
  for (const f of seeded) expect({ code: f.code, note: f.note, fits: DEMO_DEFECT_TEXT[f.code]!.notes.includes(f.note) }).toMatchObject({ fits: true });

  const code = new Map(findings.map((f) => [f.id, f.code]));
  const fixes = await rows<{ finding_id: string; note: string }>(`SELECT finding_id, note FROM fixes WHERE job_id = $1`);
  const seededFixes = fixes.filter((x) => DEMO_DEFECT_TEXT[code.get(x.finding_id) ?? '']);
  expect(seededFixes.length).toBeGreaterThan(20);
  for (const x of seededFixes) expect({ note: x.note, fits: DEMO_DEFECT_TEXT[code.get(x.finding_id)!]!.fixes.includes(x.note) }).toMatchObject({ fits: true });
  expect(new Set(seededFixes.map((x) => x.note)).size).toBeGreaterThanOrEqual(10);

  const returns = await rows<{ finding_id: string; reason: string }>(`SELECT finding_id, reason FROM finding_events WHERE job_id = $1 AND kind = 'returned'`);
  const seededReturns = returns.filter((r) => DEMO_DEFECT_TEXT[code.get(r.finding_id) ?? '']);
  expect(seededReturns.length).toBeGreaterThanOrEqual(10);
  for (const r of seededReturns) expect({ reason: r.reason, fits: DEMO_DEFECT_TEXT[code.get(r.finding_id)!]!.returns.includes(r.reason) }).toMatchObject({ fits: true });
  // Not the same few sentences everywhere: the returns span several defect types and many reasons.
  expect(new Set(seededReturns.map((r) => code.get(r.finding_id))).size).toBeGreaterThanOrEqual(5);
  expect(new Set(seededReturns.map((r) => r.reason)).size).toBeGreaterThanOrEqual(8);
});

it('every level with units shows checked, in-progress and unchecked units, fewer checked higher up', async () => {
  // As the walks left them: the Level 2 audit's re-checks (walk_id null) complete a random sample
  // of the level (drawn from its units by id), which may hold all of its few units in progress.
  const levels = await rows<{ name: string; position: number; checked: number; in_progress: number; unchecked: number }>(
    `WITH latest AS (
       SELECT DISTINCT ON (uc.unit_id) uc.unit_id, uc.complete FROM unit_checks uc WHERE uc.job_id = $1 AND uc.walk_id IS NOT NULL
        ORDER BY uc.unit_id, uc.checked_at DESC, uc.id DESC)
     SELECT l.name, l.position,
            count(*) FILTER (WHERE lc.complete)::int AS checked,
            count(*) FILTER (WHERE lc.complete IS FALSE)::int AS in_progress,
            count(*) FILTER (WHERE lc.unit_id IS NULL)::int AS unchecked
       FROM units u JOIN levels l ON l.id = u.level_id LEFT JOIN latest lc ON lc.unit_id = u.id
      WHERE u.job_id = $1 GROUP BY l.id ORDER BY l.position`,
  );
  expect(levels.length).toBeGreaterThanOrEqual(6);
  for (const l of levels) expect({ level: l.name, mix: l.checked > 0 && l.in_progress > 0 && l.unchecked > 0 }).toEqual({ level: l.name, mix: true });
  const share = levels.map((l) => l.checked / (l.checked + l.in_progress + l.unchecked));
  expect(share[0]!).toBeGreaterThan(share.at(-1)! + 0.4);

  // A complete check has every item that applies to its unit marked; a defect mark wherever a finding was logged.
  const [marks] = await rows<{ complete_unmarked: number; findings_on_ok: number }>(
    `SELECT (SELECT count(*)::int FROM unit_checks uc JOIN units u ON u.id = uc.unit_id
               JOIN catalogue_items ci ON ci.job_id = uc.job_id AND u.kind = ANY (ci.unit_kinds) AND NOT ci.is_other AND ci.retired_at IS NULL
              WHERE uc.job_id = $1 AND uc.complete
                AND NOT EXISTS (SELECT 1 FROM unit_check_items i WHERE i.unit_check_id = uc.id AND i.catalogue_item_id = ci.id)) AS complete_unmarked,
            (SELECT count(*)::int FROM findings f JOIN unit_check_items i ON i.unit_check_id = f.unit_check_id AND i.catalogue_item_id = f.catalogue_item_id
              WHERE f.job_id = $1 AND i.mark <> 'defect') AS findings_on_ok`,
  );
  expect(marks).toEqual({ complete_unmarked: 0, findings_on_ok: 0 });
});

it('the scorecards tell the companies apart: first-pass acceptance and days to accept differ', async () => {
  const job = (await Job.findByPk(jobId))!;
  const { companies } = await loadScorecards(db.sequelize, { jobId, timeZone: job.timeZone, companyId: null });
  const card = (name: string) => companies.find((c) => c.name === name)!;
  const electrical = card(DEMO_COMPANIES.electrical);
  const mechanical = card(DEMO_COMPANIES.mechanical);
  const ceilings = card(DEMO_COMPANIES.ceilings);
  for (const c of [electrical, mechanical, ceilings]) expect(c.accepted).toBeGreaterThan(0);
  // Rates apart by more than rounding: the electrical crew is usually right first time, ceilings seldom.
  expect(electrical.firstPassRate!).toBeGreaterThan(mechanical.firstPassRate! + 0.2);
  expect(mechanical.firstPassRate!).toBeGreaterThan(ceilings.firstPassRate! + 0.1);
  expect(electrical.medianDaysToAccept!).toBeLessThan(mechanical.medianDaysToAccept!);
  expect(mechanical.medianDaysToAccept!).toBeLessThan(ceilings.medianDaysToAccept!);

  // Fixes waiting for re-inspection were sent in the last few days, not weeks ago.
  const [waiting] = await rows<{ oldest_days: number }>(
    `SELECT max(extract(epoch FROM now() - fx.submitted_at) / 86400)::float AS oldest_days
       FROM findings f JOIN LATERAL (SELECT submitted_at FROM fixes WHERE finding_id = f.id ORDER BY submitted_at DESC LIMIT 1) fx ON true
      WHERE f.job_id = $1 AND f.status = 'fix_submitted' AND f.logged_by = (SELECT id FROM users WHERE email = 'inspector@demo.trimout.example')`,
  );
  expect(waiting!.oldest_days).toBeLessThan(5);
});

it('one "Something else" finding under the job\'s other defect type, with its own title, fixed with a photo', async () => {
  const found = await rows<{ title: string | null; catalogue_title: string; status: string; photos: number }>(
    `SELECT f.title, ci.title AS catalogue_title, f.status,
            (SELECT count(*)::int FROM photos p JOIN fixes fx ON fx.id = p.fix_id WHERE fx.finding_id = f.id) AS photos
       FROM findings f JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
      WHERE f.job_id = $1 AND ci.is_other AND f.logged_by = (SELECT id FROM users WHERE email = 'inspector@demo.trimout.example')
        AND f.title = $2`,
    [jobId, DEMO_SOMETHING_ELSE.title],
  );
  expect(found).toEqual([{ title: DEMO_SOMETHING_ELSE.title, catalogue_title: expect.any(String), status: 'fix_submitted', photos: 1 }]);
  expect(found[0]!.catalogue_title).not.toBe(DEMO_SOMETHING_ELSE.title);
});
