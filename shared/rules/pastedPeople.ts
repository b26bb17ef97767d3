/**
 * People pasted to be invited at once: one per line, "e-mail, role[, company]", or the same cells
 * tab-separated as a spreadsheet copies them. Read here once, for the preview on the members screen
 * (each line with its own problems before anything is sent) and for the request it sends
 * (POST /invitations/bulk, checked again by the server with the same schema).
 *
 * Lines are counted as the server counts them: the people sent, in order (empty lines and a
 * spreadsheet's header row are not people), so a refusal of `people.2.email` is line 3 here too.
 */
import { z } from 'zod';
import { invitationBulkSchema, INVITATIONS_BULK_MAX, sameEmailTwice, type InvitationCreateInput } from '../schemas/auth';
import { pastedLines } from '../schemas/setup/levels';
import { ROLES, ROLE_LABELS, type Role } from '../words';

/** Where a problem sits on its line: the request's field names, or the line as a whole. */
export type PastedPersonField = 'email' | 'role' | 'companyId' | 'name' | 'line';

export interface PastedPersonProblem {
  field: PastedPersonField;
  message: string;
}

export interface PastedPersonLine {
  /** 1-based: the person's place in the list sent. */
  line: number;
  /** The line as pasted (trimmed). */
  text: string;
  email: string;
  /** The role read from the line, or null when it is missing or not a role. */
  role: Role | null;
  /** The company as written; '' when the line names none (the inviting manager's own company). */
  companyName: string;
  /** The company's name as the job lists it, when found. */
  companyListed: string | null;
  problems: PastedPersonProblem[];
}

export interface PastedPeople {
  lines: PastedPersonLine[];
  /** Problems of the list as a whole (too many people). */
  listProblems: string[];
  /** True when the first line was a spreadsheet's header row ("E-mail, Role, Company") and was left out. */
  headerSkipped: boolean;
  /** The request's people when every line is sound and the list fits; otherwise null. */
  people: InvitationCreateInput[] | null;
}

export interface CompanyOnJob {
  id: string;
  name: string;
}

const ROLE_WORDS = `${ROLE_LABELS.gc_manager}, ${ROLE_LABELS.inspector.toLowerCase()} or ${ROLE_LABELS.subcontractor.toLowerCase()}`;

/** Lower case, "_" and "-" as spaces, runs of spaces as one: "GC-Manager" and "gc_manager" read alike. */
function plain(text: string): string {
  return text.toLowerCase().replace(/[_-]+/g, ' ').replace(/\s+/g, ' ').trim();
}

const ROLE_NAMES = new Map<string, Role>([
  ...ROLES.map((r) => [plain(r), r] as const),
  ...ROLES.map((r) => [plain(ROLE_LABELS[r]), r] as const),
  ['gc', 'gc_manager'],
  ['manager', 'gc_manager'],
  ['sub', 'subcontractor'],
  ['sub contractor', 'subcontractor'],
]);

/** A role as people write it: "GC manager", "gc_manager", "Inspector", "sub"; null when it is none. */
export function readRole(text: string): Role | null {
  return ROLE_NAMES.get(plain(text)) ?? null;
}

/** The cells of one line: tabs when the line has any (a spreadsheet), else commas; a company may hold commas. */
export function lineCells(text: string): { cells: string[]; tabbed: boolean } {
  const tabbed = text.includes('\t');
  const raw = text.split(tabbed ? '\t' : ',').map((c) => c.trim());
  while (raw.length > 0 && raw[raw.length - 1] === '') raw.pop();
  if (!tabbed && raw.length > 3) return { cells: [raw[0]!, raw[1]!, raw.slice(2).join(', ')], tabbed };
  return { cells: raw, tabbed };
}

function isHeader(text: string): boolean {
  const first = plain(lineCells(text).cells[0] ?? '').replace(/\s/g, '');
  return first === 'email' || first === 'emailaddress';
}

