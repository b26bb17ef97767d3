/**
 * Mail paths in the browser, against the real server and the test's own fake SMTP server:
 * - a GC manager invites a subcontractor; the invitee opens the mailed link on a phone, sets a
 *   password and lands signed in on the job;
 * - a GC new to Trimout signs up on a wide screen, confirms from the mail and lands on an empty
 *   job list with "Create your first job";
 * - "Forgot your password?" through to a new password;
 * - a GC manager on a phone pastes three people at once, fixes the line the preview marks and the
 *   line the server refuses, sees the three waiting, and sends one again (a new link; the old dies);
 * - the caught-mail page.
 */
import { QueryTypes } from 'sequelize';
import { AuthToken, JobCompany } from '../../server/models';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { addMember, buildCompany, buildJob, buildUser } from '../support/factories';
import { linkTo, startFakeSmtp, type FakeSmtp } from '../support/mail';

jest.setTimeout(120_000);

let h: BrowserHarness;
let smtp: FakeSmtp;

beforeAll(async () => {
  smtp = await startFakeSmtp();
  h = await startBrowserHarness({ smtp });
});
afterAll(async () => {
  await h?.close();
  await smtp?.close();
});

const uniq = () => Math.random().toString(36).slice(2, 8);

it('a subcontractor opens the invitation on a phone, sets a password and lands on the job', async () => {
  const gcCompany = await buildCompany({ name: 'Halvard Street Builders' });
  const job = await buildJob({ ownerCompanyId: gcCompany.id, name: 'Wrenfield Library Annex' });
  const manager = await buildUser({ companyId: gcCompany.id, name: 'Odile Marsh' });
  await addMember(job.id, manager.id, 'gc_manager');
  const mech = await buildCompany({ name: `Pinecrest Mechanical ${uniq()}` });
  await JobCompany.create({ jobId: job.id, companyId: mech.id, trades: ['mechanical'] });

  // The GC manager invites from the members screen, on a wide screen.
  const email = `sub-${uniq()}@test.trimout.example`;
  const gc = await h.newPage(WIDE);
  await gc.page.goto(`${h.baseUrl}/sign-in`);
  await gc.page.getByTestId('sign-in-email').fill(manager.email);
  await gc.page.getByTestId('sign-in-password').fill('correct horse battery staple');
  await gc.page.getByTestId('sign-in-submit').click();
  await gc.page.getByTestId('job-list').waitFor();
  await gc.page.goto(`${h.baseUrl}/jobs/${job.id}/setup/members`);
  await gc.page.getByTestId('invite-form').waitFor({ timeout: 15_000 }).catch(async (err: unknown) => {
    await h.screenshot(gc.page, 'invitation-members-failed-wide');
    throw new Error(`${String(err)}\n${gc.problems.join('\n')}`);
  });
  await gc.page.getByTestId('invitations-empty').waitFor();
  // a subcontractor without a company is refused at the form
  await gc.page.getByTestId('invite-form-email').fill(email);
  await gc.page.getByTestId('invite-form-submit').click();
  await gc.page.getByText('A subcontractor invitation needs the company they work for.').waitFor();
  await gc.page.getByTestId('invite-form-name').fill('Tavi Okafor');
  await gc.page.getByTestId('invite-form-company').selectOption(mech.id);
  await gc.page.getByTestId('invite-form-submit').click();
  await gc.page.getByTestId('invite-sent').waitFor();
  await gc.page.getByTestId('invitations-list').waitFor();
  await expect(gc.page.getByTestId('invitations-list').textContent()).resolves.toContain('Tavi Okafor');
  await h.screenshot(gc.page, 'invitation-sent-members-wide');
  expect(gc.problems).toEqual([]);
  await gc.page.context().close();

  const mail = await smtp.waitFor((m) => m.to.includes(email));
  expect(mail.subject).toBe('Odile Marsh invited you to Wrenfield Library Annex on Trimout');
  const link = linkTo(mail, '/invite/');
  expect(link.startsWith(h.baseUrl)).toBe(true);

  const { page, problems } = await h.newPage(PHONE);
  await page.goto(link);
  await page.getByTestId('invite-summary').waitFor();
  await expect(page.getByRole('heading', { name: 'Join Wrenfield Library Annex' }).count()).resolves.toBe(1);
  await expect(page.getByTestId('invite-role').textContent()).resolves.toBe('Subcontractor');
  await expect(page.getByTestId('invite-name').inputValue()).resolves.toBe('Tavi Okafor');
  await h.screenshot(page, 'invitation-open-phone');

  // a too-short password is refused at the form, by the shared schema
  await page.getByTestId('invite-password').fill('short');
  await page.getByTestId('invite-submit').click();
  await page.getByTestId('invite-password-error').waitFor();
  await h.screenshot(page, 'invitation-short-password-phone');

  await page.getByTestId('invite-password').fill('pinecrest crew password');
  await page.getByTestId('invite-submit').click();
  await page.waitForURL(`**/jobs/${job.id}`);
  await page.getByTestId('job-name').waitFor();
  await expect(page.getByTestId('job-name').textContent()).resolves.toBe('Wrenfield Library Annex');
  await expect(page.getByTestId('header-user-name').textContent()).resolves.toBe('Tavi Okafor');
  await h.screenshot(page, 'invitation-accepted-job-phone');

  // the link is used up
  await page.goto(link);
  await page.getByTestId('invite-error').waitFor();
  await expect(page.getByTestId('invite-error').textContent()).resolves.toMatch(/already used/);
  await h.screenshot(page, 'invitation-used-phone');
  // the browser logs the expected 410 of the used link; nothing else may go wrong
  expect(problems.filter((p) => !/status of 410/.test(p))).toEqual([]);
  await page.context().close();
});

