/**
 * The account mails: sign-up confirmation, "someone tried to sign up with your address",
 * invitation to a job, password reset. Each has a plain-text and an HTML part; every value in
 * the HTML is escaped and every value in the subject is cleaned by the outbox (headerSafe).
 */
import { MAIL_DEFERRAL } from '../../shared/deferral';
import { ROLE_LABELS, type Role } from '../../shared/words';
import type { MailMessage } from './outbox';
import { escapeHtml, headerSafe } from './safe';

interface Block {
  heading: string;
  paragraphs: string[];
  action?: { label: string; url: string };
  after?: string[];
}

const FOOTER = 'Trimout: install audits and punch lists for indoor units. You get this mail because of an action on your address.';

function textPart(block: Block): string {
  const lines = [block.heading, '', ...block.paragraphs.flatMap((p) => [p, ''])];
  if (block.action) lines.push(`${block.action.label}:`, block.action.url, '');
  for (const p of block.after ?? []) lines.push(p, '');
  lines.push('--', FOOTER, MAIL_DEFERRAL);
  return lines.join('\n');
}

function htmlPart(block: Block): string {
  const p = (s: string) => `<p style="margin:0 0 14px;font-size:16px;line-height:23px;color:#1A1F1C">${escapeHtml(s)}</p>`;
  const action = block.action
    ? `<p style="margin:22px 0"><a href="${escapeHtml(block.action.url)}" style="display:inline-block;background:#1E3B34;color:#F4F1EA;text-decoration:none;font-weight:bold;padding:12px 20px;border-radius:10px">${escapeHtml(block.action.label)}</a></p>
<p style="margin:0 0 14px;font-size:13px;color:#56605A">Or paste this address into your browser: ${escapeHtml(block.action.url)}</p>`
    : '';
  return `<!doctype html>
<html><body style="margin:0;padding:24px;background:#F4F1EA;font-family:Helvetica,Arial,sans-serif">
<div style="max-width:560px;margin:0 auto;background:#FFFFFF;border:1px solid #DAD5C9;border-radius:16px;padding:24px">
<p style="margin:0 0 18px;font-size:22px;font-weight:bold;color:#1E3B34">trimout<span style="color:#E0A23B">.</span></p>
<h1 style="margin:0 0 14px;font-size:21px;color:#1A1F1C">${escapeHtml(block.heading)}</h1>
${block.paragraphs.map(p).join('\n')}
${action}
${(block.after ?? []).map(p).join('\n')}
<p style="margin:22px 0 0;font-size:12px;color:#8A928D">${escapeHtml(FOOTER)}<br>${escapeHtml(MAIL_DEFERRAL)}</p>
</div></body></html>`;
}

function message(to: MailMessage['to'], subject: string, block: Block): MailMessage {
  return { to, subject: headerSafe(subject), text: textPart(block), html: htmlPart(block) };
}

/**
 * To an address nobody has confirmed yet: whoever signed up may not be its owner, so the mail
 * carries no word they chose (no name, no company), only our own text and the link.
 */
export function confirmationMail(to: { address: string }, link: string): MailMessage {
  return message(to, 'Confirm your e-mail address for Trimout', {
    heading: 'Confirm your e-mail address',
    paragraphs: [
      'Someone (perhaps you) signed up to Trimout with this e-mail address. Confirm that it is yours to finish setting up the account.',
      'Confirming sets the password chosen with this sign-up and signs out any other session of the account.',
    ],
    action: { label: 'Confirm my e-mail address', url: link },
    after: ['The link works once, for 24 hours. If you did not sign up for Trimout, ignore this mail: nothing happens.'],
  });
}

export function signUpExistsMail(to: { name: string; address: string }, signInUrl: string, resetUrl: string): MailMessage {
  return message(to, 'Someone tried to sign up to Trimout with your address', {
    heading: 'You already have a Trimout account',
    paragraphs: [
      'Someone (perhaps you) tried to create a new Trimout account with this e-mail address. It already has an account, so no new one was made.',
      `Sign in at ${signInUrl}, or, if you forgot your password, reset it:`,
    ],
    action: { label: 'Reset my password', url: resetUrl },
    after: ['If this was not you, you can ignore this mail: your account has not changed.'],
  });
}

export function invitationMail(
  to: { name?: string; address: string },
  invite: { jobName: string; role: Role; companyName: string; inviterName: string; existingAccount: boolean },
  link: string,
): MailMessage {
  const role = ROLE_LABELS[invite.role].toLowerCase();
  return message(to, `${invite.inviterName} invited you to ${invite.jobName} on Trimout`, {
    heading: `You are invited to ${invite.jobName}`,
    paragraphs: [
      `${invite.inviterName} invited you to join the job ${invite.jobName} as ${role === 'gc manager' ? 'a GC manager' : `${/^[aeiou]/.test(role) ? 'an' : 'a'} ${role}`}, for ${invite.companyName}.`,
      invite.existingAccount
        ? 'You already have a Trimout account: open the link and sign in with your password to add this job to it.'
        : 'Open the link to choose your password; you are signed in straight away.',
    ],
    action: { label: 'Accept the invitation', url: link },
    after: ['The link works once, for 7 days. If you do not know this job, ignore this mail.'],
  });
}

export function passwordResetMail(to: { name?: string; address: string }, link: string): MailMessage {
  return message(to, 'Reset your Trimout password', {
    heading: 'Choose a new password',
    paragraphs: ['Someone (perhaps you) asked to reset the password of your Trimout account.'],
    action: { label: 'Choose a new password', url: link },
    after: [
      'The link works once, for 1 hour. Setting a new password signs you out everywhere else.',
      'If you did not ask for this, ignore this mail: your password stays as it is.',
    ],
  });
}
