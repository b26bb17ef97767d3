/**
 * Sampling audits: the lot from its filters, the audit's state and decision, the walk screens'
 * marks and the report rows (routes/audits.ts; the write is commands/planAudit.ts).
 *
 * Results come from the unit checks and findings already recorded, replayed in time order, so the
 * decision is reached at a moment (decidedAt) and stays as it was then:
 * - a sampled unit counts as checked from its first COMPLETE unit check since the audit started;
 * - its defects are the findings logged on it since the audit started and not voided, by the
 *   severity they have now (voiding a finding logged in error takes it out of the count);
 * - after the decision nothing more is counted (a finding logged on a sampled unit later is
 *   ordinary punch-list work).
 * A rejected lot's follow-up is every unit of the lot: walks cover whole levels, so the follow-up is
 * shown per level (units of the lot and how many have a complete check since the rejection) and the
 * walk screens mark the lot's units still to check.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { decide, isFinal, type AuditPlan, type AuditState, type SampledResult } from '../../shared/calc/sampling';
import type { AuditDetail, AuditFollowUpLevel, AuditLotFilters, AuditSampleUnit, AuditSummary, AuditUnitMark, ClassRuleChoice } from '../../shared/schemas/audits';
import { SEVERITIES, UNIT_KIND_LABELS, type Severity, type UnitKindKey } from '../../shared/words';
import { notFound } from '../errors';
import { Audit } from '../models';

interface Db {
  sequelize: Sequelize;
  transaction?: Transaction;
}

const FILTER_TABLES = [
  ['levelIds', 'levels', 'level_id'],
  ['systemIds', 'systems', 'system_id'],
  ['crewIds', 'crews', 'installed_by_crew_id'],
  ['modelIds', 'unit_models', 'model_id'],
] as const;

/** Every id a filter names must be the job's (else 404, existence not told). */
async function checkFilterIds(db: Db, jobId: string, filters: AuditLotFilters): Promise<void> {
  for (const [key, table] of FILTER_TABLES) {
    const wanted = [...new Set(filters[key] ?? [])];
    if (wanted.length === 0) continue;
    const [row] = await db.sequelize.query<{ n: string }>(`SELECT count(*) AS n FROM ${table} WHERE job_id = $1 AND id = ANY($2::uuid[])`, {
      bind: [jobId, wanted],
      type: QueryTypes.SELECT,
      transaction: db.transaction,
    });
    if (Number(row!.n) !== wanted.length) throw notFound();
  }
}

/** The unit ids the filters choose on the job now, sorted. */
export async function lotUnitIds(db: Db, jobId: string, filters: AuditLotFilters): Promise<string[]> {
  await checkFilterIds(db, jobId, filters);
  const bind: unknown[] = [jobId];
  const conds = ['u.job_id = $1'];
  for (const [key, , column] of FILTER_TABLES) {
    const list = filters[key];
    if (list && list.length) {
      bind.push(list);
      conds.push(`u.${column} = ANY($${bind.length}::uuid[])`);
    }
  }
  if (filters.kinds && filters.kinds.length) {
    bind.push(filters.kinds);
    conds.push(`u.kind = ANY($${bind.length}::text[])`);
  }
  const rows = await db.sequelize.query<{ id: string }>(`SELECT u.id FROM units u WHERE ${conds.join(' AND ')} ORDER BY u.id`, {
    bind,
    type: QueryTypes.SELECT,
    transaction: db.transaction,
  });
  return rows.map((r) => r.id);
}

/** The filters in words, names read from the job. */
async function describeLot(db: Db, jobId: string, filters: AuditLotFilters): Promise<string> {
  const parts: string[] = [];
  const names = async (table: string, list: string[] | undefined, label: string) => {
    if (!list || list.length === 0) return;
    const rows = await db.sequelize.query<{ name: string }>(`SELECT name FROM ${table} WHERE job_id = $1 AND id = ANY($2::uuid[]) ORDER BY name`, {
      bind: [jobId, list],
      type: QueryTypes.SELECT,
      transaction: db.transaction,
    });
    parts.push(`${label}: ${rows.map((r) => r.name).join(', ')}`);
  };
  await names('levels', filters.levelIds, 'Levels');
  if (filters.kinds?.length) parts.push(`Kinds: ${filters.kinds.map((k) => UNIT_KIND_LABELS[k]).join(', ')}`);
  await names('systems', filters.systemIds, 'Systems');
  await names('crews', filters.crewIds, 'Crews');
  await names('unit_models', filters.modelIds, 'Models');
  return parts.length ? parts.join(' · ') : 'Every unit of the job';
}

