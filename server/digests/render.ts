/**
 * Digest and event mails: a plain-text part and an HTML part built from DigestContent. Every value
 * in the HTML goes through escapeHtml (attributes included); links are built from encoded path parts
 * on the public origin. No remote images, no scripts, inline styles only: our own simple design.
 */
import { MAIL_DEFERRAL } from '../../shared/deferral';
import { digestName, digestScheduleSentence, type DigestSchedule } from '../../shared/digestSchedule';
import { SEVERITY_LABELS } from '../../shared/words';
import { escapeHtml, headerSafe } from '../mail/safe';
import type { MailMessage } from '../mail/outbox';
import type { DigestContent, DigestFinding, LevelTestsWaiting, ManagerJobDigest, SubcontractorJobDigest } from './content';

/** Rows listed per section; the rest are counted with a link to the findings list. */
export const SECTION_LIMIT = 25;

export interface RenderOptions {
  /** Public origin, e.g. https://punch.example.org (no trailing slash). */
  origin: string;
  /** The recipient's time zone, for the dates in the mail. */
  timeZone: string;
  /** Signed token for the unsubscribe link and headers. */
  unsubscribeToken: string;
  /** "Sent because you asked" (the button) or the schedule. */
  trigger: 'scheduled' | 'now';
  /** The recipient's saved schedule: named in the subject, the first line and the footer. */
  schedule: DigestSchedule;
}

const COLORS = { ink: '#1A1F1C', muted: '#56605A', line: '#DAD5C9', paper: '#F4F1EA', brand: '#1E3B34', accent: '#E0A23B', late: '#9C2B1F', ok: '#2F6B4F' };

export function formatWhen(date: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hour12: false }).format(date);
}

function signed(n: number): string {
  return n > 0 ? `+${n}` : n < 0 ? `−${Math.abs(n)}` : '±0';
}

function place(f: DigestFinding): string {
  return [f.levelName, f.spaceName, f.unitTag].filter(Boolean).join(' · ');
}

function statusWords(f: DigestFinding): string {
  return f.status === 'fix_submitted' ? 'fix submitted' : 'open';
}

export function unsubscribeUrls(origin: string, token: string): { page: string; oneClick: string } {
  const t = encodeURIComponent(token);
  return { page: `${origin}/unsubscribe/${t}`, oneClick: `${origin}/api/unsubscribe/${t}` };
}

/** The job's levels board in the app. */
export function boardPath(jobId: string): string {
  return `/jobs/${encodeURIComponent(jobId)}/board`;
}

// ---------------------------------------------------------------------------------------------
// Text

function textFinding(f: DigestFinding, origin: string): string[] {
  const lines = [
    `  #${f.number} ${f.code} ${f.title} (${SEVERITY_LABELS[f.severity].toLowerCase()}, ${statusWords(f)}, due ${f.dueOn}${f.overdue ? ', OVERDUE' : ''}${f.isNew ? ', new' : ''})`,
    `    ${place(f)}`,
  ];
  if (f.returnReason !== null) lines.push(`    Returned${f.returnCount > 1 ? ` ${f.returnCount} times` : ''}: ${f.returnReason}`);
  lines.push(`    ${origin}${f.path}`);
  return lines;
}

function textSection(title: string, items: DigestFinding[], origin: string, listPath: string): string[] {
  if (items.length === 0) return [];
  const lines = [`${title} (${items.length})`];
  for (const f of items.slice(0, SECTION_LIMIT)) lines.push(...textFinding(f, origin));
  if (items.length > SECTION_LIMIT) lines.push(`  … and ${items.length - SECTION_LIMIT} more: ${origin}${listPath}`);
  lines.push('');
  return lines;
}

