/**
 * A room's outdoor air by route and season: windows (window-airflow.ts), infiltration (infiltration.ts) and fans,
 * combined as the ASHRAE Handbook—Fundamentals (2017) ch. 16 superposition does: balanced fan flow adds linearly,
 * an unbalanced (single-fan) flow and natural infiltration combine in quadrature, Q = Q_bal + √(Q_unbal² + Q_inf²)
 * (equation number from memory). Window flow adds linearly on top (opened sashes dominate crack flow).
 */
import type { DaySegment } from './co2-mass-balance';
import type { Season, TimetableSegment } from './types';

/** Outdoor-air flows of one season, L/s; windows differ while pupils are in and during breaks. */
export interface SeasonFlows {
  windowOccupiedLps: number;
  windowEmptyLps: number;
  infiltrationLps: number;
  /** Supply-and-extract fans (including heat-recovery units). */
  balancedLps: number;
  /** A single fan (extract only, or fan-assisted natural). */
  unbalancedLps: number;
  /** Σ η·Q over balanced flows with heat recovery: the part of the air whose heat comes back, L/s. */
  recoveredLps: number;
}

/** Outdoor air of the non-window routes: Q_bal + √(Q_unbal² + Q_inf²), L/s (ASHRAE Fundamentals ch. 16). */
export function fanAndInfiltrationLps(
  flows: Pick<SeasonFlows, 'balancedLps' | 'unbalancedLps' | 'infiltrationLps'>,
): number {
  const u = flows.unbalancedLps;
  const i = flows.infiltrationLps;
  return flows.balancedLps + (u === 0 ? i : Math.sqrt(u * u + i * i));
}

/** Outdoor air while pupils are in, all routes, L/s. */
export function occupiedTotalLps(flows: SeasonFlows): number {
  return fanAndInfiltrationLps(flows) + flows.windowOccupiedLps;
}

/** The lowest total of the day (windows shut further while occupied or empty), L/s. */
export function lowestTotalLps(flows: SeasonFlows): number {
  return fanAndInfiltrationLps(flows) + Math.min(flows.windowOccupiedLps, flows.windowEmptyLps);
}

/** Time-weighted mean outdoor-air flow over the school day, L/s; `occupiedShare` the share of minutes with pupils in. */
export function meanDayFlowLps(occupiedShare: number, flows: SeasonFlows): number {
  return (
    fanAndInfiltrationLps(flows) + occupiedShare * flows.windowOccupiedLps + (1 - occupiedShare) * flows.windowEmptyLps
  );
}

/**
 * Mass-balance segments of one day: generation scaled by the share present, flow by the windows' state.
 * `out` is reused (one array per timetable) because the engine is synchronous.
 */
export function fillDaySegments(
  out: DaySegment[],
  timetable: readonly TimetableSegment[],
  generationLps: number,
  flows: SeasonFlows,
): DaySegment[] {
  const base = fanAndInfiltrationLps(flows);
  for (let i = 0; i < timetable.length; i++) {
    const t = timetable[i] as TimetableSegment;
    let seg = out[i];
    if (!seg) {
      seg = { startMinute: 0, endMinute: 0, generationLps: 0, flowLps: 0, occupancyFraction: 0 };
      out[i] = seg;
    }
    seg.startMinute = t.startMinute;
    seg.endMinute = t.endMinute;
    seg.occupancyFraction = t.occupancyFraction;
    seg.generationLps = generationLps * t.occupancyFraction;
    seg.flowLps = base + (t.occupancyFraction > 0 ? flows.windowOccupiedLps : flows.windowEmptyLps);
  }
  if (out.length !== timetable.length) out.length = timetable.length;
  return out;
}

/** Ventilation heat loss over the heating hours of each season, kWh: ρc_p·(Q̄ − Σ ηQ)·DH/1000 (CIBSE TM41 form). */
export function heatingSeasonLossKwh(args: {
  occupiedShare: number;
  flows: Record<Season, SeasonFlows>;
  degreeHoursKh: Record<Season, number>;
  airHeatCapacityWPerLpsK: number;
}): number {
  // Season by season by name (a loop over season keys would look records up by a changing key).
  let kwh = 0;
  kwh += seasonLossKwh(args, args.flows.winter, args.degreeHoursKh.winter);
  kwh += seasonLossKwh(args, args.flows.mid, args.degreeHoursKh.mid);
  kwh += seasonLossKwh(args, args.flows.summer, args.degreeHoursKh.summer);
  return kwh;
}

/** One season's ventilation heat loss, kWh (0 without heating degree-hours). */
function seasonLossKwh(
  args: { occupiedShare: number; airHeatCapacityWPerLpsK: number },
  f: SeasonFlows,
  dh: number,
): number {
  if (dh <= 0) return 0;
  return (args.airHeatCapacityWPerLpsK * (meanDayFlowLps(args.occupiedShare, f) - f.recoveredLps) * dh) / 1000;
}
