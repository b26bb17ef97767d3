/**
 * Mail paths in the browser, against the real server and the test's own fake SMTP server:
 * - a GC manager invites a subcontractor; the invitee opens the mailed link on a phone, sets a
 *   password and lands signed in on the job;
 * - a GC new to Trimout signs up on a wide screen, confirms from the mail and lands on an empty
 *   job list with "Create your first job";
 * - "Forgot your password?" through to a new password;
 * - the caught-mail page.
 */
import { JobCompany } from '../../server/models';
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