interface SampleRow {
  unit_id: string;
  tag: string;
  kind: UnitKindKey;
  level_id: string;
  level_name: string;
  draw_position: number;
  tier: 1 | 2;
  checked_at: Date | null;
}

interface FindingRow {
  unit_id: string;
  severity: Severity;
  logged_at: Date;
}

interface Evaluated {
  state: AuditState;
  decidedAt: Date | null;
  checkedAt: Map<string, Date>;
  defects: Map<string, Record<Severity, number>>;
}

const zeroDefects = (): Record<Severity, number> => ({ critical: 0, major: 0, minor: 0 });

/**
 * Replays the sampled units' checks and findings in time order through the shared decision; the
 * first final decision stops the replay (what came later does not count).
 */
export function replay(plan: AuditPlan, sample: readonly SampleRow[], findings: readonly FindingRow[]): Evaluated {
  type Ev = { at: Date; unitId: string; severity: Severity | null };
  const events: Ev[] = [];
  for (const s of sample) if (s.checked_at) events.push({ at: s.checked_at, unitId: s.unit_id, severity: null });
  for (const f of findings) events.push({ at: f.logged_at, unitId: f.unit_id, severity: f.severity });
  events.sort((a, b) => a.at.getTime() - b.at.getTime());
  const position = new Map(sample.map((s) => [s.unit_id, s.draw_position]));
  const results = new Map<string, SampledResult>(sample.map((s) => [s.unit_id, { position: s.draw_position, checked: false, defects: {} }]));
  const checkedAt = new Map<string, Date>();
  const defects = new Map<string, Record<Severity, number>>(sample.map((s) => [s.unit_id, zeroDefects()]));
  let state = decide(plan, [...results.values()]);
  let decidedAt: Date | null = null;
  for (let i = 0; i < events.length && !decidedAt; ) {
    const at = events[i]!.at.getTime();
    // Everything recorded at the same moment is applied together.
    for (; i < events.length && events[i]!.at.getTime() === at; i += 1) {
      const e = events[i]!;
      if (!position.has(e.unitId)) continue;
      const r = results.get(e.unitId)!;
      if (e.severity === null) {
        r.checked = true;
        checkedAt.set(e.unitId, e.at);
      } else {
        r.defects = { ...r.defects, [e.severity]: (r.defects[e.severity] ?? 0) + 1 };
        defects.get(e.unitId)![e.severity] += 1;
      }
    }
    state = decide(plan, [...results.values()]);
    if (isFinal(state.decision)) decidedAt = new Date(at);
  }
  return { state, decidedAt, checkedAt, defects };
}

async function sampleRows(db: Db, audit: Audit): Promise<SampleRow[]> {
  return db.sequelize.query<SampleRow>(
    `SELECT au.unit_id, u.tag, u.kind, u.level_id, l.name AS level_name, au.draw_position, au.tier,
            (SELECT min(uc.checked_at) FROM unit_checks uc
              WHERE uc.unit_id = au.unit_id AND uc.complete AND uc.checked_at >= $2) AS checked_at
       FROM audit_units au JOIN units u ON u.id = au.unit_id JOIN levels l ON l.id = u.level_id
      WHERE au.audit_id = $1 AND au.tier IS NOT NULL
      ORDER BY au.draw_position`,
    { bind: [audit.id, audit.startedAt], type: QueryTypes.SELECT, transaction: db.transaction },
  );
}

async function findingRows(db: Db, audit: Audit): Promise<FindingRow[]> {
  return db.sequelize.query<FindingRow>(
    `SELECT f.unit_id, f.severity, f.logged_at
       FROM findings f JOIN audit_units au ON au.unit_id = f.unit_id AND au.audit_id = $1 AND au.tier IS NOT NULL
      WHERE f.job_id = $2 AND f.status <> 'voided' AND f.logged_at >= $3`,
    { bind: [audit.id, audit.jobId, audit.startedAt], type: QueryTypes.SELECT, transaction: db.transaction },
  );
}

async function evaluate(db: Db, audit: Audit): Promise<{ ev: Evaluated; sample: SampleRow[] }> {
  const sample = await sampleRows(db, audit);
  const ev = replay(audit.plan, sample, await findingRows(db, audit));
  return { ev, sample };
}

async function people(db: Db, ids: string[]): Promise<Map<string, string>> {
  const rows = await db.sequelize.query<{ id: string; name: string }>(`SELECT id, name FROM users WHERE id = ANY($1::uuid[])`, {
    bind: [[...new Set(ids)]],
    type: QueryTypes.SELECT,
    transaction: db.transaction,
  });
  return new Map(rows.map((r) => [r.id, r.name]));
}