function textSubJob(job: SubcontractorJobDigest, origin: string): string[] {
  const list = `/jobs/${encodeURIComponent(job.jobId)}/findings`;
  // The company is named: on different jobs one person may work for different companies.
  const lines = [`== ${job.jobName} ==`, `For ${job.company.name}: ${job.unresolved} unresolved, ${job.overdue.length} overdue (today is ${job.today}).`, ''];
  if (job.unresolved === 0) lines.push(`Nothing waiting on ${job.company.name}. Well done.`, '');
  lines.push(
    ...textSection('Overdue', job.overdue, origin, list),
    ...textSection('Returned after re-inspection', job.returned, origin, list),
    ...textSection('New since the last digest', job.fresh, origin, list),
    ...textSection('Still unresolved', job.rest, origin, list),
  );
  return lines;
}

/** "2 not on record, 1 failed, 1 waiting for a witness" (the parts that are not zero). */
export function testsWaitingWords(t: LevelTestsWaiting): string {
  return [
    t.missing ? `${t.missing} not on record` : null,
    t.failed ? `${t.failed} failed` : null,
    t.awaitingWitness ? `${t.awaitingWitness} waiting for a witness` : null,
  ]
    .filter(Boolean)
    .join(', ');
}

function textManagerJob(job: ManagerJobDigest, origin: string, periodWord: string): string[] {
  const lines = [`== ${job.jobName} ==`, `${job.totals.now} unresolved (${signed(job.totals.change)} since ${periodWord}).`, '', 'Unresolved per level:'];
  if (job.levels.length === 0) lines.push('  no levels yet');
  for (const l of job.levels) lines.push(`  ${l.name}: ${l.now} (${signed(l.change)})`);
  if (job.testsWaiting.length > 0) {
    lines.push('', 'Ceilings waiting for test records:');
    for (const t of job.testsWaiting) lines.push(`  ${t.name}: ${testsWaitingWords(t)}`);
  }
  lines.push('', 'Overdue per company:');
  if (job.overdueByCompany.length === 0) lines.push('  none');
  for (const c of job.overdueByCompany) lines.push(`  ${c.name}: ${c.overdue}`);
  lines.push('', 'New recurring defects:');
  if (job.newRecurring.length === 0) lines.push('  none');
  for (const r of job.newRecurring) lines.push(`  ${r.code} ${r.title}: on ${r.unitCount} units`);
  lines.push('', `Levels board: ${origin}${boardPath(job.jobId)}`, '');
  return lines;
}

// ---------------------------------------------------------------------------------------------
// HTML

const e = escapeHtml;

function htmlFinding(f: DigestFinding, origin: string): string {
  const url = `${origin}${f.path}`;
  const badges = [
    f.overdue ? `<span style="color:${COLORS.late};font-weight:bold">overdue</span>` : '',
    f.isNew ? `<span style="color:${COLORS.brand};font-weight:bold">new</span>` : '',
  ]
    .filter(Boolean)
    .join(' · ');
  const reason =
    f.returnReason !== null
      ? `<div style="margin-top:4px;font-size:14px;color:${COLORS.ink}">Returned${f.returnCount > 1 ? ` ${f.returnCount} times` : ''}: ${e(f.returnReason)}</div>`
      : '';
  return `<tr><td style="padding:10px 0;border-top:1px solid ${COLORS.line}">
<a href="${e(url)}" style="color:${COLORS.brand};font-weight:bold;text-decoration:underline">#${f.number} ${e(f.code)} ${e(f.title)}</a>
<div style="font-size:14px;color:${COLORS.muted}">${e(SEVERITY_LABELS[f.severity])} · ${e(statusWords(f))} · due ${e(f.dueOn)}${badges ? ` · ${badges}` : ''}</div>
<div style="font-size:14px;color:${COLORS.muted}">${e(place(f))}</div>${reason}
</td></tr>`;
}

function htmlSection(title: string, items: DigestFinding[], origin: string, listPath: string): string {
  if (items.length === 0) return '';
  const more =
    items.length > SECTION_LIMIT
      ? `<tr><td style="padding:10px 0;border-top:1px solid ${COLORS.line}"><a href="${e(origin + listPath)}" style="color:${COLORS.brand}">… and ${items.length - SECTION_LIMIT} more</a></td></tr>`
      : '';
  return `<h3 style="margin:18px 0 4px;font-size:16px;color:${COLORS.ink}">${e(title)} (${items.length})</h3>
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="border-collapse:collapse">${items.slice(0, SECTION_LIMIT).map((f) => htmlFinding(f, origin)).join('\n')}${more}</table>`;
}

