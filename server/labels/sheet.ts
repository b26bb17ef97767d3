/**
 * A sheet of unit labels as PDF (pdfkit): each label holds the unit's tag, kind, level and space,
 * and a QR code (qrcode, error correction M) of the unit's address. The code is drawn as vector
 * squares, so it stays sharp on any printer, with the four-module quiet zone the QR standard asks
 * for (ISO/IEC 18004) kept clear inside the label.
 */
import path from 'node:path';
import PDFDocument from 'pdfkit';
import QRCode from 'qrcode';
import { LABEL_PAGE_MM, type LabelSheet } from '../../shared/schemas/labels';

/** One label's content. */
export interface LabelUnit {
  tag: string;
  kind: string;
  level: string;
  space: string | null;
  /** What the QR code holds: the unit's address. */
  address: string;
}

const PT_PER_MM = 72 / 25.4;
const pt = (mm: number) => mm * PT_PER_MM;
const QUIET_MODULES = 4;

const FONT_DIR = path.join(path.dirname(require.resolve('@expo-google-fonts/atkinson-hyperlegible/package.json')));
const REGULAR = path.join(FONT_DIR, '400Regular', 'AtkinsonHyperlegible_400Regular.ttf');
const BOLD = path.join(FONT_DIR, '700Bold', 'AtkinsonHyperlegible_700Bold.ttf');

function drawQr(doc: PDFKit.PDFDocument, text: string, x: number, y: number, size: number): void {
  const qr = QRCode.create(text, { errorCorrectionLevel: 'M' });
  const n = qr.modules.size;
  const module = size / (n + 2 * QUIET_MODULES);
  const x0 = x + QUIET_MODULES * module;
  const y0 = y + QUIET_MODULES * module;
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) {
      // A hair wider than a module so neighbouring squares leave no hairline gap when rasterised.
      if (qr.modules.get(r, c)) doc.rect(x0 + c * module, y0 + r * module, module + 0.05, module + 0.05);
    }
  }
  doc.fill('#000000');
}

/** Writes `text` on one line at most `width` wide, shrinking from `size` to `min` before cutting it short. */
function fitLine(doc: PDFKit.PDFDocument, text: string, x: number, y: number, width: number, size: number, min: number): number {
  let s = size;
  doc.fontSize(s);
  while (s > min && doc.widthOfString(text) > width) {
    s -= 0.5;
    doc.fontSize(s);
  }
  doc.text(text, x, y, { width, lineBreak: false, ellipsis: true, height: s * 1.3 });
  return s * 1.25;
}

/** The PDF, one label per unit in reading order (across, then down), as many pages as needed. */
export async function renderLabelSheet(units: readonly LabelUnit[], sheet: LabelSheet, title: string): Promise<Buffer> {
  const page = LABEL_PAGE_MM[sheet.page];
  const doc = new PDFDocument({ size: [pt(page.width), pt(page.height)], margin: 0, autoFirstPage: false, info: { Title: title, Creator: 'Trimout' } });
  doc.registerFont('regular', REGULAR);
  doc.registerFont('bold', BOLD);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const perPage = sheet.rows * sheet.columns;
  const w = pt(sheet.width);
  const h = pt(sheet.height);
  const pad = Math.min(pt(2), h * 0.06);
  units.forEach((unit, i) => {
    const slot = i % perPage;
    if (slot === 0) doc.addPage({ size: [pt(page.width), pt(page.height)], margin: 0 });
    const col = slot % sheet.columns;
    const row = Math.floor(slot / sheet.columns);
    const x = pt(sheet.left + col * (sheet.width + sheet.gapX));
    const y = pt(sheet.top + row * (sheet.height + sheet.gapY));
    // The code takes the label's height (or less on a narrow label), the words the rest.
    const qrSize = Math.min(h - 2 * pad, w * 0.45);
    drawQr(doc, unit.address, x + pad, y + (h - qrSize) / 2, qrSize);
    const tx = x + pad + qrSize + pad * 0.5;
    const tw = x + w - pad - tx;
    const lines = [unit.kind, unit.level, unit.space ?? ''].filter(Boolean);
    // Tag large and bold; the rest in a size that lets all lines fit the label's height.
    const tagSize = Math.min(16, (h - 2 * pad) * 0.36);
    const small = Math.max(5, Math.min(8.5, ((h - 2 * pad) - tagSize * 1.25) / (lines.length * 1.3 || 1)));
    let ty = y + pad;
    doc.font('bold').fillColor('#000000');
    ty += fitLine(doc, unit.tag, tx, ty, tw, tagSize, 6);
    doc.font('regular');
    for (const line of lines) ty += fitLine(doc, line, tx, ty, tw, small, 4.5);
  });
  doc.end();
  return done;
}
