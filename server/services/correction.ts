/**
 * Reading for the correction loop: fixes with their photos, the subcontractor's inbox across
 * jobs, and the re-inspection queue. Scoping is in the SQL WHERE (job, and for the inbox the
 * caller's company and their subcontractor memberships); request values arrive only as bound
 * parameters.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { FixDto, InboxGroup, InboxItem, InboxResponse, ReinspectionQueueItem, ReinspectionQueueResponse } from '../../shared/schemas/findings';
import { todayIn } from '../../shared/rules/dates';
import { presentFinding, type FindingRow } from '../presenters/finding';
import { presentFix, type FixRow } from '../presenters/fix';
import { presentPhoto, type PhotoRow } from '../presenters/photo';
import { FROM_SQL, selectSql, type FindingScope } from './findingQueries';

/** At most this many findings in one inbox answer (a company's active findings). */
export const INBOX_MAX = 1000;

const PHOTO_SELECT = `SELECT p.id, p.finding_id, p.fix_id, p.stage, p.content_type, p.width, p.height, p.byte_size, p.uploaded_by,
         u.name AS uploader_name, p.created_at
    FROM photos p LEFT JOIN users u ON u.id = p.uploaded_by`;

async function fixesWithPhotos(sequelize: Sequelize, jobId: string, rows: FixRow[], transaction?: Transaction): Promise<FixDto[]> {
  if (rows.length === 0) return [];
  const photos = await sequelize.query<PhotoRow & { finding_id: string | null }>(`${PHOTO_SELECT} WHERE p.job_id = $1 AND p.fix_id = ANY ($2::uuid[]) ORDER BY p.created_at, p.id`, {
    bind: [jobId, rows.map((r) => r.id)],
    type: QueryTypes.SELECT,
    transaction,
  });
  return rows.map((r) =>
    presentFix(
      r,
      photos.filter((p) => p.fix_id === r.id).map((p) => presentPhoto(jobId, p)),
    ),
  );
}

/** One fix with its photos (the caller has already checked the finding is visible). */
export async function fixDto(sequelize: Sequelize, jobId: string, fixId: string, transaction?: Transaction): Promise<FixDto | null> {
  const rows = await sequelize.query<FixRow>(
    `SELECT x.id, x.finding_id, x.note, x.submitted_by, u.name AS submitter_name, x.submitted_at, x.measured_text, x.rule_result
       FROM fixes x JOIN users u ON u.id = x.submitted_by WHERE x.job_id = $1 AND x.id = $2`,
    { bind: [jobId, fixId], type: QueryTypes.SELECT, transaction },
  );
  const [fix] = await fixesWithPhotos(sequelize, jobId, rows, transaction);
  return fix ?? null;
}

/** True when the person is a subcontractor member of at least one job (the inbox is theirs). */
export async function isSubcontractorAnywhere(sequelize: Sequelize, userId: string): Promise<boolean> {
  const rows = await sequelize.query<{ n: number }>(`SELECT 1 AS n FROM job_members WHERE user_id = $1 AND role = 'subcontractor' LIMIT 1`, {
    bind: [userId],
    type: QueryTypes.SELECT,
  });
  return rows.length > 0;
}

type InboxRow = FindingRow & { job_id: string; job_name: string; last_return_reason: string | null; level_position: number };

/**
 * The inbox of a subcontractor: on every job where they are a subcontractor member, the open /
 * fix-submitted findings of the company that membership is for (which may differ from job to
 * job, and from the person's home company). Overdue (in each job's time zone) first, then due
 * date, then job name and number.
 */
