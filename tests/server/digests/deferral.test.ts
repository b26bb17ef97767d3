/**
 * Every e-mail ends with the deferral: Trimout records what people observed, it does not certify,
 * and the manufacturer's installation manual, local codes and licensed practice govern (the product
 * brief's "Safety and authority"). Rendering only: no database, no mail server.
 */
import type { DigestContent, DigestFinding } from '../../../server/digests/content';
import { renderCriticalAssignment, renderDigest } from '../../../server/digests/render';
import { confirmationMail, invitationMail, passwordResetMail, signUpExistsMail } from '../../../server/mail/messages';
import type { MailMessage } from '../../../server/mail/outbox';
import { MAIL_DEFERRAL } from '../../../shared/deferral';

const origin = 'https://punch.example.org';
const schedule = { frequency: 'daily' as const, weekday: 1, hour: 7, timeZone: 'UTC' };
const user = { id: 'u1', name: 'Sam Sub', email: 'sam@example.org' };

function emptyDigest(period: 'daily' | 'weekly'): DigestContent {
  return { user, company: { id: 'c1', name: 'Coldline Mechanical' }, since: new Date('2026-12-01T07:00:00Z'), until: new Date('2026-12-02T07:00:00Z'), period, subcontractorJobs: [], managerJobs: [] };
}

const finding: DigestFinding = {
  findingId: 'f1',
  jobId: 'j1',
  number: 12,
  code: 'EL-01',
  title: 'Disconnect out of sight',
  severity: 'critical',
  status: 'open',
  dueOn: '2026-12-03',
  overdue: false,
  levelName: 'Level 2',
  spaceName: null,
  unitTag: 'FCU-2-01',
  loggedAt: new Date('2026-12-01T10:00:00Z'),
  isNew: true,
  returnCount: 0,
  returnReason: null,
  path: '/jobs/j1/findings/f1',
};

const mails: Array<[string, MailMessage]> = [
  ['daily digest', renderDigest(emptyDigest('daily'), { origin, timeZone: 'UTC', unsubscribeToken: 't', trigger: 'scheduled', schedule })],
  ['weekly digest sent now', renderDigest(emptyDigest('weekly'), { origin, timeZone: 'UTC', unsubscribeToken: 't', trigger: 'now', schedule: { ...schedule, frequency: 'weekly' } })],
  [
    'critical finding mail',
    renderCriticalAssignment(
      { user: { name: user.name, email: user.email }, jobName: 'Cinder Lane Commons', companyName: 'Coldline Mechanical', finding, how: 'logged' },
      { origin, unsubscribeToken: 't' },
    ),
  ],
  ['sign-up confirmation', confirmationMail({ address: 'a@example.org' }, `${origin}/confirm?t=1`)],
  ['sign-up with a known address', signUpExistsMail({ name: 'A', address: 'a@example.org' }, `${origin}/sign-in`, `${origin}/reset`)],
  [
    'invitation',
    invitationMail({ address: 'a@example.org' }, { jobName: 'Cinder Lane Commons', role: 'inspector', companyName: 'GC', inviterName: 'Gina', existingAccount: false }, `${origin}/invite?t=1`),
  ],
  ['password reset', passwordResetMail({ address: 'a@example.org' }, `${origin}/reset?t=1`)],
];

it('the deferral names the manual, local codes and licensed practice, and says Trimout does not certify', () => {
  expect(MAIL_DEFERRAL).toBe(
    "Trimout records what people observed; it does not certify an installation. The manufacturer's installation manual, local codes and licensed practice govern.",
  );
});

it.each(mails)('%s: the plain text ends with the deferral, and the HTML carries it in its footer', (_name, mail) => {
  expect(mail.text.trimEnd().endsWith(MAIL_DEFERRAL)).toBe(true);
  const html = mail.html ?? '';
  const escaped = MAIL_DEFERRAL.replace(/'/g, '&#39;');
  expect(html.includes(escaped) || html.includes(MAIL_DEFERRAL.replace(/'/g, '&#x27;'))).toBe(true);
  // The HTML's last paragraph is the footer that holds it.
  expect(html.lastIndexOf('licensed practice govern')).toBeGreaterThan(html.lastIndexOf('<p'));
});
