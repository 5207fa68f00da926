/** The priorities list as .xlsx: the current view (filters, sort, weights) plus a Cautions sheet. */
import { riskBandOfNumber, riskBandTitle } from '../../engine/risk';
import ExcelJS from 'exceljs';
import { PassThrough } from 'node:stream';
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { ENGINE_CAUTIONS } from '../../engine/assess';
import { label } from '../../engine/vocabulary';
import type { ActiveTrust } from '../auth/context';
import { guardFormula } from '../formula-guard';
import type { PrioritiesQuery } from './portfolio.schemas';
import { EVIDENCE_WORDS } from '../assessments/results-export';
import { selectPriorityRows } from './priorities.repository';
import { ensureRanks } from './ranking.repository';

/** Most rows an export holds (a whole 100,000-room estate fits). */
export const EXPORT_MAX_ROWS = 200_000;

/** Text a spreadsheet would run as a formula gets a leading apostrophe so it stays text (see formula-guard.ts). */
export const guardCell = guardFormula;

const round = (v: number | null, digits = 0) => (v === null ? null : Number(v.toFixed(digits)));

/** Builds the workbook for the current view; resolves to its bytes. */
export async function exportPriorities(
  db: Kysely<Database>,
  trust: ActiveTrust,
  query: PrioritiesQuery,
  now = new Date(),
): Promise<Buffer> {
  const state = await ensureRanks(db, trust.id);
  const weights = query.weights ?? state.weights;
  const rows = await selectPriorityRows(db, trust, query, EXPORT_MAX_ROWS, 0, state);

  const sink = new PassThrough();
  const chunks: Buffer[] = [];
  sink.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<void>((resolve, reject) => {
    sink.on('end', resolve);
    sink.on('error', reject);
  });
  const book = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: sink, useStyles: true, useSharedStrings: false });
  book.creator = 'Airtally';
  book.created = now;

  const sheet = book.addWorksheet('Priorities', { views: [{ state: 'frozen', ySplit: 1 }] });
  sheet.columns = [
    { header: 'Rank', key: 'rank', width: 7 },
    { header: 'School', key: 'school', width: 30 },
    { header: 'Block', key: 'block', width: 22 },
    { header: 'Room code', key: 'code', width: 11 },
    { header: 'Room name', key: 'name', width: 22 },
    { header: 'Pupils', key: 'pupils', width: 8 },
    { header: 'Ventilation type', key: 'vent', width: 22 },
    { header: 'Worst season', key: 'season', width: 12 },
    { header: 'Daily mean CO2 (ppm)', key: 'mean', width: 12 },
    { header: 'Peak CO2 (ppm)', key: 'peak', width: 12 },
    { header: 'Criterion met', key: 'met', width: 10 },
    { header: 'Risk band', key: 'band', width: 18 },
    { header: 'Risk evidence', key: 'evidence', width: 22 },
    { header: 'Reason', key: 'reason', width: 60 },
    { header: 'Units recommended', key: 'units', width: 10 },
    { header: 'Unit models', key: 'models', width: 28 },
    { header: 'Baseline of the money columns', key: 'baseline', width: 28 },
    { header: 'Capital cost (GBP)', key: 'capital', width: 14, style: { numFmt: '"£"#,##0;-"£"#,##0' } },
    { header: 'Annual saving (GBP)', key: 'saving', width: 14, style: { numFmt: '"£"#,##0;-"£"#,##0' } },
    { header: 'Simple payback (years)', key: 'payback', width: 12 },
    { header: 'NPV (GBP)', key: 'npv', width: 12, style: { numFmt: '"£"#,##0;-"£"#,##0' } },
    { header: 'Assumed values', key: 'assumed', width: 10 },
    { header: 'Score (0-1)', key: 'score', width: 10 },
  ];
  sheet.getRow(1).font = { bold: true };
  sheet.getRow(1).commit();
  for (const r of rows) {
    sheet
      .addRow({
        rank: r.rank,
        school: guardCell(r.schoolName),
        block: guardCell(r.blockName ?? ''),
        code: guardCell(r.roomCode),
        name: guardCell(r.roomName),
        pupils: r.pupils,
        vent: label(r.ventilationType),
        season: r.worstSeason,
        mean: round(r.meanCo2Ppm),
        peak: round(r.peakCo2Ppm),
        met: r.criteriaMet ? 'Yes' : 'No',
        band: riskBandTitle(riskBandOfNumber(r.riskBand)),
        evidence: EVIDENCE_WORDS[r.riskEvidence],
        reason: guardCell(r.reason),
        units: r.unitCount,
        models: guardCell(r.unitsRecommended),
        baseline: r.baseline ? label(r.baseline) : '',
        assumed: r.assumedCount,
        capital: round(r.capitalCostGbp),
        saving: round(r.annualSavingGbp),
        payback: round(r.simplePaybackYears, 1),
        npv: round(r.npvGbp),
        score: round(r.score, 3),
      })
      .commit();
  }
  sheet.commit();

  const notes = book.addWorksheet('Cautions');
  notes.columns = [{ header: 'Read before using these figures', key: 'text', width: 120 }];
  notes.getRow(1).font = { bold: true };
  const filters = Object.entries({
    schoolId: query.schoolId,
    blockId: query.blockId,
    band: query.band,
    ventilationType: query.ventilationType,
    criteriaMet: query.criteriaMet,
  })
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => `${k} = ${String(v)}`);
  const lines = [
    ...ENGINE_CAUTIONS,
    'Airtally figures are for ranking and planning work across an estate. They are not a ventilation design, a compliance assessment or a measurement.',
    'Before anything is specified or installed, follow local building regulations and school guidance and have a competent, licensed engineer design and commission the work.',
    'Money columns are against the baseline named in the Baseline column (the finance lead’s choice): net savings are heating saved less fan electricity less servicing; better air can cost more to run than today.',
    `Ranking weights used: risk ${weights.risk}, cost-effectiveness ${weights.costEffectiveness}, payback ${weights.payback}${query.weights ? ' (a preview, not the saved weights)' : ''}.`,
    `Sorted by ${query.sort} (${query.dir}); filters: ${filters.length > 0 ? filters.join(', ') : 'none'}; ${rows.length} rooms.`,
    `Exported ${now.toISOString()} from ${trust.name}.`,
  ];
  for (const text of lines) notes.addRow({ text: guardCell(text) }).commit();
  notes.commit();
  await book.commit();
  await done;
  return Buffer.concat(chunks);
}
