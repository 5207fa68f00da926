/**
 * Small drawing helpers over pdfkit for the board report and the bid packs: an A4 document in Public Sans
 * (Helvetica when the font files cannot be found), headings, paragraphs, tables that continue across pages,
 * a bar chart and a line chart drawn as vectors, and a footer with page numbers and the caution.
 */
import { createRequire } from 'node:module';
import PDFDocument from 'pdfkit';

export type Doc = PDFKit.PDFDocument;

const MARGIN = 50;
export const COLOURS = {
  ink: '#1d2428',
  muted: '#5b6670',
  line: '#c9d1d6',
  brand: '#2f6f4f',
  accent: '#9b5a06',
  soft: '#eef3f0',
};

function fontPath(weight: 400 | 700): string | null {
  try {
    return createRequire(import.meta.url).resolve(
      `@fontsource/public-sans/files/public-sans-latin-${weight}-normal.woff`,
    );
  } catch {
    return null;
  }
}

/** A new A4 document whose bytes `done` resolves to once `doc.end()` is called. */
export function createDocument(title: string, subject: string): { doc: Doc; done: Promise<Buffer> } {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN + 20, left: MARGIN, right: MARGIN },
    bufferPages: true,
    info: { Title: title, Subject: subject, Author: 'Airtally', Creator: 'Airtally' },
  });
  const regular = fontPath(400);
  const bold = fontPath(700);
  doc.registerFont('body', regular ?? 'Helvetica');
  doc.registerFont('bold', bold ?? 'Helvetica-Bold');
  doc.font('body').fontSize(10).fillColor(COLOURS.ink);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  return { doc, done };
}

export const contentWidth = (doc: Doc) => doc.page.width - doc.page.margins.left - doc.page.margins.right;
const bottom = (doc: Doc) => doc.page.height - doc.page.margins.bottom;

/** Starts a new page unless `heightPt` still fits on this one. */
export function ensureSpace(doc: Doc, heightPt: number): void {
  if (doc.y + heightPt > bottom(doc)) doc.addPage();
}

export function heading(doc: Doc, text: string, size = 14): void {
  ensureSpace(doc, size * 3);
  doc.moveDown(0.6).font('bold').fontSize(size).fillColor(COLOURS.ink).text(text, doc.page.margins.left);
  doc.moveDown(0.3).font('body').fontSize(10);
}

export function paragraph(doc: Doc, text: string, options: { size?: number; colour?: string } = {}): void {
  doc
    .font('body')
    .fontSize(options.size ?? 10)
    .fillColor(options.colour ?? COLOURS.ink)
    .text(text, doc.page.margins.left, doc.y, { width: contentWidth(doc) });
  doc.moveDown(0.4);
}

/** A shaded box of text (headline, caution). */
export function box(doc: Doc, title: string, text: string, fill = COLOURS.soft): void {
  const width = contentWidth(doc);
  doc.font('body').fontSize(10);
  const height = doc.heightOfString(text, { width: width - 20 }) + 34;
  ensureSpace(doc, height + 10);
  const top = doc.y;
  doc.save().rect(doc.page.margins.left, top, width, height).fill(fill).restore();
  doc
    .font('bold')
    .fontSize(11)
    .fillColor(COLOURS.ink)
    .text(title, doc.page.margins.left + 10, top + 8, { width: width - 20 });
  doc
    .font('body')
    .fontSize(10)
    .text(text, doc.page.margins.left + 10, doc.y + 2, { width: width - 20 });
  doc.y = top + height + 8;
  doc.x = doc.page.margins.left;
}

export interface Column {
  header: string;
  /** Share of the content width. */
  width: number;
  align?: 'left' | 'right';
}

/** A table that repeats its header on each new page. `bold` rows are subtotals. */
export function table(doc: Doc, columns: Column[], rows: { cells: string[]; bold?: boolean }[], size = 8): void {
  const width = contentWidth(doc);
  const widths = columns.map((c) => c.width * width);
  const left = doc.page.margins.left;
  const pad = 3;
  const drawRow = (cells: string[], font: 'body' | 'bold', fill: string | null) => {
    doc.font(font).fontSize(size);
    const height =
      Math.max(...cells.map((cell, i) => doc.heightOfString(cell, { width: widths[i]! - 2 * pad }))) + 2 * pad;
    if (doc.y + height > bottom(doc)) {
      doc.addPage();
      drawHeader();
      doc.font(font).fontSize(size);
    }
    const top = doc.y;
    if (fill) doc.save().rect(left, top, width, height).fill(fill).restore();
    let x = left;
    cells.forEach((cell, i) => {
      doc
        .fillColor(COLOURS.ink)
        .text(cell, x + pad, top + pad, { width: widths[i]! - 2 * pad, align: columns[i]!.align ?? 'left' });
      x += widths[i]!;
    });
    doc
      .save()
      .moveTo(left, top + height)
      .lineTo(left + width, top + height)
      .lineWidth(0.5)
      .strokeColor(COLOURS.line)
      .stroke()
      .restore();
    doc.y = top + height;
  };
  const drawHeader = () =>
    drawRow(
      columns.map((c) => c.header),
      'bold',
      COLOURS.soft,
    );
  ensureSpace(doc, 40);
  drawHeader();
  for (const row of rows) drawRow(row.cells, row.bold ? 'bold' : 'body', null);
  doc.x = left;
  doc.moveDown(0.6);
}

const niceMax = (v: number) => {
  if (!(v > 0)) return 1;
  const p = 10 ** Math.floor(Math.log10(v));
  const m = v / p;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * p;
};

