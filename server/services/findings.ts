/**
 * Walks, unit checks and findings: the logic the commands and routes share.
 * - the responsible company suggested from the defect type's trade and the job's companies
 *   (the rule itself: shared/rules/suggestedCompany.ts; due dates: shared/rules/due.ts);
 * - measured values parsed (shared/calc parseItemMeasurement) and evaluated against the unit's model
 *   limits, the job's settings and the job's code editions (evaluateItemRule + makeLimitResolver);
 * - per-job finding numbers (#1, #2 ...) handed out under a row lock;
 * - the append-only finding history (finding_events: create only; the database refuses changes).
 */
import { unitLimitResolver } from '../../shared/rules/limits';
import { fixNeedsMeasurement, measurementVerdict, newMeasurementNeeded, sameLimitResolver } from '../../shared/rules/remeasure';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { evaluateItemRule, parseItemMeasurement } from '../../shared/calc/itemRules';
import type { LimitResolver, RuleResult } from '../../shared/calc/rules';
import type { FindingEventKind } from '../../shared/schemas/findings';
import { suggestedCompany } from '../../shared/rules/suggestedCompany';
import type { Severity } from '../../shared/words';
import { badRequest } from '../errors';
import { CatalogueItem, FindingEvent, Job, Unit, UnitModel, type Finding } from '../models';

// ---------------------------------------------------------------------------------------------
// Due dates: the rule lives in shared/rules (the screens apply the same one).

export { dueOnFor } from '../../shared/rules/due';

// ---------------------------------------------------------------------------------------------
// Companies

export interface CompanyRef {
  id: string;
  name: string;
}

/** The job's company suggested for `trade` (shared/rules/suggestedCompany.ts, the form's rule too), or null. */
export async function suggestCompany(
  sequelize: Sequelize,
  jobId: string,
  trade: string,
  transaction?: Transaction,
): Promise<CompanyRef | null> {
  const rows = await sequelize.query<CompanyRef & { trades: string[] }>(
    `SELECT c.id, c.name, jc.trades FROM job_companies jc JOIN companies c ON c.id = jc.company_id
      WHERE jc.job_id = $1 AND $2 = ANY (jc.trades)`,
    { bind: [jobId, trade], type: QueryTypes.SELECT, transaction },
  );
  const company = suggestedCompany(rows, trade);
  return company ? { id: company.id, name: company.name } : null;
}

/** The company if it is on the job, else null. */
export async function companyOnJob(
  sequelize: Sequelize,
  jobId: string,
  companyId: string,
  transaction?: Transaction,
): Promise<CompanyRef | null> {
  const rows = await sequelize.query<CompanyRef>(
    `SELECT c.id, c.name FROM job_companies jc JOIN companies c ON c.id = jc.company_id
      WHERE jc.job_id = $1 AND jc.company_id = $2`,
    { bind: [jobId, companyId], type: QueryTypes.SELECT, transaction },
  );
  return rows[0] ?? null;
}

// ---------------------------------------------------------------------------------------------
// Measured values

/** The limit resolver for one unit (its model's limits, or none) on one job: the shared rule the phone applies too. */
export function limitResolverFor(job: Job, model: UnitModel | null, unit?: Pick<Unit, 'capacity'> | null): LimitResolver {
  return unitLimitResolver({
    model: model ? { name: model.name, limits: model.limits } : null,
    job: { settings: job.settings, codeEditions: job.codeEditions },
    unit: unit ? { capacity: unit.capacity } : null,
  });
}

export interface Measurement {
  measuredText: string;
  /** Base units; yes/no answers as 1 / 0. */
  measuredValue: number;
  result: RuleResult;
}

/**
 * Parses `text` as the item's rule quantity and evaluates the rule. A value that cannot be read
 * is a 400 naming `field`; an item without a measured rule is a 400 too.
 */
export function measure(
  item: Pick<CatalogueItem, 'code' | 'title' | 'measuredRule'>,
  text: string,
  resolver: LimitResolver,
  job: Pick<Job, 'unitSystem'>,
  field: string,
): Measurement {
  const rule = item.measuredRule;
  if (!rule) {
    const message = `${item.code} ${item.title} has no measured rule, so it takes no measured value.`;
    throw badRequest(`${field}: ${message}`, { [field]: message });
  }
  const parsed = parseItemMeasurement(rule, text, { system: job.unitSystem, allowNegative: false });
  if (!parsed.ok) throw badRequest(`${field}: ${parsed.error}`, { [field]: parsed.error });
  const measured = rule.quantity === 'boolean' ? parsed.value === 1 : parsed.value;
  const result = evaluateItemRule(rule, measured, resolver, {
    system: job.unitSystem,
    given: parsed.given,
    source: rule.comparison === 'yes_no' ? `${item.code} ${item.title}` : undefined,
  });
  return { measuredText: text.trim(), measuredValue: parsed.value, result };
}

