/**
 * The crew punch list: one company's unresolved findings on one level (or one walk), printed for
 * a crew that does not use the app. Ordered by space, then unit, so a crew clears an area in one
 * pass. Each item: a tick box, what and where, a small photo, the fix guidance (and caution), and
 * lines for a note. Black on white, weight and boxes instead of colour: it is read off a
 * black-and-white copy on a ladder.
 */
import type { Writable } from 'node:stream';
import type { Sequelize } from 'sequelize';
import { findingLabel } from '../../shared/schemas/findings';
import { SEVERITY_LABELS, type FindingStatus } from '../../shared/words';
import { limitText } from '../services/csvFindings';
import type { FindingScope } from '../services/findingQueries';
import type { ObjectStore } from '../storage';
import { dateIn, jobLine, type ReportAuthor } from './closeOut';
import { findingIds, findingRows, jobFacts, type ReportFindingRow, type ResolvedScope } from './data';
import { CONTENT_WIDTH, finish, INK, keepTogether, letOutputCatchUp, newReport, PAGE, paragraph, tickBox, type Doc } from './pdf';
import { PhotoPrefetch } from './photos';

export const CREW_LIST_STATUSES: readonly FindingStatus[] = ['open', 'fix_submitted'];
const THUMB = { width: 92, height: 69 };
const BATCH = 50;

export interface CrewListInput {
  sequelize: Sequelize;
  store: ObjectStore;
  scope: FindingScope;
  /** companyId is set (the route makes sure), and levelId or walk. */
  place: ResolvedScope & { companyId: string; companyName: string };
  author: ReportAuthor;
  now: Date;
}

export async function writeCrewList(out: Writable, input: CrewListInput): Promise<{ findings: number }> {
  const { sequelize, scope, place } = input;
  const job = await jobFacts(sequelize, scope.jobId);
  const levelName = place.walk?.levelName ?? place.levelName ?? '';
  const ids = await findingIds(sequelize, scope, place, CREW_LIST_STATUSES);
  const doc = newReport({ job: jobLine(job), title: `Crew punch list · ${place.companyName} · ${levelName}`, author: input.author.name });
  doc.pipe(out);
  doc.addPage();

  doc.font('bold').fontSize(20).fillColor(INK.text).text('Crew punch list', PAGE.margin, doc.y, { width: CONTENT_WIDTH });
  doc.font('bold').fontSize(13).text(`${place.companyName} · ${levelName}`);
  const sub = place.walk ? `Found on the walk of ${place.walk.startedAt.slice(0, 10)} by ${place.walk.inspector}. ` : '';
  doc.font('body').fontSize(10).text(
    `${sub}${ids.length} item${ids.length === 1 ? '' : 's'} to fix, by space. Printed ${dateIn(job.timeZone, input.now)} by ${input.author.name}. ` +
      'Tick each item when it is fixed, note what was done, and send a photo of the fix through Trimout (or give this sheet to the person who does).',
    { width: CONTENT_WIDTH, lineGap: 1.5 },
  );
  doc.moveDown(0.8);
  if (ids.length === 0) paragraph(doc, 'Nothing to fix here for this company.', { size: 12, font: 'bold' });

  let space: string | null | undefined;
  for (let start = 0; start < ids.length; start += BATCH) {
    const rows = await findingRows(sequelize, scope, ids.slice(start, start + BATCH));
    const prefetch = new PhotoPrefetch(
      input.store,
      // The stored thumbnail (320 px) is already about 150 dpi at this size.
      rows.map((r) => ({ key: r.defect_thumb_key ?? '', box: THUMB })),
    );
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i]!;
      const photo = await prefetch.take(i);
      const spaceName = r.space_name ?? 'No space';
      if (spaceName !== space) {
        keepTogether(doc, 130);
        doc.moveDown(0.3);
        doc.rect(PAGE.margin, doc.y, CONTENT_WIDTH, 20).fill(INK.text);
        doc.font('bold').fontSize(11).fillColor('#FFFFFF').text(spaceName, PAGE.margin + 8, doc.y + 5, { width: CONTENT_WIDTH - 16, lineBreak: false });
        doc.fillColor(INK.text);
        doc.y += 10;
        doc.x = PAGE.margin;
        space = spaceName;
      }
      item(doc, r, job.unitSystem, photo);
      await letOutputCatchUp(doc, out);
    }
  }
  await finish(doc, out);
  return { findings: ids.length };
}

