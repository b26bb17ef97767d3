/**
 * The digest in the browser: the demo subcontractor signs in on a phone, opens the mail
 * preferences from the header, presses "Send me a digest now"; the test reads the caught mail
 * from the fake SMTP server, renders its HTML part in the browser (phone and wide), follows its
 * finding link to the finding, then follows the unsubscribe link without a session and confirms;
 * the preferences then show the digest off. Screenshots go to .artifacts/screenshots.
 */
import { QueryTypes } from 'sequelize';
import { User } from '../../server/models';
import { DEMO_PASSWORD, seedDemo } from '../../server/seed/demo';
import { PHONE, WIDE, startBrowserHarness, type BrowserHarness } from '../support/browser';
import { linkTo, startFakeSmtp, type FakeSmtp } from '../support/mail';
import { demoJob } from '../support/demo';

jest.setTimeout(240_000);

let h: BrowserHarness;
let smtp: FakeSmtp;
const EMAIL = 'mechanical@demo.trimout.example';

beforeAll(async () => {
  smtp = await startFakeSmtp();
  h = await startBrowserHarness({ smtp });
  await seedDemo(h.db);
  // A re-run starts from the defaults (an earlier run unsubscribed).
  const user = (await User.findOne({ where: { email: EMAIL } }))!;
  await h.db.sequelize.query(`DELETE FROM user_preferences WHERE user_id = $1`, { bind: [user.id], type: QueryTypes.DELETE });
});
afterAll(async () => {
  await h?.close();
  await smtp?.close();
});

