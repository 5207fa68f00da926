/** Shapes the portfolio API returns; islands import these types through src/lib/client. */
import type { Weights } from './portfolio.schemas';

export type { Weights };

/** The weights a trust ranks with, and whether someone chose them. */
export interface WeightSettings {
  weights: Weights;
  /** True when nobody has saved weights and the engine's defaults apply. */
  isDefault: boolean;
  savedAt: string | null;
  savedByEmail: string | null;
}

/** One room on the priorities list. */
export interface PriorityRow {
  roomId: string;
  /** Place in the trust under the weights in use, 1 = do first. */
  rank: number;
  /** Weighted score 0–1 (higher = do sooner). */
  score: number;
  schoolId: string;
  schoolName: string;
  blockId: string | null;
  blockName: string | null;
  roomCode: string;
  roomName: string;
  pupils: number;
  ventilationType: string;
  worstSeason: string;
  meanCo2Ppm: number;
  peakCo2Ppm: number;
  criteriaMet: boolean;
  /** 1 (least concern) – 4 (most). */
  riskBand: number;
  riskBandLabel: string;
  /** What the risk rests on: measured readings, the calibrated model, or the prediction. */
  riskEvidence: 'measured' | 'calibrated' | 'predicted';
  reason: string;
  pupilHoursAbove: number;
  unitsRecommended: string;
  unitCount: number;
  capitalCostGbp: number | null;
  annualSavingGbp: number | null;
  simplePaybackYears: number | null;
  npvGbp: number | null;
  /** The baseline the money figures are against (BaselineId), null when no units are recommended. */
  baseline: string | null;
  verdict: string | null;
  /** How many register values the engine assumed for this room. */
  assumedCount: number;
}

export interface PrioritiesPage {
  rows: PriorityRow[];
  total: number;
  page: number;
  pageSize: number;
  weights: Weights;
  /** True when the weights came from the request (a preview), not the trust's saved ones. */
  preview: boolean;
}

/** One installed unit on the finance page: the room's per-unit money lines. */
export interface FinanceUnitRow {
  roomId: string;
  roomCode: string;
  roomName: string;
  blockName: string | null;
  unitIndex: number;
  unitCount: number;
  modelName: string;
  capitalCostGbp: number;
  annualSavingKwh: number;
  annualSavingGbp: number;
  annualSavingKgCo2e: number;
  simplePaybackYears: number | null;
  discountedPaybackYears: number | null;
  npvGbp: number;
  /** The lines of the net saving (against the baseline): heating kWh, fan electricity kWh, servicing £. */
  heatingKwh: number;
  fanKwh: number;
  maintenanceGbp: number;
  /** Replacement within the appraisal period, £ (in NPV, not in the annual saving). */
  replacementCostGbp: number;
  baseline: string | null;
  verdict: string | null;
  /** Capital per tonne CO2e saved over the unit's life; null when the unit saves no carbon. */
  capitalPerTonneCo2eGbp: number | null;
  heatingRenewal: HeatingRenewalFlag | null;
}

/** A fuel, price and efficiency a school's figures used, and where each came from. */
export interface HeatingUsedRow {
  fuel: string;
  priceGbpPerKwh: number;
  priceSource: string;
  efficiency: number;
  efficiencySource: string;
  rooms: number;
}

/** A block whose fossil-fuel heating is near the end of its typical life. */
export interface HeatingRenewalFlag {
  fuel: string;
  installedYear: number;
  expectedEndYear: number;
}

export interface MoneyTotals {
  units: number;
  capitalCostGbp: number;
  annualSavingKwh: number;
  annualSavingGbp: number;
  annualSavingKgCo2e: number;
  npvGbp: number;
  simplePaybackYears: number | null;
  capitalPerTonneCo2eGbp: number | null;
}

export interface FinanceSchool {
  schoolId: string;
  schoolName: string;
  units: FinanceUnitRow[];
  subtotal: MoneyTotals;
  heatingUsed: HeatingUsedRow[];
}

/** One case of the sensitivity table: the programme's payback and NPV under changed prices or rate. */
export interface SensitivityCase {
  energyPriceChangePct: number;
  discountRate: number;
  annualSavingGbp: number;
  simplePaybackYears: number | null;
  discountedPaybackYears: number | null;
  npvGbp: number;
}

export interface FinanceReport {
  schools: FinanceSchool[];
  totals: MoneyTotals;
  baseline: {
    /** The baseline of the headline figures (BaselineId) and its words. */
    headline: string;
    headlineLabel: string;
    discountRate: number;
    appraisalYears: number;
    assumptionsVersion: string | null;
    runFinishedAt: string | null;
    words: string;
  };
  heatingRenewalRule: { plantLifeYears: number; horizonYears: number; fuels: string[]; words: string };
  sensitivity: { byEnergyPrice: SensitivityCase[]; byDiscountRate: SensitivityCase[] };
}

/** Counts of rooms per school in bands of worst-season occupied mean CO2. */
export interface Co2BySchool {
  /** Null for the one bar of the schools beyond CO2_MAX_SCHOOLS. */
  schoolId: string | null;
  schoolName: string;
  below1000: number;
  from1000to1500: number;
  from1500to2000: number;
  above2000: number;
}

export interface ScatterPoint {
  roomId: string;
  label: string;
  riskScore: number;
  simplePaybackYears: number;
  capitalCostGbp: number;
  riskBand: number;
}

export interface CumulativePoint {
  rank: number;
  cumulativeCapitalGbp: number;
  cumulativePupilHoursRemoved: number;
}

export interface Dashboard {
  headline: {
    roomsInRegister: number;
    roomsAssessed: number;
    roomsFailing: number;
    pupilsInFailingRooms: number;
    capitalAllUnitsGbp: number;
    annualSavingGbp: number;
    /** The baseline the saving is against (BaselineId of the latest results), null before any appraisal. */
    baseline: string | null;
    lastRunFinishedAt: string | null;
    /** Assessed rooms by what their risk rests on. */
    evidence: { measured: number; calibrated: number; predicted: number };
  };
  co2BySchool: Co2BySchool[];
  /** Schools assessed, and how many of them have a bar of their own (the rest share the last bar). */
  co2Schools: { total: number; ownBar: number };
  /** Rooms with units that pay back; `neverPayBack` counts those whose units never do (not plotted). */
  scatter: { points: ScatterPoint[]; totalWithRetrofit: number; shown: number; neverPayBack: number };
  cumulative: { points: CumulativePoint[]; totalCapitalGbp: number; totalPupilHoursRemoved: number };
}