it('a GC manager on a phone pastes three people, fixes the wrong lines, sends them at once and sends one again', async () => {
  const gcCompany = await buildCompany({ name: `Kestrel Row Builders ${uniq()}` });
  const job = await buildJob({ ownerCompanyId: gcCompany.id, name: 'Marlow Quay Offices' });
  const manager = await buildUser({ companyId: gcCompany.id, name: 'Odile Marsh' });
  await addMember(job.id, manager.id, 'gc_manager');
  const inspectorAlready = await buildUser({ companyId: gcCompany.id, name: 'Bram Oduya' });
  await addMember(job.id, inspectorAlready.id, 'inspector');
  const mechName = `Pinecrest Mechanical ${uniq()}`;
  const mech = await buildCompany({ name: mechName });
  await JobCompany.create({ jobId: job.id, companyId: mech.id, trades: ['mechanical'] });
  const ana = `ana-${uniq()}@test.trimout.example`;
  const lio = `lio-${uniq()}@test.trimout.example`;
  const kai = `kai-${uniq()}@test.trimout.example`;

  const { page, problems } = await h.newPage(PHONE);
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(manager.email);
  await page.getByTestId('sign-in-password').fill('correct horse battery staple');
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('job-list').waitFor();
  await page.goto(`${h.baseUrl}/jobs/${job.id}/setup/members`);
  await page.getByTestId('invite-paste').waitFor({ timeout: 15_000 });
  await page.getByTestId('invitations-empty').waitFor();

  // Line 2 names the company short of its listed name: the preview marks that line before anything is sent.
  const box = page.getByTestId('invite-paste-input');
  await box.fill(`${ana}\tSubcontractor\t${mechName.toLowerCase()}\n${lio}, sub, Pinecrest Mech\n${inspectorAlready.email}, inspector`);
  await page.getByTestId('invite-paste-line-2-problem').waitFor();
  await expect(page.getByTestId('invite-paste-line-2-problem').textContent()).resolves.toBe(
    'Company: No company named "Pinecrest Mech" on this job. Check the spelling, or add it on the Companies page first.',
  );
  await expect(page.getByTestId('invite-paste-line-1').textContent()).resolves.toContain(`Subcontractor · ${mechName}`);
  await page.getByTestId('invite-paste-submit').click();
  await page.getByTestId('invite-paste-error').waitFor();
  await page.getByTestId('invite-paste-line-2').scrollIntoViewIfNeeded();
  await h.screenshot(page, 'invite-paste-line-problem-phone');
  await expect(page.getByTestId('invite-paste-line-1-problem').count()).resolves.toBe(0);

  // Fixed; line 3 is someone already on the job, which only the server knows: nobody is invited and line 3 says why.
  await box.fill(`${ana}\tSubcontractor\t${mechName.toLowerCase()}\n${lio}, sub, ${mechName}\n${inspectorAlready.email}, inspector`);
  await expect(page.getByTestId('invite-paste-line-2-problem').count()).resolves.toBe(0);
  await page.getByTestId('invite-paste-submit').click();
  await page.getByTestId('invite-paste-line-3-problem').waitFor();
  await expect(page.getByTestId('invite-paste-line-3-problem').textContent()).resolves.toBe('E-mail: That person is already a member of this job.');
  await page.getByText(`Line 3 (${inspectorAlready.email}): That person is already a member of this job. Nobody was invited.`).first().waitFor();
  await page.getByTestId('invite-paste-line-3').scrollIntoViewIfNeeded();
  await h.screenshot(page, 'invite-paste-refused-line-phone');
  const countPending = async () =>
    (
      await AuthToken.sequelize!.query<{ n: string }>(
        `SELECT count(*) AS n FROM auth_tokens WHERE purpose = 'invitation' AND job_id = :jobId AND used_at IS NULL AND revoked_at IS NULL`,
        { replacements: { jobId: job.id }, type: QueryTypes.SELECT },
      )
    )[0]!.n;
  await expect(countPending()).resolves.toBe('0');

  await box.fill(`${ana}\tSubcontractor\t${mechName.toLowerCase()}\n${lio}, sub, ${mechName}\n${kai}, inspector`);
  await expect(page.getByTestId('invite-paste-line-3-problem').count()).resolves.toBe(0);
  await page.getByTestId('invite-paste-submit').click();
  await page.getByTestId('invite-paste-sent').waitFor();
  await expect(page.getByTestId('invite-paste-sent').textContent()).resolves.toBe('Invitations sent to 3 people.');
  const list = page.getByTestId('invitations-list');
  await list.waitFor();
  await expect(list.locator('[data-testid^="invitation-row-"]').count()).resolves.toBe(3);
  await h.screenshot(page, 'invite-paste-sent-phone');

  const rows = await AuthToken.sequelize!.query<{ id: string; email: string; role: string; company_id: string; invited_by: string }>(
    `SELECT id, email, role, company_id, invited_by FROM auth_tokens
      WHERE purpose = 'invitation' AND job_id = :jobId AND used_at IS NULL AND revoked_at IS NULL ORDER BY email`,
    { replacements: { jobId: job.id }, type: QueryTypes.SELECT },
  );
  expect(rows.map(({ email, role, company_id, invited_by }) => ({ email, role, company_id, invited_by }))).toEqual(
    [
      { email: ana, role: 'subcontractor', company_id: mech.id, invited_by: manager.id },
      { email: kai, role: 'inspector', company_id: gcCompany.id, invited_by: manager.id },
      { email: lio, role: 'subcontractor', company_id: mech.id, invited_by: manager.id },
    ].sort((a, b) => a.email.localeCompare(b.email)),
  );
  const firstMail = await smtp.waitFor((m) => m.to.includes(lio));
  const firstLink = linkTo(firstMail, '/invite/');

  // Send Lio's again: plain words, a new row and link, the old row revoked.
  const lioRow = rows.find((r) => r.email === lio)!;
  await page.getByTestId(`invitation-resend-${lioRow.id}`).click();
  await page.getByTestId('invitation-resend-result').waitFor();
  await expect(page.getByTestId('invitation-resend-result').textContent()).resolves.toBe(`A new link went to ${lio}; the old link no longer works.`);
  await page.getByTestId(`invitation-row-${lioRow.id}`).waitFor({ state: 'detached' });
  await expect(list.locator('[data-testid^="invitation-row-"]').count()).resolves.toBe(3);
  await h.screenshot(page, 'invite-resent-phone');
  const lioRows = await AuthToken.sequelize!.query<{ id: string; revoked: boolean }>(
    `SELECT id, revoked_at IS NOT NULL AS revoked FROM auth_tokens WHERE purpose = 'invitation' AND job_id = :jobId AND email = :email ORDER BY created_at`,
    { replacements: { jobId: job.id, email: lio }, type: QueryTypes.SELECT },
  );
  expect(lioRows.map((r) => r.revoked)).toEqual([true, false]);
  expect(lioRows[0]!.id).toBe(lioRow.id);
  await expect(countPending()).resolves.toBe('3');
  const again = await smtp.waitFor((m) => m.to.includes(lio) && linkTo(m, '/invite/') !== firstLink);
  expect(linkTo(again, '/invite/')).not.toBe(firstLink);

  // Kai's invitation is withdrawn meanwhile (another manager's screen): Send again says so and the list drops it.
  const kaiRow = rows.find((r) => r.email === kai)!;
  await AuthToken.sequelize!.query(`UPDATE auth_tokens SET revoked_at = now() WHERE id = :id`, { replacements: { id: kaiRow.id } });
  await page.getByTestId(`invitation-resend-${kaiRow.id}`).click();
  await page.getByText('That invitation was withdrawn or has expired: invite the person again. The list shows the invitations still waiting.').waitFor();
  await page.getByTestId(`invitation-row-${kaiRow.id}`).waitFor({ state: 'detached' });
  await expect(list.locator('[data-testid^="invitation-row-"]').count()).resolves.toBe(2);
  await expect(countPending()).resolves.toBe('2');

  // The same on a wide screen, for the look of it.
  await page.setViewportSize(WIDE);
  await box.fill(`${ana}, inspector\nnot-an-address, GC manager, ${mechName}`);
  await page.getByTestId('invite-paste-line-2-problem').waitFor();
  await h.screenshot(page, 'invite-paste-preview-wide');
  // the refused paste and line 3's 409 are logged by the browser; nothing else may go wrong
  expect(problems.filter((p) => !/status of 409/.test(p))).toEqual([]);
  await page.context().close();
});