it('send me a digest now → caught mail → finding link → unsubscribe link → preferences show off', async () => {
  const job = (await demoJob());
  const { page, problems } = await h.newPage(PHONE);
  const fail = async (name: string, err: unknown) => {
    await h.screenshot(page, `digest-${name}-failed`);
    throw new Error(`${String(err)}\n${problems.join('\n')}`);
  };

  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(EMAIL);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('job-list').waitFor();

  // The header's "Mail" link opens the preferences: the subcontractor's default is a daily digest at 07:00.
  await page.getByTestId('header-preferences').click();
  await page.getByTestId('preferences-form').waitFor().catch((e: unknown) => fail('preferences', e));
  expect(await page.getByTestId('preferences-frequency-daily').getAttribute('aria-checked')).toBe('true');
  await page.getByTestId('digest-now-mailbox-note').waitFor();
  await h.screenshot(page, 'digest-preferences-phone');

  await page.getByTestId('digest-now-send').click();
  await page.getByTestId('digest-now-sent').waitFor().catch((e: unknown) => fail('send-now', e));
  await h.screenshot(page, 'digest-sent-phone');

  // The caught mail, read from the fake SMTP server.
  const mail = await smtp.waitFor((m) => m.to.includes(EMAIL) && /digest/i.test(m.subject));
  expect(mail.subject).toMatch(/^Daily Trimout digest: \d+ unresolved, \d+ overdue$/);

  // Its HTML part, rendered in the browser (no network: scripts off, nothing remote in it).
  for (const [size, name] of [
    [PHONE, 'phone'],
    [WIDE, 'wide'],
  ] as const) {
    const view = await h.newPage(size);
    await view.page.setContent(mail.html, { waitUntil: 'load' });
    expect(await view.page.locator('img, script').count()).toBe(0);
    await h.screenshot(view.page, `digest-mail-html-${name}`);
    await view.context.close().catch(() => undefined);
  }

  // Follow the first finding link (the first overdue finding) to the finding, signed in.
  const findingLink = mail.links.find((l) => /\/jobs\/[^/]+\/findings\/[0-9a-f-]{36}$/.test(new URL(l).pathname))!;
  expect(findingLink).toBeDefined();
  expect(new URL(findingLink).pathname.startsWith(`/jobs/${job.id}/findings/`)).toBe(true);
  const numberInMail = /#(\d+) /.exec(mail.text.split('Overdue (')[1]!)![1]!;
  await page.goto(findingLink);
  await page.getByTestId('finding-detail-screen').waitFor().catch((e: unknown) => fail('finding', e));
  await page.getByText(`#${numberInMail}`, { exact: false }).first().waitFor();
  await h.screenshot(page, 'digest-finding-from-mail-phone');

  // The unsubscribe link works without a session: a fresh browser context, wide.
  const unsubscribe = linkTo(mail, '/unsubscribe/');
  const anon = await h.newPage(WIDE);
  await anon.page.goto(unsubscribe);
  await anon.page.getByTestId('unsubscribe-confirm').waitFor().catch(async (e: unknown) => {
    await h.screenshot(anon.page, 'digest-unsubscribe-failed');
    throw new Error(`${String(e)}\n${anon.problems.join('\n')}`);
  });
  await anon.page.getByText('Your Trimout digest mails (daily or weekly)').waitFor();
  await h.screenshot(anon.page, 'digest-unsubscribe-wide');
  await anon.page.getByTestId('unsubscribe-confirm').click();
  await anon.page.getByTestId('unsubscribe-done').waitFor();
  await h.screenshot(anon.page, 'digest-unsubscribed-wide');

  // Back in the signed-in app: the digest is off.
  await page.goto(`${h.baseUrl}/preferences`);
  await page.getByTestId('preferences-form').waitFor();
  expect(await page.getByTestId('preferences-frequency-off').getAttribute('aria-checked')).toBe('true');
  await page.getByTestId('preferences-digest-off').waitFor();
  await h.screenshot(page, 'digest-preferences-off-phone');
  const wide = await h.newPage(WIDE);
  await wide.page.goto(`${h.baseUrl}/sign-in`);
  await wide.page.getByTestId('sign-in-email').fill(EMAIL);
  await wide.page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await wide.page.getByTestId('sign-in-submit').click();
  await wide.page.getByTestId('job-list').waitFor();
  await wide.page.goto(`${h.baseUrl}/preferences`);
  await wide.page.getByTestId('preferences-digest-off').waitFor();
  await h.screenshot(wide.page, 'digest-preferences-off-wide');

  // And back on, weekly on Fridays at 06:00, through the form.
  await wide.page.getByTestId('preferences-frequency-weekly').click();
  await wide.page.getByTestId('preferences-weekday').selectOption('5');
  await wide.page.getByTestId('preferences-hour').selectOption('6');
  await wide.page.getByTestId('preferences-save').click();
  await wide.page.getByTestId('preferences-saved').waitFor().catch(async (e: unknown) => {
    await h.screenshot(wide.page, 'digest-preferences-save-failed');
    throw new Error(`${String(e)}\n${wide.problems.join('\n')}`);
  });
  await h.screenshot(wide.page, 'digest-preferences-weekly-wide');
  const user = (await User.findOne({ where: { email: EMAIL } }))!;
  const [row] = await h.db.sequelize.query<{ digest_frequency: string; digest_weekday: number; digest_hour: number; time_zone: string | null }>(
    `SELECT digest_frequency, digest_weekday, digest_hour, time_zone FROM user_preferences WHERE user_id = $1`,
    { bind: [user.id], type: QueryTypes.SELECT },
  );
  // The time zone stays "the first job's" (NULL) because it was not changed.
  expect(row).toEqual({ digest_frequency: 'weekly', digest_weekday: 5, digest_hour: 6, time_zone: null });

  // Right after choosing weekly, "Send me a digest now" says and sends a weekly digest.
  await wide.page.getByText("Sends you this week's digest now (the last 7 days)", { exact: false }).waitFor();
  smtp.clear();
  await wide.page.getByTestId('digest-now-send').click();
  await wide.page.getByTestId('digest-now-sent').waitFor();
  const weekly = await smtp.waitFor((m) => m.to.includes(EMAIL) && /digest/i.test(m.subject));
  expect(weekly.subject).toMatch(/^Weekly Trimout digest \(Fridays\): /);
  await h.screenshot(wide.page, 'digest-now-weekly-wide');
  // The screen and the mail say the same schedule (shared/digestSchedule.ts), never daily.
  const sentence = /Your digest comes once a week, every Friday at 06:00 \(/;
  expect(await wide.page.getByTestId('preferences-schedule').textContent()).toMatch(sentence);
  await wide.page.getByTestId('preferences-schedule').scrollIntoViewIfNeeded();
  await h.screenshot(wide.page, 'digest-preferences-schedule-weekly-wide');
  expect(weekly.text).toMatch(sentence);
  expect(weekly.text.split('\n')[0]).toMatch(/^Weekly digest for .+ \(Fridays\)$/);
  expect(`${weekly.subject}\n${weekly.text}`).not.toMatch(/\bdaily\b|every day/i);
  const weeklyView = await h.newPage(WIDE);
  await weeklyView.page.setContent(weekly.html, { waitUntil: 'load' });
  await h.screenshot(weeklyView.page, 'digest-mail-html-weekly-wide');
  await weeklyView.context.close().catch(() => undefined);

  expect(problems).toEqual([]);
  expect(anon.problems).toEqual([]);
  expect(wide.problems).toEqual([]);
});
