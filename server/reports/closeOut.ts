/**
 * The close-out report: the handover document for the owner. Cover, summary (coverage, findings
 * by status and severity per level, readiness per level and system), test records, then every
 * finding in scope (voided ones only counted) with its measured value, limit and source and its
 * photo as found beside the photo of the correction, and last the open items grouped by company.
 *
 * Findings are read in batches as their pages are written, and their photos a few ahead, so
 * memory holds one batch and one page whatever the size of the job.
 */
import type { Writable } from 'node:stream';
import type { Sequelize } from 'sequelize';
import { GOVERNS, NOT_CERTIFIED } from '../../shared/deferral';
import { findingLabel } from '../../shared/schemas/findings';
import { TEST_RECORD_KIND_LABELS } from '../../shared/schemas/testRecords';
import { FINDING_STATUS_LABELS, PHOTO_STAGE_LABELS, ROLE_LABELS, SEVERITY_LABELS, unitKindLabel, type FindingStatus, type Role } from '../../shared/words';
import { loadReadiness } from '../services/board';
import { limitText } from '../services/csvFindings';
import type { FindingScope } from '../services/findingQueries';
import { printCopyKeeper } from '../services/printCopies';
import { allTestRecords, figuresSummary } from '../services/testRecords';
import type { ObjectStore } from '../storage';
import {
  countsPerLevel,
  findingIds,
  findingRows,
  jobFacts,
  systemsOnLevel,
  unitCoverage,
  type JobFacts,
  type ReportFindingRow,
  type ResolvedScope,
} from './data';
import { CONTENT_WIDTH, finish, heading, INK, keepTogether, letOutputCatchUp, newReport, PAGE, paragraph, roomLeft, table, type Doc } from './pdf';
import { PhotoPrefetch, type PhotoRequest, type PrintPhoto } from './photos';

/** The findings a close-out report prints a page section for. */
export const CLOSE_OUT_STATUSES: readonly FindingStatus[] = ['open', 'fix_submitted', 'closed'];
export const BATCH = 50;

/** Each photo of a finding's pair: half the width, 4:3. */
export const PHOTO_BOX = { width: (CONTENT_WIDTH - 14) / 2, height: ((CONTENT_WIDTH - 14) / 2) * 0.75 };
/** A third of the width, 4:3: a finding with a re-inspection photo prints three across. */
export const THIRD_BOX = { width: (CONTENT_WIDTH - 28) / 3, height: ((CONTENT_WIDTH - 28) / 3) * 0.75 };
const PHOTO_GAP = 14;

export interface Box {
  width: number;
  height: number;
}

/** "Fix accepted 2026-11-02 by Dana Reyes": the verdict under a re-inspection photo. */
export function verdictLine(kind: 'accepted' | 'returned', on: string, by: string | null): string {
  return `${kind === 'accepted' ? 'Fix accepted' : 'Fix returned'} ${on}${by ? ` by ${by}` : ''}`;
}

export interface ReportAuthor {
  name: string;
  role: Role;
}

export interface CloseOutInput {
  sequelize: Sequelize;
  store: ObjectStore;
  scope: FindingScope;
  place: ResolvedScope;
  author: ReportAuthor;
  now: Date;
  /** Called after each batch of findings is written (background reports record their progress). */
  onProgress?: (done: number, total: number) => Promise<void> | void;
}

/** "Level 3 · System VRF-2 · Northline Mechanical", or "Whole job". */
export function scopeLabel(place: ResolvedScope): string {
  const parts: string[] = [];
  if (place.walk) parts.push(`Walk on ${place.walk.levelName}, ${place.walk.startedAt.slice(0, 10)}`);
  if (place.levelName) parts.push(place.levelName);
  if (place.systemName) parts.push(`System ${place.systemName}`);
  if (place.companyName) parts.push(place.companyName);
  return parts.length ? parts.join(' · ') : 'Whole job';
}