function htmlSubJob(job: SubcontractorJobDigest, origin: string): string {
  const list = `/jobs/${encodeURIComponent(job.jobId)}/findings`;
  const empty = job.unresolved === 0 ? `<p style="margin:8px 0;color:${COLORS.ok}">Nothing waiting on ${e(job.company.name)}. Well done.</p>` : '';
  return `<h2 style="margin:24px 0 4px;font-size:19px;color:${COLORS.ink}">${e(job.jobName)}</h2>
<p style="margin:0 0 8px;font-size:14px;color:${COLORS.muted}">For ${e(job.company.name)}: ${job.unresolved} unresolved · <span style="color:${job.overdue.length ? COLORS.late : COLORS.muted}">${job.overdue.length} overdue</span> · today is ${e(job.today)}</p>
${empty}${htmlSection('Overdue', job.overdue, origin, list)}
${htmlSection('Returned after re-inspection', job.returned, origin, list)}
${htmlSection('New since the last digest', job.fresh, origin, list)}
${htmlSection('Still unresolved', job.rest, origin, list)}`;
}

function cell(content: string, align: 'left' | 'right' = 'left', bold = false): string {
  return `<td style="padding:6px 4px;border-top:1px solid ${COLORS.line};text-align:${align};${bold ? 'font-weight:bold;' : ''}font-size:14px;color:${COLORS.ink}">${content}</td>`;
}

function htmlManagerJob(job: ManagerJobDigest, origin: string, periodWord: string): string {
  const levelRows = job.levels
    .map((l) => `<tr>${cell(e(l.name))}${cell(String(l.now), 'right')}${cell(e(signed(l.change)), 'right')}</tr>`)
    .join('\n');
  const totals = `<tr>${cell('All levels', 'left', true)}${cell(String(job.totals.now), 'right', true)}${cell(e(signed(job.totals.change)), 'right', true)}</tr>`;
  const companies = job.overdueByCompany.length
    ? job.overdueByCompany.map((c) => `<tr>${cell(e(c.name))}${cell(String(c.overdue), 'right')}</tr>`).join('\n')
    : `<tr>${cell('None overdue.')}</tr>`;
  const tests = job.testsWaiting.length
    ? `<h3 style="margin:16px 0 4px;font-size:16px;color:${COLORS.ink}">Ceilings waiting for test records</h3>
<ul style="margin:0;padding-left:20px;font-size:14px;color:${COLORS.ink}">${job.testsWaiting.map((t) => `<li style="margin:0 0 4px">${e(t.name)}: ${e(testsWaitingWords(t))}</li>`).join('\n')}</ul>\n`
    : '';
  const recurring = job.newRecurring.length
    ? job.newRecurring.map((r) => `<li style="margin:0 0 4px">${e(r.code)} ${e(r.title)}: on ${r.unitCount} units</li>`).join('\n')
    : '<li style="margin:0 0 4px">None.</li>';
  return `<h2 style="margin:24px 0 4px;font-size:19px;color:${COLORS.ink}">${e(job.jobName)}</h2>
<p style="margin:0 0 8px;font-size:14px;color:${COLORS.muted}">${job.totals.now} unresolved (${e(signed(job.totals.change))} since ${e(periodWord)}) · today is ${e(job.today)}</p>
<h3 style="margin:16px 0 4px;font-size:16px;color:${COLORS.ink}">Unresolved per level</h3>
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="border-collapse:collapse">
<tr><td style="font-size:12px;color:${COLORS.muted};padding:4px">Level</td><td style="font-size:12px;color:${COLORS.muted};padding:4px;text-align:right">Now</td><td style="font-size:12px;color:${COLORS.muted};padding:4px;text-align:right">Change</td></tr>
${levelRows}
${totals}</table>
${tests}<h3 style="margin:16px 0 4px;font-size:16px;color:${COLORS.ink}">Overdue per company</h3>
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="border-collapse:collapse">${companies}</table>
<h3 style="margin:16px 0 4px;font-size:16px;color:${COLORS.ink}">New recurring defects</h3>
<ul style="margin:0;padding-left:20px;font-size:14px;color:${COLORS.ink}">${recurring}</ul>
<p style="margin:12px 0"><a href="${e(`${origin}${boardPath(job.jobId)}`)}" style="color:${COLORS.brand};font-weight:bold">Open the levels board</a></p>`;
}

