/**
 * Digest content for each role, from the demo seed and from a job built here, with every value
 * checked against something outside the digest code: counts made in JavaScript from the seeded
 * rows, and a controlled job whose answers follow from how it was built. Plus escaping with
 * hostile names.
 */
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildDigestContent } from '../../../server/digests/content';
import { SECTION_LIMIT, renderDigest } from '../../../server/digests/render';
import type { DigestService } from '../../../server/digests/service';
import { CatalogueItem, Company, Finding, FindingEvent, Job, Level, User } from '../../../server/models';
import { DEMO_PASSWORD, seedDemo } from '../../../server/seed/demo';
import { nextFindingNumber, recordFindingEvent } from '../../../server/services/findings';
import { todayIn } from '../../../shared/rules/dates';
import { buildTestApp, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildSystem, buildUnit } from '../../support/factories';
import { buildWalkJob, insertFinding, type WalkJob } from '../../support/findings';
import { startFakeSmtp, testMailService, type FakeSmtp } from '../../support/mail';

jest.setTimeout(180_000);

let db: Database;
let smtp: FakeSmtp;
let trimout: TrimoutApp;
let digests: DigestService;

beforeAll(async () => {
  db = await connectTestDb();
  smtp = await startFakeSmtp();
  trimout = buildTestApp(db, { mail: testMailService(smtp) });
  digests = trimout.app.get('digests') as DigestService;
  await seedDemo(db);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await smtp.close();
});

const DAY = 24 * 60 * 60 * 1000;

/** A finding logged at a given time, its "logged" event dated the same (insertFinding dates it now). */
async function logFinding(w: WalkJob, loggedAt: Date, code: string, unitId: string) {
  return db.sequelize.transaction(async (transaction) => {
    const finding = await Finding.create(
      {
        jobId: w.job.id,
        number: await nextFindingNumber(db.sequelize, w.job.id, transaction),
        unitId,
        spaceId: null,
        levelId: w.level.id,
        catalogueItemId: w.byCode(code).id,
        walkId: null,
        unitCheckId: null,
        severity: 'major',
        companyId: w.subA.companyId,
        dueOn: '2026-12-08',
        measuredText: null,
        measuredValue: null,
        ruleResult: null,
        loggedBy: w.inspector.id,
        loggedAt,
        pinX: null,
        pinY: null,
      },
      { transaction },
    );
    await recordFindingEvent({ findingId: finding.id, jobId: w.job.id, actorId: w.inspector.id, kind: 'logged', to: { status: 'open' }, at: loggedAt }, transaction);
    return finding;
  });
}

