/**
 * The page furniture every Trimout PDF shares: US Letter, the app's own typeface (Atkinson
 * Hyperlegible, shipped in the npm package the app already loads its fonts from), a running header
 * (job and report), a footer with the page number and the deferral line, black text on white so
 * a report printed in black and white loses nothing.
 *
 * The footer says "Page 7 of 40" while pages still stream as they are finished (no
 * `bufferPages`, which keeps every page's drawing operators until the end: measured at 155 MB
 * more heap for a 4,783-finding, 1,180-page close-out report, about 130 KB a page, so GBs for a
 * whole large job built in the background). The
 * total is one small form XObject that every page draws after "Page 7 of " and that is written
 * once, at `finish()`, when the count is known: a PDF object may come after the pages naming it.
 */
import { once } from 'node:events';
import path from 'node:path';
import type { Writable } from 'node:stream';
import PDFDocument from 'pdfkit';
import { GOVERNS, NOT_CERTIFIED } from '../../shared/deferral';

const FONT_DIR = path.dirname(require.resolve('@expo-google-fonts/atkinson-hyperlegible/package.json'));
export const FONTS = {
  regular: path.join(FONT_DIR, '400Regular', 'AtkinsonHyperlegible_400Regular.ttf'),
  bold: path.join(FONT_DIR, '700Bold', 'AtkinsonHyperlegible_700Bold.ttf'),
  italic: path.join(FONT_DIR, '400Regular_Italic', 'AtkinsonHyperlegible_400Regular_Italic.ttf'),
} as const;

/** Points (1/72 in). US Letter, 0.6 in margins; the header and footer sit inside the margins. */
export const PAGE = { width: 612, height: 792, margin: 44, top: 62, bottom: 64 } as const;
export const CONTENT_WIDTH = PAGE.width - 2 * PAGE.margin;

/** Greys that still print as distinct tones on a black-and-white laser printer. */
export const INK = { text: '#000000', soft: '#444444', rule: '#888888', fill: '#EEEEEE' } as const;

export type Doc = PDFKit.PDFDocument;

export interface ReportFrame {
  /** Running header, left: the job ("Harbour Street Lofts · #2471"). */
  job: string;
  /** Running header, right: the report and its scope ("Close-out report · Level 3"). */
  title: string;
  /** Document information (shown by PDF viewers). */
  author: string;
}

/**
 * A new document with the header and footer drawn on every page as it is added. Call
 * `finish()` at the end: it ends the document; the stream then ends on its own.
 */
export function newReport(frame: ReportFrame): Doc {
  const doc = new PDFDocument({
    size: 'LETTER',
    margins: { top: PAGE.top, bottom: PAGE.bottom, left: PAGE.margin, right: PAGE.margin },
    autoFirstPage: false,
    compress: true,
    info: { Title: `${frame.title} — ${frame.job}`, Author: frame.author, Creator: 'Trimout', Producer: 'Trimout' },
    // Photos are embedded as their own JPEG bytes; pdfkit never re-encodes them.
  });
  doc.registerFont('body', FONTS.regular);
  doc.registerFont('bold', FONTS.bold);
  doc.registerFont('italic', FONTS.italic);
  const total = (doc as unknown as PdfInternals).ref({ Type: 'XObject', Subtype: 'Form', BBox: [0, -4, PAGE_NUMBER_WIDTH, 12], Resources: {} });
  const numbering = { total, pages: 0 };
  NUMBERING.set(doc, numbering);
  doc.on('pageAdded', () => {
    numbering.pages += 1;
    drawFrame(doc, frame, numbering);
  });
  return doc;
}

const FOOT_Y = PAGE.height - 46;
const PAGE_NUMBER_WIDTH = 92;
const PAGE_NUMBER_SIZE = 9;
const TOTAL_XOBJECT = 'PageTotal';

