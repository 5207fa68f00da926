/**
 * The capital programme's contract: what a plan is built from (settings and candidate rooms) and what it
 * returns. Plain JSON data; the modules of this folder never do I/O. Money in £ (Gbp), capacity in units.
 */

/** The holiday works windows of a school year, in the order they fall in a September–August year. */
export const WINDOW_IDS = ['october', 'february', 'easter', 'summer'] as const;
export type WindowId = (typeof WINDOW_IDS)[number];

/** Whether the trust's programme years run September–August (academic) or April–March (financial). */
export const YEAR_CONVENTIONS = ['sep_aug', 'apr_mar'] as const;
export type YearConvention = (typeof YEAR_CONVENTIONS)[number];

/** What the plan maximises: pupil-hours of poor air removed a year, or the trust's saved ranking weights. */
export const OBJECTIVES = ['pupil_hours', 'rank_weights'] as const;
export type ProgrammeObjective = (typeof OBJECTIVES)[number];

/** On-costs applied to the installed price, each a fraction (0.12 = 12 %). */
export interface OnCostRates {
  /** Main contractor's preliminaries, on the works. */
  preliminariesRate: number;
  /** Project and design team fees, on works plus preliminaries. */
  feesRate: number;
  /** Risk allowance (contingency), on the base cost (works, preliminaries and fees). */
  contingencyRate: number;
  /** Construction inflation a year; programme year n is priced (1 + rate)^(n − 1) times today's price. */
  inflationRatePerYear: number;
  /** VAT rate on the whole. */
  vatRate: number;
  /** True when the trust recovers the VAT (academy trusts, s.33D VAT Act 1994): the budget then carries none. */
  vatRecoverable: boolean;
}

/** A holiday works window and its length in working days (0 = not used). */
export interface WorksWindow {
  id: WindowId;
  workingDays: number;
}

/** A room placed by hand: into a programme year, and optionally into one window of it. */
export interface RoomPin {
  roomId: string;
  /** Programme year, 1 = the first. */
  year: number;
  windowId: WindowId | null;
}

/** A block whose heating is replaced in a programme year: its ventilation work joins that project. */
export interface HeatingJoin {
  blockId: string;
  /** Programme year, 1 = the first. */
  year: number;
}

/** Everything the trust decides about a programme. */
export interface ProgrammeSettings {
  yearConvention: YearConvention;
  /** Calendar year in which programme year 1 starts (September or April of it). */
  firstYear: number;
  /** Capital available in each programme year, with on-costs, £ (1–10 years). */
  budgetsGbp: number[];
  onCosts: OnCostRates;
  /** One entry per window id. */
  windows: WorksWindow[];
  /** Units the contractor can fit per working day (across all sites). */
  unitsPerWorkingDay: number;
  /** Cost of one school visit (site set-up, access, clearing up), before on-costs, £. */
  mobilisationGbp: number;
  forcedIn: string[];
  keptOut: string[];
  heatingJoins: HeatingJoin[];
  pins: RoomPin[];
  objective: ProgrammeObjective;
  /** Scenario: energy prices this much higher (+) or lower (−) than the assessment's, % (money saved only). */
  energyPriceChangePct: number;
}

/** One room that could be retrofitted, as the latest assessment results describe it. */
export interface ProgrammeCandidate {
  roomId: string;
  roomCode: string;
  roomName: string;
  schoolId: string;
  schoolName: string;
  blockId: string | null;
  blockName: string | null;
  /** Units recommended for the room, count. */
  units: number;
  /** e.g. "2 × Wall unit 150". */
  unitsLabel: string;
  /** Installed price of the room's units at today's prices, before on-costs, £. */
  installedCostGbp: number;
  pupils: number;
  /** Pupil-hours a year above the criterion's threshold that the units remove. */
  pupilHoursRemovedPerYear: number;
  /** The room's weighted ranking score under the trust's saved weights, 0–1 (higher = do sooner). */
  rankScore: number;
  /** Place on the priorities list (1 = do first), when known. */
  rank: number | null;
  /** 1 (least concern) – 4 (most). */
  riskBand: number;
  /** Net money saved a year at the assessment's prices, after fan electricity and maintenance, £. */
  annualSavingGbp: number;
  /** Annual maintenance included in that saving, £ (kept apart so an energy-price scenario scales only energy). */
  annualMaintenanceGbp: number;
  annualSavingKgCo2e: number;
  /** Life of the units, years (null when unknown). */
  lifeYears: number | null;
  /** Predicted occupied-period mean CO2 in the worst season, ppm. */
  predictedMeanCo2Ppm: number;
  predictedPeakCo2Ppm: number;
  /** Measured occupied-period mean CO2 from monitor logs, ppm; null when no readings exist. */
  measuredMeanCo2Ppm: number | null;
  /** The assessment's own reason for the room's risk. */
  riskReason: string;
}

/** A place and time works can happen: one window of one programme year. */
export interface Slot {
  index: number;
  /** Programme year, 1-based. */
  year: number;
  windowId: WindowId;
  capacityUnits: number;
}

/** One room as the optimiser sees it. */
export interface PlanItem {
  roomId: string;
  /** Index into `schools`. */
  school: number;
  units: number;
  /** Installed price before on-costs, £ (the year's cost factor multiplies it). */
  baseCostGbp: number;
  /** Benefit a year once done (pupil-hours or weighted score). */
  value: number;
  /** Slots the room may go into, ascending. */
  allowedSlots: number[];
  /** Must be in the plan (forced in or pinned). */
  mustPlace: boolean;
  /** No visit of its own is needed (the work joins a heating project). */
  mobilisationWaived: boolean;
}

/** The optimisation problem: items, slots, budgets and costs. */
export interface ProgrammeProblem {
  years: number;
  slots: Slot[];
  budgetsGbp: number[];
  /** Multiplier from installed price to capital charged to the budget, per programme year (index 0 = year 1). */
  costFactorByYear: number[];
  /** Mobilisation per school visit before on-costs, £. */
  mobilisationGbp: number;
  schoolIds: string[];
  items: PlanItem[];
  /** Each year sooner is worth this fraction more (a tie-break towards doing the worst rooms first). */
  earlinessWeight: number;
}

/** Where each item goes: a slot index, or −1 for not in the programme. Same order as problem.items. */
export type Assignment = Int32Array;

/** How the plan was found and how close it is to the best possible. */
export interface SolveInfo {
  method: 'exact' | 'exact_limited' | 'heuristic';
  /** Objective of the plan (weighted benefit, see ProgrammeProblem.earlinessWeight). */
  objective: number;
  /** A proven upper bound on the best possible objective. */
  bound: number;
  /** 100 × (bound − objective) / bound; 0 when both are 0. */
  gapPct: number;
  boundMethod: 'solver_dual_bound' | 'lp_relaxation' | 'lagrangian' | 'resource_relaxation';
  /** Words for the plan page and reports. */
  words: string;
  seconds: number;
  columns: number;
}