function summaryOf(audit: Audit, ev: Evaluated, plannerName: string): AuditSummary {
  return {
    id: audit.id,
    number: audit.number,
    name: audit.name,
    scheme: audit.scheme,
    inspectionLevel: audit.inspectionLevel,
    lotSize: audit.lotSize,
    sampleSize: ev.state.sampleSize,
    checked: ev.state.checked,
    decision: ev.state.decision,
    decidedAt: ev.decidedAt?.toISOString() ?? null,
    seed: audit.seed,
    plannedBy: { id: audit.plannedBy, name: plannerName },
    startedAt: audit.startedAt.toISOString(),
  };
}

async function loadAudit(db: Db, jobId: string, auditId: string): Promise<Audit> {
  const audit = await Audit.findOne({ where: { id: auditId, jobId }, transaction: db.transaction });
  if (!audit) throw notFound();
  return audit;
}

async function followUp(db: Db, audit: Audit, decidedAt: Date): Promise<NonNullable<AuditDetail['followUp']>> {
  const rows = await db.sequelize.query<{ level_id: string; level_name: string; units: string; checked_since: string }>(
    `SELECT l.id AS level_id, l.name AS level_name, count(*) AS units,
            count(*) FILTER (WHERE EXISTS (SELECT 1 FROM unit_checks uc WHERE uc.unit_id = u.id AND uc.complete AND uc.checked_at >= $2)) AS checked_since
       FROM audit_units au JOIN units u ON u.id = au.unit_id JOIN levels l ON l.id = u.level_id
      WHERE au.audit_id = $1
      GROUP BY l.id, l.name, l.position
      ORDER BY l.position, l.name`,
    { bind: [audit.id, decidedAt], type: QueryTypes.SELECT, transaction: db.transaction },
  );
  const levels: AuditFollowUpLevel[] = rows.map((r) => ({ levelId: r.level_id, levelName: r.level_name, units: Number(r.units), checkedSince: Number(r.checked_since) }));
  return { levels, remaining: levels.reduce((n, l) => n + l.units - l.checkedSince, 0) };
}

export async function auditDetail(db: Db, jobId: string, auditId: string): Promise<AuditDetail> {
  const audit = await loadAudit(db, jobId, auditId);
  const { ev, sample } = await evaluate(db, audit);
  const names = await people(db, [audit.plannedBy]);
  const activeTier = ev.state.activeTier;
  const units: AuditSampleUnit[] = sample.map((s) => ({
    unitId: s.unit_id,
    tag: s.tag,
    kind: s.kind,
    levelId: s.level_id,
    levelName: s.level_name,
    position: s.draw_position,
    tier: s.tier,
    checkedAt: ev.checkedAt.get(s.unit_id)?.toISOString() ?? null,
    defects: ev.defects.get(s.unit_id) ?? zeroDefects(),
    active: s.tier <= activeTier,
  }));
  return {
    ...summaryOf(audit, ev, names.get(audit.plannedBy) ?? ''),
    lotFilters: audit.lotFilters,
    lotDescription: await describeLot(db, jobId, audit.lotFilters),
    classRules: classRuleChoices(audit),
    plan: audit.plan,
    state: ev.state,
    sample: units,
    followUp: ev.state.decision === 'reject' && ev.decidedAt ? await followUp(db, audit, ev.decidedAt) : null,
  };
}

function classRuleChoices(audit: Audit): Record<Severity, ClassRuleChoice> {
  const out = { critical: 'off', major: 'off', minor: 'off' } as Record<Severity, ClassRuleChoice>;
  for (const s of SEVERITIES) {
    const rule = audit.classRules[s];
    if (rule) out[s] = rule.aql === null ? 'zero' : rule.aql;
  }
  return out;
}