describe('subcontractor digest (demo seed: the mechanical subcontractor)', () => {
  it('"Send me a digest now" mails their company\'s unresolved findings, overdue first, returned ones with the reason, each linked', async () => {
    const user = (await User.findOne({ where: { email: 'mechanical@demo.trimout.example' } }))!;
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const me = await signIn(trimout.app, user.email, DEMO_PASSWORD);
    const res = await me.agent.post('/api/me/digest').set('X-CSRF-Token', me.csrf).set('Idempotency-Key', `digest-now-${Date.now()}`).send({}).expect(202);
    expect(res.body).toMatchObject({ queued: true, to: user.email });
    const mail = await smtp.waitFor((m) => m.to.includes(user.email) && /digest/i.test(m.subject));

    // Independent numbers, from the seeded rows.
    const mine = await Finding.findAll({ where: { jobId: job.id, companyId: user.companyId }, order: [['number', 'ASC']] });
    const unresolved = mine.filter((f) => f.status === 'open' || f.status === 'fix_submitted');
    const today = todayIn(job.timeZone);
    // Overdue: open (new or returned) and past due; a fix waiting for re-inspection is not.
    const overdue = unresolved.filter((f) => f.status === 'open' && f.dueOn < today);
    expect(unresolved.length).toBeGreaterThan(0);
    expect(overdue.length).toBeGreaterThan(0);
    expect(res.body.findings).toBe(unresolved.length);
    expect(mail.text).toContain(`${unresolved.length} unresolved, ${overdue.length} overdue`);
    expect(mail.subject).toContain(`${unresolved.length} unresolved, ${overdue.length} overdue`);

    // Every unresolved finding at most once, with its link; none of another company's, nothing closed
    // or voided. Each section lists its first SECTION_LIMIT and links the rest ("… and 3 more"):
    // other tests add findings of this company to the shared demo job, so a section may be full.
    const linkedOnce = unresolved.filter((f) => mail.links.filter((l) => l.endsWith(`/jobs/${job.id}/findings/${f.id}`)).length === 1);
    for (const f of unresolved) expect(mail.links.filter((l) => l.endsWith(`/jobs/${job.id}/findings/${f.id}`)).length).toBeLessThanOrEqual(1);
    if (unresolved.length <= SECTION_LIMIT) expect(linkedOnce).toHaveLength(unresolved.length);
    else expect(linkedOnce.length).toBeGreaterThanOrEqual(SECTION_LIMIT);
    const others = await Finding.findAll({ where: { jobId: job.id } });
    for (const f of others.filter((o) => !unresolved.includes(o) && !unresolved.some((u) => u.id === o.id))) {
      expect(mail.text).not.toContain(f.id);
    }

    // Overdue first: the "Overdue" section is first and holds exactly the overdue ones.
    const overdueBlock = mail.text.split('Overdue (')[1]!.split(/\n\n/)[0]!;
    expect(mail.text.indexOf('Overdue (')).toBeLessThan(mail.text.indexOf('Still unresolved ('));
    expect(mail.text).toContain(`Overdue (${overdue.length})`);
    const overdueLinked = overdue.filter((f) => overdueBlock.includes(`/findings/${f.id}`));
    expect(overdueLinked).toHaveLength(Math.min(overdue.length, SECTION_LIMIT));

    // Returned ones (open, last verdict "returned") carry the reason of their latest return.
    const returnedOpen = unresolved.filter((f) => f.status === 'open' && f.returnCount > 0);
    expect(returnedOpen.length).toBeGreaterThan(0);
    for (const f of returnedOpen) {
      const events = await FindingEvent.findAll({ where: { findingId: f.id }, order: [['at', 'ASC'], ['id', 'ASC']] });
      const lastStatus = events.filter((e) => e.to && 'status' in e.to).at(-1)!;
      if (lastStatus.kind !== 'returned') continue; // reopened after a close: not a return
      const reason = events.filter((e) => e.kind === 'returned').at(-1)!.reason!;
      expect(mail.text).toContain(`: ${reason}`);
    }
    expect(mail.html).toContain('Returned');

    // The HTML part has the same links, no remote images and no script.
    expect(mail.html).toContain(`/jobs/${job.id}/findings/${unresolved[0]!.id}`);
    expect(mail.html).not.toMatch(/<img|<script/i);
    // List-Unsubscribe (RFC 2369) and one-click (RFC 8058) headers.
    const headers = mail.raw.split(/\r?\n\r?\n/)[0]!.replace(/\r?\n[ \t]+/g, ' '); // unfolded (RFC 5322 2.2.3)
    expect(headers).toMatch(/^List-Unsubscribe: <http:\/\/[^>]+\/api\/unsubscribe\/[A-Za-z0-9_-]+\.[A-Za-z0-9_-]{43}>$/m);
    expect(headers).toMatch(/^List-Unsubscribe-Post: List-Unsubscribe=One-Click$/m);
  });
});

