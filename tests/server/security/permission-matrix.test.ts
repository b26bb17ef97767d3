/**
 * The permission matrix (OWASP ASVS 5.0 V8.1.1, V8.2.1, V8.2.2): every API route, read from the
 * router itself, × every caller × own job / another job (× own / another company's finding),
 * with the EXACT status expected. A route without an entry in EXPECTED fails by name.
 *
 * Callers: anonymous; the GC manager, the inspector, and subcontractors of company A and of
 * company B, all members of the OWN job and of no other. Each request is a minimal VALID one
 * made against fresh rows (matrix-fixtures.ts), so the policy and the scope decide, not the
 * validation. For routes that name a finding or a photo, the row in EXPECTED is written from the
 * point of view of a finding of the subcontractor's own company: `sub` is the subcontractor of
 * the finding's company, `subOther` the one of the other company; each such route runs twice
 * (a finding of company A, then of company B), so both subcontractors are tried both ways.
 *
 * Scopes:
 * - own:   the own job, its own rows → EXPECTED.
 * - other: another job (none of the callers is a member) and its rows → 401 signed out, 404 for
 *          everyone else (the job's existence is not leaked).
 * - cross: the own job's id in the path with another job's row id → what EXPECTED says when it
 *          says 401 or 403; 404 where EXPECTED allows (the row is not on this job).
 * And every GET a subcontractor is allowed must not name the other company's finding or photo
 * (lists, board, exports, inbox alike).
 */
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { routeKeysFromRouter } from '../../support/routes';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { buildCtx, CASES, freshAgent, objectParams, send, takesFinding, type Ctx, type RoleName, type Variant } from './matrix-fixtures';

jest.setTimeout(120_000);

type Col = 'anon' | 'gc' | 'insp' | 'sub' | 'subOther';
type Row = Record<Col, number>;
/** [anonymous, GC manager, inspector, subcontractor (own company), subcontractor (other company)] */
const r = (anon: number, gc: number, insp: number, sub: number, subOther: number): Row => ({ anon, gc, insp, sub, subOther });
const all = (s: number) => r(s, s, s, s, s);
const member = (s: number) => r(401, s, s, s, s);
const gcOnly = (s: number) => r(401, s, 403, 403, 403);
const fieldCrew = (s: number) => r(401, s, s, 403, 403); // GC manager + inspector
const seesFinding = (s: number) => r(401, s, s, s, 404); // everyone who sees that finding

