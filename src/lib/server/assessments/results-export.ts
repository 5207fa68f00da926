/** The latest current results as .xlsx: a Results sheet (one row a room, by rank) and a Notes sheet. */
import ExcelJS from 'exceljs';
import { PassThrough, type Readable } from 'node:stream';
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { ENGINE_CAUTIONS, listAssumptions, RISK_BAND_LABELS } from '../../engine';
import type { ActiveTrust } from '../auth/context';
import { guardFormula } from '../formula-guard';
import { getAssumptionSetById } from './assumptions.repository';
import { inCanonicalOrder } from './assumptions.service';
import { RISK_BANDS_BY_NUMBER } from './result-row';

/** The first columns of the Results sheet, in this order (the brief of the export; more may follow). */
export const RESULTS_HEADER = [
  'Rank',
  'School',
  'Block',
  'Room code',
  'Risk band',
  'Daily mean CO2 (ppm)',
  'Peak CO2 (ppm)',
  'Units recommended',
  'Capital cost (GBP)',
  'Annual saving (GBP)',
  'Simple payback (years)',
  'NPV (GBP)',
] as const;

const EXTRA_HEADER = [
  'Room name',
  'Pupils',
  'Worst season',
  'Criterion met',
  'Pupil-hours a year above threshold',
  'Reason',
  'Annual saving (kWh)',
  'Annual saving (kgCO2e)',
  'Discounted payback (years)',
  'Pupil-hours removed per GBP 1,000',
  'Assumptions version',
  'Run finished',
  'Risk evidence',
] as const;

/** Text a spreadsheet would run as a formula gets a leading apostrophe so it stays text (see formula-guard.ts). */
export const guardText = guardFormula;

/** How the exports name what a room's risk rests on. */
export const EVIDENCE_WORDS: Record<string, string> = {
  measured: 'Measured (monitor readings)',
  calibrated: 'Calibrated model',
  predicted: 'Predicted (model)',
};

const round = (v: number | null, digits = 0) => (v === null || !Number.isFinite(v) ? null : Number(v.toFixed(digits)));

const BATCH = 5000;

/** Streams the workbook; read rows in rank order in batches so a 100,000-room estate stays small in memory. */
export function exportResults(db: Kysely<Database>, trust: ActiveTrust, now = new Date()): Readable {
  const out = new PassThrough();
  const book = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useStyles: true, useSharedStrings: false });
  book.creator = 'Airtally';
  book.created = now;
  void writeBook(db, trust, book).catch((error: unknown) => {
    console.error('results export failed', error);
    out.destroy(error instanceof Error ? error : new Error(String(error)));
  });
  return out;
}