export async function inbox(
  sequelize: Sequelize,
  userId: string,
  options: { jobId?: string; statuses: readonly string[]; groupBy: 'none' | 'area' },
): Promise<InboxResponse> {
  const bind: unknown[] = [userId, options.statuses];
  const today = `(now() AT TIME ZONE COALESCE(NULLIF(j.time_zone, ''), 'UTC'))::date`;
  const jobFilter = options.jobId ? ` AND f.job_id = $${bind.push(options.jobId)}` : '';
  const rows = await sequelize.query<InboxRow>(
    `${selectSql('f.number', today)}, j.id AS job_id, j.name AS job_name, l.position AS level_position,
            (SELECT e.reason FROM finding_events e WHERE e.finding_id = f.id AND e.kind = 'returned'
              ORDER BY e.at DESC, e.id DESC LIMIT 1) AS last_return_reason
       ${FROM_SQL}
       JOIN jobs j ON j.id = f.job_id
       JOIN job_members m ON m.job_id = f.job_id AND m.user_id = $1 AND m.role = 'subcontractor' AND m.company_id = f.company_id
      WHERE f.status = ANY ($2::text[])${jobFilter}
      ORDER BY overdue DESC, f.due_on ASC, j.name ASC, f.number ASC
      LIMIT ${INBOX_MAX}`,
    { bind, type: QueryTypes.SELECT },
  );
  const items: InboxItem[] = rows.map((r) => ({
    ...presentFinding(r.job_id, r),
    jobId: r.job_id,
    jobName: r.job_name,
    lastReturnReason: r.return_count > 0 ? r.last_return_reason : null,
  }));
  let groups: InboxGroup[] | null = null;
  if (options.groupBy === 'area') {
    const byKey = new Map<string, InboxGroup & { position: number }>();
    rows.forEach((r, i) => {
      const key = `${r.job_id}|${r.level_id}|${r.space_id ?? ''}`;
      let g = byKey.get(key);
      if (!g) {
        g = {
          jobId: r.job_id,
          jobName: r.job_name,
          levelId: r.level_id,
          levelName: r.level_name,
          spaceId: r.space_id,
          spaceName: r.space_name,
          items: [],
          position: r.level_position,
        };
        byKey.set(key, g);
      }
      g.items.push(items[i]!);
    });
    groups = [...byKey.values()]
      .sort(
        (a, b) =>
          a.jobName.localeCompare(b.jobName) ||
          a.jobId.localeCompare(b.jobId) ||
          a.position - b.position ||
          a.levelName.localeCompare(b.levelName) ||
          (a.spaceName === null ? 1 : 0) - (b.spaceName === null ? 1 : 0) ||
          (a.spaceName ?? '').localeCompare(b.spaceName ?? ''),
      )
      .map(({ position: _position, ...g }) => g);
  }
  return {
    items,
    groups,
    counts: {
      total: items.length,
      overdue: items.filter((i) => i.overdue).length,
      returned: items.filter((i) => i.status === 'open' && i.returnCount > 0).length,
      fixSubmitted: items.filter((i) => i.status === 'fix_submitted').length,
    },
  };
}

/** Fix-submitted findings of the job grouped by level (level order), with the latest fix and the original photos. */
export async function reinspectionQueue(sequelize: Sequelize, scope: FindingScope): Promise<ReinspectionQueueResponse> {
  const rows = await sequelize.query<FindingRow & { level_position: number }>(
    `${selectSql('f.number', '$2::date')}, l.position AS level_position ${FROM_SQL}
      WHERE f.job_id = $1 AND f.status = 'fix_submitted'
      ORDER BY l.position, l.name, f.due_on, f.number`,
    { bind: [scope.jobId, todayIn(scope.timeZone)], type: QueryTypes.SELECT },
  );
  const ids = rows.map((r) => r.id);
  const fixRows =
    ids.length === 0
      ? []
      : await sequelize.query<FixRow>(
          `SELECT DISTINCT ON (x.finding_id) x.id, x.finding_id, x.note, x.submitted_by, u.name AS submitter_name, x.submitted_at,
                  x.measured_text, x.rule_result
             FROM fixes x JOIN users u ON u.id = x.submitted_by
            WHERE x.job_id = $1 AND x.finding_id = ANY ($2::uuid[])
            ORDER BY x.finding_id, x.submitted_at DESC, x.id DESC`,
          { bind: [scope.jobId, ids], type: QueryTypes.SELECT },
        );
  const fixes = await fixesWithPhotos(sequelize, scope.jobId, fixRows);
  const originals =
    ids.length === 0
      ? []
      : await sequelize.query<PhotoRow & { finding_id: string | null }>(`${PHOTO_SELECT} WHERE p.job_id = $1 AND p.finding_id = ANY ($2::uuid[]) AND p.stage = 'finding' ORDER BY p.created_at, p.id`, {
          bind: [scope.jobId, ids],
          type: QueryTypes.SELECT,
        });
  const levels: ReinspectionQueueResponse['levels'] = [];
  for (const r of rows) {
    let level = levels[levels.length - 1];
    if (!level || level.levelId !== r.level_id) {
      level = { levelId: r.level_id, levelName: r.level_name, items: [] };
      levels.push(level);
    }
    const item: ReinspectionQueueItem = {
      finding: presentFinding(scope.jobId, r),
      latestFix: fixes.find((x) => x.findingId === r.id) ?? null,
      originalPhotos: originals.filter((p) => p.finding_id === r.id).map((p) => presentPhoto(scope.jobId, p)),
      rule: r.measured_rule ?? null,
    };
    level.items.push(item);
  }
  return { levels, total: rows.length };
}