/** The pdfkit internals the page total needs (not in its type definitions). */
interface PdfInternals {
  ref(data: object): PdfRef;
  _font: { id: string; ascender: number; ref(): PdfRef; encode(text: string): [string[], unknown[]] };
  page: { xobjects: Record<string, PdfRef> };
}
interface PdfRef {
  data: Record<string, unknown>;
  end(chunk?: string): void;
}

/** Each open document's page count and the form XObject that will print it. */
const NUMBERING = new WeakMap<Doc, { total: PdfRef; pages: number }>();

function drawFrame(doc: Doc, frame: ReportFrame, numbering: { total: PdfRef; pages: number }): void {
  const { x, y } = doc;
  const bottom = doc.page.margins.bottom;
  // Writing below the bottom margin would start a new page: lift the margin while drawing the footer.
  doc.page.margins.bottom = 0;
  doc.save();
  doc.font('bold').fontSize(8.5).fillColor(INK.text);
  doc.text(frame.job, PAGE.margin, 26, { width: CONTENT_WIDTH * 0.55, lineBreak: false, ellipsis: true });
  doc.font('body').text(frame.title, PAGE.margin + CONTENT_WIDTH * 0.45, 26, { width: CONTENT_WIDTH * 0.55, align: 'right', lineBreak: false, ellipsis: true });
  doc.moveTo(PAGE.margin, 40).lineTo(PAGE.width - PAGE.margin, 40).lineWidth(0.6).strokeColor(INK.rule).stroke();
  const footY = FOOT_Y;
  doc.moveTo(PAGE.margin, footY - 6).lineTo(PAGE.width - PAGE.margin, footY - 6).lineWidth(0.6).strokeColor(INK.rule).stroke();
  doc.font('body').fontSize(7.5).fillColor(INK.soft);
  doc.text(`${NOT_CERTIFIED} ${GOVERNS}`, PAGE.margin, footY, { width: CONTENT_WIDTH - PAGE_NUMBER_WIDTH, lineGap: 1 });
  // "Page 7 of " now; the total is drawn from the shared form XObject filled in by finish().
  const label = `Page ${numbering.pages} of `;
  const left = PAGE.width - PAGE.margin - PAGE_NUMBER_WIDTH + 12;
  doc.font('bold').fontSize(PAGE_NUMBER_SIZE).fillColor(INK.text);
  doc.text(label, left, footY, { lineBreak: false });
  const internals = doc as unknown as PdfInternals;
  const baseline = footY + (internals._font.ascender / 1000) * PAGE_NUMBER_SIZE;
  internals.page.xobjects[TOTAL_XOBJECT] = numbering.total;
  doc.save();
  // Form space is y-up with its origin on the baseline; pdfkit's page space is y-down.
  doc.transform(1, 0, 0, -1, left + doc.widthOfString(label), baseline);
  doc.addContent(`/${TOTAL_XOBJECT} Do`);
  doc.restore();
  doc.restore();
  doc.page.margins.bottom = bottom;
  doc.x = x;
  doc.y = y;
  doc.fillColor(INK.text);
}

/** Room left on the page below doc.y, in points. */
export function roomLeft(doc: Doc): number {
  return PAGE.height - PAGE.bottom - doc.y;
}

/** Starts a new page unless `height` points still fit below the cursor. */
export function keepTogether(doc: Doc, height: number): void {
  if (roomLeft(doc) < height) doc.addPage();
}

export function heading(doc: Doc, text: string, size = 15): void {
  keepTogether(doc, size * 4);
  doc.font('bold').fontSize(size).fillColor(INK.text).text(text, PAGE.margin, doc.y, { width: CONTENT_WIDTH });
  doc.moveDown(0.35);
}

export function paragraph(doc: Doc, text: string, options: { size?: number; font?: 'body' | 'bold' | 'italic'; color?: string } = {}): void {
  doc.font(options.font ?? 'body').fontSize(options.size ?? 10).fillColor(options.color ?? INK.text);
  doc.text(text, PAGE.margin, doc.y, { width: CONTENT_WIDTH, lineGap: 1.5 });
}

export interface Column {
  label: string;
  width: number;
  align?: 'left' | 'right' | 'center';
}

