/**
 * Reports built in the background: the report_runs row (what was asked, by whom, in whose scope,
 * how far it has come) and the build itself, which the pg-boss worker runs (queue.ts).
 *
 * The build writes the PDF to a temporary file as it streams (memory stays one page and one
 * batch), stores it in the photo store under `reports/<run id>.pdf` for REPORT_KEEP_DAYS, and
 * mails the person who asked a link to the app's report page (never the file itself, never a
 * link that works without their session). The scope is the asker's at the time they asked; the
 * build checks they are still on the job first.
 */
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { MAIL_DEFERRAL } from '../../shared/deferral';
import { REPORT_KEEP_DAYS, reportProgressText, type ReportKind, type ReportRunDto, type ReportRunStatus } from '../../shared/schemas/reports';
import type { Role } from '../../shared/words';
import type { MailService } from '../mail';
import type { MailMessage } from '../mail/outbox';
import { escapeHtml, headerSafe } from '../mail/safe';
import type { FindingScope } from '../services/findingQueries';
import type { ObjectStore } from '../storage';
import { scopeLabel, writeCloseOut } from './closeOut';
import { resolveScope, type ReportScopeInput, type ResolvedScope } from './data';

export interface ReportRunRow {
  id: string;
  job_id: string;
  requested_by: string;
  kind: ReportKind;
  level_id: string | null;
  system_id: string | null;
  company_id: string | null;
  viewer_company_id: string | null;
  status: ReportRunStatus;
  findings_total: number;
  findings_done: number;
  photos_total: number;
  storage_key: string | null;
  byte_size: number | null;
  message: string | null;
  created_at: Date;
  finished_at: Date | null;
  expires_at: Date | null;
  scope_label?: string;
}

export const reportKey = (id: string) => `reports/${id}.pdf`;

export function placeOf(row: Pick<ReportRunRow, 'level_id' | 'system_id' | 'company_id'>): ReportScopeInput {
  return { levelId: row.level_id ?? undefined, systemId: row.system_id ?? undefined, companyId: row.company_id ?? undefined };
}

export function presentRun(row: ReportRunRow, label: string): ReportRunDto {
  const stored = row.status === 'done' && row.storage_key !== null && (!row.expires_at || row.expires_at > new Date());
  return {
    id: row.id,
    jobId: row.job_id,
    kind: row.kind,
    status: row.status,
    scopeLabel: label,
    findingsTotal: row.findings_total,
    findingsDone: row.findings_done,
    photosTotal: row.photos_total,
    createdAt: new Date(row.created_at).toISOString(),
    finishedAt: row.finished_at ? new Date(row.finished_at).toISOString() : null,
    expiresAt: row.expires_at ? new Date(row.expires_at).toISOString() : null,
    download: stored ? `/api/jobs/${row.job_id}/reports/${row.id}/report.pdf` : null,
    byteSize: row.byte_size,
    message: row.message,
  };
}

export async function insertRun(
  sequelize: Sequelize,
  transaction: Transaction,
  values: { jobId: string; userId: string; kind: ReportKind; place: ReportScopeInput; viewerCompanyId: string | null; findings: number; photos: number },
): Promise<ReportRunRow> {
  const [row] = await sequelize.query<ReportRunRow>(
    `INSERT INTO report_runs (id, job_id, requested_by, kind, level_id, system_id, company_id, viewer_company_id, findings_total, photos_total, created_at)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, now()) RETURNING *`,
    {
      bind: [
        randomUUID(),
        values.jobId,
        values.userId,
        values.kind,
        values.place.levelId ?? null,
        values.place.systemId ?? null,
        values.place.companyId ?? null,
        values.viewerCompanyId,
        values.findings,
        values.photos,
      ],
      type: QueryTypes.SELECT,
      transaction,
    },
  );
  return row!;
}

/** The run, only for the person who asked for it, on this job (anyone else: null → 404). */
export async function loadOwnRun(sequelize: Sequelize, jobId: string, userId: string, id: string): Promise<ReportRunRow | null> {
  const [row] = await sequelize.query<ReportRunRow>(`SELECT * FROM report_runs WHERE job_id = $1 AND requested_by = $2 AND id = $3`, {
    bind: [jobId, userId, id],
    type: QueryTypes.SELECT,
  });
  return row ?? null;
}

export interface BuildDeps {
  sequelize: Sequelize;
  store: ObjectStore;
  mail?: MailService;
  log: (message: string, err?: unknown) => void;
  now?: () => Date;
}

/**
 * Builds one queued run. A run already started or finished is left alone (pg-boss may deliver a
 * job twice after a crash); a failure marks the run failed with a plain message.
 */