describe('GC manager digest (demo seed)', () => {
  it('per level unresolved now and 24 hours ago, rebuilt from the events, and overdue per company', async () => {
    const user = (await User.findOne({ where: { email: 'gc.manager@demo.trimout.example' } }))!;
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const now = new Date();
    const content = (await buildDigestContent(db.sequelize, user.id, 'daily', now))!;
    const jobDigest = content.managerJobs.find((j) => j.jobId === job.id)!;
    expect(jobDigest).toBeDefined();
    expect(content.subcontractorJobs).toEqual([]);

    // Independently: each finding's status 24 h ago is the last status its events gave it by then (in JavaScript).
    const since = new Date(now.getTime() - DAY);
    const findings = await Finding.findAll({ where: { jobId: job.id } });
    const events = await FindingEvent.findAll({ where: { jobId: job.id } });
    const levels = await Level.findAll({ where: { jobId: job.id }, order: [['position', 'ASC']] });
    const unresolvedWords = new Set(['open', 'fix_submitted']);
    const statusAt = (findingId: string, at: Date) => {
      const mine = events
        .filter((e) => e.findingId === findingId && e.to && typeof e.to.status === 'string' && e.at.getTime() <= at.getTime())
        .sort((a, b) => a.at.getTime() - b.at.getTime() || (a.id < b.id ? -1 : 1));
      return mine.at(-1)?.to?.status as string | undefined;
    };
    for (const level of levels) {
      const onLevel = findings.filter((f) => f.levelId === level.id);
      const nowCount = onLevel.filter((f) => unresolvedWords.has(f.status)).length;
      const beforeCount = onLevel.filter((f) => f.loggedAt.getTime() <= since.getTime() && unresolvedWords.has(statusAt(f.id, since) ?? '')).length;
      expect(jobDigest.levels.find((l) => l.levelId === level.id)).toMatchObject({ name: level.name, now: nowCount, before: beforeCount, change: nowCount - beforeCount });
    }
    expect(jobDigest.totals.now).toBe(findings.filter((f) => unresolvedWords.has(f.status)).length);

    const today = todayIn(job.timeZone, now);
    const companies = await Company.findAll();
    const expected = new Map<string, number>();
    for (const f of findings) if (f.status === 'open' && f.dueOn < today) expected.set(f.companyId, (expected.get(f.companyId) ?? 0) + 1);
    expect(jobDigest.overdueByCompany.map((c) => [c.name, c.overdue]).sort()).toEqual(
      Array.from(expected.entries()).map(([id, n]) => [companies.find((c) => c.id === id)!.name, n]).sort(),
    );
    expect(expected.size).toBeGreaterThan(0);
  });

  it('a job built here: level changes since yesterday and a defect type that became recurring today', async () => {
    const w = await buildWalkJob();
    await db.sequelize.query(`UPDATE jobs SET recurring_thresholds = recurring_thresholds || '{"minUnits": 2}'::jsonb WHERE id = $1`, { bind: [w.job.id] });
    const now = new Date();
    const ago = (days: number) => new Date(now.getTime() - days * DAY);
    // Level 3: A open since 2 days, B logged now, C open 3 days ago and accepted (closed) an hour ago.
    await logFinding(w, ago(2), 'DR-03', w.cassette.id);
    await logFinding(w, now, 'DR-03', w.cassette2.id);
    const c = await logFinding(w, ago(3), 'PN-01', w.wall.id);
    await db.sequelize.transaction(async (transaction) => {
      await recordFindingEvent({ findingId: c.id, jobId: w.job.id, actorId: w.inspector.id, kind: 'accepted', from: { status: 'fix_submitted' }, to: { status: 'closed' }, at: new Date(now.getTime() - 60 * 60 * 1000) }, transaction);
      await Finding.update({ status: 'closed' }, { where: { id: c.id }, transaction });
    });
    const system = await buildSystem(w.job.id, { name: 'VRF-D' });
    await buildUnit(w.job.id, w.level.id, { tag: 'IU-3-DU', kind: 'ducted_low', systemId: system.id });
    const content = (await buildDigestContent(db.sequelize, w.gcManager.id, 'daily', new Date()))!;
    const j = content.managerJobs[0]!;
    // Now: A and B (2); 24 h ago: A and C (2); Level 4: nothing.
    expect(j.levels).toEqual([
      { levelId: w.level.id, name: 'Level 3', now: 2, before: 2, change: 0 },
      { levelId: w.otherLevel.id, name: 'Level 4', now: 0, before: 0, change: 0 },
    ]);
    // DR-03 reached 2 distinct units with B, logged now: new recurring today. PN-01 is on one unit only.
    expect(j.newRecurring.map((r) => [r.code, r.unitCount])).toEqual([['DR-03', 2]]);
    // Both are due 2026-12-08 by default in insertFinding; nothing overdue unless today is later.
    const today = todayIn(w.job.timeZone);
    expect(j.overdueByCompany).toEqual(today > '2026-12-08' ? [{ companyId: w.subA.companyId, name: expect.any(String), overdue: 2 }] : []);
    // A ducted unit on a system on Level 3, and no test record on file: per level, every system with a unit there lacks its pressure test and
    // every concealed unit (ducted kinds, coil kit) its drain test, counted here in SQL.
    const expected = await db.sequelize.query<{ level_id: string; name: string; missing: string }>(
      `SELECT l.id AS level_id, l.name,
              (SELECT count(DISTINCT u.system_id) FROM units u WHERE u.level_id = l.id AND u.system_id IS NOT NULL)
            + (SELECT count(*) FROM units u WHERE u.level_id = l.id AND u.ceiling_excluded_reason IS NULL
                AND u.kind IN ('ducted_low', 'ducted_high', 'ducted_very_high', 'ahu_coil_kit')) AS missing
         FROM levels l WHERE l.job_id = $1 ORDER BY l.position`,
      { bind: [w.job.id], type: QueryTypes.SELECT },
    );
    expect(j.testsWaiting.length).toBeGreaterThan(0);
    expect(j.testsWaiting).toEqual(
      expected.filter((r) => Number(r.missing) > 0).map((r) => ({ levelId: r.level_id, name: r.name, missing: Number(r.missing), failed: 0, awaitingWitness: 0 })),
    );
    const mail = renderDigest(content, { origin: 'https://trimout.test', timeZone: 'UTC', unsubscribeToken: 't', trigger: 'now', schedule: { frequency: 'daily', weekday: 1, hour: 7, timeZone: 'UTC' } });
    for (const t of j.testsWaiting) expect(mail.text).toContain(`  ${t.name}: ${t.missing} not on record`);
  });
});