/**
 * A plain table: a bold header row repeated after each page break, rows with a hairline under
 * each. Cells are text; widths are fractions of the content width.
 */
export function table(doc: Doc, columns: readonly Column[], rows: readonly (readonly string[])[], size = 9): void {
  const widths = columns.map((c) => c.width * CONTENT_WIDTH);
  const pad = 3;
  const rowHeight = (cells: readonly string[], font: string) => {
    doc.font(font).fontSize(size);
    return Math.max(...cells.map((c, i) => doc.heightOfString(c || ' ', { width: widths[i]! - 2 * pad }))) + 2 * pad;
  };
  // A row's height is measured once (wrapping text is the costly part of a long table).
  const drawRow = (cells: readonly string[], font: string, shade: boolean, h = rowHeight(cells, font)) => {
    const top = doc.y;
    if (shade) doc.rect(PAGE.margin, top, CONTENT_WIDTH, h).fill(INK.fill);
    let x = PAGE.margin;
    doc.font(font).fontSize(size).fillColor(INK.text);
    cells.forEach((c, i) => {
      doc.text(c, x + pad, top + pad, { width: widths[i]! - 2 * pad, align: columns[i]!.align ?? 'left' });
      x += widths[i]!;
    });
    doc.moveTo(PAGE.margin, top + h).lineTo(PAGE.margin + CONTENT_WIDTH, top + h).lineWidth(0.4).strokeColor(INK.rule).stroke();
    doc.x = PAGE.margin;
    doc.y = top + h;
  };
  const header = columns.map((c) => c.label);
  const headerHeight = rowHeight(header, 'bold');
  keepTogether(doc, headerHeight + rowHeight(rows[0] ?? header, 'body') + 4);
  drawRow(header, 'bold', true, headerHeight);
  for (const r of rows) {
    const h = rowHeight(r, 'body');
    if (roomLeft(doc) < h) {
      doc.addPage();
      drawRow(header, 'bold', true, headerHeight);
    }
    drawRow(r, 'body', false, h);
  }
  doc.moveDown(0.6);
}

/** An empty square to tick by hand, `size` points, top-left at (x, y). */
export function tickBox(doc: Doc, x: number, y: number, size = 13): void {
  doc.save().rect(x, y, size, size).lineWidth(1.1).strokeColor(INK.text).stroke().restore();
}

/**
 * Waits while the document's output waits on the reader: pdfkit pushes pages whatever the
 * consumer does, so without this a slow download would collect the whole report in memory.
 */
export async function letOutputCatchUp(doc: Doc, out: Writable, highWater = 2 * 1024 * 1024): Promise<void> {
  while (doc.readableLength > highWater && !out.destroyed && !out.writableEnded) {
    await Promise.race([once(out, 'drain'), once(out, 'close')]);
  }
}

/** Writes the page total into the form XObject every page's footer draws; called once, after the last page. */
export function numberPages(doc: Doc): void {
  const numbering = NUMBERING.get(doc);
  if (!numbering) return;
  NUMBERING.delete(doc);
  const internals = doc as unknown as PdfInternals;
  doc.font('bold');
  const font = internals._font;
  // Encoding adds the digits to the embedded font's subset, which pdfkit writes at doc.end().
  const [glyphs] = font.encode(String(numbering.pages));
  numbering.total.data.Resources = { Font: { [font.id]: font.ref() } };
  numbering.total.end(`BT /${font.id} ${PAGE_NUMBER_SIZE} Tf 0 0 Td <${glyphs.join('')}> Tj ET`);
}

/**
 * Numbers the pages, ends the document and resolves when `out` has taken every byte (or rejects
 * when it fails).
 */
export async function finish(doc: Doc, out: Writable): Promise<void> {
  const done = new Promise<void>((resolve, reject) => {
    out.once('finish', resolve);
    out.once('close', resolve);
    out.once('error', reject);
  });
  numberPages(doc);
  doc.end();
  await done;
}