async function writeBook(
  db: Kysely<Database>,
  trust: ActiveTrust,
  book: ExcelJS.stream.xlsx.WorkbookWriter,
): Promise<void> {
  const sheet = book.addWorksheet('Results', { views: [{ state: 'frozen', ySplit: 1 }] });
  sheet.columns = [...RESULTS_HEADER, ...EXTRA_HEADER].map((header) => ({
    header,
    width: header === 'Reason' ? 60 : Math.max(10, header.length + 2),
  }));
  sheet.getRow(1).font = { bold: true };
  sheet.getRow(1).commit();

  const limited = trust.schoolIds === null ? sql`TRUE` : sql`rr.school_id = ANY(${trust.schoolIds}::uuid[])`;
  const setIds = new Set<string>();
  let afterRank = 0;
  let written = 0;
  for (;;) {
    const { rows } = await sql<{
      rank: number;
      school: string;
      block: string | null;
      code: string;
      room_name: string;
      risk_band: number;
      mean_co2_ppm: number;
      peak_co2_ppm: number;
      units_recommended: string;
      capital_cost_gbp: number | null;
      annual_saving_gbp: number | null;
      simple_payback_years: number | null;
      npv_gbp: number | null;
      pupils: number;
      worst_season: string;
      criteria_met: boolean;
      pupil_hours_above: number;
      reason: string;
      annual_saving_kwh: number | null;
      annual_saving_kgco2e: number | null;
      discounted_payback_years: number | null;
      pupil_hours_removed_per_1000_gbp: number | null;
      assumptions_version: string | null;
      assumption_set_id: string | null;
      finished_at: Date | null;
      risk_evidence: string;
    }>`
      SELECT rr.rank, s.name AS school, b.name AS block, r.code, r.name AS room_name, rr.risk_band, rr.mean_co2_ppm, rr.peak_co2_ppm,
        rr.units_recommended, rr.capital_cost_gbp, rr.annual_saving_gbp, rr.simple_payback_years, rr.npv_gbp, rr.pupils,
        rr.worst_season, rr.criteria_met, rr.pupil_hours_above, rr.reason, rr.annual_saving_kwh, rr.annual_saving_kgco2e,
        rr.discounted_payback_years, rr.pupil_hours_removed_per_1000_gbp, ar.assumptions_version, ar.assumption_set_id, ar.finished_at,
        rr.risk_evidence
      FROM room_results rr
      JOIN rooms r ON r.id = rr.room_id
      JOIN schools s ON s.id = rr.school_id
      LEFT JOIN blocks b ON b.id = rr.block_id
      JOIN assessment_runs ar ON ar.id = rr.run_id
      WHERE rr.is_current AND rr.trust_id = ${trust.id} AND ${limited} AND rr.rank > ${afterRank}
      ORDER BY rr.rank
      LIMIT ${BATCH}`.execute(db);
    for (const r of rows) {
      if (r.assumption_set_id) setIds.add(r.assumption_set_id);
      const band = RISK_BANDS_BY_NUMBER[r.risk_band - 1] ?? 'fresh';
      sheet
        .addRow([
          r.rank,
          guardText(r.school),
          guardText(r.block ?? ''),
          guardText(r.code),
          `${r.risk_band} ${RISK_BAND_LABELS[band]}`,
          round(r.mean_co2_ppm),
          round(r.peak_co2_ppm),
          guardText(r.units_recommended),
          round(r.capital_cost_gbp),
          round(r.annual_saving_gbp),
          round(r.simple_payback_years, 1),
          round(r.npv_gbp),
          guardText(r.room_name),
          r.pupils,
          r.worst_season,
          r.criteria_met ? 'Yes' : 'No',
          round(r.pupil_hours_above),
          guardText(r.reason),
          round(r.annual_saving_kwh),
          round(r.annual_saving_kgco2e),
          round(r.discounted_payback_years, 1),
          round(r.pupil_hours_removed_per_1000_gbp, 1),
          guardText(r.assumptions_version ?? ''),
          r.finished_at ? r.finished_at.toISOString().slice(0, 16).replace('T', ' ') : '',
          EVIDENCE_WORDS[r.risk_evidence] ?? r.risk_evidence,
        ])
        .commit();
    }
    written += rows.length;
    if (rows.length < BATCH) break;
    afterRank = rows[rows.length - 1]!.rank;
  }
  sheet.commit();
  await writeNotes(db, trust, book, [...setIds], written);
  await book.commit();
}

async function writeNotes(
  db: Kysely<Database>,
  trust: ActiveTrust,
  book: ExcelJS.stream.xlsx.WorkbookWriter,
  setIds: string[],
  rooms: number,
): Promise<void> {
  const notes = book.addWorksheet('Notes');
  notes.columns = [
    { header: 'Item', width: 48 },
    { header: 'Value', width: 40 },
    { header: 'Unit', width: 16 },
    { header: 'Source', width: 70 },
    { header: 'Status', width: 18 },
    { header: 'Edited by', width: 12 },
    { header: 'Flagged', width: 9 },
    { header: 'Note', width: 60 },
  ];
  notes.getRow(1).font = { bold: true };
  notes.getRow(1).commit();
  const line = (cells: (string | number | null)[]) =>
    notes.addRow(cells.map((c) => (typeof c === 'string' ? guardText(c) : c))).commit();
  line(['Cautions']);
  for (const caution of ENGINE_CAUTIONS) line([caution]);
  line(['Rooms in this export', rooms]);
  line([]);
  for (const id of setIds) {
    const stored = await getAssumptionSetById(db, trust.id, id);
    if (!stored) continue;
    line([
      `Assumptions used: ${stored.label}`,
      `version ${stored.version} of ${stored.createdAt.slice(0, 10)}`,
      null,
      stored.changeSummary,
    ]);
    for (const entry of inCanonicalOrder(listAssumptions(stored.set))) {
      const value =
        typeof entry.value === 'number' || typeof entry.value === 'string' ? entry.value : JSON.stringify(entry.value);
      const shown = typeof value === 'string' && value.length > 32_000 ? `${value.slice(0, 32_000)}…` : value;
      line([
        entry.label,
        shown,
        entry.unit,
        entry.source,
        STATUS_WORDS[entry.status],
        entry.kind,
        entry.flagged ? 'Yes' : '',
        entry.note ?? '',
      ]);
    }
    line([]);
  }
  notes.commit();
}

/** The status tags as people read them. */
export const STATUS_WORDS = {
  confirmed: 'confirmed',
  secondary: 'secondary source',
  from_memory: 'from memory',
  common_practice: 'common practice',
} as const;