it('a GC new to Trimout signs up, confirms from the mail and lands on an empty job list', async () => {
  const { page, problems } = await h.newPage(WIDE);
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-sign-up').click();
  await page.waitForURL('**/sign-up');
  await page.getByTestId('sign-up-submit').click();
  await page.getByTestId('sign-up-company-error').waitFor();
  await h.screenshot(page, 'sign-up-empty-wide');

  const email = `founder-${uniq()}@test.trimout.example`;
  await page.getByTestId('sign-up-company').fill('Bramblegate Construction');
  await page.getByTestId('sign-up-name').fill('Sefa Lindqvist');
  await page.getByTestId('sign-up-email').fill(email);
  await page.getByTestId('sign-up-password').fill('bramblegate first job');
  await page.getByTestId('sign-up-submit').click();
  await page.getByTestId('sign-up-done').waitFor();
  await h.screenshot(page, 'sign-up-check-mail-wide');

  const mail = await smtp.waitFor((m) => m.to.includes(email));
  await page.goto(linkTo(mail, '/confirm/'));
  await page.getByTestId('job-list-screen').waitFor();
  await page.getByTestId('create-first-job').waitFor();
  await expect(page.getByTestId('header-user-name').textContent()).resolves.toBe('Sefa Lindqvist');
  expect(new URL(page.url()).pathname).toBe('/');
  await h.screenshot(page, 'sign-up-confirmed-empty-jobs-wide');
  await page.getByTestId('create-first-job').click();
  await page.waitForURL('**/jobs/new');
  expect(problems).toEqual([]);
  await page.context().close();
});

