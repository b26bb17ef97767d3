/**
 * The unit sheet: one unit's whole history on one document. What it is and where, its unit
 * checks, every finding on it with each step (logged, fixes, returns, acceptance) and the test
 * records that cover it (its drain test, its system's pressure, evacuation, charge and start-up).
 * Under a finding's steps, the photos its inspector took at each re-inspection, captioned with the
 * verdict, day and inspector.
 * A subcontractor's sheet holds only their own company's findings and the test records their
 * company answers for, like every other read.
 */
import type { Writable } from 'node:stream';
import { QueryTypes, type Sequelize } from 'sequelize';
import { findingLabel } from '../../shared/schemas/findings';
import { TEST_RECORD_KIND_LABELS } from '../../shared/schemas/testRecords';
import { FINDING_STATUS_LABELS, PHOTO_STAGE_LABELS, SEVERITY_LABELS, unitKindLabel, type FindingStatus, type Severity, type UnitKindKey } from '../../shared/words';
import { notFound } from '../errors';
import { limitText } from '../services/csvFindings';
import { findingScopeSql, jobFacts, PRINT_KEY_SQL } from './data';
import type { FindingScope } from '../services/findingQueries';
import { printCopyKeeper } from '../services/printCopies';
import { allTestRecords, figuresSummary } from '../services/testRecords';
import type { ObjectStore } from '../storage';
import { dateIn, jobLine, photoBox, THIRD_BOX, verdictLine, type ReportAuthor } from './closeOut';
import { CONTENT_WIDTH, finish, heading, INK, keepTogether, newReport, PAGE, paragraph, table } from './pdf';
import { PhotoPrefetch } from './photos';
import type { RuleResult } from '../../shared/calc/rules';
import type { QuantityKind } from '../../shared/catalogue/types';

interface UnitRow {
  tag: string;
  kind: UnitKindKey;
  model_name: string | null;
  model_number: string | null;
  capacity: number | null;
  level_name: string;
  space_name: string | null;
  system_id: string | null;
  system_name: string | null;
  crew_name: string | null;
  crew_company: string | null;
}

/** The unit, or 404 when it is not on the job. Checked before any byte of the PDF is sent. */
export async function loadUnit(sequelize: Sequelize, jobId: string, unitId: string): Promise<UnitRow> {
  const [u] = await sequelize.query<UnitRow>(
    `SELECT u.tag, u.kind, m.name AS model_name, m.model_number, u.capacity, l.name AS level_name, s.name AS space_name,
            u.system_id, sy.name AS system_name, cr.name AS crew_name, cc.name AS crew_company
       FROM units u JOIN levels l ON l.id = u.level_id
       LEFT JOIN unit_models m ON m.id = u.model_id
       LEFT JOIN spaces s ON s.id = u.space_id
       LEFT JOIN systems sy ON sy.id = u.system_id
       LEFT JOIN crews cr ON cr.id = u.installed_by_crew_id
       LEFT JOIN companies cc ON cc.id = cr.company_id
      WHERE u.job_id = $1 AND u.id = $2`,
    { bind: [jobId, unitId], type: QueryTypes.SELECT },
  );
  if (!u) throw notFound('That unit is not on this job.');
  return u;
}

export interface UnitSheetInput {
  sequelize: Sequelize;
  scope: FindingScope;
  unitId: string;
  unit: UnitRow;
  /** The photo store: the re-inspection photos are printed under each finding's steps. */
  store: ObjectStore;
  author: ReportAuthor;
  now: Date;
}