/**
 * A new measurement of a logged finding (with a fix, or at re-inspection): the defect type's rule,
 * and the limit the finding as logged was judged against (shared/rules/remeasure.ts); a limit the
 * original did not decide comes from the unit's limits now. 400 naming `field` when the text
 * cannot be read or the defect type takes no measured value.
 */
export async function remeasure(
  finding: Pick<Finding, 'jobId' | 'catalogueItemId' | 'unitId' | 'ruleResult'>,
  text: string,
  field: string,
  transaction?: Transaction,
): Promise<Measurement & { verdict: string }> {
  const [item, job] = await Promise.all([
    CatalogueItem.findOne({ where: { id: finding.catalogueItemId, jobId: finding.jobId }, transaction }),
    Job.findByPk(finding.jobId, { transaction }),
  ]);
  if (!item || !job) throw new Error('a finding without its defect type or job');
  const unit = finding.unitId ? await Unit.findOne({ where: { id: finding.unitId, jobId: finding.jobId }, attributes: ['modelId', 'capacity'], transaction }) : null;
  const model = unit?.modelId ? await UnitModel.findOne({ where: { id: unit.modelId, jobId: finding.jobId }, transaction }) : null;
  const fallback = limitResolverFor(job, model, unit);
  const resolver = item.measuredRule ? sameLimitResolver(item.measuredRule, finding.ruleResult, fallback) : fallback;
  const m = measure(item, text, resolver, job, field);
  return { ...m, verdict: measurementVerdict(item.measuredRule!, m.result, job.unitSystem) };
}

/**
 * The new measurement a fix brings: required (400 `measuredText`) when the finding was logged with
 * a measured value of a measured defect type; otherwise optional. Checked before any photo is stored.
 */
export async function fixMeasurement(
  finding: Pick<Finding, 'jobId' | 'catalogueItemId' | 'unitId' | 'ruleResult' | 'measuredText'>,
  text: string | null | undefined,
): Promise<(Measurement & { verdict: string }) | null> {
  if (text) return remeasure(finding, text, 'measuredText');
  const item = await CatalogueItem.findOne({ where: { id: finding.catalogueItemId, jobId: finding.jobId }, attributes: ['measuredRule'] });
  if (fixNeedsMeasurement(item?.measuredRule, finding)) {
    const message = newMeasurementNeeded(item!.measuredRule!);
    throw badRequest(`measuredText: ${message}`, { measuredText: message });
  }
  return null;
}

/** What a history entry keeps of a new measurement: the value as typed, pass/fail and the verdict in words. */
export function measurementEventFields(m: (Measurement & { verdict: string }) | null): Record<string, unknown> {
  return m ? { measuredText: m.measuredText, pass: m.result.pass, verdict: m.verdict } : {};
}

// ---------------------------------------------------------------------------------------------
// Numbers and events

/** The job's next finding number; the counter row stays locked until the transaction ends. */
export async function nextFindingNumber(sequelize: Sequelize, jobId: string, transaction: Transaction): Promise<number> {
  const [row] = await sequelize.query<{ last_number: number }>(
    `INSERT INTO job_finding_numbers (job_id, last_number) VALUES ($1, 1)
     ON CONFLICT (job_id) DO UPDATE SET last_number = job_finding_numbers.last_number + 1
     RETURNING last_number`,
    { bind: [jobId], type: QueryTypes.SELECT, transaction },
  );
  return row!.last_number;
}

export interface EventInput {
  findingId: string;
  jobId: string;
  actorId: string;
  kind: FindingEventKind;
  from?: Record<string, unknown> | null;
  to?: Record<string, unknown> | null;
  reason?: string | null;
  photoIds?: string[];
  at?: Date;
}

/** Appends one event to a finding's history (never updated or deleted afterwards). */
export async function recordFindingEvent(input: EventInput, transaction: Transaction): Promise<FindingEvent> {
  return FindingEvent.create(
    {
      findingId: input.findingId,
      jobId: input.jobId,
      actorId: input.actorId,
      kind: input.kind,
      from: input.from ?? null,
      to: input.to ?? null,
      reason: input.reason ?? null,
      photoIds: input.photoIds ?? [],
      at: input.at ?? new Date(),
    },
    { transaction },
  );
}

/** Severity rank for sorting and "worst": critical 1, major 2, minor 3. */
export const SEVERITY_RANK_SQL = (column: string) =>
  `(CASE ${column} WHEN 'critical' THEN 1 WHEN 'major' THEN 2 ELSE 3 END)`;
export const SEVERITY_BY_RANK: Record<number, Severity> = { 1: 'critical', 2: 'major', 3: 'minor' };