it('"Forgot your password?" sends a link that sets a new password and signs in', async () => {
  const user = await buildUser({ name: 'Ines Varga' });
  const { page, problems } = await h.newPage(PHONE);
  await page.goto(`${h.baseUrl}/sign-in`);
  await h.screenshot(page, 'sign-in-with-links-phone');
  await page.getByTestId('sign-in-forgot').click();
  await page.waitForURL('**/forgot-password');
  await page.getByTestId('forgot-email').fill(user.email);
  await page.getByTestId('forgot-submit').click();
  await page.getByTestId('forgot-done').waitFor();
  await h.screenshot(page, 'forgot-password-sent-phone');

  const mail = await smtp.waitFor((m) => m.to.includes(user.email));
  await page.goto(linkTo(mail, '/reset/'));
  await page.getByTestId('reset-password').fill('a new password for ines');
  await h.screenshot(page, 'reset-password-phone');
  await page.getByTestId('reset-submit').click();
  await page.getByTestId('job-list-screen').waitFor();
  await expect(page.getByTestId('header-user-name').textContent()).resolves.toBe('Ines Varga');
  expect(problems).toEqual([]);
  await page.context().close();
});

it('the caught-mail page lists the mails with their links', async () => {
  const { page, problems } = await h.newPage(WIDE);
  await page.goto(`${h.baseUrl}/mailbox`);
  await page.getByTestId('mailbox-list').waitFor();
  const subjects = await page.getByTestId('mail-subject').allTextContents();
  expect(subjects).toContain('Reset your Trimout password');
  expect(subjects).toContain('Confirm your e-mail address for Trimout');
  await h.screenshot(page, 'mailbox-wide');
  expect(problems).toEqual([]);
  await page.context().close();
});
