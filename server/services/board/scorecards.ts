/**
 * Company scorecards: live open / overdue / fixes waiting per company, and the history of accepted
 * fixes, first pass, median days to accept and returns from the events (docs/api-board.md).
 */
import type { Sequelize } from 'sequelize';
import type { CompanyScorecard, ScorecardsResponse } from '../../../shared/schemas/board';
import { todayIn } from '../../../shared/rules/dates';
import { daysWaiting } from '../../../shared/rules/waiting';
import { cachedStat, readStatVersions } from '../statCache';
import type { FindingScope } from '../findingQueries';
import { Bind, companyCond, loadTallies, loadUnresolvedFigures, loadWaitingFixes, num, selectTuned } from './common';

interface ScorecardRow {
  company_id: string;
  name: string;
  trades: string[];
  accepted: string;
  accepted_first_pass: string;
  median_days: string | number | null;
  returns: string;
}

/**
 * One row per company on the job (by name). Only GC managers and inspectors see it, so it is
 * never company-scoped; `scope.companyId` is honoured anyway (a subcontractor would see their row).
 *
 * Assignment episodes come from finding_events: a finding's history is cut into segments at
 * each 'reassigned' and 'reopened' event; a segment starts at the finding's logged_at (the first)
 * or at that event, and belongs to the company assigned then (the `to` company of the latest
 * reassignment, else the `from` company of the first reassignment, else the finding's company).
 * An 'accepted' event ends its segment: days = accepted.at - segment start; first pass = no
 * 'returned' event in the segment. 'returned' events count for the segment's company.
 * Voided findings are left out.
 */
export async function loadScorecards(sequelize: Sequelize, scope: FindingScope): Promise<ScorecardsResponse> {
  const clock = new Date();
  const today = todayIn(scope.timeZone, clock);
  const versions = await readStatVersions(sequelize, scope.jobId);
  const [hist, tallies, unresolved, waiting] = await Promise.all([
    cachedStat(sequelize, scope.jobId, ['structure', 'shape', 'history'], `scorecards|${scope.companyId ?? '*'}`, () => loadScorecardHistory(sequelize, scope), versions),
    loadTallies(sequelize, scope.jobId, scope.companyId),
    loadUnresolvedFigures(sequelize, scope.jobId, today, versions),
    loadWaitingFixes(sequelize, scope.jobId),
  ]);
  // The oldest fix of each company still waiting for the inspector.
  const oldestByCompany = new Map<string, Date>();
  for (const w of waiting) {
    const prev = oldestByCompany.get(w.companyId);
    if (!prev || w.oldestSubmittedAt < prev) oldestByCompany.set(w.companyId, w.oldestSubmittedAt);
  }
  const live = new Map<string, { open: number; overdue: number; fixesWaiting: number }>();
  const at = (companyId: string) => {
    let c = live.get(companyId);
    if (!c) live.set(companyId, (c = { open: 0, overdue: 0, fixesWaiting: 0 }));
    return c;
  };
  for (const t of tallies) {
    if (t.status === 'open') at(t.company_id).open += t.n;
    if (t.status === 'fix_submitted') at(t.company_id).fixesWaiting += t.n;
  }
  for (const u of unresolved) if (!scope.companyId || u.companyId === scope.companyId) at(u.companyId).overdue += u.overdue;
  const companies: CompanyScorecard[] = hist.map((r) => {
    const accepted = num(r.accepted);
    const firstPass = num(r.accepted_first_pass);
    const now = live.get(r.company_id);
    return {
      companyId: r.company_id,
      name: r.name,
      trade: r.trades[0] ?? null,
      trades: r.trades,
      open: now?.open ?? 0,
      overdue: now?.overdue ?? 0,
      fixesWaiting: now?.fixesWaiting ?? 0,
      longestWaitDays: oldestByCompany.has(r.company_id) ? daysWaiting(oldestByCompany.get(r.company_id)!, scope.timeZone, clock) : null,
      accepted,
      acceptedFirstPass: firstPass,
      firstPassRate: accepted === 0 ? null : firstPass / accepted,
      medianDaysToAccept: r.median_days === null ? null : Math.round(Number(r.median_days) * 10) / 10,
      returns: num(r.returns),
    };
  });
  return { companies };
}

/**
 * The history half of the scorecards (accepted fixes, first pass, median days, returns) and the
 * job's companies, from the events: changes only with an accepted / returned / reassigned /
 * reopened event or a finding's shape, so it is cached on those topics by loadScorecards.
 */