/** The job's audits, newest first; with a level, the marks its walk screens show. */
export async function listAudits(db: Db, jobId: string, levelId?: string): Promise<{ items: AuditSummary[]; unitMarks?: AuditUnitMark[] }> {
  const audits = await Audit.findAll({ where: { jobId }, order: [['number', 'DESC']], transaction: db.transaction });
  const names = await people(db, audits.map((a) => a.plannedBy));
  const items: AuditSummary[] = [];
  const marks: AuditUnitMark[] = [];
  for (const audit of audits) {
    const { ev, sample } = await evaluate(db, audit);
    items.push(summaryOf(audit, ev, names.get(audit.plannedBy) ?? ''));
    if (!levelId) continue;
    if (!isFinal(ev.state.decision)) {
      for (const s of sample) {
        if (s.level_id === levelId && s.tier <= ev.state.activeTier) marks.push({ unitId: s.unit_id, auditId: audit.id, number: audit.number, mark: 'sample' });
      }
    } else if (ev.state.decision === 'reject' && ev.decidedAt) {
      const rows = await db.sequelize.query<{ unit_id: string }>(
        `SELECT au.unit_id FROM audit_units au JOIN units u ON u.id = au.unit_id
          WHERE au.audit_id = $1 AND u.level_id = $2
            AND NOT EXISTS (SELECT 1 FROM unit_checks uc WHERE uc.unit_id = u.id AND uc.complete AND uc.checked_at >= $3)`,
        { bind: [audit.id, levelId, ev.decidedAt], type: QueryTypes.SELECT, transaction: db.transaction },
      );
      for (const r of rows) marks.push({ unitId: r.unit_id, auditId: audit.id, number: audit.number, mark: 'check_all' });
    }
  }
  return levelId ? { items, unitMarks: marks } : { items };
}

/** A level the caller names must be the job's (else 404). */
export async function checkLevel(db: Db, jobId: string, levelId: string): Promise<void> {
  const [row] = await db.sequelize.query(`SELECT 1 FROM levels WHERE job_id = $1 AND id = $2`, { bind: [jobId, levelId], type: QueryTypes.SELECT, transaction: db.transaction });
  if (!row) throw notFound();
}

export const AUDIT_CSV_HEADER = ['Section', 'Item', 'Value', 'Detail'] as const;

/** The audit report as rows: lot, plan with its source, seed, sample with results, decision, who and when. */
export async function auditCsvRows(db: Db, jobId: string, auditId: string): Promise<(string | number | null)[][]> {
  const d = await auditDetail(db, jobId, auditId);
  const lot = await db.sequelize.query<{ tag: string; level_name: string; draw_position: number; tier: number | null }>(
    `SELECT u.tag, l.name AS level_name, au.draw_position, au.tier
       FROM audit_units au JOIN units u ON u.id = au.unit_id JOIN levels l ON l.id = u.level_id
      WHERE au.audit_id = $1 ORDER BY u.tag`,
    { bind: [auditId], type: QueryTypes.SELECT, transaction: db.transaction },
  );
  const rows: (string | number | null)[][] = [
    [...AUDIT_CSV_HEADER],
    ['Audit', 'Number', d.number, d.name],
    ['Audit', 'Planned by', d.plannedBy.name, d.startedAt],
    ['Audit', 'Seed', d.seed, 'Fisher-Yates shuffle of the lot sorted by unit id, seedrandom Alea'],
    ['Lot', 'Filters', d.lotDescription, null],
    ['Lot', 'Units', d.lotSize, null],
    ['Plan', 'Scheme', d.scheme === 'z14' ? `Z1.4 level ${d.inspectionLevel}` : 'Tiered 10 percent', d.plan.source],
  ];
  if (d.plan.kind === 'z14') {
    rows.push(['Plan', 'Code letter', d.plan.letter, `Table I, lot of ${d.plan.lotSize}`]);
    for (const c of d.state.classes) {
      rows.push(['Plan', `${c.severity} (${c.aql === null ? 'none allowed' : `AQL ${c.aql}`})`, c.sampleSize, `Ac ${c.accept} / Re ${c.reject}`]);
      rows.push(['Result', c.severity, c.defects, `${c.checked} of ${c.sampleSize} checked: ${c.decision}`]);
    }
  } else {
    for (const t of d.state.tiers) {
      rows.push(['Plan', `Tier ${t.tier}`, t.size, `fails at ${t.failAt} failed units`]);
      rows.push(['Result', `Tier ${t.tier}`, t.failed, `${t.checked} of ${t.size} checked: ${t.decision}`]);
    }
  }
  rows.push(['Decision', d.decision, d.decidedAt, null]);
  for (const s of d.sample) {
    rows.push(['Sample', s.tag, s.position, `${s.levelName}; tier ${s.tier}; ${s.checkedAt ? `checked ${s.checkedAt}` : 'not checked'}; critical ${s.defects.critical}, major ${s.defects.major}, minor ${s.defects.minor}`]);
  }
  for (const u of lot) rows.push(['Lot unit', u.tag, u.draw_position, `${u.level_name}${u.tier ? `; sample tier ${u.tier}` : ''}`]);
  return rows;
}