export async function writeUnitSheet(out: Writable, input: UnitSheetInput): Promise<{ findings: number; photos: number }> {
  const { sequelize, scope, unit, unitId } = input;
  const job = await jobFacts(sequelize, scope.jobId);
  const tz = scope.timeZone;
  const day = (d: Date | string | null) => (d ? dateIn(tz, new Date(d)) : '');
  const doc = newReport({ job: jobLine(job), title: `Unit sheet · ${unit.tag}`, author: input.author.name });
  doc.pipe(out);
  doc.addPage();

  doc.font('bold').fontSize(24).fillColor(INK.text).text(unit.tag, PAGE.margin, doc.y, { width: CONTENT_WIDTH });
  doc.font('body').fontSize(11).text(`Unit sheet, printed ${dateIn(tz, input.now)} by ${input.author.name}`);
  doc.moveDown(0.6);
  table(
    doc,
    [
      { label: 'Unit', width: 0.25 },
      { label: '', width: 0.75 },
    ],
    [
      ['Kind', unitKindLabel(unit.kind)],
      ['Model', [unit.model_name, unit.model_number].filter(Boolean).join(', ') || 'Not recorded'],
      ['Capacity', unit.capacity === null ? 'Not recorded' : String(unit.capacity)],
      ['Level and space', [unit.level_name, unit.space_name].filter(Boolean).join(' / ')],
      ['System', unit.system_name ?? 'None'],
      ['Installed by', unit.crew_name ? `${unit.crew_name} (${unit.crew_company ?? ''})` : 'Not recorded'],
    ],
    10,
  );

  // Unit checks: every save of a check, newest last.
  const checks = await sequelize.query<{ checked_at: Date; name: string; complete: boolean; ok: string; defect: string; na: string }>(
    `SELECT uc.checked_at, us.name, uc.complete,
            count(i.id) FILTER (WHERE i.mark = 'ok') AS ok, count(i.id) FILTER (WHERE i.mark = 'defect') AS defect,
            count(i.id) FILTER (WHERE i.mark = 'not_applicable') AS na
       FROM unit_checks uc JOIN users us ON us.id = uc.checked_by LEFT JOIN unit_check_items i ON i.unit_check_id = uc.id
      WHERE uc.job_id = $1 AND uc.unit_id = $2
      GROUP BY uc.id, us.name ORDER BY uc.checked_at, uc.id`,
    { bind: [scope.jobId, unitId], type: QueryTypes.SELECT },
  );
  heading(doc, `Unit checks (${checks.length})`, 14);
  if (checks.length === 0) paragraph(doc, 'Not checked yet.');
  else
    table(
      doc,
      [
        { label: 'Date', width: 0.18 },
        { label: 'By', width: 0.3 },
        { label: 'Complete', width: 0.16 },
        { label: 'OK', width: 0.12, align: 'right' },
        { label: 'Defect', width: 0.12, align: 'right' },
        { label: 'N/A', width: 0.12, align: 'right' },
      ],
      checks.map((c) => [day(c.checked_at), c.name, c.complete ? 'Yes' : 'No', c.ok, c.defect, c.na]),
    );

  // Findings in the caller's scope, each with its steps.
  const bind: unknown[] = [];
  const where = findingScopeSql(scope, {}, bind);
  const findings = await sequelize.query<{
    id: string;
    number: number;
    code: string;
    title: string;
    severity: Severity;
    status: FindingStatus;
    company_name: string;
    measured_text: string | null;
    rule_result: RuleResult | null;
    quantity: QuantityKind | null;
    note: string;
  }>(
    `SELECT f.id, f.number, ci.code, coalesce(f.title, ci.title) AS title, f.severity, f.status, c.name AS company_name,
            f.measured_text, f.rule_result, ci.measured_rule->>'quantity' AS quantity, f.note
       FROM findings f JOIN catalogue_items ci ON ci.id = f.catalogue_item_id JOIN companies c ON c.id = f.company_id
      WHERE ${where} AND f.unit_id = $${bind.push(unitId)} ORDER BY f.number`,
    { bind, type: QueryTypes.SELECT },
  );
  const events = await sequelize.query<{ finding_id: string; at: Date; kind: string; name: string; reason: string | null; note: string | null }>(
    `SELECT e.finding_id, e.at, e.kind, us.name, e.reason, x.note
       FROM finding_events e JOIN users us ON us.id = e.actor_id
       LEFT JOIN fixes x ON e.kind = 'fix_submitted' AND x.finding_id = e.finding_id AND x.submitted_at = e.at
      WHERE e.job_id = $1 AND e.finding_id = ANY ($2::uuid[]) AND e.kind <> 'comment'
      ORDER BY e.at, e.id`,
    { bind: [scope.jobId, findings.map((f) => f.id)], type: QueryTypes.SELECT },
  );
  // Re-inspection photos: the ones each accepted / returned event names (photos.stage 'reinspection').
  const shots = await sequelize.query<{
    finding_id: string;
    photo_id: string;
    storage_key: string;
    print_key: string | null;
    kind: 'accepted' | 'returned';
    at: Date;
    name: string;
  }>(
    `SELECT p.finding_id, p.id AS photo_id, coalesce(pm.marked_key, p.storage_key) AS storage_key, ${PRINT_KEY_SQL} AS print_key, e.kind, e.at, us.name
       FROM finding_events e JOIN findings f ON f.id = e.finding_id JOIN users us ON us.id = e.actor_id
       JOIN photos p ON p.id = ANY (e.photo_ids) AND p.finding_id = e.finding_id AND p.job_id = e.job_id AND p.stage = 'reinspection'
       LEFT JOIN photo_marks pm ON pm.photo_id = p.id
      WHERE e.job_id = $1 AND e.finding_id = ANY ($2::uuid[]) AND e.kind IN ('accepted', 'returned')
      ORDER BY f.number, e.at, e.id, p.created_at, p.id`,
    { bind: [scope.jobId, findings.map((f) => f.id)], type: QueryTypes.SELECT },
  );
  const prefetch = new PhotoPrefetch(
    input.store,
    shots.map((p) => ({ key: p.storage_key, box: THIRD_BOX, photoId: p.photo_id, printKey: p.print_key })),
    8,
    printCopyKeeper({ sequelize, store: input.store }),
  );
  let photos = 0;
  doc.moveDown(0.4);
  heading(doc, `Findings (${findings.length})`, 14);
  if (findings.length === 0) paragraph(doc, 'No findings on this unit.');
  for (const f of findings) {
    keepTogether(doc, 90);
    doc.font('bold').fontSize(11).fillColor(INK.text).text(`${findingLabel(f.number)}  ${f.code} ${f.title}`, PAGE.margin, doc.y, { width: CONTENT_WIDTH });
    const limit = limitText(f.rule_result, f.quantity, job.unitSystem);
    paragraph(
      doc,
      `${SEVERITY_LABELS[f.severity]} · ${FINDING_STATUS_LABELS[f.status]} · ${f.company_name}` +
        (f.measured_text ? ` · measured ${f.measured_text}${limit ? `, limit ${limit}` : ''}${f.rule_result?.limitSource ? ` (${f.rule_result.limitSource})` : ''}` : ''),
      { size: 9.5 },
    );
    if (f.note) paragraph(doc, `Note: ${f.note}`, { size: 9 });
    const steps = events.filter((e) => e.finding_id === f.id);
    table(
      doc,
      [
        { label: 'Date', width: 0.16 },
        { label: 'Step', width: 0.2 },
        { label: 'By', width: 0.24 },
        { label: 'Detail', width: 0.4 },
      ],
      steps.map((e) => [day(e.at), STEP_LABELS[e.kind] ?? e.kind.replace(/_/g, ' '), e.name, e.reason ?? e.note ?? '']),
      8.5,
    );
    // Three across, a row at a time, each kept whole on its page.
    const mine = shots.map((p, i) => ({ ...p, i })).filter((p) => p.finding_id === f.id);
    for (let start = 0; start < mine.length; start += 3) {
      const row = mine.slice(start, start + 3);
      keepTogether(doc, THIRD_BOX.height + 30);
      const y = doc.y;
      for (const [c, p] of row.entries()) {
        const photo = await prefetch.take(p.i);
        if (photo) photos += 1;
        photoBox(doc, PAGE.margin + c * (THIRD_BOX.width + 14), y, THIRD_BOX, PHOTO_STAGE_LABELS.reinspection, photo, true, verdictLine(p.kind, day(p.at), p.name));
      }
      doc.x = PAGE.margin;
      doc.y = y + THIRD_BOX.height + 28;
    }
  }

  // Test records: the unit's drain test and its system's records, in the caller's scope.
  const records = [
    ...(await allTestRecords(sequelize, scope, { unitId, current: true })),
    ...(unit.system_id ? (await allTestRecords(sequelize, scope, { systemId: unit.system_id, current: true })).filter((r) => r.unit === null) : []),
  ];
  heading(doc, `Test records (${records.length})`, 14);
  if (records.length === 0) paragraph(doc, 'No test records for this unit or its system.');
  else
    table(
      doc,
      [
        { label: 'Test', width: 0.14 },
        { label: 'Result', width: 0.1 },
        { label: 'Recorded', width: 0.18 },
        { label: 'Witnessed', width: 0.18 },
        { label: 'Figures', width: 0.4 },
      ],
      records.map((r) => [
        TEST_RECORD_KIND_LABELS[r.kind],
        r.result === 'passed' ? 'Passed' : r.result === 'failed' ? 'Failed' : 'Recorded',
        `${day(r.recordedAt)} ${r.recordedBy.name}`,
        r.witnessedBy ? `${day(r.witnessedAt)} ${r.witnessedBy.name}` : 'Not witnessed',
        figuresSummary(r),
      ]),
      8.5,
    );
  await finish(doc, out);
  return { findings: findings.length, photos };
}

const STEP_LABELS: Record<string, string> = {
  logged: 'Logged',
  fix_submitted: 'Fix submitted',
  accepted: 'Fix accepted',
  returned: 'Returned',
  closed_on_walk: 'Closed on a walk',
  voided: 'Voided',
  reopened: 'Reopened',
  reassigned: 'Reassigned',
  severity_changed: 'Severity changed',
  due_changed: 'Due date changed',
  photo_added: 'Photo added',
};