function frame(title: string, intro: string, body: string, footerHtml: string): string {
  return `<!doctype html>
<html><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${e(title)}</title></head>
<body style="margin:0;padding:16px;background:${COLORS.paper};font-family:Helvetica,Arial,sans-serif">
<div style="max-width:640px;margin:0 auto;background:#FFFFFF;border:1px solid ${COLORS.line};border-radius:14px;padding:20px 22px">
<p style="margin:0 0 14px;font-size:22px;font-weight:bold;color:${COLORS.brand}">trimout<span style="color:${COLORS.accent}">.</span></p>
<h1 style="margin:0 0 6px;font-size:21px;color:${COLORS.ink}">${e(title)}</h1>
<p style="margin:0 0 8px;font-size:14px;color:${COLORS.muted}">${intro}</p>
${body}
<p style="margin:24px 0 0;font-size:12px;line-height:18px;color:${COLORS.muted}">${footerHtml}</p>
</div></body></html>`;
}

function unsubscribeHeaders(origin: string, token: string): Record<string, string> {
  const { oneClick } = unsubscribeUrls(origin, token);
  return { 'List-Unsubscribe': `<${oneClick}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' };
}

export function digestSubject(content: DigestContent, schedule: DigestSchedule): string {
  const subs = content.subcontractorJobs;
  const mgr = content.managerJobs;
  const parts: string[] = [];
  if (subs.length) {
    const unresolved = subs.reduce((n, j) => n + j.unresolved, 0);
    const overdue = subs.reduce((n, j) => n + j.overdue.length, 0);
    parts.push(`${unresolved} unresolved, ${overdue} overdue`);
  }
  if (mgr.length) {
    const now = mgr.reduce((n, j) => n + j.totals.now, 0);
    const change = mgr.reduce((n, j) => n + j.totals.change, 0);
    parts.push(`${now} unresolved on your jobs (${signed(change)})`);
  }
  if (parts.length === 0) parts.push('no jobs to report');
  return headerSafe(`${digestName(content.period, schedule).subjectLead}: ${parts.join('; ')}`);
}

export function renderDigest(content: DigestContent, options: RenderOptions): MailMessage {
  const { origin, timeZone } = options;
  const periodWord = content.period === 'weekly' ? 'a week ago' : 'yesterday';
  const title = digestName(content.period, options.schedule).heading(content.user.name);
  const since = formatWhen(content.since, timeZone);
  const until = formatWhen(content.until, timeZone);
  const { page } = unsubscribeUrls(origin, options.unsubscribeToken);
  const prefs = `${origin}/preferences`;
  const schedule = digestScheduleSentence(options.schedule);
  const why =
    options.trigger === 'now'
      ? `You asked for this digest with "Send me a digest now". ${schedule}`
      : `You get this digest because of your Trimout mail preferences. ${schedule}`;

  const text = [
    title,
    `${content.company.name} · from ${since} to ${until} (${timeZone})`,
    '',
    ...content.subcontractorJobs.flatMap((j) => textSubJob(j, origin)),
    ...content.managerJobs.flatMap((j) => textManagerJob(j, origin, periodWord)),
    ...(content.subcontractorJobs.length + content.managerJobs.length === 0 ? ['You are not a GC manager or a subcontractor on any job yet.', ''] : []),
    '--',
    why,
    `Change how often: ${prefs}`,
    `Stop these digests: ${page}`,
    MAIL_DEFERRAL,
  ].join('\n');

  const body =
    content.subcontractorJobs.map((j) => htmlSubJob(j, origin)).join('\n') +
    content.managerJobs.map((j) => htmlManagerJob(j, origin, periodWord)).join('\n') +
    (content.subcontractorJobs.length + content.managerJobs.length === 0 ? '<p>You are not a GC manager or a subcontractor on any job yet.</p>' : '');
  const footer = `${e(why)}<br><a href="${e(prefs)}" style="color:${COLORS.muted}">Change how often</a> · <a href="${e(page)}" style="color:${COLORS.muted}">Stop these digests</a><br>${e(MAIL_DEFERRAL)}`;
  const html = frame(title, `${e(content.company.name)} · from ${e(since)} to ${e(until)} (${e(timeZone)})`, body, footer);
  return {
    to: { name: content.user.name, address: content.user.email },
    subject: digestSubject(content, options.schedule),
    text,
    html,
    headers: unsubscribeHeaders(origin, options.unsubscribeToken),
  };
}

export interface CriticalAssignment {
  user: { name: string; email: string };
  jobName: string;
  companyName: string;
  finding: DigestFinding;
  /** 'logged' or 'reassigned' */
  how: 'logged' | 'reassigned';
}

export function renderCriticalAssignment(a: CriticalAssignment, options: Omit<RenderOptions, 'trigger' | 'timeZone' | 'schedule'>): MailMessage {
  const { origin } = options;
  const f = a.finding;
  const url = `${origin}${f.path}`;
  const { page } = unsubscribeUrls(origin, options.unsubscribeToken);
  const prefs = `${origin}/preferences`;
  const verb = a.how === 'logged' ? 'was logged against' : 'was reassigned to';
  const title = `Critical finding #${f.number} for ${a.companyName}`;
  const lead = `A critical finding ${verb} ${a.companyName} on ${a.jobName}. It is due on ${f.dueOn}.`;
  const text = [
    title,
    '',
    lead,
    '',
    `#${f.number} ${f.code} ${f.title}`,
    place(f),
    '',
    `Open it: ${url}`,
    '',
    'Where the fix involves electrical, refrigerant, brazing, lifting or overhead work, follow the manufacturer\'s installation manual, local codes and licensed practice.',
    '',
    '--',
    `You get this mail because critical-finding mails are on in your preferences: ${prefs}`,
    `Stop these mails: ${page}`,
    MAIL_DEFERRAL,
  ].join('\n');
  const body = `<p style="margin:0 0 12px;font-size:16px;line-height:23px;color:${COLORS.ink}">${e(lead)}</p>
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="border-collapse:collapse">${htmlFinding(f, origin)}</table>
<p style="margin:18px 0"><a href="${e(url)}" style="display:inline-block;background:${COLORS.brand};color:${COLORS.paper};text-decoration:none;font-weight:bold;padding:12px 20px;border-radius:10px">Open finding #${f.number}</a></p>
<p style="margin:0 0 12px;font-size:13px;color:${COLORS.muted}">Where the fix involves electrical, refrigerant, brazing, lifting or overhead work, follow the manufacturer's installation manual, local codes and licensed practice.</p>`;
  const footer = `You get this mail because critical-finding mails are on in your <a href="${e(prefs)}" style="color:${COLORS.muted}">preferences</a>. <a href="${e(page)}" style="color:${COLORS.muted}">Stop these mails</a>.<br>${e(MAIL_DEFERRAL)}`;
  return {
    to: { name: a.user.name, address: a.user.email },
    subject: headerSafe(`Critical finding #${f.number} on ${a.jobName}: ${f.code} ${f.title}`),
    text,
    html: frame(title, e(a.jobName), body, footer),
    headers: unsubscribeHeaders(origin, options.unsubscribeToken),
  };
}
