/** The finance view: one row per recommended unit from each room's retrofit.perUnit, per school and for the trust. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { DEFAULT_ASSUMPTIONS } from '../../engine/assumptions';
import { getAssumptionSetById } from '../assessments/assumptions.repository';
import { simplePaybackYears } from '../../engine/finance';
import type { RetrofitMoney, RetrofitUnitLine } from '../../engine/types';
import type { ActiveTrust } from '../auth/context';
import {
  FOSSIL_FUELS,
  heatingRenewalFlag,
  HEATING_RENEWAL_WORDS,
  RENEWAL_HORIZON_YEARS,
  TYPICAL_PLANT_LIFE_YEARS,
} from './heating-renewal';
import type { FinanceQuery } from './portfolio.schemas';
import type { FinanceReport, FinanceSchool, FinanceUnitRow, MoneyTotals } from './portfolio.types';
import { programmeSensitivity } from './sensitivity';

interface Row {
  room_id: string;
  room_code: string;
  room_name: string;
  school_id: string;
  school_name: string;
  block_name: string | null;
  heating_fuel: string | null;
  heating_installed_year: number | null;
  unit_count: number;
  annual_saving_kwh: number | null;
  capital_per_tonne_co2e_gbp: number | null;
  per_unit: RetrofitMoney | null;
  units: RetrofitUnitLine[] | null;
}

const emptyTotals = (): MoneyTotals & { lifetimeTonnes: number; maintenanceGbp: number } => ({
  units: 0,
  capitalCostGbp: 0,
  annualSavingKwh: 0,
  annualSavingGbp: 0,
  annualSavingKgCo2e: 0,
  npvGbp: 0,
  simplePaybackYears: null,
  capitalPerTonneCo2eGbp: null,
  lifetimeTonnes: 0,
  maintenanceGbp: 0,
});
type Accumulator = ReturnType<typeof emptyTotals>;

function add(sum: Accumulator, unit: FinanceUnitRow, maintenanceGbp: number) {
  sum.units += 1;
  sum.capitalCostGbp += unit.capitalCostGbp;
  sum.annualSavingKwh += unit.annualSavingKwh;
  sum.annualSavingGbp += unit.annualSavingGbp;
  sum.annualSavingKgCo2e += unit.annualSavingKgCo2e;
  sum.npvGbp += unit.npvGbp;
  sum.maintenanceGbp += maintenanceGbp;
  // Tonnes over the unit's life, recovered from the engine's £/t so the unit life stays the engine's.
  if (unit.capitalPerTonneCo2eGbp && unit.capitalPerTonneCo2eGbp > 0)
    sum.lifetimeTonnes += unit.capitalCostGbp / unit.capitalPerTonneCo2eGbp;
}

function finish(sum: Accumulator): MoneyTotals {
  const { lifetimeTonnes, maintenanceGbp, ...totals } = sum;
  void maintenanceGbp;
  return {
    ...totals,
    simplePaybackYears: totals.units > 0 ? simplePaybackYears(totals.capitalCostGbp, totals.annualSavingGbp) : null,
    capitalPerTonneCo2eGbp: lifetimeTonnes > 0 ? totals.capitalCostGbp / lifetimeTonnes : null,
  };
}

/** One line per installed unit: a room with n units gives n rows, each its share (the engine's perUnit). */
function unitRows(row: Row, currentYear: number): { unit: FinanceUnitRow; maintenanceGbp: number }[] {
  const perUnit = row.per_unit;
  if (!perUnit || row.unit_count <= 0) return [];
  const models = (row.units ?? []).flatMap((line) => Array.from({ length: line.count }, () => line.modelName));
  const heatingRenewal = heatingRenewalFlag({
    fuel: row.heating_fuel,
    installedYear: row.heating_installed_year,
    currentYear,
  });
  return Array.from({ length: row.unit_count }, (_, i) => ({
    maintenanceGbp: perUnit.annualMaintenanceGbp,
    unit: {
      roomId: row.room_id,
      roomCode: row.room_code,
      roomName: row.room_name,
      blockName: row.block_name,
      unitIndex: i + 1,
      unitCount: row.unit_count,
      modelName: models[i] ?? models[0] ?? 'Unit',
      capitalCostGbp: perUnit.capitalCostGbp,
      annualSavingKwh: (row.annual_saving_kwh ?? 0) / row.unit_count,
      annualSavingGbp: perUnit.annualNetSavingGbp,
      annualSavingKgCo2e: perUnit.annualNetSavingKgCo2e,
      simplePaybackYears: perUnit.simplePaybackYears,
      discountedPaybackYears: perUnit.discountedPaybackYears,
      npvGbp: perUnit.npvGbp,
      capitalPerTonneCo2eGbp: row.capital_per_tonne_co2e_gbp,
      heatingRenewal,
    },
  }));
}