/** Reads the pasted text against the companies listed for the job (by name, any case). */
export function parsePastedPeople(text: string, companies: readonly CompanyOnJob[]): PastedPeople {
  let rows = pastedLines(text);
  const headerSkipped = rows.length > 0 && isHeader(rows[0]!);
  if (headerSkipped) rows = rows.slice(1);
  const byName = new Map(companies.map((c) => [plain(c.name), c] as const));

  const lines: PastedPersonLine[] = [];
  const candidates: Record<string, unknown>[] = [];
  rows.forEach((row, i) => {
    const { cells, tabbed } = lineCells(row);
    const [email = '', roleText = '', companyName = ''] = cells;
    const problems: PastedPersonProblem[] = [];
    if (tabbed && cells.length > 3) {
      problems.push({ field: 'line', message: 'Too many columns: keep e-mail, role and company only.' });
    }
    const role = readRole(roleText);
    if (roleText === '') problems.push({ field: 'role', message: `Add the role after the e-mail: ${ROLE_WORDS}.` });
    else if (!role) problems.push({ field: 'role', message: `"${roleText}" is not a role: write ${ROLE_WORDS}.` });
    const company = companyName === '' ? undefined : byName.get(plain(companyName));
    if (companyName !== '' && !company) {
      problems.push({ field: 'companyId', message: `No company named "${companyName}" on this job. Check the spelling, or add it on the Companies page first.` });
    }
    lines.push({ line: i + 1, text: row, email, role, companyName, companyListed: company?.name ?? null, problems });
    candidates.push({ email, role: role ?? roleText, ...(company ? { companyId: company.id } : {}) });
  });

  // The request's own schema gives the rest (an address that is not one, the same address twice,
  // a subcontractor without a company) in the server's words, each on its line.
  const listProblems: string[] = [];
  const parsed = invitationBulkSchema.safeParse({ people: candidates });
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const [, index, field] = issue.path;
      if (typeof index !== 'number') {
        if (lines.length > 0) listProblems.push(issue.message);
        continue;
      }
      const line = lines[index];
      if (!line) continue;
      const name = (typeof field === 'string' ? field : 'line') as PastedPersonField;
      // A role or company already said in this reader's words is not said twice.
      if ((name === 'role' || name === 'companyId') && line.problems.some((p) => p.field === name)) continue;
      if (line.problems.some((p) => p.message === issue.message)) continue;
      line.problems.push({ field: name, message: issue.message });
    }
  }
  // The schema checks repeated addresses only once every line parses; the preview says it at once.
  for (const { index, message } of sameEmailTwice(lines.map((l) => l.email))) {
    const line = lines[index]!;
    if (!line.problems.some((p) => p.message === message)) line.problems.push({ field: 'email', message });
  }
  if (lines.length > INVITATIONS_BULK_MAX && !listProblems.length) listProblems.push(`At most ${INVITATIONS_BULK_MAX} people at once.`);
  const sound = parsed.success && lines.every((l) => l.problems.length === 0) && listProblems.length === 0;
  return { lines, listProblems, headerSkipped, people: sound ? parsed.data.people : null };
}

/**
 * A refused bulk write's field messages (`people.2.email`) by line: line 3 gets that message.
 * Keys that name no line are left to the message above the form.
 */
export function problemsByLine(fields: Readonly<Record<string, string>>): Map<number, PastedPersonProblem[]> {
  const out = new Map<number, PastedPersonProblem[]>();
  for (const [key, message] of Object.entries(fields)) {
    const m = /^people\.(\d+)(?:\.(\w+))?$/.exec(key);
    if (!m) continue;
    const line = Number(m[1]) + 1;
    const field = (m[2] ?? 'line') as PastedPersonField;
    out.set(line, [...(out.get(line) ?? []), { field, message }]);
  }
  return out;
}

/** The one sentence on the paste box while lines need a change (each line shows its own problem). */
export function pastedPeopleMessage(result: PastedPeople): string | null {
  if (result.lines.length === 0) return 'Paste at least one person: e-mail, role and company, one per line.';
  const bad = result.lines.filter((l) => l.problems.length > 0);
  if (bad.length === 1) return `Line ${bad[0]!.line}: ${bad[0]!.problems[0]!.message}`;
  if (bad.length > 1) {
    const numbers = bad.map((l) => l.line);
    return `Lines ${numbers.slice(0, -1).join(', ')} and ${numbers[numbers.length - 1]} need a change: each says what below.`;
  }
  return result.listProblems[0] ?? null;
}

/** The paste box's form: one text, read against the job's companies; sound only when every line is. */
export function pastedPeopleForm(companies: readonly CompanyOnJob[]) {
  return z.object({
    text: z.string().superRefine((value, ctx) => {
      const message = pastedPeopleMessage(parsePastedPeople(value, companies));
      if (message) ctx.addIssue({ code: 'custom', message });
    }),
  });
}