export async function buildRun(deps: BuildDeps, runId: string): Promise<void> {
  const { sequelize } = deps;
  const [row] = await sequelize.query<ReportRunRow>(
    `UPDATE report_runs SET status = 'running', started_at = now() WHERE id = $1 AND status = 'queued' RETURNING *`,
    { bind: [runId], type: QueryTypes.SELECT },
  );
  if (!row) return;
  const fail = async (message: string) => {
    await sequelize.query(`UPDATE report_runs SET status = 'failed', message = $2, finished_at = now() WHERE id = $1`, { bind: [runId, message] });
  };
  const file = path.join(os.tmpdir(), `trimout-report-${runId}.pdf`);
  try {
    // Still on the job, in the same role and company scope as when they asked.
    const [member] = await sequelize.query<{ role: Role; company_id: string; name: string; email: string; time_zone: string }>(
      `SELECT m.role, m.company_id, u.name, u.email, j.time_zone FROM job_members m JOIN users u ON u.id = m.user_id JOIN jobs j ON j.id = m.job_id
        WHERE m.job_id = $1 AND m.user_id = $2 AND u.disabled_at IS NULL`,
      { bind: [row.job_id, row.requested_by], type: QueryTypes.SELECT },
    );
    const viewer = member?.role === 'subcontractor' ? member.company_id : null;
    if (!member || viewer !== row.viewer_company_id) return await fail('You are no longer on this job with the access you asked with.');
    const scope: FindingScope = { jobId: row.job_id, timeZone: member.time_zone || 'UTC', companyId: viewer };
    const place = await resolveScope(sequelize, scope, placeOf(row));
    const out = fs.createWriteStream(file);
    let last = 0;
    const result = await writeCloseOut(out, {
      sequelize,
      store: deps.store,
      scope,
      place,
      author: { name: member.name, role: member.role },
      now: deps.now?.() ?? new Date(),
      onProgress: async (done, total) => {
        // At most about once a second: the app polls every two.
        if (Date.now() - last < 800 && done < total) return;
        last = Date.now();
        await sequelize.query(`UPDATE report_runs SET findings_done = $2, findings_total = $3 WHERE id = $1`, { bind: [runId, done, total] });
      },
    });
    const bytes = await fs.promises.readFile(file);
    await deps.store.put(reportKey(runId), bytes, 'application/pdf');
    await sequelize.query(
      `UPDATE report_runs SET status = 'done', findings_done = $2, findings_total = $2, photos_total = $3, storage_key = $4, byte_size = $5,
              finished_at = now(), expires_at = now() + make_interval(days => $6) WHERE id = $1`,
      { bind: [runId, result.findings, result.photos, reportKey(runId), bytes.length, REPORT_KEEP_DAYS] },
    );
    if (deps.mail) {
      const label = scopeLabel(place);
      await deps.mail.outbox.sendMail(readyMail({ name: member.name, address: member.email }, deps.mail.link(`/jobs/${row.job_id}/reports/${runId}`), label, result.findings));
    }
  } catch (err) {
    deps.log(`report ${runId} failed`, err);
    await fail('Something went wrong while building the report. Ask for it again.');
  } finally {
    await fs.promises.rm(file, { force: true });
  }
}

export async function runLabel(sequelize: Sequelize, scope: FindingScope, row: ReportRunRow): Promise<string> {
  const place: ResolvedScope = await resolveScope(sequelize, scope, placeOf(row)).catch(() => placeOf(row));
  return scopeLabel(place);
}

function readyMail(to: { name: string; address: string }, link: string, label: string, findings: number): MailMessage {
  const heading = 'Your close-out report is ready';
  const lines = [
    `The close-out report you asked for (${label}, ${reportProgressText({ status: 'done', findingsDone: findings, findingsTotal: findings }).replace('Report ready: ', '')}) is ready.`,
    `It is kept for ${REPORT_KEEP_DAYS} days. Open it in Trimout, signed in as yourself:`,
  ];
  const text = [heading, '', ...lines, link, '', '--', MAIL_DEFERRAL].join('\n');
  const html = `<!doctype html><html><body style="font-family:Helvetica,Arial,sans-serif;color:#1A1F1C">
<h1 style="font-size:20px">${escapeHtml(heading)}</h1>
${lines.map((l) => `<p>${escapeHtml(l)}</p>`).join('\n')}
<p><a href="${escapeHtml(link)}">${escapeHtml(link)}</a></p>
<p style="font-size:12px;color:#56605A">${escapeHtml(MAIL_DEFERRAL)}</p></body></html>`;
  return { to, subject: headerSafe(`Close-out report ready: ${label}`), text, html };
}

/** The queue could not be reached: the run fails with a plain message instead of waiting forever. */
export async function markNotQueued(sequelize: Sequelize, id: string): Promise<void> {
  await sequelize.query(`UPDATE report_runs SET status = 'failed', message = $2, finished_at = now() WHERE id = $1 AND status = 'queued'`, {
    bind: [id, 'The report could not be queued. Ask for it again.'],
  });
}

/** Removes built files past their keeping time (the rows stay, without a file). */
export async function sweepExpiredReports(sequelize: Sequelize, store: ObjectStore): Promise<number> {
  const rows = await sequelize.query<{ id: string; storage_key: string }>(
    `SELECT id, storage_key FROM report_runs WHERE storage_key IS NOT NULL AND expires_at < now() LIMIT 500`,
    { type: QueryTypes.SELECT },
  );
  if (rows.length === 0) return 0;
  await store.delete(rows.map((r) => r.storage_key));
  await sequelize.query(`UPDATE report_runs SET storage_key = NULL WHERE id = ANY ($1::uuid[])`, { bind: [rows.map((r) => r.id)] });
  return rows.length;
}