/** The finance report of the trust (or one school): unit rows, subtotals, totals, baseline and sensitivity. */
export async function financeReport(
  db: Kysely<Database>,
  trust: ActiveTrust,
  query: FinanceQuery,
  now = new Date(),
): Promise<FinanceReport> {
  const scope = [
    sql`rr.trust_id = ${trust.id}`,
    sql`rr.is_current`,
    sql`rr.unit_count > 0`,
    sql`rr.capital_cost_gbp IS NOT NULL`,
  ];
  if (trust.schoolIds) scope.push(sql`rr.school_id = ANY(${trust.schoolIds}::uuid[])`);
  if (query.schoolId) scope.push(sql`rr.school_id = ${query.schoolId}::uuid`);
  const [result, lastRun] = await Promise.all([
    sql<Row>`
      SELECT rr.room_id, r.code AS room_code, r.name AS room_name, rr.school_id, s.name AS school_name, b.name AS block_name,
        coalesce(b.heating_fuel, s.heating_fuel) AS heating_fuel, b.heating_installed_year, rr.unit_count, rr.annual_saving_kwh,
        rr.capital_per_tonne_co2e_gbp, rr.detail->'retrofit'->'perUnit' AS per_unit, rr.detail->'retrofit'->'units' AS units
      FROM room_results rr
        JOIN rooms r ON r.id = rr.room_id
        JOIN schools s ON s.id = rr.school_id
        LEFT JOIN blocks b ON b.id = rr.block_id
      WHERE ${sql.join(scope, sql` AND `)}
      ORDER BY s.name, b.name NULLS LAST, r.code`.execute(db),
    db
      .selectFrom('assessment_runs')
      .select(['finished_at', 'assumptions_version', 'assumption_set_id'])
      .where('trust_id', '=', trust.id)
      .where('status', '=', 'succeeded')
      .orderBy('finished_at', 'desc')
      .limit(1)
      .executeTakeFirst(),
  ]);

  const currentYear = now.getUTCFullYear();
  const schools = new Map<string, { school: FinanceSchool; sum: Accumulator }>();
  const trustSum = emptyTotals();
  for (const row of result.rows) {
    let entry = schools.get(row.school_id);
    if (!entry) {
      entry = {
        school: { schoolId: row.school_id, schoolName: row.school_name, units: [], subtotal: finish(emptyTotals()) },
        sum: emptyTotals(),
      };
      schools.set(row.school_id, entry);
    }
    for (const { unit, maintenanceGbp } of unitRows(row, currentYear)) {
      entry.school.units.push(unit);
      add(entry.sum, unit, maintenanceGbp);
      add(trustSum, unit, maintenanceGbp);
    }
  }
  for (const entry of schools.values()) entry.school.subtotal = finish(entry.sum);

  // The baseline is the assumption set the latest run used, so the sensitivity matches the rows above it.
  const runSet = lastRun?.assumption_set_id
    ? await getAssumptionSetById(db, trust.id, lastRun.assumption_set_id)
    : null;
  const finance = (runSet?.set ?? DEFAULT_ASSUMPTIONS).finance;
  const baseline = { discountRate: finance.discountRate.value, appraisalYears: finance.appraisalYears.value };
  const runWhen = lastRun?.finished_at ? new Date(lastRun.finished_at).toISOString() : null;
  return {
    schools: [...schools.values()].map((e) => e.school),
    totals: finish(trustSum),
    baseline: {
      ...baseline,
      assumptionsVersion: lastRun?.assumptions_version ?? null,
      runFinishedAt: runWhen,
      words:
        `Savings are against supplying the same fresh air through windows, at the energy prices and carbon factors of the ` +
        `assumption set the latest assessment used${lastRun?.assumptions_version ? ` (version ${lastRun.assumptions_version})` : ''}. ` +
        `Money is in today's pounds; NPV and discounted payback use a real discount rate of ${(baseline.discountRate * 100).toFixed(1)} % ` +
        `over ${baseline.appraisalYears} years, with savings at the end of each year. Against today's operation, better air can ` +
        `cost more energy than it saves; the room pages say where.`,
    },
    heatingRenewalRule: {
      plantLifeYears: TYPICAL_PLANT_LIFE_YEARS,
      horizonYears: RENEWAL_HORIZON_YEARS,
      fuels: [...FOSSIL_FUELS],
      words: HEATING_RENEWAL_WORDS,
    },
    sensitivity: programmeSensitivity(
      {
        capitalCostGbp: trustSum.capitalCostGbp,
        annualNetSavingGbp: trustSum.annualSavingGbp,
        annualMaintenanceGbp: trustSum.maintenanceGbp,
      },
      baseline,
    ),
  };
}
