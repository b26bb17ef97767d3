/**
 * Invitations: a GC manager invites an address to a job with a role and company; the mail's
 * one-time link lets the person choose a password (new) or sign in (existing), and they land
 * signed in on the job.
 */
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import type { MailService } from '../../../server/mail';
import { AuthToken, JobCompany, JobMember, User } from '../../../server/models';
import { hashToken } from '../../../server/services/tokens';
import { buildTestApp, csrfFor, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildCompany, buildJob, buildJobWithCrew, buildUser, TEST_PASSWORD } from '../../support/factories';
import { startFakeSmtp, testMailService, tokenOf, type FakeSmtp } from '../../support/mail';

// Several scrypt hashes per test (N=2^17): generous on a busy shared machine.
jest.setTimeout(60_000);

let db: Database;
let trimout: TrimoutApp;
let smtp: FakeSmtp;
let mailer: MailService;

beforeAll(async () => {
  db = await connectTestDb();
  smtp = await startFakeSmtp();
  mailer = testMailService(smtp);
  trimout = buildTestApp(db, { mail: mailer });
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await smtp.close();
});

const uniq = () => Math.random().toString(36).slice(2, 10);
const NEW_PASSWORD = 'my own new password';
const NO_JOB = '00000000-0000-4000-8000-000000000000';

/** A crew whose job lists a mechanical subcontractor company. */
async function crewWithSubCompany() {
  const crew = await buildJobWithCrew();
  const mech = await buildCompany({ name: `Mechanical ${uniq()}` });
  await JobCompany.create({ jobId: crew.job.id, companyId: mech.id, trades: ['mechanical'] });
  await JobCompany.create({ jobId: crew.job.id, companyId: crew.gcCompany.id, trades: ['general'] });
  const gc = await signIn(trimout.app, crew.gcManager.email);
  return { ...crew, mech, gc };
}

async function invite(gc: { agent: request.Agent | ReturnType<typeof request.agent>; csrf: string }, jobId: string, body: Record<string, unknown>) {
  return gc.agent.post(`/api/jobs/${jobId}/invitations`).set('X-CSRF-Token', gc.csrf).send(body);
}

async function anonymous() {
  const agent = request.agent(trimout.app);
  return { agent, csrf: await csrfFor(agent) };
}

