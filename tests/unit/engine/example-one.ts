/**
 * Worked example 1 (docs/sources.md, "Worked examples"): one classroom, one school day, worked by hand with the
 * exact period-by-period solution of the well-mixed mass balance (Batterman 2017, IJERPH 14(2):145 §2.1) and the
 * generation rates of Persily & de Jonge (2017) Table 4.
 * V = 8 m × 7 m × 3.0 m = 168 m³; 30 pupils 11–16 y at 1.4 met + 1 adult 30–40 y at 1.4 met;
 * G = (30·0.00445 + 0.0047) × 293.15/273.15 = 0.148319 L/s; C_o = C_0 = 420 ppm; timetable 09:00–15:15.
 */
import type { DaySegment } from '~/lib/engine/co2-mass-balance';

export const EXAMPLE_ONE = {
  volumeM3: 168,
  generationLps: 0.148319,
  outdoorCo2Ppm: 420,
  periods: [
    { label: 'L1', start: 540, end: 600, occupied: true },
    { label: 'L2', start: 600, end: 660, occupied: true },
    { label: 'break', start: 660, end: 675, occupied: false },
    { label: 'L3', start: 675, end: 735, occupied: true },
    { label: 'lunch', start: 735, end: 795, occupied: false },
    { label: 'L4', start: 795, end: 855, occupied: true },
    { label: 'L5', start: 855, end: 915, occupied: true },
  ],
} as const;

/** The example's day as mass-balance segments with one constant outdoor-air flow. */
export function exampleOneSegments(flowLps: number): DaySegment[] {
  return EXAMPLE_ONE.periods.map((p) => ({
    startMinute: p.start,
    endMinute: p.end,
    generationLps: p.occupied ? EXAMPLE_ONE.generationLps : 0,
    flowLps,
    occupancyFraction: p.occupied ? 1 : 0,
  }));
}
