/**
 * The programme as .xlsx: a Summary sheet, one sheet per programme year (room by room, with each school
 * visit's mobilisation and the on-cost build-up), the rooms not in the programme and why, the assumptions
 * with their sources, and the cautions.
 */
import ExcelJS from 'exceljs';

import { PROGRAMME_CAUTIONS } from '../../engine/programme/cautions';
import { DEFAULT_SOURCES } from '../../engine/programme/defaults';
import type { OnCostBreakdown } from '../../engine/programme/on-costs';
import type { ProgrammeView } from './programme.types';
import { guardCell } from '../portfolio/priorities-export';
import { assumptionLines } from './programme-assumptions';

const GBP = '"£"#,##0';
const INT = '#,##0';
const text = (v: string) => guardCell(v);

const moneyColumns = (b: OnCostBreakdown) => [
  b.worksGbp,
  b.preliminariesGbp,
  b.feesGbp,
  b.contingencyGbp,
  b.inflationGbp,
  b.netGbp,
  b.vatGbp,
  b.chargedGbp,
];

/** Builds the workbook; resolves to its bytes. */
export async function programmeWorkbook(view: ProgrammeView, now = new Date()): Promise<Buffer> {
  const book = new ExcelJS.Workbook();
  book.creator = 'Airtally';
  book.created = now;
  const { report } = view;

  const summary = book.addWorksheet('Summary');
  summary.columns = [
    { width: 44 },
    { width: 18 },
    { width: 18 },
    { width: 16 },
    { width: 16 },
    { width: 18 },
    { width: 16 },
    { width: 16 },
  ];
  summary.addRow([text(`Capital programme: ${view.name}`)]).font = { bold: true, size: 14 };
  summary.addRow([text(report.solve.words)]);
  summary.addRow([`Assumption version(s): ${view.source.assumptionsVersions.join(', ') || 'not recorded'}`]);
  if (report.partial) summary.addRow(['Only your schools are shown; totals are for them.']);
  summary.addRow([]);
  const head = summary.addRow([
    'Year',
    'Capital available (£)',
    'Capital used, with on-costs (£)',
    'Rooms',
    'Units',
    'Pupils helped',
    'Pupil-hours removed a year',
    'kgCO2e saved a year',
  ]);
  head.font = { bold: true };
  for (const y of report.years) {
    const row = summary.addRow([
      y.label,
      y.budgetGbp,
      y.totals.capitalGbp,
      y.totals.rooms,
      y.totals.units,
      y.totals.pupils,
      Math.round(y.totals.pupilHoursRemovedPerYear),
      Math.round(y.totals.annualSavingKgCo2e),
    ]);
    row.getCell(2).numFmt = GBP;
    row.getCell(3).numFmt = GBP;
    for (const c of [4, 5, 6, 7, 8]) row.getCell(c).numFmt = INT;
  }
  const t = report.totals;
  const total = summary.addRow([
    'Total',
    report.budgetTotalGbp,
    t.capitalGbp,
    t.rooms,
    t.units,
    t.pupils,
    Math.round(t.pupilHoursRemovedPerYear),
    Math.round(t.annualSavingKgCo2e),
  ]);
  total.font = { bold: true };
  total.getCell(2).numFmt = GBP;
  total.getCell(3).numFmt = GBP;
  summary.addRow([]);
  for (const [name, value, fmt] of [
    ['Money saved a year at the scenario’s energy prices (£)', t.annualSavingGbp, GBP],
    ['Tonnes CO2e saved over the units’ life', t.lifetimeTonnesCo2e, '#,##0.0'],
    [
      'Capital per tonne CO2e over the units’ life (£)',
      t.lifetimeTonnesCo2e > 0 ? t.capitalGbp / t.lifetimeTonnesCo2e : null,
      GBP,
    ],
    ['School visits', t.visits, INT],
    ['Mobilisation, with on-costs (£)', t.mobilisationGbp, GBP],
    ['Gap to the best possible plan (%)', report.solve.gapPct, '0.00'],
  ] as const) {
    const row = summary.addRow([name, value]);
    row.getCell(2).numFmt = fmt;
  }
  summary.addRow([]);
  summary.addRow(['What the next £100,000 would buy', text(report.nextTranche.words)]);
  summary.addRow(['What the last £100,000 bought', text(report.lastTranche.words)]);

  const header = [
    'Window',
    'School',
    'Room code',
    'Room name',
    'Block',
    'Units',
    'Unit models',
    'Installed price (£)',
    'Preliminaries (£)',
    'Fees (£)',
    'Contingency (£)',
    'Inflation (£)',
    'Net of VAT (£)',
    'VAT (£)',
    'Capital charged to the budget (£)',
    'Pupils',
    'Pupil-hours removed a year',
    'kgCO2e saved a year',
    'Money saved a year (£)',
    'Tonnes CO2e over unit life',
    'Placed by hand',
  ];
  for (const year of report.years) {
    const sheet = book.addWorksheet(year.label.replace('/', '-'), { views: [{ state: 'frozen', ySplit: 1 }] });
    sheet.columns = header.map((h, i) => ({ header: h, width: i < 5 ? 20 : i === 6 ? 26 : 14 }));
    sheet.getRow(1).font = { bold: true };
    for (const window of year.windows)
      for (const visit of window.schools) {
        if (visit.mobilisation) {
          const row = sheet.addRow([
            window.label,
            text(visit.schoolName),
            '',
            'School visit (mobilisation)',
            '',
            null,
            '',
            ...moneyColumns(visit.mobilisation),
          ]);
          for (let c = 8; c <= 15; c++) row.getCell(c).numFmt = GBP;
        }
        for (const r of visit.rooms) {
          const row = sheet.addRow([
            window.label,
            text(r.schoolName),
            text(r.roomCode),
            text(r.roomName),
            text(r.blockName ?? ''),
            r.units,
            text(r.unitsLabel),
            ...moneyColumns(r.capital),
            r.pupils,
            Math.round(r.pupilHoursRemovedPerYear),
            Math.round(r.annualSavingKgCo2e),
            Math.round(r.annualSavingGbp),
            r.lifetimeTonnesCo2e === null ? null : Number(r.lifetimeTonnesCo2e.toFixed(2)),
            [r.pinned ? 'pinned' : '', r.forcedIn ? 'forced in' : '', r.joinsHeating ? 'joins heating project' : '']
              .filter(Boolean)
              .join(', '),
          ]);
          for (let c = 8; c <= 15; c++) row.getCell(c).numFmt = GBP;
          row.getCell(19).numFmt = GBP;
        }
      }
    const sum = sheet.addRow([
      'Year total',
      '',
      '',
      '',
      '',
      year.totals.units,
      '',
      ...moneyColumns(year.breakdown),
      year.totals.pupils,
      Math.round(year.totals.pupilHoursRemovedPerYear),
      Math.round(year.totals.annualSavingKgCo2e),
      Math.round(year.totals.annualSavingGbp),
      Number(year.totals.lifetimeTonnesCo2e.toFixed(2)),
    ]);
    sum.font = { bold: true };
    for (let c = 8; c <= 15; c++) sum.getCell(c).numFmt = GBP;
    sheet.addRow([`Capital available: £${Math.round(year.budgetGbp).toLocaleString('en-GB')}`]);
  }

  const out = book.addWorksheet('Not in programme');
  out.columns = [
    { header: 'School', width: 28 },
    { header: 'Room code', width: 12 },
    { header: 'Room name', width: 22 },
    { header: 'Pupil-hours its units would remove a year', width: 16 },
    { header: 'Why not', width: 100 },
  ];
  out.getRow(1).font = { bold: true };
  for (const m of report.misses)
    out.addRow([
      text(m.schoolName),
      text(m.roomCode),
      text(m.roomName),
      Math.round(m.pupilHoursRemovedPerYear),
      text(m.words),
    ]);

  const assumptions = book.addWorksheet('Assumptions');
  assumptions.columns = [
    { header: 'Assumption', width: 44 },
    { header: 'Value', width: 30 },
    { header: 'Source', width: 110 },
  ];
  assumptions.getRow(1).font = { bold: true };
  for (const a of assumptionLines(view)) assumptions.addRow([a.name, a.value, a.source]);
  assumptions.addRow([]);
  assumptions.addRow(['Order of on-costs', '', DEFAULT_SOURCES.order]);

  const cautions = book.addWorksheet('Cautions');
  cautions.columns = [{ header: 'Cautions', width: 140 }];
  cautions.getRow(1).font = { bold: true };
  for (const c of PROGRAMME_CAUTIONS) cautions.addRow([c]);

  return Buffer.from(await book.xlsx.writeBuffer());
}