describe('POST /api/jobs/:jobId/invitations', () => {
  it('invites a subcontractor: 201, a pending invitation, and a mail with a one-time link', async () => {
    const crew = await crewWithSubCompany();
    const email = `sub-${uniq()}@test.trimout.example`;
    const res = await invite(crew.gc, crew.job.id, { email, name: 'Pell Anders', role: 'subcontractor', companyId: crew.mech.id });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      email,
      name: 'Pell Anders',
      role: 'subcontractor',
      company: { id: crew.mech.id, name: crew.mech.name },
      invitedBy: { id: crew.gcManager.id, name: crew.gcManager.name },
    });
    const mail = await smtp.waitFor((m) => m.to.includes(email));
    expect(mail.subject).toBe(`${crew.gcManager.name} invited you to ${crew.job.name} on Trimout`);
    expect(mail.text).toContain(crew.mech.name);
    expect(mail.text).toContain('a subcontractor');
    expect(mail.html).toContain('Accept the invitation');
    const token = tokenOf(mail, '/invite/');
    const row = await AuthToken.findByPk(res.body.id);
    expect(row!.tokenHash).toBe(hashToken(token));
    const days = (row!.expiresAt.getTime() - row!.createdAt.getTime()) / 86_400_000;
    expect(days).toBeCloseTo(7, 2);
  });

  it('lets a GC manager or inspector invitation default to the inviter’s company', async () => {
    const crew = await crewWithSubCompany();
    const res = await invite(crew.gc, crew.job.id, { email: `insp-${uniq()}@test.trimout.example`, role: 'inspector' });
    expect(res.status).toBe(201);
    expect(res.body.company.id).toBe(crew.gcCompany.id);
  });

  it('replays the same response for the same Idempotency-Key and sends one mail', async () => {
    const crew = await crewWithSubCompany();
    const email = `idem-${uniq()}@test.trimout.example`;
    const body = { email, role: 'subcontractor', companyId: crew.mech.id };
    const first = await crew.gc.agent.post(`/api/jobs/${crew.job.id}/invitations`).set('X-CSRF-Token', crew.gc.csrf).set('Idempotency-Key', `inv-${uniq()}-key`).send(body);
    const key = first.request.getHeader('Idempotency-Key') as string;
    const second = await crew.gc.agent.post(`/api/jobs/${crew.job.id}/invitations`).set('X-CSRF-Token', crew.gc.csrf).set('Idempotency-Key', key).send(body);
    expect(second.status).toBe(201);
    expect(second.headers['idempotent-replayed']).toBe('true');
    expect(second.body.id).toBe(first.body.id);
    await smtp.waitFor((m) => m.to.includes(email));
    // Both writes have answered; a mail either of them sent has been handed over once the outbox is idle.
    await mailer.outbox.idle();
    expect(smtp.messages().filter((m) => m.to.includes(email))).toHaveLength(1);
  });

  it('answers 401 signed out', async () => {
    const { agent, csrf } = await anonymous();
    await agent.post(`/api/jobs/${NO_JOB}/invitations`).set('X-CSRF-Token', csrf).send({ email: 'a@b.example', role: 'inspector' }).expect(401);
  });

  it.each(['inspector', 'subA'] as const)('answers 403 to the %s', async (who) => {
    const crew = await crewWithSubCompany();
    const them = await signIn(trimout.app, crew[who].email);
    const res = await invite(them, crew.job.id, { email: `x-${uniq()}@test.trimout.example`, role: 'inspector' });
    expect(res.status).toBe(403);
  });

  it('answers 404 for a job the GC manager is not on, and for a job that does not exist', async () => {
    const crew = await crewWithSubCompany();
    const other = await buildJob();
    expect((await invite(crew.gc, other.id, { email: 'a@b.example', role: 'inspector' })).status).toBe(404);
    expect((await invite(crew.gc, NO_JOB, { email: 'a@b.example', role: 'inspector' })).status).toBe(404);
  });

  it.each([
    [{ role: 'inspector' }, 'email', /email: Enter their e-mail address\./],
    [{ email: 'nope', role: 'inspector' }, 'email', /valid e-mail/],
    [{ email: 'a@b.example', role: 'owner' }, 'role', /Choose a role/],
    [{ email: 'a@b.example', role: 'subcontractor' }, 'companyId', /needs the company/],
    [{ email: 'a@b.example', role: 'inspector', extra: 1 }, '', /:/],
  ])('refuses %j with 400 (%s)', async (body, field, message) => {
    const crew = await crewWithSubCompany();
    const res = await invite(crew.gc, crew.job.id, body);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(message);
    if (field) expect(Object.keys(res.body.error.fields)).toContain(field);
  });

  it('refuses a company that is not on the job with 400', async () => {
    const crew = await crewWithSubCompany();
    const stranger = await buildCompany();
    const res = await invite(crew.gc, crew.job.id, { email: `s-${uniq()}@test.trimout.example`, role: 'subcontractor', companyId: stranger.id });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.companyId).toMatch(/not on this job/);
  });

  it('refuses to invite someone already on the job (409)', async () => {
    const crew = await crewWithSubCompany();
    const res = await invite(crew.gc, crew.job.id, { email: crew.inspector.email, role: 'inspector' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/already a member/);
  });

  it('keeps a job name with CR/LF from adding a header, and escapes names in the HTML part', async () => {
    const gcCompany = await buildCompany();
    const job = await buildJob({ ownerCompanyId: gcCompany.id, name: 'Tower\r\nBcc: victim@evil.example' });
    const manager = await buildUser({ companyId: gcCompany.id, name: 'Ann <script>alert(1)</script>\nX-Evil: 1' });
    await JobMember.create({ jobId: job.id, userId: manager.id, role: 'gc_manager', companyId: gcCompany.id });
    const gc = await signIn(trimout.app, manager.email);
    const email = `inj-${uniq()}@test.trimout.example`;
    expect((await invite(gc, job.id, { email, name: 'Bo\r\nCc: other@evil.example', role: 'inspector' })).status).toBe(201);
    const mail = await smtp.waitFor((m) => m.to.includes(email));
    const headers = mail.raw.split(/\r?\n\r?\n/)[0]!;
    expect(headers).not.toMatch(/^(Bcc|Cc|X-Evil):/im);
    expect(mail.envelopeTo).toEqual([email]);
    expect(mail.subject).not.toMatch(/[\r\n]/);
    expect(mail.subject).toContain('Tower Bcc: victim@evil.example');
    expect(mail.html).not.toContain('<script>');
    expect(mail.html).toContain('&lt;script&gt;');
  });
});

