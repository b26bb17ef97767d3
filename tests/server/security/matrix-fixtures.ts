/**
 * Fixtures for the permission matrix and the fuzz test: two jobs ("worlds") with everything a
 * path parameter can name (level, space, system, unit model, units, catalogue, findings of
 * company A and of company B with photos, a walk, a unit check, a comment, an invitation), the
 * five callers (anonymous, GC manager, inspector, subcontractor of company A and of company B,
 * members of the OWN job only; B's person has company A as home company), and per route a
 * function that makes a minimal VALID request against fresh rows, so authorisation, not
 * validation, decides the answer.
 */
import { randomUUID } from 'node:crypto';
import request, { type Response } from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import type { TrimoutApp } from '../../../server/app';
import { CatalogueItem, Crew, Level, TestRecord, Unit, User } from '../../../server/models';
import { signUnsubscribeToken } from '../../../server/digests/unsubscribeToken';
import { issueToken } from '../../../server/services/tokens';
import { planAudit } from '../../../server/commands/planAudit';
import { computeRecord, resolveTestSettings } from '../../../server/services/testRecords';
import { createTestRecordSchema } from '../../../shared/schemas/testRecords';
import { caller, type Caller } from '../../support/api';
import { CookieAccessInfo } from 'cookiejar';
import { csrfFor, signIn, testEnv, type SignedIn } from '../../support/app';
// eslint-disable-next-line @typescript-eslint/no-require-imports
const { sign: signCookie } = require('cookie-signature') as { sign(value: string, secret: string): string };
const SESSION_COOKIE = 'trimout.sid';
import { addMember, buildCompany, buildLevel, buildSpace, buildSystem, buildUnit, buildUnitModel, buildUser, linkCompany, TEST_PASSWORD } from '../../support/factories';
import { buildWalkJob, insertFinding, type People, type WalkJob } from '../../support/findings';
import { phoneJpeg } from '../photos/fixtures';

export type RoleName = 'anon' | 'gc' | 'insp' | 'subA' | 'subB';
export const ROLE_NAMES: RoleName[] = ['anon', 'gc', 'insp', 'subA', 'subB'];
/** Company of the finding a finding/photo route is called on. */
export type Variant = 'A' | 'B';

export const uniq = () => randomUUID().slice(0, 8);
let codeCounter = 100 + Math.floor(Math.random() * 800);
const nextCode = () => `ZQ-${String(codeCounter++ % 1000).padStart(3, '1')}`;

export interface World extends WalkJob {
  /** A caller that can set up rows through the API (this world's GC manager). */
  gcApi: Caller;
  gcSignedIn: SignedIn;
  system: Awaited<ReturnType<typeof buildSystem>>;
  /** Findings of company A / company B, each with one photo (made through the API). */
  finding: Record<Variant, { id: string; photoId: string }>;
}

async function findingWithPhoto(w: WalkJob, gc: SignedIn, companyId: string, jpeg: Buffer) {
  const res = await gc.agent
    .post(`/api/jobs/${w.job.id}/findings`)
    .set('X-CSRF-Token', gc.csrf)
    .field('data', JSON.stringify({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, companyId }))
    .attach('photos', jpeg, { filename: 'f.jpg', contentType: 'image/jpeg' });
  if (res.status !== 201) throw new Error(`finding with photo: ${res.status} ${JSON.stringify(res.body)}`);
  return { id: res.body.id as string, photoId: res.body.photos[0].id as string };
}

export async function buildWorld(app: TrimoutApp['app'], people?: People): Promise<World> {
  const w = await buildWalkJob(people);
  const gcSignedIn = await signIn(app, w.gcManager.email);
  const jpeg = await phoneJpeg();
  const system = await buildSystem(w.job.id);
  const finding = {
    A: await findingWithPhoto(w, gcSignedIn, w.subA.companyId, jpeg),
    B: await findingWithPhoto(w, gcSignedIn, w.subB.companyId, jpeg),
  };
  return { ...w, gcApi: caller(gcSignedIn), gcSignedIn, system, finding };
}

export interface Ctx {
  app: TrimoutApp['app'];
  own: World;
  other: World;
  agents: Record<RoleName, SignedIn>;
  jpeg: Buffer;
}

export async function buildCtx(app: TrimoutApp['app']): Promise<Ctx> {
  const own = await buildWorld(app);
  const other = await buildWorld(app); // its own crew: none of the callers below is a member
  // Subcontractor B's home company is company A: on the own job they act for company B only
  // through their membership (as if invited for B), so every row also checks that scoping reads
  // the membership's company, never the person's home company.
  await User.update({ companyId: own.subA.companyId }, { where: { id: own.subB.id } });
  const anon = request.agent(app);
  const agents: Record<RoleName, SignedIn> = {
    anon: { agent: anon, csrf: await csrfFor(anon) },
    gc: own.gcSignedIn,
    insp: await signIn(app, own.inspector.email),
    subA: await signIn(app, own.subA.email),
    subB: await signIn(app, own.subB.email),
  };
  return { app, own, other, agents, jpeg: await phoneJpeg() };
}

