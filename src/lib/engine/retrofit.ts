/**
 * Heat-recovery retrofit: the outdoor air a room needs to meet the mechanical criterion, the cheapest
 * combination of catalogue units that supplies it within a sound limit, and the money, energy and carbon
 * of those units (Batterman 2017 steady state; CIBSE TM41 degree-hours; HM Treasury Green Book discounting).
 */
import type { RetrofitUnitLine, UnitModel } from './types';

/**
 * Outdoor air needed so that the steady state stays at or below each limit, L/s:
 * inverting C_ss = C_o + 10^6·G/Q gives Q = 10^6·G/(C_limit − C_o) (Batterman 2017, steady-state method).
 * The steady state bounds the occupied-period mean from above, so meeting it meets the mean limit.
 * Returns null when a limit is at or below outdoor CO2 (no flow can meet it).
 */
export function requiredOutdoorAirLps(args: {
  generationLps: number;
  outdoorCo2Ppm: number;
  meanLimitPpm: number;
  maxLimitPpm: number | null;
}): number | null {
  const limit = args.maxLimitPpm === null ? args.meanLimitPpm : Math.min(args.meanLimitPpm, args.maxLimitPpm);
  if (limit <= args.outdoorCo2Ppm) return null;
  return (1e6 * args.generationLps) / (limit - args.outdoorCo2Ppm);
}

/** Sound level of several sources together: 10·log10 Σ n·10^(L/10), dB(A). */
export function combinedSoundDbA(sources: readonly { soundDbA: number; count: number }[]): number {
  let sum = 0;
  for (const s of sources) sum += s.count * 10 ** (s.soundDbA / 10);
  return sum > 0 ? 10 * Math.log10(sum) : 0;
}

/** A chosen set of units. */
export interface UnitChoice {
  lines: { model: UnitModel; count: number }[];
  count: number;
  flowLps: number;
  capitalCostGbp: number;
  soundDbA: number;
  soundLimitMet: boolean;
}

/**
 * Cheapest combination (one model, or two models mixed) with at most `maxUnits` units whose nominal flow
 * meets the requirement; combinations within the sound limit win over any that exceed it. Ties: fewer units.
 * Returns null when no combination reaches the flow.
 */
export function chooseUnits(args: {
  requiredSupplyLps: number;
  catalogue: readonly UnitModel[];
  soundLimitDbA: number;
  maxUnits: number;
}): UnitChoice | null {
  const { requiredSupplyLps: need, catalogue, soundLimitDbA, maxUnits } = args;
  let best: UnitChoice | null = null;
  let bestCost = Number.POSITIVE_INFINITY;
  let bestCount = Number.POSITIVE_INFINITY;
  let bestOk = false;
  // Scalars only in the loop; the winning lines are built once per improvement.
  const consider = (a: UnitModel, n: number, b: UnitModel | null, m: number): void => {
    const flow = a.nominalFlowLps * n + (b ? b.nominalFlowLps * m : 0);
    if (flow + 1e-9 < need) return;
    const cost = a.installedCostGbp * n + (b ? b.installedCostGbp * m : 0);
    const count = n + (b ? m : 0);
    const energy = n * 10 ** (a.soundDbA / 10) + (b ? m * 10 ** (b.soundDbA / 10) : 0);
    const sound = 10 * Math.log10(energy);
    const ok = sound <= soundLimitDbA + 1e-9;
    const better =
      best === null ||
      (ok && !bestOk) ||
      (ok === bestOk && (cost < bestCost - 1e-9 || (Math.abs(cost - bestCost) <= 1e-9 && count < bestCount)));
    if (!better) return;
    const lines = b
      ? [
          { model: a, count: n },
          { model: b, count: m },
        ]
      : [{ model: a, count: n }];
    best = { lines, count, flowLps: flow, capitalCostGbp: cost, soundDbA: sound, soundLimitMet: ok };
    bestCost = cost;
    bestCount = count;
    bestOk = ok;
  };
  for (let i = 0; i < catalogue.length; i++) {
    const a = catalogue[i] as UnitModel;
    for (let n = 1; n <= maxUnits; n++) {
      consider(a, n, null, 0);
      for (let j = i + 1; j < catalogue.length; j++) {
        const b = catalogue[j] as UnitModel;
        for (let m = 1; n + m <= maxUnits; m++) consider(a, n, b, m);
      }
    }
  }
  return best;
}

/** The unit lines as the result reports them. */
export function unitLines(choice: UnitChoice): RetrofitUnitLine[] {
  return choice.lines.map((l) => ({ modelId: l.model.id, modelName: l.model.name, count: l.count }));
}

/** "2 × Wall unit 150 + 1 × Sill unit 60". */
export function describeUnitLines(lines: readonly RetrofitUnitLine[]): string {
  return lines.map((l) => `${l.count} × ${l.modelName}`).join(' + ');
}

/** Flow-weighted heat-recovery efficiency and specific fan power of a choice. */
export function choicePerformance(choice: UnitChoice): {
  heatRecoveryEfficiency: number;
  specificFanPowerWPerLps: number;
  maintenanceGbp: number;
  lifeYears: number;
} {
  let eta = 0;
  let sfp = 0;
  let maint = 0;
  let life = Number.POSITIVE_INFINITY;
  for (const l of choice.lines) {
    const q = l.model.nominalFlowLps * l.count;
    eta += l.model.heatRecoveryEfficiency * q;
    sfp += l.model.specificFanPowerWPerLps * q;
    maint += l.model.annualMaintenanceGbp * l.count;
    if (l.model.lifeYears < life) life = l.model.lifeYears;
  }
  return {
    heatRecoveryEfficiency: eta / choice.flowLps,
    specificFanPowerWPerLps: sfp / choice.flowLps,
    maintenanceGbp: maint,
    lifeYears: life,
  };
}

/** Pupil-hours of poor air removed per £1,000 of capital; null with no capital. */
export function pupilHoursPer1000Gbp(pupilHoursRemoved: number, capitalCostGbp: number): number | null {
  return capitalCostGbp > 0 ? (1000 * pupilHoursRemoved) / capitalCostGbp : null;
}

/** Capital per tonne CO2e saved over the unit life, £/t; null when the units save no carbon. */
export function capitalPerTonneCo2eGbp(capitalCostGbp: number, annualKgCo2e: number, lifeYears: number): number | null {
  const tonnes = (annualKgCo2e * lifeYears) / 1000;
  return tonnes > 0 ? capitalCostGbp / tonnes : null;
}
