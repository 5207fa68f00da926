/**
 * Synthetic monitor logs from the mass-balance ODE 1000·V·dC/dt = Q·(C_o − C) + 10^6·G (Batterman 2017 §2.1),
 * integrated by a general-purpose solver (odex, Gragg–Bulirsch–Stoer) that knows nothing of our closed forms,
 * with known air-change rates per state, known occupancy and seeded Gaussian sensor noise.
 */
import { createRequire } from 'node:module';
import { prng } from '../../../scripts/seed/prng';
import type { MeasuredDay } from '~/lib/engine/measured';
import type { Season, TimetableSegment } from '~/lib/engine/types';

interface OdexSolver {
  absoluteTolerance: number;
  relativeTolerance: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], x1: number): { y: number[] };
}
const { Solver } = createRequire(import.meta.url)('odex') as { Solver: new (n: number) => OdexSolver };

/** The room and its behaviour the log is generated from. */
export interface SyntheticRoom {
  volumeM3: number;
  outdoorPpm: number;
  /** CO2 generation with everyone in, L/s. */
  generationLps: number;
  /** Air-change rates, h⁻¹: during lessons, empty periods in the school day, and after school/overnight. */
  lessonAch: number;
  emptyAch: number;
  nightAch: number;
  timetable: readonly TimetableSegment[];
  /** Sensor noise, ppm (standard deviation). */
  noisePpm: number;
  stepMinutes: number;
  season: Season;
  seed: number;
}

/** Box–Muller normal deviate from a uniform source. */
function gaussian(random: () => number): number {
  const u = Math.max(random(), 1e-12);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

/** `days` consecutive days from a Monday (weekends empty), each sampled every `stepMinutes` from 00:00 to 24:00. */
export function syntheticDays(room: SyntheticRoom, days: number): MeasuredDay[] {
  const solver = new Solver(1);
  solver.absoluteTolerance = 1e-9;
  solver.relativeTolerance = 1e-9;
  const random = prng(room.seed);
  const first = room.timetable[0]!.startMinute;
  const last = room.timetable[room.timetable.length - 1]!.endMinute;
  let c = room.outdoorPpm;
  const out: MeasuredDay[] = [];
  for (let d = 0; d < days; d++) {
    const weekday = (1 + d) % 7;
    const school = weekday >= 1 && weekday <= 5;
    // State changes of the day (minutes): timetable boundaries on school days.
    const cuts = school ? [0, ...room.timetable.flatMap((s) => [s.startMinute, s.endMinute]), 1440] : [0, 1440];
    const bounds = [...new Set(cuts)].sort((a, b) => a - b);
    const elapsed: number[] = [];
    const ppm: number[] = [];
    let t = 0;
    for (let b = 0; b + 1 < bounds.length; b++) {
      const from = bounds[b]!;
      const to = bounds[b + 1]!;
      const seg = school ? room.timetable.find((s) => s.startMinute <= from && from < s.endMinute) : undefined;
      const inDay = school && from >= first && from < last;
      const occupancy = seg?.occupancyFraction ?? 0;
      const ach = occupancy > 0 ? room.lessonAch : inDay ? room.emptyAch : room.nightAch;
      const q = (ach * room.volumeM3) / 3.6;
      const g = room.generationLps * occupancy;
      const f = (_x: number, y: number[]) => [
        (60 * (q * (room.outdoorPpm - (y[0] as number)) + 1e6 * g)) / (1000 * room.volumeM3),
      ];
      while (t < to) {
        if (t >= from) {
          elapsed.push(t);
          ppm.push(Math.round(c + room.noisePpm * gaussian(random)));
        }
        const next = Math.min(to, t + room.stepMinutes);
        c = solver.solve(f, t, [c], next).y[0] as number;
        t = next;
      }
    }
    const date = new Date(Date.UTC(2026, 0, 5 + d)).toISOString().slice(0, 10);
    out.push({ date, weekday, season: room.season, elapsedMin: elapsed, wallMin: elapsed, co2Ppm: ppm });
  }
  return out;
}
