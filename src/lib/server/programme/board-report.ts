/**
 * The board report: a printable, paginated PDF with the headline, two charts (capital by year against the
 * capital available; cumulative benefit against cumulative spend), the programme table year by year, window by
 * window, school by school, the rooms left out and why, the assumptions with their sources, and the cautions.
 */
import { PROGRAMME_CAUTIONS } from '../../engine/programme/cautions';
import { formatGbp, formatInt, formatOneDecimal } from '../../engine/format';
import {
  barChart,
  box,
  COLOURS,
  createDocument,
  type Doc,
  footers,
  heading,
  lineChart,
  paragraph,
  table,
} from './pdf-kit';
import { assumptionLines } from './programme-assumptions';
import type { ProgrammeView } from './programme.types';

const compactGbp = (v: number) =>
  v >= 1e6 ? `£${formatOneDecimal(v / 1e6)}m` : v >= 1e3 ? `£${formatInt(v / 1e3)}k` : formatGbp(v);

/** The headline sentence of a programme. */
export function headline(view: ProgrammeView): string {
  const t = view.report.totals;
  const schools = new Set(view.report.years.flatMap((y) => y.windows.flatMap((w) => w.schools.map((s) => s.schoolId))));
  const years = view.yearLabels.length;
  return (
    `${formatGbp(t.capitalGbp)} of the ${formatGbp(view.report.budgetTotalGbp)} available over ${years} year${years === 1 ? '' : 's'} ` +
    `(${view.yearLabels[0]} to ${view.yearLabels.at(-1)}) fits heat-recovery ventilation to ${formatInt(t.rooms)} rooms ` +
    `(${formatInt(t.units)} units) at ${formatInt(schools.size)} school${schools.size === 1 ? '' : 's'}, helping ${formatInt(t.pupils)} pupils ` +
    `and removing about ${formatInt(t.pupilHoursRemovedPerYear)} pupil-hours of poor air a year once complete. ` +
    `The units save about ${formatInt(t.annualSavingKgCo2e / 1000)} tonnes CO2e a year (${formatInt(t.lifetimeTonnesCo2e)} over their life) ` +
    `and ${t.annualSavingGbp >= 0 ? `${formatGbp(t.annualSavingGbp)} a year net` : `cost ${formatGbp(-t.annualSavingGbp)} a year more to run`}.`
  );
}

/** The assumptions with their sources and the cautions, closing the board report and every bid pack. */
export function assumptionsAndCautions(doc: Doc, view: ProgrammeView, size = 14): void {
  heading(doc, 'Assumptions and their sources', size);
  table(
    doc,
    [
      { header: 'Assumption', width: 0.24 },
      { header: 'Value', width: 0.26 },
      { header: 'Source', width: 0.5 },
    ],
    assumptionLines(view).map((a) => ({ cells: [a.name, a.value, a.source] })),
  );
  heading(doc, 'Cautions');
  for (const c of PROGRAMME_CAUTIONS) paragraph(doc, `• ${c}`);
}