/** Axes with four gridlines; returns the plot area. */
function axes(doc: Doc, title: string, yLabel: (v: number) => string, yMax: number, heightPt: number) {
  const width = contentWidth(doc);
  // Title, plot, axis labels and legend must all fit on the page.
  ensureSpace(doc, heightPt + 75);
  doc.font('bold').fontSize(10).fillColor(COLOURS.ink).text(title, doc.page.margins.left, doc.y);
  const top = doc.y + 6;
  const plot = { left: doc.page.margins.left + 60, top, width: width - 70, height: heightPt };
  doc.font('body').fontSize(7).fillColor(COLOURS.muted);
  for (let g = 0; g <= 4; g++) {
    const v = (yMax * g) / 4;
    const y = plot.top + plot.height - (plot.height * g) / 4;
    doc
      .save()
      .moveTo(plot.left, y)
      .lineTo(plot.left + plot.width, y)
      .lineWidth(0.4)
      .strokeColor(COLOURS.line)
      .stroke()
      .restore();
    doc.fillColor(COLOURS.muted).text(yLabel(v), doc.page.margins.left, y - 4, { width: 55, align: 'right' });
  }
  return plot;
}

/** Grouped bars: one group per label, one bar per series. */
export function barChart(
  doc: Doc,
  title: string,
  labels: string[],
  series: { name: string; colour: string; values: number[] }[],
  yLabel: (v: number) => string,
  heightPt = 150,
): void {
  const yMax = niceMax(Math.max(0, ...series.flatMap((s) => s.values)));
  const plot = axes(doc, title, yLabel, yMax, heightPt);
  const group = plot.width / Math.max(1, labels.length);
  const bar = (group * 0.7) / Math.max(1, series.length);
  labels.forEach((label, i) => {
    series.forEach((s, j) => {
      const h = (plot.height * (s.values[i] ?? 0)) / yMax;
      const x = plot.left + i * group + group * 0.15 + j * bar;
      doc
        .save()
        .rect(x, plot.top + plot.height - h, bar * 0.9, h)
        .fill(s.colour)
        .restore();
    });
    doc
      .font('body')
      .fontSize(7)
      .fillColor(COLOURS.muted)
      .text(label, plot.left + i * group, plot.top + plot.height + 3, { width: group, align: 'center' });
  });
  legend(doc, series, plot.left, plot.top + plot.height + 16);
}

/** Lines through (x, y) points on number axes. */
export function lineChart(
  doc: Doc,
  title: string,
  series: { name: string; colour: string; points: { x: number; y: number }[] }[],
  xLabel: (v: number) => string,
  yLabel: (v: number) => string,
  xTitle: string,
  heightPt = 170,
): void {
  const xMax = niceMax(Math.max(0, ...series.flatMap((s) => s.points.map((p) => p.x))));
  const yMax = niceMax(Math.max(0, ...series.flatMap((s) => s.points.map((p) => p.y))));
  const plot = axes(doc, title, yLabel, yMax, heightPt);
  for (let g = 0; g <= 4; g++) {
    const x = plot.left + (plot.width * g) / 4;
    doc
      .font('body')
      .fontSize(7)
      .fillColor(COLOURS.muted)
      .text(xLabel((xMax * g) / 4), x - 30, plot.top + plot.height + 3, { width: 60, align: 'center' });
  }
  for (const s of series) {
    if (s.points.length === 0) continue;
    doc.save().lineWidth(1.5).strokeColor(s.colour);
    s.points.forEach((p, i) => {
      const x = plot.left + (plot.width * p.x) / xMax;
      const y = plot.top + plot.height - (plot.height * p.y) / yMax;
      if (i === 0) doc.moveTo(x, y);
      else doc.lineTo(x, y);
    });
    doc.stroke().restore();
  }
  doc
    .font('body')
    .fontSize(7)
    .fillColor(COLOURS.muted)
    .text(xTitle, plot.left, plot.top + plot.height + 14, { width: plot.width, align: 'center' });
  legend(doc, series, plot.left, plot.top + plot.height + 26);
}

function legend(doc: Doc, series: { name: string; colour: string }[], left: number, top: number): void {
  let x = left;
  for (const s of series) {
    doc
      .save()
      .rect(x, top + 1, 8, 8)
      .fill(s.colour)
      .restore();
    doc.font('body').fontSize(8).fillColor(COLOURS.ink);
    const w = doc.widthOfString(s.name);
    doc.text(s.name, x + 11, top, { lineBreak: false });
    x += w + 28;
  }
  doc.x = doc.page.margins.left;
  doc.y = top + 18;
}

/** Writes "title · page n of m" and the short caution at the foot of every page; call just before end(). */
export function footers(doc: Doc, title: string): void {
  const range = doc.bufferedPageRange();
  for (let i = 0; i < range.count; i++) {
    doc.switchToPage(range.start + i);
    const y = doc.page.height - doc.page.margins.bottom + 8;
    const width = contentWidth(doc);
    const oldBottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc.font('body').fontSize(7).fillColor(COLOURS.muted);
    doc.text(`${title} · page ${i + 1} of ${range.count}`, doc.page.margins.left, y, { width, lineBreak: false });
    doc.text(
      'Screening estimates, not a design: defer to local regulations, school guidance and a competent, licensed engineer.',
      doc.page.margins.left,
      y + 10,
      { width, lineBreak: false },
    );
    doc.page.margins.bottom = oldBottom;
  }
}