function item(doc: Doc, r: ReportFindingRow, unitSystem: 'imperial' | 'metric', photo: { jpeg: Buffer } | null): void {
  const textX = PAGE.margin + 24;
  const textW = CONTENT_WIDTH - 24 - THUMB.width - 12;
  doc.font('body').fontSize(9);
  const guidance = r.fix_guidance ? `What to do: ${r.fix_guidance}` : '';
  const need = 40 + (guidance ? doc.heightOfString(guidance, { width: textW }) : 0) + (r.caution ? 30 : 0) + 34;
  keepTogether(doc, Math.max(need, THUMB.height + 40));
  const top = doc.y + 4;
  tickBox(doc, PAGE.margin + 2, top + 1, 14);
  doc.font('bold').fontSize(11.5).fillColor(INK.text);
  doc.text(`${r.unit_tag ?? 'No unit'}  ·  ${r.code} ${r.title}`, textX, top, { width: textW });
  const severity = SEVERITY_LABELS[r.severity].toUpperCase();
  const status =
    r.status === 'fix_submitted' ? 'Fix submitted, waiting for the inspector' : r.return_count > 0 ? `Returned ${r.return_count}× — fix again` : 'Open';
  doc.font('bold').fontSize(9).text(`${severity}  ·  ${findingLabel(r.number)}  ·  ${status}  ·  due ${r.due_on}`, textX, doc.y, { width: textW });
  if (r.measured_text) {
    const limit = limitText(r.rule_result, r.quantity, unitSystem);
    doc.font('body').text(`Measured ${r.measured_text}${limit ? `; limit ${limit}` : ''}${r.rule_result?.limitSource ? ` (${r.rule_result.limitSource})` : ''}`, textX, doc.y, {
      width: textW,
    });
  }
  if (r.note) doc.font('italic').text(`Inspector: ${r.note}`, textX, doc.y, { width: textW });
  if (guidance) doc.font('body').text(guidance, textX, doc.y, { width: textW, lineGap: 1 });
  if (r.caution) doc.font('bold').text(`Caution: ${r.caution}`, textX, doc.y, { width: textW, lineGap: 1 });
  const textBottom = doc.y;
  const photoX = PAGE.margin + CONTENT_WIDTH - THUMB.width;
  if (photo) doc.image(photo.jpeg, photoX, top, { fit: [THUMB.width, THUMB.height], align: 'center' });
  else {
    doc.rect(photoX, top, THUMB.width, THUMB.height).lineWidth(0.5).strokeColor(INK.rule).stroke();
    doc.font('italic').fontSize(8).fillColor(INK.soft).text('No photo', photoX, top + THUMB.height / 2 - 4, { width: THUMB.width, align: 'center' });
    doc.fillColor(INK.text);
  }
  let y = Math.max(textBottom + 6, top + THUMB.height + 6);
  doc.font('body').fontSize(8.5).fillColor(INK.soft).text('Note', textX, y, { lineBreak: false });
  doc.fillColor(INK.text);
  for (const dy of [10, 26]) {
    doc.moveTo(textX + 26, y + dy).lineTo(PAGE.margin + CONTENT_WIDTH, y + dy).lineWidth(0.5).strokeColor(INK.rule).stroke();
  }
  y += 34;
  doc.moveTo(PAGE.margin, y).lineTo(PAGE.margin + CONTENT_WIDTH, y).lineWidth(0.8).strokeColor(INK.text).stroke();
  doc.x = PAGE.margin;
  doc.y = y + 2;
}