export function jobLine(job: JobFacts): string {
  return job.number ? `${job.name} · ${job.number}` : job.name;
}

export function dateIn(timeZone: string, at: Date): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(at);
}

export async function writeCloseOut(out: Writable, input: CloseOutInput): Promise<{ findings: number; photos: number }> {
  const { sequelize, scope, place } = input;
  const job = await jobFacts(sequelize, scope.jobId);
  const label = scopeLabel(place);
  const ids = await findingIds(sequelize, scope, place, CLOSE_OUT_STATUSES);
  const doc = newReport({ job: jobLine(job), title: `Close-out report · ${label}`, author: input.author.name });
  doc.pipe(out);

  await cover(doc, input, job, label, ids.length);
  await summary(doc, input);
  await testRecords(doc, input);

  // Findings, a batch at a time, photos read a few ahead of the page.
  doc.addPage();
  heading(doc, `Findings (${ids.length})`, 17);
  if (ids.length === 0) paragraph(doc, 'No findings in this scope.');
  const open: ReportFindingRow[] = [];
  let photos = 0;
  // The next batch's rows are read while this one is laid out, and its photos join the same
  // prefetch as soon as they arrive, so neither the database nor sharp waits at a batch's edge.
  const prefetch = new PhotoPrefetch(input.store, [], 8, printCopyKeeper({ sequelize, store: input.store }));
  const load = (start: number): Promise<{ rows: ReportFindingRow[]; base: number }> => {
    const loading = findingRows(sequelize, scope, ids.slice(start, start + BATCH)).then((rows) => ({ rows, base: prefetch.add(photoRequests(rows)) }));
    // Awaited in its turn; a failure while the batch before is still being drawn is not "unhandled".
    loading.catch(() => undefined);
    return loading;
  };
  let loading = ids.length > 0 ? load(0) : null;
  for (let start = 0; start < ids.length; start += BATCH) {
    const { rows, base } = await loading!;
    loading = start + BATCH < ids.length ? load(start + BATCH) : null;
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i]!;
      const before = await prefetch.take(base + 3 * i);
      const after = await prefetch.take(base + 3 * i + 1);
      const again = await prefetch.take(base + 3 * i + 2);
      photos += (before ? 1 : 0) + (after ? 1 : 0) + (again ? 1 : 0);
      findingSection(doc, r, job, before, after, again);
      if (r.status !== 'closed') open.push(lean(r));
      await letOutputCatchUp(doc, out);
    }
    await input.onProgress?.(Math.min(start + BATCH, ids.length), ids.length);
  }

  openByCompany(doc, open);
  await finish(doc, out);
  return { findings: ids.length, photos };
}

/** Three requests a finding, in drawing order: as found, corrected, re-inspection ('' when it has none). */
function photoRequests(rows: readonly ReportFindingRow[]): PhotoRequest[] {
  return rows.flatMap((r) => {
    const box = photoBoxOf(r);
    return [
      { key: r.defect_photo_key ?? '', box, photoId: r.defect_photo_id, printKey: r.defect_print_key },
      { key: r.fix_photo_key ?? '', box, photoId: r.fix_photo_id, printKey: r.fix_print_key },
      { key: r.reinspection_photo_key ?? '', box, photoId: r.reinspection_photo_id, printKey: r.reinspection_print_key },
    ];
  });
}

/** A finding with a re-inspection photo prints three photos across; otherwise the pair. */
function photoBoxOf(r: ReportFindingRow): Box {
  return r.reinspection_photo_key ? THIRD_BOX : PHOTO_BOX;
}

/** What the open-items list keeps of a row (not its texts), so a large job's list stays small. */
function lean(r: ReportFindingRow): ReportFindingRow {
  return { ...r, note: '', fix_note: null, fix_guidance: null, caution: null, rule_result: null };
}

