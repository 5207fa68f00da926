/** The finance view: one row per recommended unit from each room's retrofit.perUnit, per school and for the trust. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { DEFAULT_ASSUMPTIONS } from '../../engine/assumptions';
import { getAssumptionSetById } from '../assessments/assumptions.repository';
import { simplePaybackYears } from '../../engine/finance';
import { label } from '../../engine/vocabulary';
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
  capital_cost_gbp: number;
  annual_saving_gbp: number;
  annual_saving_kwh: number | null;
  annual_saving_kgco2e: number | null;
  simple_payback_years: number | null;
  discounted_payback_years: number | null;
  npv_gbp: number | null;
  annual_heating_saving_kwh: number | null;
  annual_fan_saving_kwh: number | null;
  annual_maintenance_saving_gbp: number | null;
  replacement_cost_gbp: number | null;
  capital_per_tonne_co2e_gbp: number | null;
  baseline: string | null;
  verdict: string | null;
  heat_fuel: string | null;
  fuel_price_gbp_per_kwh: number | null;
  heating_efficiency: number | null;
  price_source: string | null;
  efficiency_source: string | null;
  /** The recommended units as JSON [[count, model name], …]. */
  unit_lines: string | null;
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

/**
 * One line per installed unit: a room with n units gives n rows, each an equal share of the room's headline
 * figures (paybacks are the room's: capital and saving divide alike).
 */
function unitRows(row: Row, currentYear: number): { unit: FinanceUnitRow; maintenanceGbp: number }[] {
  if (row.unit_count <= 0) return [];
  const k = 1 / row.unit_count;
  const lines = row.unit_lines ? (JSON.parse(row.unit_lines) as [number, string][]) : [];
  const models = lines.flatMap(([count, modelName]) => Array.from({ length: count }, () => modelName));
  const heatingRenewal = heatingRenewalFlag({
    fuel: row.heating_fuel,
    installedYear: row.heating_installed_year,
    currentYear,
  });
  return Array.from({ length: row.unit_count }, (_, i) => ({
    maintenanceGbp: -(row.annual_maintenance_saving_gbp ?? 0) * k,
    unit: {
      roomId: row.room_id,
      roomCode: row.room_code,
      roomName: row.room_name,
      blockName: row.block_name,
      unitIndex: i + 1,
      unitCount: row.unit_count,
      modelName: models[i] ?? models[0] ?? 'Unit',
      capitalCostGbp: row.capital_cost_gbp * k,
      annualSavingKwh: (row.annual_saving_kwh ?? 0) * k,
      annualSavingGbp: row.annual_saving_gbp * k,
      annualSavingKgCo2e: (row.annual_saving_kgco2e ?? 0) * k,
      simplePaybackYears: row.simple_payback_years,
      discountedPaybackYears: row.discounted_payback_years,
      npvGbp: (row.npv_gbp ?? 0) * k,
      heatingKwh: (row.annual_heating_saving_kwh ?? 0) * k,
      fanKwh: (row.annual_fan_saving_kwh ?? 0) * k,
      maintenanceGbp: (row.annual_maintenance_saving_gbp ?? 0) * k,
      replacementCostGbp: (row.replacement_cost_gbp ?? 0) * k,
      baseline: row.baseline,
      verdict: row.verdict,
      capitalPerTonneCo2eGbp: row.capital_per_tonne_co2e_gbp,
      heatingRenewal,
    },
  }));
}

/** Records the fuel, price and efficiency a school's figures used (each distinct combination once). */
function noteHeating(school: FinanceSchool, row: Row): void {
  if (!row.heat_fuel || row.fuel_price_gbp_per_kwh === null || row.heating_efficiency === null) return;
  const found = school.heatingUsed.find(
    (h) =>
      h.fuel === row.heat_fuel &&
      h.priceGbpPerKwh === row.fuel_price_gbp_per_kwh &&
      h.efficiency === row.heating_efficiency &&
      h.priceSource === row.price_source &&
      h.efficiencySource === row.efficiency_source,
  );
  if (found) found.rooms += 1;
  else
    school.heatingUsed.push({
      fuel: row.heat_fuel,
      priceGbpPerKwh: row.fuel_price_gbp_per_kwh,
      priceSource: row.price_source ?? 'trust',
      efficiency: row.heating_efficiency,
      efficiencySource: row.efficiency_source ?? 'trust',
      rooms: 1,
    });
}

/** The finance report of the trust (or one school): unit rows, subtotals, totals, baseline and sensitivity. */
export async function financeReport(
  db: Kysely<Database>,
  trust: ActiveTrust,
  query: FinanceQuery,
  now = new Date(),
): Promise<FinanceReport> {
  const scope = [sql`rr.trust_id = ${trust.id}`, sql`rr.unit_count > 0`, sql`rr.capital_cost_gbp IS NOT NULL`];
  if (trust.schoolIds) scope.push(sql`rr.school_id = ANY(${trust.schoolIds}::uuid[])`);
  if (query.schoolId) scope.push(sql`rr.school_id = ${query.schoolId}::uuid`);
  const [result, lastRun] = await Promise.all([
    sql<Row>`
      SELECT rr.room_id, r.code AS room_code, r.name AS room_name, rr.school_id, s.name AS school_name, b.name AS block_name,
        coalesce(b.heating_fuel, s.heating_fuel) AS heating_fuel, b.heating_installed_year, rr.unit_count,
        rr.capital_cost_gbp, rr.annual_saving_gbp, rr.annual_saving_kwh, rr.annual_saving_kgco2e, rr.simple_payback_years,
        rr.discounted_payback_years, rr.npv_gbp, rr.annual_heating_saving_kwh, rr.annual_fan_saving_kwh,
        rr.annual_maintenance_saving_gbp, rr.replacement_cost_gbp, rr.capital_per_tonne_co2e_gbp, rr.baseline, rr.verdict,
        rr.heating_fuel AS heat_fuel, rr.fuel_price_gbp_per_kwh, rr.heating_efficiency, rr.price_source, rr.efficiency_source,
        rr.unit_lines
      FROM current_room_results rr
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
        school: {
          schoolId: row.school_id,
          schoolName: row.school_name,
          units: [],
          subtotal: finish(emptyTotals()),
          heatingUsed: [],
        },
        sum: emptyTotals(),
      };
      schools.set(row.school_id, entry);
    }
    noteHeating(entry.school, row);
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
  const headline = finance.headlineBaseline?.value ?? 'same_air_without_recovery';
  const runWhen = lastRun?.finished_at ? new Date(lastRun.finished_at).toISOString() : null;
  return {
    schools: [...schools.values()].map((e) => e.school),
    totals: finish(trustSum),
    baseline: {
      ...baseline,
      headline,
      headlineLabel: label(headline),
      assumptionsVersion: lastRun?.assumptions_version ?? null,
      runFinishedAt: runWhen,
      words:
        `Figures are against ${label(headline)} (the finance lead's choice of baseline in the assumption set the latest ` +
        `assessment used${lastRun?.assumptions_version ? `, version ${lastRun.assumptions_version}` : ''}); each room page shows all three baselines. ` +
        `Net savings are heating saved less fan electricity less servicing; unit replacement within the period is a separate line in NPV. ` +
        `Each school's fuel, price and heating efficiency are listed with it (block, else school, else the trust's assumption set). ` +
        `Money is in today's pounds; NPV and discounted payback use a real discount rate of ${(baseline.discountRate * 100).toFixed(1)} % ` +
        `over ${baseline.appraisalYears} years, with savings at the end of each year.`,
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