describe('GET /api/jobs/:jobId/invitations', () => {
  it('lists the pending invitations only, newest first, with a cursor', async () => {
    const crew = await crewWithSubCompany();
    const emails = [1, 2, 3].map((i) => `list${i}-${uniq()}@test.trimout.example`);
    const ids: string[] = [];
    for (const email of emails) ids.push((await invite(crew.gc, crew.job.id, { email, role: 'subcontractor', companyId: crew.mech.id })).body.id);
    await crew.gc.agent.delete(`/api/jobs/${crew.job.id}/invitations/${ids[0]}`).set('X-CSRF-Token', crew.gc.csrf).expect(204);
    const page1 = await crew.gc.agent.get(`/api/jobs/${crew.job.id}/invitations?limit=1`).expect(200);
    expect(page1.body.items.map((i: { email: string }) => i.email)).toEqual([emails[2]]);
    const page2 = await crew.gc.agent.get(`/api/jobs/${crew.job.id}/invitations?limit=1&cursor=${page1.body.nextCursor}`).expect(200);
    expect(page2.body.items.map((i: { email: string }) => i.email)).toEqual([emails[1]]);
    expect(page2.body.nextCursor).toBeNull();
  });

  it('answers 401, 403 (inspector), 404 (other job), 400 (bad limit)', async () => {
    const crew = await crewWithSubCompany();
    await request(trimout.app).get(`/api/jobs/${crew.job.id}/invitations`).expect(401);
    const insp = await signIn(trimout.app, crew.inspector.email);
    await insp.agent.get(`/api/jobs/${crew.job.id}/invitations`).expect(403);
    const sub = await signIn(trimout.app, crew.subA.email);
    await sub.agent.get(`/api/jobs/${crew.job.id}/invitations`).expect(403);
    await crew.gc.agent.get(`/api/jobs/${(await buildJob()).id}/invitations`).expect(404);
    const bad = await crew.gc.agent.get(`/api/jobs/${crew.job.id}/invitations?limit=500`).expect(400);
    expect(bad.body.error.message).toMatch(/limit/);
    await crew.gc.agent.get(`/api/jobs/${crew.job.id}/invitations?cursor=nonsense`).expect(400);
  });
});