/** Route key → caller → status, on the OWN job. Read the policy of a new route before adding it. */
export const EXPECTED: Record<string, Row> = {
  // Public
  'GET /api/health': all(200),
  'GET /api/session': all(200),
  'POST /api/session': all(200),
  'DELETE /api/session': all(204),
  'POST /api/signup': all(202),
  'POST /api/email-confirmations/:token': all(200),
  'POST /api/password-resets': all(202),
  'GET /api/password-resets/:token': all(200),
  'POST /api/password-resets/:token': all(200),
  'GET /api/invitations/:token': all(200),
  'POST /api/invitations/:token': all(200),
  'GET /api/dev/mail': all(404), // only while the fake SMTP server is in use (development), never in tests/production
  // Any signed-in user
  'GET /api/jobs': member(200),
  'POST /api/jobs': r(401, 201, 403, 403, 403), // a GC manager (or someone with no job yet) starts a job and is its GC manager; inspectors and subcontractors ask the GC (shared/rules/roles.ts)
  'GET /api/companies/known': member(200),
  'GET /api/inbox': r(401, 403, 403, 200, 200), // subcontractors only
  'GET /api/me/preferences': member(200), // the caller's own preferences only
  'PATCH /api/me/preferences': member(200),
  'POST /api/me/digest': member(202), // to the caller's own address, built from what the caller may see
  'GET /api/unsubscribe/:token': all(200), // the signed token in the path is the credential
  'POST /api/unsubscribe/:token': all(200),
  // Job: read by every member
  'GET /api/jobs/:jobId': member(200),
  'GET /api/jobs/:jobId/levels': member(200),
  'GET /api/jobs/:jobId/spaces': member(200),
  'GET /api/jobs/:jobId/spaces/:spaceId': member(200),
  'GET /api/jobs/:jobId/systems': member(200),
  'GET /api/jobs/:jobId/systems/:systemId': member(200),
  'GET /api/jobs/:jobId/models': member(200),
  'GET /api/jobs/:jobId/models/:modelId': member(200),
  'GET /api/jobs/:jobId/units': member(200),
  'GET /api/jobs/:jobId/units.csv': member(200),
  'GET /api/jobs/:jobId/units/:unitId': member(200),
  'GET /api/jobs/:jobId/companies': member(200),
  'GET /api/jobs/:jobId/members': member(200),
  'GET /api/jobs/:jobId/catalogue': member(200),
  'GET /api/jobs/:jobId/catalogue/:itemId': member(200),
  'GET /api/jobs/:jobId/findings': member(200), // a subcontractor's list holds only their company's findings (findings.test.ts)
  'GET /api/jobs/:jobId/findings.csv': member(200), // same scope as the list
  'GET /api/jobs/:jobId/levels/:levelId/plan': member(200),
  'GET /api/jobs/:jobId/board': member(200), // counts scoped to a subcontractor's company
  'GET /api/jobs/:jobId/board/systems': member(200), // records start-up waits for: a subcontractor's company's systems only
  'GET /api/jobs/:jobId/readiness': member(200),
  'GET /api/jobs/:jobId/recurring': member(200),
  'GET /api/jobs/:jobId/trend': member(200),
  // Company comparisons: not for subcontractors (they would see the other companies' records)
  'GET /api/jobs/:jobId/scorecards': fieldCrew(200),
  'GET /api/jobs/:jobId/scorecards.csv': fieldCrew(200),
  // PDF reports: each in the caller's scope; the crew list names company A (B's subcontractor: 404);
  // a report built in the background is its asker's alone (the GC manager's here; not built yet: 409).
  'GET /api/jobs/:jobId/reports/close-out.pdf': member(200),
  'GET /api/jobs/:jobId/reports/crew-list.pdf': r(401, 200, 200, 200, 404),
  'GET /api/jobs/:jobId/units/:unitId/sheet.pdf': member(200),
  'POST /api/jobs/:jobId/reports': member(202),
  'GET /api/jobs/:jobId/reports/:reportId': r(401, 200, 404, 404, 404),
  'GET /api/jobs/:jobId/reports/:reportId/report.pdf': r(401, 409, 404, 404, 404),
  'POST /api/jobs/:jobId/levels/:levelId/plan': fieldCrew(201),
  'DELETE /api/jobs/:jobId/levels/:levelId/plan': gcOnly(204),
  // Job set-up: GC manager only
  'PATCH /api/jobs/:jobId': gcOnly(200),
  'GET /api/jobs/:jobId/setup/checklist': gcOnly(200), // what is missing before a walk makes sense
  'POST /api/jobs/:jobId/copy': gcOnly(201), // a new job with this one's structure, catalogue, settings and companies
  'POST /api/jobs/:jobId/levels': gcOnly(201),
  'POST /api/jobs/:jobId/levels/order': gcOnly(200),
  'POST /api/jobs/:jobId/levels/bulk': gcOnly(201),
  'POST /api/jobs/:jobId/spaces/bulk': gcOnly(201),
  'POST /api/jobs/:jobId/spaces/import': gcOnly(200),
  'PATCH /api/jobs/:jobId/levels/:levelId': gcOnly(200),
  'DELETE /api/jobs/:jobId/levels/:levelId': gcOnly(204),
  'POST /api/jobs/:jobId/spaces': gcOnly(201),
  'PATCH /api/jobs/:jobId/spaces/:spaceId': gcOnly(200),
  'DELETE /api/jobs/:jobId/spaces/:spaceId': gcOnly(204),
  'POST /api/jobs/:jobId/systems': gcOnly(201),
  'PATCH /api/jobs/:jobId/systems/:systemId': gcOnly(200),
  'DELETE /api/jobs/:jobId/systems/:systemId': gcOnly(204),
  'POST /api/jobs/:jobId/models': gcOnly(201),
  'PATCH /api/jobs/:jobId/models/:modelId': gcOnly(200),
  'DELETE /api/jobs/:jobId/models/:modelId': gcOnly(204),
  'POST /api/jobs/:jobId/units': gcOnly(201),
  'POST /api/jobs/:jobId/units/import': gcOnly(200), // dryRun: true
  'GET /api/jobs/:jobId/units/imports': gcOnly(200),
  'POST /api/jobs/:jobId/units/imports/:importId/undo': gcOnly(200),
  'POST /api/jobs/:jobId/units/delete': gcOnly(200),
  'PATCH /api/jobs/:jobId/units/:unitId': gcOnly(200),
  'DELETE /api/jobs/:jobId/units/:unitId': gcOnly(204),
  'PUT /api/jobs/:jobId/units/:unitId/ceiling-exclusion': gcOnly(200), // excluded from the ceiling rule with a reason
  'DELETE /api/jobs/:jobId/units/:unitId/ceiling-exclusion': gcOnly(200), // counted again
  'POST /api/jobs/:jobId/companies': gcOnly(201),
  'PATCH /api/jobs/:jobId/companies/:companyId': gcOnly(200),
  'DELETE /api/jobs/:jobId/companies/:companyId': gcOnly(204),
  // Crews (of company A here): the GC manager for any company, a subcontractor for their own company;
  // another company's crew is out of the subcontractor's scope (404), naming one for it is 403.
  'GET /api/jobs/:jobId/crews': member(200),
  'POST /api/jobs/:jobId/crews': r(401, 201, 403, 201, 403),
  'PATCH /api/jobs/:jobId/crews/:crewId': r(401, 200, 403, 200, 404),
  'DELETE /api/jobs/:jobId/crews/:crewId': r(401, 204, 403, 204, 404),
  // Test records: the world's system names no company, so company A (mechanical) answers for it and B does not see it.
  'GET /api/jobs/:jobId/test-records': member(200), // a subcontractor's list holds only their company's systems and units
  'POST /api/jobs/:jobId/test-records': r(401, 403, 201, 201, 404), // an inspector or the responsible company records; a GC manager witnesses instead
  'GET /api/jobs/:jobId/test-records.csv': member(200),
  'GET /api/jobs/:jobId/test-records/:recordId': r(401, 200, 200, 200, 404),
  // Sampling audits: a GC manager or inspector plans and reads them; a sample's results count every company's findings
  'GET /api/jobs/:jobId/audits': fieldCrew(200),
  'POST /api/jobs/:jobId/audits': fieldCrew(201),
  'GET /api/jobs/:jobId/audits/:auditId.csv': fieldCrew(200),
  'GET /api/jobs/:jobId/audits/:auditId': fieldCrew(200),
  'POST /api/jobs/:jobId/test-records/:recordId/witness': r(401, 200, 200, 403, 403), // an inspector or GC manager confirms
  'PATCH /api/jobs/:jobId/members/:memberId': gcOnly(200),
  'DELETE /api/jobs/:jobId/members/:memberId': gcOnly(204),
  'POST /api/jobs/:jobId/catalogue': gcOnly(201),
  'PATCH /api/jobs/:jobId/catalogue/:itemId': gcOnly(200),
  'DELETE /api/jobs/:jobId/catalogue/:itemId': gcOnly(200), // retires the item (findings keep pointing at it) and answers it
  'POST /api/jobs/:jobId/invitations': gcOnly(201),
  'GET /api/jobs/:jobId/invitations': gcOnly(200),
  'POST /api/jobs/:jobId/invitations/bulk': gcOnly(201),
  'POST /api/jobs/:jobId/invitations/:invitationId/resend': gcOnly(200),
  'DELETE /api/jobs/:jobId/invitations/:invitationId': gcOnly(204),
  // Walks and unit checks: GC manager and inspector
  'POST /api/jobs/:jobId/walks': fieldCrew(201),
  'GET /api/jobs/:jobId/walks': fieldCrew(200),
  'GET /api/jobs/:jobId/walks/:walkId': fieldCrew(200),
  // The walk is started by the GC manager: only the inspector who started a walk, or a GC manager, finishes it.
  'POST /api/jobs/:jobId/walks/:walkId/finish': r(401, 200, 403, 403, 403),
  'GET /api/jobs/:jobId/levels/:levelId/walk-units': fieldCrew(200),
  'POST /api/jobs/:jobId/units/:unitId/checks': fieldCrew(201),
  'GET /api/jobs/:jobId/units/:unitId/checks': fieldCrew(200),
  // Findings
  'POST /api/jobs/:jobId/findings': fieldCrew(201),
  'POST /api/jobs/:jobId/findings/batch': fieldCrew(201), // one defect on many units of a level
  'GET /api/jobs/:jobId/labels.pdf': fieldCrew(200), // unit labels: the people who walk and check units
  'POST /api/jobs/:jobId/findings/bulk': fieldCrew(200),
  'GET /api/jobs/:jobId/reinspections/queue': fieldCrew(200),
  'GET /api/jobs/:jobId/findings/:findingId': seesFinding(200),
  'GET /api/jobs/:jobId/findings/:findingId/events': seesFinding(200),
  'GET /api/jobs/:jobId/findings/:findingId/comments': seesFinding(200),
  'POST /api/jobs/:jobId/findings/:findingId/comments': seesFinding(201),
  'GET /api/jobs/:jobId/photos/:photoId': seesFinding(200),
  'GET /api/jobs/:jobId/photos/:photoId/thumb': seesFinding(200),
  'GET /api/photos/:photoId/marks': seesFinding(200), // as the photo: the caller's membership of the photo's job
  'PUT /api/photos/:photoId/marks': r(401, 200, 200, 403, 404), // as adding photos to the finding
  'POST /api/jobs/:jobId/findings/:findingId/fixes': r(401, 201, 403, 201, 404), // the finding's company and the GC manager
  'POST /api/jobs/:jobId/findings/:findingId/reinspections': r(401, 200, 200, 403, 403),
  'POST /api/jobs/:jobId/findings/:findingId/photos': fieldCrew(201), // those who log findings add photos to them
  'PATCH /api/jobs/:jobId/findings/:findingId': r(401, 200, 200, 403, 404), // a subcontractor changes nothing; another company's finding is not found
};