export function emailOf(ctx: Ctx, role: RoleName): string | undefined {
  return { anon: undefined, gc: ctx.own.gcManager.email, insp: ctx.own.inspector.email, subA: ctx.own.subA.email, subB: ctx.own.subB.email }[role];
}

/**
 * A fresh agent signed in as `role` (for routes that replace or end the caller's session):
 * a copy of the role's session row under a new id, with a cookie signed like express-session's,
 * so no slow password hash is run for each one.
 */
export async function freshAgent(ctx: Ctx, role: RoleName): Promise<SignedIn> {
  const agent = request.agent(ctx.app);
  if (role === 'anon') return { agent, csrf: await csrfFor(agent) };
  const jar = (ctx.agents[role].agent as unknown as { jar: { getCookies(a: unknown): Array<{ name: string; value: string }> } }).jar;
  const cookie = jar.getCookies(CookieAccessInfo.All).find((c) => c.name === SESSION_COOKIE);
  if (!cookie) throw new Error(`${role} has no session cookie`);
  const sid = decodeURIComponent(cookie.value).slice(2).split('.')[0]!;
  const newSid = randomUUID();
  const [rows] = (await CatalogueItem.sequelize!.query(`INSERT INTO sessions (sid, sess, expire) SELECT $2, sess, expire FROM sessions WHERE sid = $1 RETURNING sid`, {
    bind: [sid, newSid],
  })) as [unknown[], unknown];
  if (rows.length !== 1) throw new Error(`${role}: session ${sid} not found to copy`);
  agent.set('Cookie', `${SESSION_COOKIE}=${encodeURIComponent(`s:${signCookie(newSid, testEnv().sessionSecrets[0]!)}`)}`);
  return { agent, csrf: ctx.agents[role].csrf };
}

/** One request: JSON body, a multipart body (data field + photos), or a raw body. */
export interface Spec {
  path: string;
  body?: unknown;
  /** `data` as a JSON text field (when given) and `photos` JPEG files in `field` (default "photos"). */
  multipart?: { data?: unknown; photos: number; field?: string };
  headers?: Record<string, string>;
}

export interface RouteCase {
  /** Makes fresh rows in world `w` and returns the request. */
  setup: (w: World, ctx: Ctx, variant: Variant) => Promise<Spec>;
  /** The route replaces or ends the caller's session: use a fresh agent per call. */
  fresh?: boolean;
  /** Callers one after another, not side by side (streamed exports: at most 3 run at once, server/services/csvStream.ts). */
  serial?: boolean;
}

const J = (w: World, rest = '') => `/api/jobs/${w.job.id}${rest}`;
const IF_MATCH = { 'If-Match': '*' };

async function openFinding(w: World, variant: Variant, status: 'open' | 'fix_submitted' = 'open') {
  return insertFinding(w, { companyId: variant === 'A' ? w.subA.companyId : w.subB.companyId, status });
}

async function freshInvitationToken(w: World): Promise<string> {
  const sequelize = CatalogueItem.sequelize!;
  return sequelize.transaction(async (transaction) => {
    const { token } = await issueToken(
      'invitation',
      { email: `invitee-${uniq()}@test.trimout.example`, name: null, jobId: w.job.id, role: 'inspector', companyId: w.gcCompany.id, invitedBy: w.gcManager.id },
      transaction,
    );
    return token;
  });
}

async function userToken(purpose: 'password_reset' | 'email_confirmation', confirmed: boolean): Promise<string> {
  const user = await buildUser();
  if (!confirmed) await user.update({ emailConfirmedAt: null });
  const sequelize = CatalogueItem.sequelize!;
  return sequelize.transaction(async (transaction) => (await issueToken(purpose, { userId: user.id }, transaction)).token);
}

const evacuationBody = (w: World) => ({
  kind: 'evacuation',
  systemId: w.system.id,
  deepestReading: '350 microns',
  isolatedReading: '380 microns',
  afterHoldReading: '610 microns',
  holdMinutes: 15,
});

/** A close-out report the world's GC manager asked for, still being built (its file is theirs alone, once built). */
async function reportRunOf(w: World): Promise<string> {
  const id = randomUUID();
  await CatalogueItem.sequelize!.query(
    `INSERT INTO report_runs (id, job_id, requested_by, kind, status, created_at) VALUES ($1, $2, $3, 'close-out', 'running', now())`,
    { bind: [id, w.job.id, w.gcManager.id] },
  );
  return id;
}

/** A fresh evacuation record of the world's system, made by company A's subcontractor (so anyone else may witness it). */
async function testRecordOf(w: World): Promise<string> {
  // Figures and verdict as the service computes them, so every reader (list, CSV, PDF) meets a real row.
  const computed = computeRecord(
    createTestRecordSchema.parse(evacuationBody(w)),
    { system: { id: w.system.id, name: 'System', factoryCharge: null, chargeBasis: null, units: [] }, unit: null },
    resolveTestSettings(null),
  );
  const row = await TestRecord.create({
    id: randomUUID(),
    jobId: w.job.id,
    kind: 'evacuation',
    systemId: w.system.id,
    unitId: null,
    companyId: w.subA.companyId,
    levelIds: null,
    recordedBy: w.subA.id,
    recordedAt: new Date(),
    supersedesId: null,
    result: computed.result,
    reasons: computed.reasons,
    data: computed.data,
    figures: computed.figures,
    note: null,
  });
  return row.id;
}