describe('DELETE /api/jobs/:jobId/invitations/:invitationId', () => {
  it('withdraws an invitation: its link then answers 410', async () => {
    const crew = await crewWithSubCompany();
    const email = `revoke-${uniq()}@test.trimout.example`;
    const created = await invite(crew.gc, crew.job.id, { email, role: 'subcontractor', companyId: crew.mech.id });
    const token = tokenOf(await smtp.waitFor((m) => m.to.includes(email)), '/invite/');
    await crew.gc.agent.delete(`/api/jobs/${crew.job.id}/invitations/${created.body.id}`).set('X-CSRF-Token', crew.gc.csrf).expect(204);
    const res = await request(trimout.app).get(`/api/invitations/${token}`).expect(410);
    expect(res.body.error.message).toMatch(/withdrawn/);
  });

  it('answers 401, 403 for the inspector, 404 for another job’s invitation, 400 for a bad id', async () => {
    const crew = await crewWithSubCompany();
    const other = await crewWithSubCompany();
    const theirs = await invite(other.gc, other.job.id, { email: `o-${uniq()}@test.trimout.example`, role: 'inspector' });
    const path = `/api/jobs/${crew.job.id}/invitations/${theirs.body.id}`;
    const { agent, csrf } = await anonymous();
    await agent.delete(path).set('X-CSRF-Token', csrf).expect(401);
    const insp = await signIn(trimout.app, crew.inspector.email);
    await insp.agent.delete(path).set('X-CSRF-Token', insp.csrf).expect(403);
    await crew.gc.agent.delete(path).set('X-CSRF-Token', crew.gc.csrf).expect(404);
    const bad = await crew.gc.agent.delete(`/api/jobs/${crew.job.id}/invitations/not-an-id`).set('X-CSRF-Token', crew.gc.csrf).expect(400);
    expect(bad.body.error.message).toMatch(/invitationId/);
    // still pending for its own job
    expect((await AuthToken.findByPk(theirs.body.id))!.revokedAt).toBeNull();
  });
});

