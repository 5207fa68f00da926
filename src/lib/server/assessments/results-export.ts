/** The latest current results as .xlsx: a Results sheet (one row a room, by rank) and a Notes sheet. */
import ExcelJS from 'exceljs';
import { PassThrough, type Readable } from 'node:stream';
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { ENGINE_CAUTIONS, listAssumptions } from '../../engine';
import { riskBandOfNumber, riskBandTitle } from '../../engine/risk';
import type { ActiveTrust } from '../auth/context';
import { guardFormula } from '../formula-guard';
import { getAssumptionSetById } from './assumptions.repository';
import { inCanonicalOrder } from './assumptions.service';
import { label } from '../../engine/vocabulary';
import { ensureRanks } from '../portfolio/ranking.repository';

/** Verdicts as people read them. */
const VERDICT_WORDS = {
  pays_back: 'Pays back',
  saves_slowly: 'Saves, but not the capital within the period',
  costs_to_run: 'Costs money to run (better air)',
} as const;

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
  'Unit models',
  'Baseline of the money columns',
  'Verdict',
  'Heating saved (kWh a year)',
  'Fan electricity saved (kWh a year)',
  'Servicing saved (GBP a year)',
  'Replacement in the period (GBP)',
  'Room name',
  'Pupils',
  'Worst season',
  'Criterion met',
  'Pupil-hours a year above threshold',
  'Pupil-hours removed a year',
  'Reason',
  'Annual saving (kWh)',
  'Annual saving (kgCO2e)',
  'Discounted payback (years)',
  'Pupil-hours removed per GBP 1,000',
  'Heating fuel',
  'Fuel price (GBP/kWh)',
  'Price from',
  'Heating efficiency (COP for heat pumps)',
  'Efficiency from',
  'Heating degree-hours (K.h)',
  'Unit run hours a year',
  'Assumed values',
  'Assumptions version',
  'Run finished',
  'Risk evidence',
] as const;

/** £ number formats, so a finance lead can sum the columns. */
const GBP = '"£"#,##0;-"£"#,##0';
const GBP_PRICE = '"£"0.000';
const MONEY_COLUMNS = new Set<string>([
  'Capital cost (GBP)',
  'Annual saving (GBP)',
  'NPV (GBP)',
  'Servicing saved (GBP a year)',
  'Replacement in the period (GBP)',
]);

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
    ...(MONEY_COLUMNS.has(header)
      ? { style: { numFmt: GBP } }
      : header === 'Fuel price (GBP/kWh)'
        ? { style: { numFmt: GBP_PRICE } }
        : {}),
  }));
  sheet.getRow(1).font = { bold: true };
  sheet.getRow(1).commit();

  const limited = trust.schoolIds === null ? sql`TRUE` : sql`pr.school_id = ANY(${trust.schoolIds}::uuid[])`;
  // The rank every page shows: portfolio_ranks, built by the engine's one ranking rule.
  const { generation } = await ensureRanks(db, trust.id);
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
      unit_count: number;
      baseline: string | null;
      verdict: string | null;
      annual_heating_saving_kwh: number | null;
      annual_fan_saving_kwh: number | null;
      annual_maintenance_saving_gbp: number | null;
      replacement_cost_gbp: number | null;
      pupil_hours_removed: number | null;
      heating_fuel: string | null;
      fuel_price_gbp_per_kwh: number | null;
      price_source: string | null;
      heating_efficiency: number | null;
      efficiency_source: string | null;
      heating_degree_hours_kh: number | null;
      unit_run_hours: number | null;
      assumed_count: number;
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
      SELECT pr.rank, s.name AS school, b.name AS block, r.code, r.name AS room_name, rr.risk_band, rr.mean_co2_ppm, rr.peak_co2_ppm,
        rr.units_recommended, rr.unit_count, rr.capital_cost_gbp, rr.annual_saving_gbp, rr.simple_payback_years, rr.npv_gbp, rr.pupils,
        rr.worst_season, rr.criteria_met, rr.pupil_hours_above, rr.reason, rr.annual_saving_kwh, rr.annual_saving_kgco2e,
        rr.discounted_payback_years, rr.pupil_hours_removed_per_1000_gbp, rr.baseline, rr.verdict, rr.annual_heating_saving_kwh,
        rr.annual_fan_saving_kwh, rr.annual_maintenance_saving_gbp, rr.replacement_cost_gbp, rr.pupil_hours_removed,
        rr.heating_fuel, rr.fuel_price_gbp_per_kwh, rr.price_source, rr.heating_efficiency, rr.efficiency_source,
        rr.heating_degree_hours_kh, rr.unit_run_hours, rr.assumed_count,
        ar.assumptions_version, ar.assumption_set_id, ar.finished_at, rr.risk_evidence
      FROM portfolio_ranks pr
      JOIN room_results rr ON rr.run_id = pr.run_id AND rr.room_id = pr.room_id
      JOIN rooms r ON r.id = rr.room_id
      JOIN schools s ON s.id = rr.school_id
      LEFT JOIN blocks b ON b.id = rr.block_id
      JOIN assessment_runs ar ON ar.id = rr.run_id
      WHERE pr.trust_id = ${trust.id} AND pr.generation = ${generation} AND ${limited} AND pr.rank > ${afterRank}
      ORDER BY pr.rank
      LIMIT ${BATCH}`.execute(db);
    for (const r of rows) {
      if (r.assumption_set_id) setIds.add(r.assumption_set_id);
      sheet
        .addRow([
          r.rank,
          guardText(r.school),
          guardText(r.block ?? ''),
          guardText(r.code),
          riskBandTitle(riskBandOfNumber(r.risk_band)),
          round(r.mean_co2_ppm),
          round(r.peak_co2_ppm),
          r.unit_count,
          round(r.capital_cost_gbp),
          round(r.annual_saving_gbp),
          round(r.simple_payback_years, 1),
          round(r.npv_gbp),
          guardText(r.units_recommended),
          r.baseline ? label(r.baseline) : '',
          r.verdict ? (VERDICT_WORDS[r.verdict as keyof typeof VERDICT_WORDS] ?? r.verdict) : '',
          round(r.annual_heating_saving_kwh),
          round(r.annual_fan_saving_kwh),
          round(r.annual_maintenance_saving_gbp),
          round(r.replacement_cost_gbp),
          guardText(r.room_name),
          r.pupils,
          r.worst_season,
          r.criteria_met ? 'Yes' : 'No',
          round(r.pupil_hours_above),
          round(r.pupil_hours_removed),
          guardText(r.reason),
          round(r.annual_saving_kwh),
          round(r.annual_saving_kgco2e),
          round(r.discounted_payback_years, 1),
          round(r.pupil_hours_removed_per_1000_gbp, 1),
          r.heating_fuel ? label(r.heating_fuel) : '',
          round(r.fuel_price_gbp_per_kwh, 3),
          r.price_source ?? '',
          round(r.heating_efficiency, 2),
          r.efficiency_source ?? '',
          round(r.heating_degree_hours_kh),
          round(r.unit_run_hours),
          r.assumed_count,
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
  confirmed: 'published source',
  secondary: 'secondary source',
  from_memory: 'from memory',
  common_practice: 'common practice',
} as const;