/** A fresh tiered audit of every unit of `w`'s job, planned by its GC manager. */
async function auditOf(w: World): Promise<string> {
  const sequelize = CatalogueItem.sequelize!;
  const detail = await sequelize.transaction((transaction) =>
    planAudit(
      { sequelize, transaction, jobId: w.job.id, actorId: w.gcManager.id, clock: () => new Date() },
      { name: `Audit ${uniq()}`, scheme: 'tiered', inspectionLevel: 'II', classes: { critical: 'zero', major: '1.0', minor: '4.0' }, lot: {} },
    ),
  );
  return detail.id;
}

/** A fresh level of `w` with a plan (uploaded by the world's GC manager). */
async function levelWithPlan(w: World): Promise<string> {
  const level = await buildLevel(w.job.id);
  const res = await send(w.gcSignedIn, 'POST', { path: J(w, `/levels/${level.id}/plan`), multipart: { photos: 1, field: 'file' } });
  if (res.status !== 201) throw new Error(`setup plan: ${res.status} ${JSON.stringify(res.body)}`);
  return level.id;
}

async function createdId(res: Response, what: string): Promise<string> {
  if (res.status !== 201) throw new Error(`setup ${what}: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

const catalogueBody = () => ({
  code: nextCode(),
  group: 'drainage',
  title: `Test item ${uniq()}`,
  description: 'A job-specific defect type made by the permission test.',
  unitKinds: ['cassette_4way'],
  defaultSeverity: 'minor',
  trade: 'mechanical',
  fixGuidance: 'Fix it as the manual says.',
  // Drainage is a hazardous group: the server refuses a type there without a caution.
  caution: 'Work at height: use a rated ladder. The manufacturer’s manual, local codes and licensed practice govern.',
  needsCeilingAccess: false,
});

/**
 * Route key "METHOD /api/path" → how to make a valid request. Every route of the router must be
 * here AND in the expectation table of the permission matrix.
 */
export const CASES: Record<string, RouteCase> = {
  'GET /api/health': { setup: async () => ({ path: '/api/health' }) },
  'GET /api/session': { setup: async () => ({ path: '/api/session' }) },
  'POST /api/session': {
    fresh: true,
    setup: async (_w, ctx) => ({ path: '/api/session', body: { email: ctx.own.subA.email, password: TEST_PASSWORD } }),
  },
  'DELETE /api/session': { fresh: true, setup: async () => ({ path: '/api/session' }) },
  'POST /api/signup': {
    setup: async () => ({
      path: '/api/signup',
      body: { companyName: `Signup Co ${uniq()}`, name: 'Sam Signup', email: `signup-${uniq()}@test.trimout.example`, password: 'a long enough password' },
    }),
  },
  'POST /api/email-confirmations/:token': {
    fresh: true,
    setup: async () => ({ path: `/api/email-confirmations/${await userToken('email_confirmation', false)}` }),
  },
  'POST /api/password-resets': { setup: async () => ({ path: '/api/password-resets', body: { email: `nobody-${uniq()}@test.trimout.example` } }) },
  'GET /api/password-resets/:token': { setup: async () => ({ path: `/api/password-resets/${await userToken('password_reset', true)}` }) },
  'POST /api/password-resets/:token': {
    fresh: true,
    setup: async () => ({ path: `/api/password-resets/${await userToken('password_reset', true)}`, body: { password: 'another long password' } }),
  },
  'POST /api/jobs/:jobId/invitations': {
    setup: async (w) => ({ path: J(w, '/invitations'), body: { email: `invitee-${uniq()}@test.trimout.example`, role: 'inspector' } }),
  },
  'GET /api/jobs/:jobId/invitations': { setup: async (w) => ({ path: J(w, '/invitations') }) },
  'DELETE /api/jobs/:jobId/invitations/:invitationId': {
    setup: async (w) => {
      const id = await createdId(await w.gcApi.post(J(w, '/invitations'), { email: `invitee-${uniq()}@test.trimout.example`, role: 'inspector' }), 'invitation');
      return { path: J(w, `/invitations/${id}`), headers: IF_MATCH };
    },
  },
  'POST /api/jobs/:jobId/invitations/bulk': {
    setup: async (w) => ({
      path: J(w, '/invitations/bulk'),
      body: { people: [{ email: `invitee-${uniq()}@test.trimout.example`, role: 'inspector' }, { email: `invitee-${uniq()}@test.trimout.example`, role: 'gc_manager' }] },
    }),
  },
  'POST /api/jobs/:jobId/invitations/:invitationId/resend': {
    setup: async (w) => {
      const id = await createdId(await w.gcApi.post(J(w, '/invitations'), { email: `invitee-${uniq()}@test.trimout.example`, role: 'inspector' }), 'invitation');
      return { path: J(w, `/invitations/${id}/resend`), body: {} };
    },
  },
  'GET /api/invitations/:token': { setup: async (w) => ({ path: `/api/invitations/${await freshInvitationToken(w)}` }) },
  'POST /api/invitations/:token': {
    fresh: true,
    setup: async (w) => ({ path: `/api/invitations/${await freshInvitationToken(w)}`, body: { name: 'Ina Invitee', password: 'a long enough password' } }),
  },
  'GET /api/dev/mail': { setup: async () => ({ path: '/api/dev/mail' }) },
  'GET /api/jobs': { setup: async () => ({ path: '/api/jobs' }) },
  'POST /api/jobs': { setup: async () => ({ path: '/api/jobs', body: { name: `Matrix job ${uniq()}` } }) },
  'GET /api/jobs/:jobId': { setup: async (w) => ({ path: J(w) }) },
  'PATCH /api/jobs/:jobId': { setup: async (w) => ({ path: J(w), body: { address: `${uniq()} Test Street` }, headers: IF_MATCH }) },
  'GET /api/jobs/:jobId/setup/checklist': { setup: async (w) => ({ path: J(w, '/setup/checklist') }) },
  'POST /api/jobs/:jobId/copy': { setup: async (w) => ({ path: J(w, '/copy'), body: { name: `Matrix copy ${uniq()}` } }) },
  'GET /api/jobs/:jobId/levels': { setup: async (w) => ({ path: J(w, '/levels') }) },
  'POST /api/jobs/:jobId/levels': { setup: async (w) => ({ path: J(w, '/levels'), body: { name: `Level ${uniq()}` } }) },
  'POST /api/jobs/:jobId/levels/bulk': { setup: async (w) => ({ path: J(w, '/levels/bulk'), body: { names: [`Level ${uniq()}`, `Level ${uniq()}`] } }) },
  'POST /api/jobs/:jobId/spaces/bulk': { setup: async (w) => ({ path: J(w, '/spaces/bulk'), body: { levelId: w.level.id, names: [`Space ${uniq()}`, `Space ${uniq()}`] } }) },
  'POST /api/jobs/:jobId/spaces/import': {
    setup: async (w) => ({ path: J(w, '/spaces/import'), body: { rows: [{ level: `Level ${uniq()}`, space: `Space ${uniq()}`, area: '10 m2' }], apply: true } }),
  },
  'POST /api/jobs/:jobId/levels/order': {
    setup: async (w) => {
      const levels = await Level.findAll({ where: { jobId: w.job.id }, order: [['position', 'ASC']] });
      return { path: J(w, '/levels/order'), body: { levelIds: levels.map((l) => l.id) } };
    },
  },
  'PATCH /api/jobs/:jobId/levels/:levelId': {
    setup: async (w) => ({ path: J(w, `/levels/${(await buildLevel(w.job.id)).id}`), body: { name: `Level ${uniq()}` }, headers: IF_MATCH }),
  },
  'DELETE /api/jobs/:jobId/levels/:levelId': {
    setup: async (w) => ({ path: J(w, `/levels/${(await buildLevel(w.job.id)).id}`), headers: IF_MATCH }),
  },
  'GET /api/jobs/:jobId/spaces': { setup: async (w) => ({ path: J(w, '/spaces') }) },
  'POST /api/jobs/:jobId/spaces': { setup: async (w) => ({ path: J(w, '/spaces'), body: { levelId: w.level.id, name: `Space ${uniq()}` } }) },
  'GET /api/jobs/:jobId/spaces/:spaceId': { setup: async (w) => ({ path: J(w, `/spaces/${w.space.id}`) }) },
  'PATCH /api/jobs/:jobId/spaces/:spaceId': {
    setup: async (w) => ({ path: J(w, `/spaces/${(await buildSpace(w.job.id, w.level.id)).id}`), body: { name: `Space ${uniq()}` }, headers: IF_MATCH }),
  },
  'DELETE /api/jobs/:jobId/spaces/:spaceId': {
    setup: async (w) => ({ path: J(w, `/spaces/${(await buildSpace(w.job.id, w.level.id)).id}`), headers: IF_MATCH }),
  },
  'GET /api/jobs/:jobId/systems': { setup: async (w) => ({ path: J(w, '/systems') }) },
  'POST /api/jobs/:jobId/systems': { setup: async (w) => ({ path: J(w, '/systems'), body: { name: `System ${uniq()}`, refrigerant: 'R-410A' } }) },
  'GET /api/jobs/:jobId/systems/:systemId': { setup: async (w) => ({ path: J(w, `/systems/${w.system.id}`) }) },
  'PATCH /api/jobs/:jobId/systems/:systemId': {
    setup: async (w) => ({ path: J(w, `/systems/${(await buildSystem(w.job.id)).id}`), body: { name: `System ${uniq()}` }, headers: IF_MATCH }),
  },
  'DELETE /api/jobs/:jobId/systems/:systemId': {
    setup: async (w) => ({ path: J(w, `/systems/${(await buildSystem(w.job.id)).id}`), headers: IF_MATCH }),
  },
  'GET /api/jobs/:jobId/models': { setup: async (w) => ({ path: J(w, '/models') }) },
  'POST /api/jobs/:jobId/models': { setup: async (w) => ({ path: J(w, '/models'), body: { name: `Model ${uniq()}`, unitKind: 'cassette_4way' } }) },
  'GET /api/jobs/:jobId/models/:modelId': { setup: async (w) => ({ path: J(w, `/models/${w.model.id}`) }) },
  'PATCH /api/jobs/:jobId/models/:modelId': {
    setup: async (w) => ({ path: J(w, `/models/${(await buildUnitModel(w.job.id)).id}`), body: { name: `Model ${uniq()}` }, headers: IF_MATCH }),
  },
  'DELETE /api/jobs/:jobId/models/:modelId': {
    setup: async (w) => ({ path: J(w, `/models/${(await buildUnitModel(w.job.id)).id}`), headers: IF_MATCH }),
  },
  'GET /api/jobs/:jobId/units': { setup: async (w) => ({ path: J(w, '/units') }) },
  'GET /api/jobs/:jobId/units.csv': { serial: true, setup: async (w) => ({ path: J(w, '/units.csv') }) },
  'POST /api/jobs/:jobId/units': {
    setup: async (w) => ({ path: J(w, '/units'), body: { tag: `IU-${uniq()}`, kind: 'cassette_4way', levelId: w.level.id } }),
  },
  'POST /api/jobs/:jobId/units/import': {
    setup: async (w) => ({ path: J(w, '/units/import'), body: { csv: `tag,kind,level\nIU-${uniq()},cassette_4way,Level 3\n`, dryRun: true } }),
  },
  'GET /api/jobs/:jobId/units/imports': { setup: async (w) => ({ path: J(w, '/units/imports') }) },
  'POST /api/jobs/:jobId/units/imports/:importId/undo': {
    // A recorded import that added nothing: the latest of its job, so it can be undone.
    setup: async (w) => {
      const id = randomUUID();
      await Unit.sequelize!.query(`INSERT INTO unit_imports (id, job_id, created_at) VALUES ($1, $2, now())`, { bind: [id, w.job.id] });
      return { path: J(w, `/units/imports/${id}/undo`), body: {} };
    },
  },
  'POST /api/jobs/:jobId/units/delete': {
    setup: async (w) => ({ path: J(w, '/units/delete'), body: { unitIds: [(await buildUnit(w.job.id, w.level.id)).id] } }),
  },
  'GET /api/jobs/:jobId/units/:unitId': { setup: async (w) => ({ path: J(w, `/units/${w.cassette.id}`) }) },
  'PATCH /api/jobs/:jobId/units/:unitId': {
    setup: async (w) => ({ path: J(w, `/units/${(await buildUnit(w.job.id, w.level.id)).id}`), body: { tag: `IU-${uniq()}` }, headers: IF_MATCH }),
  },
  'DELETE /api/jobs/:jobId/units/:unitId': {
    setup: async (w) => ({ path: J(w, `/units/${(await buildUnit(w.job.id, w.level.id)).id}`), headers: IF_MATCH }),
  },
  'PUT /api/jobs/:jobId/units/:unitId/ceiling-exclusion': {
    setup: async (w) => ({ path: J(w, `/units/${(await buildUnit(w.job.id, w.level.id)).id}/ceiling-exclusion`), body: { reason: 'Owner furnished, tile stays removable.' }, headers: IF_MATCH }),
  },
  'DELETE /api/jobs/:jobId/units/:unitId/ceiling-exclusion': {
    setup: async (w) => {
      const unit = await buildUnit(w.job.id, w.level.id);
      await unit.update({ ceilingExcludedReason: 'Owner furnished.', ceilingExcludedBy: w.gcManager.id, ceilingExcludedAt: new Date() });
      return { path: J(w, `/units/${unit.id}/ceiling-exclusion`), headers: IF_MATCH };
    },
  },
  'GET /api/companies/known': { setup: async () => ({ path: '/api/companies/known' }) },
  'GET /api/jobs/:jobId/companies': { setup: async (w) => ({ path: J(w, '/companies') }) },
  'POST /api/jobs/:jobId/companies': { setup: async (w) => ({ path: J(w, '/companies'), body: { name: `Co ${uniq()}`, trades: ['insulation'] } }) },
  'PATCH /api/jobs/:jobId/companies/:companyId': {
    setup: async (w) => {
      const company = await buildCompany();
      await linkCompany(w.job.id, company.id, []);
      return { path: J(w, `/companies/${company.id}`), body: { trades: ['controls'] }, headers: IF_MATCH };
    },
  },
  'DELETE /api/jobs/:jobId/companies/:companyId': {
    setup: async (w) => {
      const company = await buildCompany();
      await linkCompany(w.job.id, company.id, []);
      return { path: J(w, `/companies/${company.id}`), headers: IF_MATCH };
    },
  },
  // Crews: company A's, so subcontractor A manages them and B does not see them.
  'GET /api/jobs/:jobId/crews': { setup: async (w) => ({ path: J(w, '/crews') }) },
  'POST /api/jobs/:jobId/crews': { setup: async (w) => ({ path: J(w, '/crews'), body: { companyId: w.subA.companyId, name: `Crew ${uniq()}` } }) },
  'PATCH /api/jobs/:jobId/crews/:crewId': {
    setup: async (w) => {
      const crew = await Crew.create({ jobId: w.job.id, companyId: w.subA.companyId, name: `Crew ${uniq()}` });
      return { path: J(w, `/crews/${crew.id}`), body: { name: `Crew ${uniq()}` }, headers: IF_MATCH };
    },
  },
  'GET /api/jobs/:jobId/audits': { setup: async (w) => ({ path: J(w, '/audits') }) },
  'POST /api/jobs/:jobId/audits': { setup: async (w) => ({ path: J(w, '/audits'), body: { name: `Audit ${uniq()}`, scheme: 'tiered' } }) },
  'GET /api/jobs/:jobId/audits/:auditId.csv': { serial: true, setup: async (w) => ({ path: J(w, `/audits/${await auditOf(w)}.csv`) }) },
  'GET /api/jobs/:jobId/audits/:auditId': { setup: async (w) => ({ path: J(w, `/audits/${await auditOf(w)}`) }) },
  'GET /api/jobs/:jobId/test-records': { setup: async (w) => ({ path: J(w, '/test-records') }) },
  'POST /api/jobs/:jobId/test-records': { setup: async (w) => ({ path: J(w, '/test-records'), body: evacuationBody(w) }) },
  'GET /api/jobs/:jobId/test-records.csv': { serial: true, setup: async (w) => ({ path: J(w, '/test-records.csv') }) },
  'GET /api/jobs/:jobId/test-records/:recordId': { setup: async (w) => ({ path: J(w, `/test-records/${await testRecordOf(w)}`) }) },
  'POST /api/jobs/:jobId/test-records/:recordId/witness': {
    setup: async (w) => ({ path: J(w, `/test-records/${await testRecordOf(w)}/witness`), body: {}, headers: IF_MATCH }),
  },
  'DELETE /api/jobs/:jobId/crews/:crewId': {
    setup: async (w) => {
      const crew = await Crew.create({ jobId: w.job.id, companyId: w.subA.companyId, name: `Crew ${uniq()}` });
      return { path: J(w, `/crews/${crew.id}`), headers: IF_MATCH };
    },
  },
  'GET /api/jobs/:jobId/members': { setup: async (w) => ({ path: J(w, '/members') }) },
  'PATCH /api/jobs/:jobId/members/:memberId': {
    setup: async (w) => {
      const member = await addMember(w.job.id, (await buildUser({ companyId: w.gcCompany.id })).id, 'inspector');
      return { path: J(w, `/members/${member.id}`), body: { role: 'gc_manager' }, headers: IF_MATCH };
    },
  },
  'DELETE /api/jobs/:jobId/members/:memberId': {
    setup: async (w) => {
      const member = await addMember(w.job.id, (await buildUser({ companyId: w.gcCompany.id })).id, 'inspector');
      return { path: J(w, `/members/${member.id}`), headers: IF_MATCH };
    },
  },
  'GET /api/jobs/:jobId/catalogue': { setup: async (w) => ({ path: J(w, '/catalogue') }) },
  'POST /api/jobs/:jobId/catalogue': { setup: async (w) => ({ path: J(w, '/catalogue'), body: catalogueBody() }) },
  'GET /api/jobs/:jobId/catalogue/:itemId': { setup: async (w) => ({ path: J(w, `/catalogue/${w.byCode('DR-03').id}`) }) },
  'PATCH /api/jobs/:jobId/catalogue/:itemId': {
    setup: async (w) => {
      const id = await createdId(await w.gcApi.post(J(w, '/catalogue'), catalogueBody()), 'catalogue item');
      return { path: J(w, `/catalogue/${id}`), body: { title: `Retitled ${uniq()}` }, headers: IF_MATCH };
    },
  },
  'DELETE /api/jobs/:jobId/catalogue/:itemId': {
    setup: async (w) => {
      const id = await createdId(await w.gcApi.post(J(w, '/catalogue'), catalogueBody()), 'catalogue item');
      return { path: J(w, `/catalogue/${id}`), headers: IF_MATCH };
    },
  },
  'POST /api/jobs/:jobId/walks': {
    setup: async (w) => ({ path: J(w, '/walks'), body: { levelId: (await buildLevel(w.job.id)).id } }),
  },
  'GET /api/jobs/:jobId/walks': { setup: async (w) => ({ path: J(w, '/walks') }) },
  'GET /api/jobs/:jobId/walks/:walkId': {
    setup: async (w) => {
      const id = await createdId(await w.gcApi.post(J(w, '/walks'), { levelId: (await buildLevel(w.job.id)).id }), 'walk');
      return { path: J(w, `/walks/${id}`) };
    },
  },
  'POST /api/jobs/:jobId/walks/:walkId/finish': {
    setup: async (w) => {
      const id = await createdId(await w.gcApi.post(J(w, '/walks'), { levelId: (await buildLevel(w.job.id)).id }), 'walk');
      return { path: J(w, `/walks/${id}/finish`), body: {} };
    },
  },
  'GET /api/jobs/:jobId/levels/:levelId/walk-units': { setup: async (w) => ({ path: J(w, `/levels/${w.level.id}/walk-units`) }) },
  'POST /api/jobs/:jobId/units/:unitId/checks': {
    setup: async (w) => ({
      path: J(w, `/units/${(await buildUnit(w.job.id, w.level.id)).id}/checks`),
      body: { items: [{ catalogueItemId: w.byCode('DR-03').id, mark: 'ok' }], complete: false },
    }),
  },
  'GET /api/jobs/:jobId/units/:unitId/checks': { setup: async (w) => ({ path: J(w, `/units/${w.cassette.id}/checks`) }) },
  'GET /api/jobs/:jobId/findings': { setup: async (w) => ({ path: J(w, '/findings') }) },
  'POST /api/jobs/:jobId/findings/batch': {
    setup: async (w) => ({ path: J(w, '/findings/batch'), body: { catalogueItemId: w.byCode('DR-03').id, levelId: w.level.id, units: [{ unitId: w.cassette2.id }] } }),
  },
  'GET /api/jobs/:jobId/labels.pdf': { serial: true, setup: async (w) => ({ path: J(w, `/labels.pdf?levelId=${w.level.id}`) }) },
  'POST /api/jobs/:jobId/findings': {
    setup: async (w) => ({ path: J(w, '/findings'), body: { catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette2.id } }),
  },
  'GET /api/jobs/:jobId/findings/:findingId': { setup: async (w, _c, v) => ({ path: J(w, `/findings/${w.finding[v].id}`) }) },
  'GET /api/jobs/:jobId/photos/:photoId': { setup: async (w, _c, v) => ({ path: J(w, `/photos/${w.finding[v].photoId}`) }) },
  'GET /api/jobs/:jobId/photos/:photoId/thumb': { setup: async (w, _c, v) => ({ path: J(w, `/photos/${w.finding[v].photoId}/thumb`) }) },
  'GET /api/photos/:photoId/marks': { setup: async (w, _c, v) => ({ path: `/api/photos/${w.finding[v].photoId}/marks` }) },
  'PUT /api/photos/:photoId/marks': {
    setup: async (w, _c, v) => ({ path: `/api/photos/${w.finding[v].photoId}/marks`, body: { marks: [{ kind: 'rect', colour: 'yellow', x: 0.1, y: 0.1, w: 0.2, h: 0.2 }] }, headers: IF_MATCH }),
  },
  'POST /api/jobs/:jobId/findings/:findingId/fixes': {
    setup: async (w, _c, v) => ({ path: J(w, `/findings/${(await openFinding(w, v)).id}/fixes`), multipart: { data: { note: 'Re-pitched the drain.' }, photos: 1 } }),
  },
  'POST /api/jobs/:jobId/findings/:findingId/photos': {
    setup: async (w, _c, v) => ({ path: J(w, `/findings/${(await openFinding(w, v)).id}/photos`), multipart: { data: {}, photos: 1 } }),
  },
  'POST /api/jobs/:jobId/findings/:findingId/reinspections': {
    setup: async (w, _c, v) => ({
      path: J(w, `/findings/${(await openFinding(w, v, 'fix_submitted')).id}/reinspections`),
      body: { verdict: 'accept' },
      headers: IF_MATCH,
    }),
  },
  'PATCH /api/jobs/:jobId/findings/:findingId': {
    setup: async (w, _c, v) => ({ path: J(w, `/findings/${(await openFinding(w, v)).id}`), body: { severity: { to: 'minor' } }, headers: IF_MATCH }),
  },
  'GET /api/jobs/:jobId/findings/:findingId/events': { setup: async (w, _c, v) => ({ path: J(w, `/findings/${w.finding[v].id}/events`) }) },
  'GET /api/jobs/:jobId/findings/:findingId/comments': { setup: async (w, _c, v) => ({ path: J(w, `/findings/${w.finding[v].id}/comments`) }) },
  'POST /api/jobs/:jobId/findings/:findingId/comments': {
    setup: async (w, _c, v) => ({ path: J(w, `/findings/${w.finding[v].id}/comments`), body: { text: `Comment ${uniq()}` } }),
  },
  'POST /api/jobs/:jobId/findings/bulk': {
    setup: async (w, _c, v) => ({
      path: J(w, '/findings/bulk'),
      body: { findingIds: [(await openFinding(w, v)).id], change: { dueOn: { to: '2026-12-30' } } },
    }),
  },
  'GET /api/jobs/:jobId/reinspections/queue': { setup: async (w) => ({ path: J(w, '/reinspections/queue') }) },
  'GET /api/inbox': { setup: async () => ({ path: '/api/inbox' }) },
  // Mail preferences, digest now, unsubscribe (H5)
  'GET /api/me/preferences': { setup: async () => ({ path: '/api/me/preferences' }) },
  'PATCH /api/me/preferences': { setup: async () => ({ path: '/api/me/preferences', body: { criticalAssignmentMail: true }, headers: IF_MATCH }) },
  'POST /api/me/digest': { setup: async () => ({ path: '/api/me/digest', body: {} }) },
  'GET /api/unsubscribe/:token': {
    setup: async () => ({ path: `/api/unsubscribe/${signUnsubscribeToken(testEnv().sessionSecrets, (await buildUser()).id, 'digest')}` }),
  },
  'POST /api/unsubscribe/:token': {
    setup: async () => ({
      path: `/api/unsubscribe/${signUnsubscribeToken(testEnv().sessionSecrets, (await buildUser()).id, 'digest')}`,
      body: { 'List-Unsubscribe': 'One-Click' },
    }),
  },
  // Level plans (H2)
  'GET /api/jobs/:jobId/levels/:levelId/plan': { setup: async (w) => ({ path: J(w, `/levels/${await levelWithPlan(w)}/plan`) }) },
  'POST /api/jobs/:jobId/levels/:levelId/plan': {
    setup: async (w) => ({ path: J(w, `/levels/${(await buildLevel(w.job.id)).id}/plan`), multipart: { photos: 1, field: 'file' } }),
  },
  'DELETE /api/jobs/:jobId/levels/:levelId/plan': { setup: async (w) => ({ path: J(w, `/levels/${await levelWithPlan(w)}/plan`), headers: IF_MATCH }) },
  // Levels board family (H1) and exports (H4)
  'GET /api/jobs/:jobId/board': { setup: async (w) => ({ path: J(w, '/board') }) },
  'GET /api/jobs/:jobId/board/systems': { setup: async (w) => ({ path: J(w, '/board/systems') }) },
  'GET /api/jobs/:jobId/readiness': { setup: async (w) => ({ path: J(w, '/readiness') }) },
  'GET /api/jobs/:jobId/scorecards': { setup: async (w) => ({ path: J(w, '/scorecards') }) },
  'GET /api/jobs/:jobId/recurring': { setup: async (w) => ({ path: J(w, '/recurring') }) },
  'GET /api/jobs/:jobId/trend': { setup: async (w) => ({ path: J(w, '/trend') }) },
  'GET /api/jobs/:jobId/findings.csv': { serial: true, setup: async (w) => ({ path: J(w, '/findings.csv') }) },
  'GET /api/jobs/:jobId/scorecards.csv': { serial: true, setup: async (w) => ({ path: J(w, '/scorecards.csv') }) },
  // PDF reports (server/routes/reports.ts): the crew list of company A's level; report runs of the GC manager.
  'GET /api/jobs/:jobId/reports/close-out.pdf': { serial: true, setup: async (w) => ({ path: J(w, `/reports/close-out.pdf?levelId=${w.level.id}`) }) },
  'GET /api/jobs/:jobId/reports/crew-list.pdf': {
    serial: true,
    setup: async (w) => ({ path: J(w, `/reports/crew-list.pdf?companyId=${w.subA.companyId}&levelId=${w.level.id}`) }),
  },
  'GET /api/jobs/:jobId/units/:unitId/sheet.pdf': { serial: true, setup: async (w) => ({ path: J(w, `/units/${w.cassette.id}/sheet.pdf`) }) },
  'POST /api/jobs/:jobId/reports': { setup: async (w) => ({ path: J(w, '/reports'), body: { kind: 'close-out', levelId: w.level.id } }) },
  'GET /api/jobs/:jobId/reports/:reportId': { setup: async (w) => ({ path: J(w, `/reports/${await reportRunOf(w)}`) }) },
  'GET /api/jobs/:jobId/reports/:reportId/report.pdf': { setup: async (w) => ({ path: J(w, `/reports/${await reportRunOf(w)}/report.pdf`) }) },
};

/** Sends a spec as `who` (CSRF header and a fresh Idempotency-Key on every write). */
export async function send(who: SignedIn, method: string, spec: Spec): Promise<Response> {
  const m = method.toLowerCase() as 'get' | 'post' | 'patch' | 'put' | 'delete';
  let req = (who.agent as TestAgent)[m](spec.path);
  if (method !== 'GET') req = req.set('X-CSRF-Token', who.csrf).set('Idempotency-Key', `matrix-${randomUUID()}`);
  if (spec.headers) req = req.set(spec.headers);
  if (spec.multipart) {
    if (spec.multipart.data !== undefined) req = req.field('data', JSON.stringify(spec.multipart.data));
    const jpeg = await phoneJpeg();
    for (let i = 0; i < spec.multipart.photos; i++) req = req.attach(spec.multipart.field ?? 'photos', jpeg, { filename: `p${i}.jpg`, contentType: 'image/jpeg' });
    return req;
  }
  if (method === 'GET' || spec.body === undefined) return req;
  return req.send(spec.body as object);
}

/** Path parameters other than :jobId (and tokens): routes that name an object of the job. */
export function objectParams(routePath: string): string[] {
  return (routePath.match(/:[A-Za-z]+/g) ?? []).filter((p) => p !== ':jobId' && p !== ':token');
}

export function takesFinding(routePath: string): boolean {
  return /:findingId|:photoId/.test(routePath);
}