describe('escaping', () => {
  it('hostile names, titles and reasons are escaped in the HTML part and cannot add headers', async () => {
    const w = await buildWalkJob();
    const hostile = '<script>alert("x")</script> & <img src=x onerror=alert(1)>';
    await Company.update({ name: `Pipe ${hostile}` }, { where: { id: w.subA.companyId } });
    await Job.update({ name: `Tower ${hostile}\r\nBcc: evil@example.com` }, { where: { id: w.job.id } });
    await Level.update({ name: `L3 ${hostile}` }, { where: { id: w.level.id } });
    await CatalogueItem.update({ title: `Drain ${hostile}` }, { where: { id: w.byCode('DR-03').id } });
    const f = await insertFinding(w, { code: 'DR-03', dueOn: '2020-01-01' });
    await db.sequelize.transaction(async (transaction) => {
      await recordFindingEvent({ findingId: f.id, jobId: w.job.id, actorId: w.inspector.id, kind: 'returned', from: { status: 'fix_submitted' }, to: { status: 'open' }, reason: `Still sags ${hostile}` }, transaction);
      await Finding.update({ returnCount: 1 }, { where: { id: f.id }, transaction });
    });
    const content = (await buildDigestContent(db.sequelize, w.subA.id, 'daily'))!;
    const message = renderDigest(content, { origin: 'https://punch.example.org', timeZone: 'UTC', unsubscribeToken: digests.unsubscribeToken(w.subA.id, 'digest'), trigger: 'now', schedule: { frequency: 'daily', weekday: 1, hour: 7, timeZone: 'UTC' } });
    expect(message.html).not.toContain('<script>');
    expect(message.html).not.toContain('<img');
    expect(message.html).not.toContain('onerror=alert(1)>');
    expect(message.html).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &lt;img src=x onerror=alert(1)&gt;');
    expect(message.html).toContain('Still sags &lt;script&gt;');
    // The text part keeps the words as typed (it is plain text).
    expect(message.text).toContain('Still sags <script>');

    // Sent: the raw message has no Bcc header, whatever the names hold.
    const sent = await testMailService(smtp).outbox.sendMail({ ...message, subject: `${message.subject} ${content.subcontractorJobs[0]!.jobName}` });
    expect(sent).toBe(true);
    const mail = await smtp.waitFor((m) => m.to.includes(w.subA.email) && m.subject.includes('Tower'));
    const headers = mail.raw.split(/\r?\n\r?\n/)[0]!;
    expect(headers).toMatch(/^Subject: /m);
    expect(headers).not.toMatch(/^Bcc:/im);
    expect(mail.subject).not.toMatch(/[\r\n]/);
    const [row] = await db.sequelize.query<{ n: number }>(`SELECT count(*)::int AS n FROM findings WHERE job_id = $1`, { bind: [w.job.id], type: QueryTypes.SELECT });
    expect(row!.n).toBe(1);
  });
});