/**
 * Own job id + another job's row, where it differs from the rule in the header: the policy lets
 * the role through and the handler finds no such row on this job before its own role rule (a
 * subcontractor's change of a finding; only the walk's inspector or a GC manager finishes a walk).
 */
const CROSS: Record<string, Row> = {
  'PATCH /api/jobs/:jobId/findings/:findingId': r(401, 404, 404, 404, 404),
  'POST /api/jobs/:jobId/walks/:walkId/finish': r(401, 404, 404, 403, 403),
  // Another job's report under this job's id is not found before its state is looked at.
  'GET /api/jobs/:jobId/reports/:reportId/report.pdf': r(401, 404, 404, 404, 404),
};

let db: Database;
let s3: FakeS3;
let trimout: TrimoutApp;
let ctx: Ctx;

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  trimout = buildTestApp(db, { objectStore: s3.store });
  ctx = await buildCtx(trimout.app);
});
afterAll(async () => {
  await trimout?.close();
  await s3?.close();
  await db?.close();
});

const ROLES: RoleName[] = ['anon', 'gc', 'insp', 'subA', 'subB'];

/** The column of EXPECTED that applies to `role` for a finding of company `variant`. */
function colOf(role: RoleName, variant: Variant): Col {
  if (role === 'subA') return variant === 'A' ? 'sub' : 'subOther';
  if (role === 'subB') return variant === 'B' ? 'sub' : 'subOther';
  return role;
}