/** Builds the board report; resolves to the PDF's bytes. */
export async function boardReportPdf(view: ProgrammeView, trustName: string, now = new Date()): Promise<Buffer> {
  const title = `Capital programme: ${view.name}`;
  const { doc, done } = createDocument(title, `Board report for ${trustName}`);
  const { report } = view;

  doc.font('bold').fontSize(20).fillColor(COLOURS.brand).text(title);
  doc.font('body').fontSize(10).fillColor(COLOURS.muted);
  doc.text(`${trustName} · board report · ${now.toISOString().slice(0, 10)}`);
  doc.text(`Assessment results: assumption version ${view.source.assumptionsVersions.join(', ') || 'not recorded'}`);
  if (report.partial) doc.text('Only the schools you can see are included; totals are for them.');
  doc.moveDown(0.8).fillColor(COLOURS.ink);
  box(doc, 'Headline', headline(view));
  paragraph(doc, `How good this plan is: ${report.solve.words}`);
  box(doc, 'Caution', PROGRAMME_CAUTIONS.slice(0, 2).join(' '), '#fbf1e3');

  heading(doc, 'Capital by year');
  barChart(
    doc,
    'Figure 1. Capital used, with on-costs, against the capital available',
    report.years.map((y) => y.label),
    [
      { name: 'Capital available', colour: COLOURS.line, values: report.years.map((y) => y.budgetGbp) },
      { name: 'Capital used', colour: COLOURS.brand, values: report.years.map((y) => y.totals.capitalGbp) },
    ],
    compactGbp,
    120,
  );
  heading(doc, 'Benefit against spend');
  lineChart(
    doc,
    'Figure 2. Pupil-hours of poor air removed a year against capital spent, in programme order',
    [
      {
        name: 'Cumulative benefit',
        colour: COLOURS.brand,
        points: report.cumulative.map((p) => ({ x: p.cumulativeCapitalGbp, y: p.cumulativePupilHoursRemoved })),
      },
    ],
    compactGbp,
    (v) => formatInt(v),
    'Capital spent, with on-costs',
    140,
  );

  doc.addPage();
  heading(doc, 'What more, or less, money buys', 16);
  paragraph(doc, `The next £100,000. ${report.nextTranche.words}`);
  paragraph(doc, `The last £100,000. ${report.lastTranche.words}`);
  heading(doc, 'The programme, year by year', 16);
  table(
    doc,
    [
      { header: 'Year', width: 0.16 },
      { header: 'Capital available', width: 0.14, align: 'right' },
      { header: 'Capital used', width: 0.14, align: 'right' },
      { header: 'Rooms', width: 0.08, align: 'right' },
      { header: 'Units', width: 0.08, align: 'right' },
      { header: 'Pupils', width: 0.1, align: 'right' },
      { header: 'Pupil-hours removed a year', width: 0.16, align: 'right' },
      { header: 'tCO2e a year', width: 0.14, align: 'right' },
    ],
    [
      ...report.years.map((y) => ({
        cells: [
          y.label,
          formatGbp(y.budgetGbp),
          formatGbp(y.totals.capitalGbp),
          formatInt(y.totals.rooms),
          formatInt(y.totals.units),
          formatInt(y.totals.pupils),
          formatInt(y.totals.pupilHoursRemovedPerYear),
          formatOneDecimal(y.totals.annualSavingKgCo2e / 1000),
        ],
      })),
      {
        bold: true,
        cells: [
          'Total',
          formatGbp(report.budgetTotalGbp),
          formatGbp(report.totals.capitalGbp),
          formatInt(report.totals.rooms),
          formatInt(report.totals.units),
          formatInt(report.totals.pupils),
          formatInt(report.totals.pupilHoursRemovedPerYear),
          formatOneDecimal(report.totals.annualSavingKgCo2e / 1000),
        ],
      },
    ],
    9,
  );
  heading(doc, 'Window by window, school by school');
  const rows: { cells: string[]; bold?: boolean }[] = [];
  for (const y of report.years)
    for (const w of y.windows)
      for (const s of w.schools)
        rows.push({
          cells: [
            w.label,
            s.schoolName,
            s.rooms.map((r) => r.roomCode).join(', '),
            formatInt(s.totals.units),
            formatGbp(s.totals.capitalGbp),
            formatInt(s.totals.pupils),
            formatInt(s.totals.pupilHoursRemovedPerYear),
          ],
        });
  table(
    doc,
    [
      { header: 'Window', width: 0.17 },
      { header: 'School', width: 0.2 },
      { header: 'Rooms', width: 0.25 },
      { header: 'Units', width: 0.07, align: 'right' },
      { header: 'Capital with on-costs', width: 0.12, align: 'right' },
      { header: 'Pupils', width: 0.08, align: 'right' },
      { header: 'Pupil-hours a year', width: 0.11, align: 'right' },
    ],
    rows.length > 0 ? rows : [{ cells: ['No rooms are in the programme.', '', '', '', '', '', ''] }],
  );

  heading(doc, 'Rooms not in the programme');
  const counts = new Map<string, number>();
  for (const m of report.misses) counts.set(m.reason, (counts.get(m.reason) ?? 0) + 1);
  paragraph(
    doc,
    report.misses.length === 0
      ? 'Every room with recommended units is in the programme.'
      : `${formatInt(report.misses.length)} room${report.misses.length === 1 ? ' is' : 's are'} not in the programme. The ${Math.min(15, report.misses.length)} that would remove most poor air:`,
  );
  if (report.misses.length > 0)
    table(
      doc,
      [
        { header: 'School', width: 0.22 },
        { header: 'Room', width: 0.1 },
        { header: 'Pupil-hours a year', width: 0.12, align: 'right' },
        { header: 'Why not', width: 0.56 },
      ],
      report.misses.slice(0, 15).map((m) => ({
        cells: [m.schoolName, m.roomCode, formatInt(m.pupilHoursRemovedPerYear), m.words],
      })),
    );

  doc.addPage();
  assumptionsAndCautions(doc, view, 16);

  footers(doc, title);
  doc.end();
  return done;
}