describe('accepting an invitation', () => {
  async function invited(role: 'subcontractor' | 'inspector' = 'subcontractor', email = `acc-${uniq()}@test.trimout.example`) {
    const crew = await crewWithSubCompany();
    const res = await invite(crew.gc, crew.job.id, { email, name: 'Pell Anders', role, ...(role === 'subcontractor' ? { companyId: crew.mech.id } : {}) });
    expect(res.status).toBe(201);
    const mails = smtp.messages().filter((m) => m.to.includes(email));
    const mail = await smtp.waitFor((m) => m.to.includes(email) && !mails.includes(m));
    return { ...crew, email, token: tokenOf(mail, '/invite/'), mail };
  }

  it('GET shows the job, role and company without a session', async () => {
    const inv = await invited();
    const res = await request(trimout.app).get(`/api/invitations/${inv.token}`).expect(200);
    expect(res.body).toMatchObject({
      email: inv.email,
      name: 'Pell Anders',
      role: 'subcontractor',
      job: { id: inv.job.id, name: inv.job.name },
      company: { name: inv.mech.name },
      invitedBy: inv.gcManager.name,
      existingAccount: false,
    });
  });

  it('a new person sets name and password: account in the invited company, member of the job, signed in', async () => {
    const inv = await invited();
    const { agent, csrf } = await anonymous();
    const res = await agent.post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ name: 'Pell Anders', password: NEW_PASSWORD }).expect(200);
    expect(res.body.jobId).toBe(inv.job.id);
    expect(res.body.user).toMatchObject({ email: inv.email, name: 'Pell Anders', company: { id: inv.mech.id } });
    expect(res.body.jobs).toEqual([expect.objectContaining({ id: inv.job.id, role: 'subcontractor' })]);
    expect(res.body.csrfToken).not.toBe(csrf);
    await agent.get(`/api/jobs/${inv.job.id}`).expect(200);
    const user = await User.findOne({ where: { email: inv.email } });
    expect(user!.emailConfirmedAt).toBeInstanceOf(Date);
    await signIn(trimout.app, inv.email, NEW_PASSWORD);
    // single use
    const again = await request(trimout.app).post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ name: 'X', password: NEW_PASSWORD }).expect(410);
    expect(again.body.error.message).toMatch(/already used/);
    await request(trimout.app).get(`/api/invitations/${inv.token}`).expect(410);
  });

  it('an address someone signed up with but never confirmed: accepting sets the password, and the pending sign-up link dies', async () => {
    const email = `pending-${uniq()}@test.trimout.example`;
    const stranger = await anonymous();
    await stranger.agent
      .post('/api/signup')
      .set('X-CSRF-Token', stranger.csrf)
      .send({ companyName: 'Stranger Holdings', name: 'Not The Owner', email, password: 'the stranger chose this one' })
      .expect(202);
    const signUpMail = await smtp.waitFor((m) => m.to.includes(email) && m.subject.startsWith('Confirm'));
    const inv = await invited('subcontractor', email);
    const { agent, csrf } = await anonymous();
    const accepted = await agent.post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ name: 'Pell Anders', password: NEW_PASSWORD }).expect(200);
    expect(accepted.body.user).toMatchObject({ name: 'Pell Anders', company: { id: inv.mech.id } });
    await signIn(trimout.app, email, NEW_PASSWORD);
    const late = await anonymous();
    const dead = await late.agent.post(`/api/email-confirmations/${tokenOf(signUpMail, '/confirm/')}`).set('X-CSRF-Token', late.csrf);
    expect(dead.status).toBe(410);
    await signIn(trimout.app, email, NEW_PASSWORD);
  });

  it('an existing account must give its current password; the invitation never changes it', async () => {
    const existing = await buildUser();
    const inv = await invited('inspector', existing.email);
    expect(inv.mail.text).toMatch(/already have a Trimout account/);
    const preview = await request(trimout.app).get(`/api/invitations/${inv.token}`).expect(200);
    expect(preview.body.existingAccount).toBe(true);
    const { agent, csrf } = await anonymous();
    const wrong = await agent.post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD }).expect(401);
    expect(wrong.body.error.message).toMatch(/not the password/);
    // the failed try did not use the link
    const res = await agent.post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ password: TEST_PASSWORD }).expect(200);
    expect(res.body.user.id).toBe(existing.id);
    expect(await JobMember.count({ where: { jobId: inv.job.id, userId: existing.id, role: 'inspector' } })).toBe(1);
    await signIn(trimout.app, existing.email, TEST_PASSWORD);
  });

  it('answers 400 for a short password or missing name (new person) and keeps the link usable', async () => {
    const inv = await invited();
    const { agent, csrf } = await anonymous();
    const short = await agent.post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ name: 'Pell', password: 'short' }).expect(400);
    expect(short.body.error.fields.password).toMatch(/at least 8/);
    const extra = await agent.post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ password: NEW_PASSWORD, role: 'gc_manager' }).expect(400);
    expect(extra.body.error.message).toMatch(/:/);
    await request(trimout.app).get(`/api/invitations/${inv.token}`).expect(200);
  });

  it('answers 410 "expired" for an expired invitation, 404 for a reset token used as an invitation', async () => {
    const inv = await invited();
    await AuthToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { tokenHash: hashToken(inv.token) } });
    const { agent, csrf } = await anonymous();
    const res = await agent.post(`/api/invitations/${inv.token}`).set('X-CSRF-Token', csrf).send({ name: 'Pell', password: NEW_PASSWORD }).expect(410);
    expect(res.body.error.message).toBe('This link has expired. Ask for a new one.');
    expect(await User.count({ where: { email: inv.email } })).toBe(0);

    const user = await buildUser();
    await agent.post('/api/password-resets').set('X-CSRF-Token', csrf).send({ email: user.email }).expect(202);
    const reset = tokenOf(await smtp.waitFor((m) => m.to.includes(user.email)), '/reset/');
    await request(trimout.app).get(`/api/invitations/${reset}`).expect(404);
    await agent.post(`/api/invitations/${reset}`).set('X-CSRF-Token', csrf).send({ name: 'X', password: NEW_PASSWORD }).expect(404);
  });

  it('answers 400 for a malformed token and 403 without the CSRF token', async () => {
    const bad = await request(trimout.app).get('/api/invitations/short').expect(400);
    expect(bad.body.error.message).toMatch(/not complete/);
    const inv = await invited();
    await request(trimout.app).post(`/api/invitations/${inv.token}`).send({ name: 'X', password: NEW_PASSWORD }).expect(403);
  });

  it('a second invitation to the same address replaces the first', async () => {
    const inv = await invited();
    const again = await invite(inv.gc, inv.job.id, { email: inv.email, role: 'subcontractor', companyId: inv.mech.id });
    expect(again.status).toBe(201);
    await request(trimout.app).get(`/api/invitations/${inv.token}`).expect(410);
  });
});
