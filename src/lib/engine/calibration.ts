/**
 * Ventilation rates from logged CO2 (Batterman 2017, IJERPH 14(2):145, §2): the two-point decay (tracer-gas dilution,
 * ASTM E741 applied to occupant CO2 by Batterman 2017) and the steady-plateau method.
 */

/**
 * Two-point decay with no occupants: λ = ln[(C1 − C_o)/(C2 − C_o)]/(t2 − t1), h⁻¹.
 * Concentrations ppm with C1 > C2 > C_o; elapsed hours > 0.
 */
export function decayAchPerH(args: {
  startPpm: number;
  endPpm: number;
  outdoorCo2Ppm: number;
  elapsedHours: number;
}): number {
  return Math.log((args.startPpm - args.outdoorCo2Ppm) / (args.endPpm - args.outdoorCo2Ppm)) / args.elapsedHours;
}

/** Concentration after a decay of λ over t hours with no occupants: C_o + (C_0 − C_o)·e^(−λt), ppm. */
export function decayedPpm(args: { startPpm: number; outdoorCo2Ppm: number; achPerH: number; hours: number }): number {
  return args.outdoorCo2Ppm + (args.startPpm - args.outdoorCo2Ppm) * Math.exp(-args.achPerH * args.hours);
}

/** Steady plateau with known generation: Q = 10^6·G/(C_plateau − C_o), L/s (Batterman 2017 steady-state method). */
export function plateauFlowLps(args: { generationLps: number; plateauPpm: number; outdoorCo2Ppm: number }): number {
  return (1e6 * args.generationLps) / (args.plateauPpm - args.outdoorCo2Ppm);
}