async function cover(doc: Doc, input: CloseOutInput, job: JobFacts, label: string, findings: number): Promise<void> {
  doc.addPage();
  doc.y = 150;
  doc.font('bold').fontSize(30).fillColor(INK.text).text('Close-out report', PAGE.margin, doc.y, { width: CONTENT_WIDTH });
  doc.moveDown(0.3);
  doc.font('bold').fontSize(18).text(job.name, { width: CONTENT_WIDTH });
  if (job.number) doc.font('body').fontSize(12).text(`Job number ${job.number}`);
  if (job.address) doc.font('body').fontSize(12).text(job.address);
  doc.moveDown(1.5);
  doc.moveTo(PAGE.margin, doc.y).lineTo(PAGE.margin + 120, doc.y).lineWidth(3).strokeColor(INK.text).stroke();
  doc.moveDown(1.2);
  const line = (k: string, v: string) => {
    const y = doc.y;
    doc.font('bold').fontSize(12).fillColor(INK.text).text(k, PAGE.margin, y, { width: 130 });
    doc.font('body').fontSize(12).text(v, PAGE.margin + 135, y, { width: CONTENT_WIDTH - 135 });
    doc.moveDown(0.5);
  };
  line('Scope', label);
  line('Produced on', dateIn(job.timeZone, input.now));
  line('Produced by', `${input.author.name} (${ROLE_LABELS[input.author.role]})`);
  line('Findings', `${findings} printed (open, fix submitted and closed; voided ones are counted in the summary)`);
  if (input.scope.companyId) line('Shown', "This company's findings only");
  doc.y = PAGE.height - PAGE.bottom - 110;
  doc.rect(PAGE.margin, doc.y, CONTENT_WIDTH, 78).lineWidth(1).strokeColor(INK.text).stroke();
  doc.font('bold').fontSize(11).text('What this report is', PAGE.margin + 12, doc.y + 10, { width: CONTENT_WIDTH - 24 });
  doc.font('body').fontSize(10).text(`${NOT_CERTIFIED} ${GOVERNS}`, { width: CONTENT_WIDTH - 24, lineGap: 2 });
}

async function summary(doc: Doc, input: CloseOutInput): Promise<void> {
  const { sequelize, scope, place } = input;
  doc.addPage();
  heading(doc, 'Summary', 17);
  const coverage = await unitCoverage(sequelize, scope.jobId, place);
  paragraph(doc, `Units checked: ${coverage.checked} of ${coverage.units} (a unit counts once its latest unit check is complete).`, { size: 11 });
  doc.moveDown(0.6);

  heading(doc, 'Findings by level', 12);
  const counts = await countsPerLevel(sequelize, scope, place);
  if (counts.length === 0) paragraph(doc, 'No findings.');
  else {
    const total = counts.reduce(
      (t, c) => ({ ...t, open: t.open + c.open, fix_submitted: t.fix_submitted + c.fix_submitted, closed: t.closed + c.closed, voided: t.voided + c.voided, critical: t.critical + c.critical, major: t.major + c.major, minor: t.minor + c.minor }),
      { level_name: 'Total', open: 0, fix_submitted: 0, closed: 0, voided: 0, critical: 0, major: 0, minor: 0 },
    );
    const n = (x: number) => String(x);
    table(
      doc,
      [
        { label: 'Level', width: 0.24 },
        { label: 'Open', width: 0.1, align: 'right' },
        { label: 'Fix submitted', width: 0.12, align: 'right' },
        { label: 'Closed', width: 0.1, align: 'right' },
        { label: 'Voided', width: 0.1, align: 'right' },
        { label: 'Critical', width: 0.115, align: 'right' },
        { label: 'Major', width: 0.1, align: 'right' },
        { label: 'Minor', width: 0.115, align: 'right' },
      ],
      [...counts, total].map((c) => [c.level_name, n(c.open), n(c.fix_submitted), n(c.closed), n(c.voided), n(c.critical), n(c.major), n(c.minor)]),
    );
    paragraph(doc, 'Severity counts leave voided findings out.', { size: 8.5, color: INK.soft });
    doc.moveDown(0.6);
  }

  const readiness = await loadReadiness(sequelize, scope, { levelId: place.levelId ?? place.walk?.levelId, systemId: place.systemId });
  if (readiness) {
    heading(doc, 'Readiness by level', 12);
    table(
      doc,
      [
        { label: 'Level', width: 0.24 },
        { label: 'Ceilings', width: 0.2 },
        { label: 'Test records', width: 0.36 },
        { label: 'Units ready', width: 0.2, align: 'right' },
      ],
      readiness.levels.map((l) => [
        l.name,
        l.ceilingState === 'ready' ? 'Can close' : l.ceilingState === 'blocked' ? 'Not yet' : 'No ceiling units',
        l.testsReady ? 'In place' : blockerText(l.testBlockers),
        `${l.unitsReady} of ${l.unitsTotal}`,
      ]),
    );
    if (readiness.systems.length > 0) {
      heading(doc, 'Readiness by system', 12);
      table(
        doc,
        [
          { label: 'System', width: 0.24 },
          { label: 'Start-up', width: 0.2 },
          { label: 'Waiting for', width: 0.36 },
          { label: 'Units ready', width: 0.2, align: 'right' },
        ],
        readiness.systems.map((s) => [
          s.name,
          s.accepted ? 'Accepted' : s.startupReady ? 'Ready for start-up' : 'Not ready',
          s.startupReady ? (s.accepted ? '' : blockerText(s.acceptanceBlockers)) : blockerText(s.startupBlockers) || 'Units not ready',
          `${s.unitsReady} of ${s.unitsTotal}`,
        ]),
      );
    }
    if (readiness.companyScope) paragraph(doc, "Readiness counts this company's findings only.", { size: 8.5, color: INK.soft });
  }
}

