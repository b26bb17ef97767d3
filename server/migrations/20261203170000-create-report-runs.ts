import type { QueryInterface } from 'sequelize';

/**
 * report_runs: one row per PDF report built in the background (server/reports/queue.ts). The row
 * carries what was asked (kind, scope) and the asker's own scope at the time (viewer_company_id:
 * the company a subcontractor's membership is for, so the background build sees exactly what the
 * asker may see), the progress the app shows, and where the built file is kept in the photo store
 * until expires_at (7 days; the worker's sweep removes the object and keeps the row).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`CREATE TABLE report_runs (
    id uuid PRIMARY KEY,
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    requested_by uuid NOT NULL REFERENCES users (id) ON DELETE CASCADE,
    kind varchar(20) NOT NULL CHECK (kind IN ('close-out')),
    level_id uuid REFERENCES levels (id) ON DELETE CASCADE,
    system_id uuid REFERENCES systems (id) ON DELETE CASCADE,
    company_id uuid REFERENCES companies (id) ON DELETE CASCADE,
    viewer_company_id uuid REFERENCES companies (id) ON DELETE CASCADE,
    status varchar(10) NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'running', 'done', 'failed')),
    findings_total integer NOT NULL DEFAULT 0,
    findings_done integer NOT NULL DEFAULT 0,
    photos_total integer NOT NULL DEFAULT 0,
    storage_key varchar(200),
    byte_size integer,
    message text,
    created_at timestamptz NOT NULL,
    started_at timestamptz,
    finished_at timestamptz,
    expires_at timestamptz
  )`);
  await qi.sequelize.query(`CREATE INDEX report_runs_job_user ON report_runs (job_id, requested_by, created_at)`);
  await qi.sequelize.query(`CREATE INDEX report_runs_expiry ON report_runs (expires_at) WHERE storage_key IS NOT NULL`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query('DROP TABLE report_runs');
}