const ok = (s: number) => s >= 200 && s < 300;

// The router is read when the file loads (no database needed to list routes).
const routeKeys: string[] = routeKeysFromRouter();

describe('permission matrix', () => {
  it('has an expectation and a request for every route of the router, and no stale entries', () => {
    expect(routeKeys.filter((k) => !EXPECTED[k])).toEqual([]);
    expect(routeKeys.filter((k) => !CASES[k])).toEqual([]);
    expect([...Object.keys(EXPECTED), ...Object.keys(CROSS)].filter((k) => !routeKeys.includes(k))).toEqual([]);
  });

  it.each(routeKeys)('%s', async (key) => {
    const row = EXPECTED[key];
    const kase = CASES[key];
    if (!row || !kase) throw new Error(`${key}: no entry in the permission matrix (EXPECTED and CASES in matrix-fixtures.ts)`);
    const [method, path] = key.split(' ') as [string, string];
    const variants: Variant[] = takesFinding(path) ? ['A', 'B'] : ['A'];
    const mismatches: string[] = [];
    const check = (label: string, want: number, got: { status: number; body: unknown }) => {
      if (want !== got.status) mismatches.push(`${label}: expected ${want}, got ${got.status} ${JSON.stringify(got.body).slice(0, 160)}`);
    };
    // Callers run side by side (each on its own fresh rows; sign-in, sign-up and reset hash with slow
    // scrypt), except on routes marked serial.
    const forEachRole = async (run: (role: RoleName) => Promise<void>) => {
      if (kase.serial) for (const role of ROLES) await run(role);
      else await Promise.all(ROLES.map(run));
    };
    await forEachRole(async (role) => {
      const who = async () => (kase.fresh ? freshAgent(ctx, role) : ctx.agents[role]);
      for (const variant of variants) {
        const col = colOf(role, variant);
        const want = row[col];
        // own job
        const spec = await kase.setup(ctx.own, ctx, variant);
        const res = await send(await who(), method, spec);
        check(`${role} own job finding=${variant}`, want, res);
        // Whatever a subcontractor may read never names the other company's finding or photo.
        if ((role === 'subA' || role === 'subB') && method === 'GET' && ok(res.status) && typeof res.text === 'string') {
          const foreign = ctx.own.finding[role === 'subA' ? 'B' : 'A'];
          if (res.text.includes(foreign.id) || res.text.includes(foreign.photoId)) {
            mismatches.push(`${role} own job: the answer names the other company's finding ${foreign.id}`);
          }
        }
        if (!path.includes(':jobId')) continue;
        // another job: not a member
        const otherSpec = await kase.setup(ctx.other, ctx, variant);
        check(`${role} other job finding=${variant}`, role === 'anon' ? 401 : 404, await send(await who(), method, otherSpec));
        // own job id, another job's row
        if (objectParams(path).length > 0) {
          const crossSpec = { ...otherSpec, path: otherSpec.path.replace(ctx.other.job.id, ctx.own.job.id) };
          const crossWant = CROSS[key]?.[col] ?? (ok(want) ? 404 : want);
          check(`${role} own job, other job's row finding=${variant}`, crossWant, await send(await who(), method, crossSpec));
        }
      }
    });
    expect(mismatches).toEqual([]);
  });
});
