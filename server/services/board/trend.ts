/**
 * The open-findings trend: daily counts of open and fix-submitted findings, rebuilt from the
 * events (docs/api-board.md).
 */
import type { Sequelize } from 'sequelize';
import { TREND_DAYS_DEFAULT, type TrendQuery, type TrendResponse } from '../../../shared/schemas/board';
import { addDays, minutesIntoDay, todayIn } from '../../../shared/rules/dates';
import { cachedStat } from '../statCache';
import type { FindingScope } from '../findingQueries';
import { Bind, companyCond, num, select } from './common';

/**
 * Daily counts of findings in status open and fix_submitted at the end of each day (job time
 * zone), for `days` days ending today. Rebuilt from finding_events: every event whose `to` has a
 * status moves the finding from `from.status` (null for 'logged') to `to.status`, as every write
 * path records them (the demo seed included); the count at the
 * end of a day is the running sum (window function) of those moves up to that day, and moves
 * before the first day all land on the first day.
 * The level and company are the finding's current ones. Null when `levelId` is not on the job.
 */
export async function loadTrend(sequelize: Sequelize, scope: FindingScope, query: TrendQuery = {}): Promise<TrendResponse | null> {
  const days = query.days ?? TREND_DAYS_DEFAULT;
  const today = todayIn(scope.timeZone);
  const start = addDays(today, -(days - 1));
  const yesterday = addDays(today, -1);
  if (query.levelId) {
    const [ok] = await select<{ ok: boolean }>(sequelize, `SELECT EXISTS (SELECT 1 FROM levels WHERE job_id = $1 AND id = $2::uuid) AS ok`, [
      scope.jobId,
      query.levelId,
    ]);
    if (!ok?.ok) return null;
  }
  // The days before today only change with a back-dated event or a finding moved to another
  // level or company (topics past, moved), so they are cached; today's moves are added live.
  // Right after midnight an event dated just before it may still be committing: no cache then.
  const pastStart = start < today ? start : yesterday;
  const computePast = () => trendSeries(sequelize, scope, query.levelId, pastStart, yesterday);
  const past =
    minutesIntoDay(scope.timeZone) < 5
      ? await computePast()
      : await cachedStat(
          sequelize,
          scope.jobId,
          ['structure', 'moved', 'past'],
          `trend|${scope.companyId ?? '*'}|${query.levelId ?? '*'}|${scope.timeZone}|${pastStart}|${yesterday}`,
          computePast,
        );
  const moves = await trendSeries(sequelize, scope, query.levelId, today, today, { onlyFrom: today });
  const base = past.length ? past[past.length - 1]! : { open: 0, fixSubmitted: 0 };
  const delta = moves[0] ?? { open: 0, fixSubmitted: 0 };
  const points = past.filter((p) => p.date >= start).map((p) => ({ ...p }));
  points.push({ date: today, open: base.open + delta.open, fixSubmitted: base.fixSubmitted + delta.fixSubmitted });
  return { levelId: query.levelId ?? null, points, companyScope: scope.companyId };
}

/**
 * Counts of findings in status open and fix_submitted at the end of each day from `from` to `to`
 * (job time zone), from the events: every event whose `to` has a status moves the finding from
 * `from.status` (null for 'logged') to `to.status`, as every write path records them; the count
 * at the end of a day is the running sum of those moves up to that day, and moves before `from`
 * all land on `from`. With `onlyFrom`, only the moves dated on or after that day are summed (the
 * change over those days, read from finding_events_job_at). The level and company are the
 * finding's current ones.
 */
async function trendSeries(
  sequelize: Sequelize,
  scope: FindingScope,
  levelId: string | undefined,
  from: string,
  to: string,
  options: { onlyFrom?: string } = {},
): Promise<{ date: string; open: number; fixSubmitted: number }[]> {
  const b = new Bind(scope.jobId);
  const tz = b.add(scope.timeZone);
  const startRef = `${b.add(from)}::date`;
  const todayRef = `${b.add(to)}::date`;
  const levelCond = levelId ? ` AND f.level_id = ${b.add(levelId)}::uuid` : '';
  const company = companyCond(b, scope);
  const since = options.onlyFrom ? ` AND e.at >= (${b.add(options.onlyFrom)}::date::timestamp AT TIME ZONE ${tz})` : '';
  // The finding's level and company are needed only to filter; the job-wide trend reads events alone.
  const join = levelCond || company ? `JOIN findings f ON f.id = e.finding_id AND f.job_id = $1${levelCond}${company}` : '';
  const sql = `
    WITH per_day AS (
      SELECT greatest((e.at AT TIME ZONE ${tz})::date, ${startRef}) AS day,
             sum((e."to" ->> 'status' = 'open')::int - (coalesce(e."from" ->> 'status', '') = 'open')::int) AS d_open,
             sum((e."to" ->> 'status' = 'fix_submitted')::int - (coalesce(e."from" ->> 'status', '') = 'fix_submitted')::int) AS d_fix
        FROM finding_events e ${join}
       WHERE e.job_id = $1 AND (e."to" ->> 'status') IS NOT NULL AND (e.at AT TIME ZONE ${tz})::date <= ${todayRef}${since}
       GROUP BY 1
    ), days AS (
      SELECT d::date AS day FROM generate_series(${startRef}, ${todayRef}, interval '1 day') AS d
    )
    SELECT to_char(days.day, 'YYYY-MM-DD') AS date,
           sum(coalesce(per_day.d_open, 0)) OVER (ORDER BY days.day) AS open,
           sum(coalesce(per_day.d_fix, 0)) OVER (ORDER BY days.day) AS fix_submitted
      FROM days LEFT JOIN per_day ON per_day.day = days.day
     ORDER BY days.day`;
  const rows = await select<{ date: string; open: string; fix_submitted: string }>(sequelize, sql, b.values);
  return rows.map((r) => ({ date: r.date, open: num(r.open), fixSubmitted: num(r.fix_submitted) }));
}