function blockerText(blockers: readonly { kind: keyof typeof TEST_RECORD_KIND_LABELS; state: string }[]): string {
  const counts = new Map<string, number>();
  for (const b of blockers) {
    const key = `${TEST_RECORD_KIND_LABELS[b.kind]} ${b.state === 'missing' ? 'missing' : b.state === 'failed' ? 'failed' : 'waiting for a witness'}`;
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  return [...counts].map(([k, n]) => (n > 1 ? `${k} (${n})` : k)).join('; ');
}

async function testRecords(doc: Doc, input: CloseOutInput): Promise<void> {
  const { sequelize, scope, place } = input;
  let records = await allTestRecords(sequelize, scope, { current: true, systemId: place.systemId });
  const levelId = place.levelId ?? place.walk?.levelId;
  if (levelId) {
    const systems = await systemsOnLevel(sequelize, scope.jobId, levelId);
    records = records.filter((r) => (r.unit ? r.unit.levelId === levelId : r.system !== null && systems.has(r.system.id)));
  }
  if (place.companyId) records = records.filter((r) => r.company?.id === place.companyId);
  keepTogether(doc, 160);
  doc.moveDown(0.6);
  heading(doc, `Test records (${records.length})`, 17);
  if (records.length === 0) {
    paragraph(doc, 'No test records in this scope.');
    return;
  }
  const day = (iso: string | null) => (iso ? dateIn(scope.timeZone, new Date(iso)) : '');
  table(
    doc,
    [
      { label: 'Test', width: 0.13 },
      { label: 'System or unit', width: 0.15 },
      { label: 'Result', width: 0.09 },
      { label: 'Recorded', width: 0.15 },
      { label: 'Witnessed', width: 0.15 },
      { label: 'Figures', width: 0.33 },
    ],
    records.map((r) => [
      TEST_RECORD_KIND_LABELS[r.kind],
      r.unit ? r.unit.tag : (r.system?.name ?? ''),
      r.result === 'passed' ? 'Passed' : r.result === 'failed' ? 'Failed' : 'Recorded',
      `${day(r.recordedAt)} ${r.recordedBy.name}`,
      r.witnessedBy ? `${day(r.witnessedAt)} ${r.witnessedBy.name}` : 'Not witnessed',
      figuresSummary(r) + (r.reasons.length ? ` — ${r.reasons.join('; ')}` : ''),
    ]),
    8.5,
  );
}

/**
 * One finding: its facts in two columns, then the photo as found beside the correction photo,
 * and the latest re-inspection's photo beside them when the inspector took one.
 */
function findingSection(doc: Doc, r: ReportFindingRow, job: JobFacts, before: PrintPhoto | null, after: PrintPhoto | null, again: PrintPhoto | null): void {
  const hasPhotos = Boolean(r.defect_photo_key || r.fix_photo_key || r.reinspection_photo_key);
  const box = photoBoxOf(r);
  // Heading and facts take about 110 points; the photos their box and caption.
  keepTogether(doc, 110 + (hasPhotos ? box.height + 28 : 0));
  const top = doc.y;
  doc.moveTo(PAGE.margin, top).lineTo(PAGE.margin + CONTENT_WIDTH, top).lineWidth(1.4).strokeColor(INK.text).stroke();
  doc.y = top + 6;
  const where = [r.level_name, r.space_name].filter(Boolean).join(' / ');
  doc.font('bold').fontSize(12.5).fillColor(INK.text);
  doc.text(`${findingLabel(r.number)}  ${r.unit_tag ?? 'No unit'}  ·  ${r.code} ${r.title}`, PAGE.margin, doc.y, { width: CONTENT_WIDTH });
  doc.font('body').fontSize(9.5).text(
    [where, r.unit_kind ? unitKindLabel(r.unit_kind) : null, r.system_name ? `System ${r.system_name}` : null].filter(Boolean).join('  ·  '),
    { width: CONTENT_WIDTH },
  );
  doc.moveDown(0.3);
  const facts: [string, string][] = [
    ['Status', FINDING_STATUS_LABELS[r.status] + (r.return_count > 0 ? ` (returned ${r.return_count}×)` : '')],
    ['Severity', SEVERITY_LABELS[r.severity]],
    ['Company', r.company_name],
    ['Logged', `${r.logged_on} by ${r.logged_by_name}`],
    ['Due', r.due_on],
  ];
  if (r.fix_on) facts.push(['Fix submitted', `${r.fix_on} by ${r.fix_by_name ?? ''}`]);
  if (r.closed_on) facts.push(['Closed', `${r.closed_on}${r.closed_by_name ? ` by ${r.closed_by_name}` : ''}`]);
  if (r.measured_text || r.rule_result) {
    const limit = limitText(r.rule_result, r.quantity, job.unitSystem);
    facts.push(['Measured', r.measured_text ?? '']);
    if (limit) facts.push(['Limit', `${limit}${r.rule_result?.pass === false ? ' (not met)' : r.rule_result?.pass ? ' (met)' : ''}`]);
    if (r.rule_result?.limitSource) facts.push(['Limit source', r.rule_result.limitSource]);
    if (r.fix_measured_text) facts.push(['After the fix', r.fix_measured_text]);
  }
  const half = Math.ceil(facts.length / 2);
  const colW = CONTENT_WIDTH / 2 - 6;
  const factsTop = doc.y;
  let bottom = factsTop;
  [facts.slice(0, half), facts.slice(half)].forEach((col, c) => {
    let y = factsTop;
    for (const [k, v] of col) {
      const x = PAGE.margin + c * (colW + 12);
      doc.font('bold').fontSize(9).text(k, x, y, { width: 78 });
      doc.font('body').fontSize(9).text(v, x + 80, y, { width: colW - 80 });
      y = Math.max(doc.y, y + 12) + 1;
    }
    bottom = Math.max(bottom, y);
  });
  doc.x = PAGE.margin;
  doc.y = bottom + 2;
  if (r.note) paragraph(doc, `Note: ${r.note}`, { size: 9 });
  if (r.fix_note) paragraph(doc, `Fix: ${r.fix_note}`, { size: 9 });
  doc.moveDown(0.4);
  if (hasPhotos) {
    const under = r.reinspection_photo_key && r.reinspection_kind && r.reinspection_on ? verdictLine(r.reinspection_kind, r.reinspection_on, r.reinspection_by_name) : null;
    if (roomLeft(doc) < box.height + 18 + (under ? 10 : 0)) doc.addPage();
    const y = doc.y;
    photoBox(doc, PAGE.margin, y, box, 'As found', r.defect_photo_key ? before : null, Boolean(r.defect_photo_key));
    photoBox(doc, PAGE.margin + box.width + PHOTO_GAP, y, box, 'Corrected', r.fix_photo_key ? after : null, Boolean(r.fix_photo_key));
    if (r.reinspection_photo_key) photoBox(doc, PAGE.margin + 2 * (box.width + PHOTO_GAP), y, box, PHOTO_STAGE_LABELS.reinspection, again, true, under);
    doc.x = PAGE.margin;
    doc.y = y + box.height + 16 + (under ? 10 : 0);
  }
  doc.moveDown(0.8);
}

/**
 * A captioned photo in `box` at (x, y): the caption above, the photo fitted inside a hairline
 * frame, and an optional small line under it. "Photo not available" when the store could not give it.
 */
export function photoBox(doc: Doc, x: number, y: number, box: Box, caption: string, photo: PrintPhoto | null, expected: boolean, under?: string | null): void {
  doc.font('bold').fontSize(8.5).fillColor(INK.text).text(caption, x, y, { width: box.width, lineBreak: false });
  const top = y + 11;
  doc.rect(x, top, box.width, box.height).lineWidth(0.5).strokeColor(INK.rule).stroke();
  if (photo) {
    doc.image(photo.jpeg, x, top, { fit: [box.width, box.height], align: 'center', valign: 'center' });
  } else {
    doc.font('italic').fontSize(9).fillColor(INK.soft).text(expected ? 'Photo not available' : 'No photo', x, top + box.height / 2 - 5, {
      width: box.width,
      align: 'center',
    });
    doc.fillColor(INK.text);
  }
  if (under) {
    doc.font('body').fontSize(7.5).fillColor(INK.soft).text(under, x, top + box.height + 2, { width: box.width, lineBreak: false, ellipsis: true });
    doc.fillColor(INK.text);
  }
}

function openByCompany(doc: Doc, open: readonly ReportFindingRow[]): void {
  doc.addPage();
  heading(doc, `Open items by company (${open.length})`, 17);
  if (open.length === 0) {
    paragraph(doc, 'Nothing is open in this scope.');
    return;
  }
  const byCompany = new Map<string, ReportFindingRow[]>();
  for (const r of open) byCompany.set(r.company_name, [...(byCompany.get(r.company_name) ?? []), r]);
  for (const [company, rows] of [...byCompany].sort(([a], [b]) => a.localeCompare(b))) {
    heading(doc, `${company} (${rows.length})`, 12);
    table(
      doc,
      [
        { label: 'Finding', width: 0.08 },
        { label: 'Unit', width: 0.12 },
        { label: 'Where', width: 0.18 },
        { label: 'Defect', width: 0.27 },
        { label: 'Severity', width: 0.09 },
        { label: 'Status', width: 0.12 },
        { label: 'Due', width: 0.14 },
      ],
      rows.map((r) => [
        findingLabel(r.number),
        r.unit_tag ?? '',
        [r.level_name, r.space_name].filter(Boolean).join(' / '),
        `${r.code} ${r.title}`,
        SEVERITY_LABELS[r.severity],
        FINDING_STATUS_LABELS[r.status],
        r.due_on,
      ]),
      8.5,
    );
  }
}