async function loadScorecardHistory(sequelize: Sequelize, scope: FindingScope): Promise<ScorecardRow[]> {
  const b = new Bind(scope.jobId);
  const companyJc = companyCond(b, scope, 'jc');
  const sql = `
    WITH special AS (
      -- Findings with a return, reassignment or reopening (few): only these need the windows below.
      SELECT DISTINCT e.finding_id
        FROM finding_events e
       WHERE e.job_id = $1 AND e.kind IN ('returned', 'reassigned', 'reopened')
    ), ev AS (
      -- One pass over each such finding's events in order, read in that order (no sort) from the
      -- partial index finding_events_job_assignment: the latest segment start so far, the companies
      -- of its reassignments so far / in all, and the running count of returns. Events alone: the
      -- finding's columns are joined after the windows (each window is one finding's events, so
      -- leaving out a voided finding afterwards is the same as before).
      SELECT e.finding_id, e.id, e.at, e.kind,
             max(e.at) FILTER (WHERE e.kind IN ('reassigned', 'reopened')) OVER upto AS seg_event_at,
             array_agg(e."to" ->> 'companyId') FILTER (WHERE e.kind = 'reassigned') OVER upto AS reassigned_to,
             array_agg(e."from" ->> 'companyId') FILTER (WHERE e.kind = 'reassigned') OVER whole AS reassigned_from,
             count(*) FILTER (WHERE e.kind = 'returned') OVER upto AS returns_so_far
        FROM finding_events e
       WHERE e.job_id = $1 AND e.kind IN ('accepted', 'returned', 'reassigned', 'reopened')
         AND e.finding_id IN (SELECT finding_id FROM special)
      WINDOW upto AS (PARTITION BY e.finding_id ORDER BY e.at, e.id ROWS UNBOUNDED PRECEDING),
             whole AS (PARTITION BY e.finding_id ORDER BY e.at, e.id ROWS BETWEEN UNBOUNDED PRECEDING AND UNBOUNDED FOLLOWING)
    ), ev_seg AS (
      SELECT ev.*,
             ev.returns_so_far - coalesce(max(ev.returns_so_far) FILTER (WHERE ev.kind IN ('reassigned', 'reopened'))
               OVER (PARTITION BY ev.finding_id ORDER BY ev.at, ev.id ROWS UNBOUNDED PRECEDING), 0) AS returns_in_seg
        FROM ev
    ), seg AS (
      -- Only accepted and returned events are counted below; narrow rows (days precomputed) for the sort.
      SELECT s.kind = 'accepted' AS accepted,
             (extract(epoch FROM (s.at - coalesce(s.seg_event_at, f.logged_at))) / 86400.0)::float8 AS days,
             coalesce(s.reassigned_to[cardinality(s.reassigned_to)]::uuid, s.reassigned_from[1]::uuid, f.company_id) AS company_id,
             s.returns_in_seg
        FROM ev_seg s
        JOIN findings f ON f.id = s.finding_id
       WHERE f.job_id = $1 AND f.status <> 'voided' AND s.kind IN ('accepted', 'returned')
      UNION ALL
      -- Every other finding: its accepted events, in one segment from logging, for its company, no returns.
      SELECT true AS accepted, (extract(epoch FROM (e.at - f.logged_at)) / 86400.0)::float8 AS days, f.company_id, 0 AS returns_in_seg
        FROM finding_events e
        JOIN findings f ON f.id = e.finding_id
       WHERE e.job_id = $1 AND e.kind = 'accepted' AND f.job_id = $1 AND f.status <> 'voided'
         AND NOT EXISTS (SELECT 1 FROM special sp WHERE sp.finding_id = e.finding_id)
    ), hist AS (
      SELECT company_id,
             count(*) FILTER (WHERE accepted) AS accepted,
             count(*) FILTER (WHERE accepted AND returns_in_seg = 0) AS accepted_first_pass,
             percentile_cont(0.5) WITHIN GROUP (ORDER BY days) FILTER (WHERE accepted) AS median_days,
             count(*) FILTER (WHERE NOT accepted) AS returns
        FROM seg
       GROUP BY company_id
    )
    SELECT c.id AS company_id, c.name, jc.trades,
           coalesce(hist.accepted, 0) AS accepted, coalesce(hist.accepted_first_pass, 0) AS accepted_first_pass,
           hist.median_days, coalesce(hist.returns, 0) AS returns
      FROM job_companies jc
      JOIN companies c ON c.id = jc.company_id
      LEFT JOIN hist ON hist.company_id = jc.company_id
     WHERE jc.job_id = $1${companyJc}
     ORDER BY c.name, c.id`;
  return selectTuned<ScorecardRow>(sequelize, sql, b.values);
}
