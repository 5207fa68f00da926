/**
 * Hours of the school year: occupied hours, heating hours and occupied heating degree-hours from an hourly
 * model of outdoor temperature built from monthly means.
 *
 * Method (our own closed form of a published approach):
 *  - the mean temperature at hour h of a day in month m follows a cosine daily cycle peaking at 15:00,
 *    θ(h) = θ_m + (R_m/2)·cos(2π(h − 15)/24), with R_m the month's mean daily range (the shape used by CIBSE
 *    Guide A (2015) §2 and the ASHRAE Handbook—Fundamentals (2017) ch. 14 design-day profiles; from memory);
 *  - days scatter about that mean as a normal distribution with the month's day-to-day standard deviation σ_m,
 *    the assumption behind Hitchin's (1983) monthly degree-day formula in CIBSE TM41 (2006);
 *  - for T ~ N(μ, σ) the expected degree-hours with indoor θ_i and cut-off θ_c are exactly
 *    E[(θ_i − T)·1(T < θ_c)] = (θ_i − μ)·Φ(z) + σ·φ(z), z = (θ_c − μ)/σ, and the heating share is Φ(z).
 * The timetable is sampled every 15 minutes; each season's school days are shared equally among its months.
 */
import type { ClimateRegionData, Season, SeasonProfile, TimetableSegment } from './types';

const SEASONS: readonly Season[] = ['winter', 'mid', 'summer'];
const STEP_MINUTES = 15;

/** Standard normal density φ(z). */
export function normalPdf(z: number): number {
  return Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
}

/**
 * Standard normal cumulative distribution Φ(z) through erf, Abramowitz & Stegun (1964) formula 7.1.26
 * (absolute error below 1.5·10⁻⁷).
 */
export function normalCdf(z: number): number {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * x);
  const poly = t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
  const erf = 1 - poly * Math.exp(-x * x);
  return z >= 0 ? 0.5 * (1 + erf) : 0.5 * (1 - erf);
}

/** Mean outdoor temperature at clock hour `hour` (0–24, decimal) of a month, °C: θ_m + (R/2)·cos(2π(h − 15)/24). */
export function hourlyMeanTempC(monthMeanC: number, dailyRangeK: number, hour: number): number {
  return monthMeanC + (dailyRangeK / 2) * Math.cos((2 * Math.PI * (hour - 15)) / 24);
}

/**
 * Expected heating degree-hours of one hour whose temperature is N(μ, σ), K·h: E[(θ_i − T)·1(T < θ_c)]
 * = (θ_i − μ)Φ(z) + σφ(z), z = (θ_c − μ)/σ, with θ_c ≤ θ_i. σ = 0 gives the deterministic value.
 */
export function expectedDegreeHoursK(args: {
  meanTempC: number;
  sdK: number;
  indoorTempC: number;
  cutoffTempC: number;
}): number {
  const { meanTempC: mu, sdK: sd, indoorTempC, cutoffTempC } = args;
  const cutoff = Math.min(cutoffTempC, indoorTempC);
  if (sd <= 0) return mu < cutoff ? indoorTempC - mu : 0;
  const z = (cutoff - mu) / sd;
  return (indoorTempC - mu) * normalCdf(z) + sd * normalPdf(z);
}

/** Share of hours colder than the cut-off, Φ((θ_c − μ)/σ). */
export function heatingShare(meanTempC: number, sdK: number, cutoffTempC: number): number {
  if (sdK <= 0) return meanTempC < cutoffTempC ? 1 : 0;
  return normalCdf((cutoffTempC - meanTempC) / sdK);
}

/** Hours of one season of the school year. */
export interface SeasonHours {
  /** School-day hours (timetable span) × school days, h. */
  schoolHours: number;
  /** Of those, hours colder than the heating cut-off (expected), h. */
  heatingHours: number;
  /** Occupied heating degree-hours, K·h. */
  degreeHoursKh: number;
  /** Mean outdoor temperature over the school-day hours of the season's months, °C. */
  meanSchoolHoursTempC: number;
}

/** Length of the school day covered by the timetable, hours. */
export function schoolDayHours(timetable: readonly TimetableSegment[]): number {
  let minutes = 0;
  for (const s of timetable) minutes += s.endMinute - s.startMinute;
  return minutes / 60;
}

/**
 * Hours of each season over the school's timetable (see the method above). Monthly mean temperatures from the
 * region, daily ranges and day-to-day spread by month (January first).
 */
export function schoolYearHours(args: {
  region: ClimateRegionData;
  dailyRangeK: readonly number[];
  dayToDaySdK: readonly number[];
  seasons: Record<Season, SeasonProfile>;
  timetable: readonly TimetableSegment[];
  indoorTempC: number;
  cutoffTempC: number;
}): Record<Season, SeasonHours> {
  const out = {} as Record<Season, SeasonHours>;
  // Sample clock times of the school day (mid-points of 15-minute steps), each worth its share of an hour.
  const samples: { hour: number; weightH: number }[] = [];
  for (const seg of args.timetable) {
    for (let m = seg.startMinute; m < seg.endMinute; m += STEP_MINUTES) {
      const end = Math.min(m + STEP_MINUTES, seg.endMinute);
      samples.push({ hour: (m + end) / 120, weightH: (end - m) / 60 });
    }
  }
  const dayHours = schoolDayHours(args.timetable);
  for (const season of SEASONS) {
    const profile = args.seasons[season];
    const daysPerMonth = profile.schoolDays / profile.months.length;
    let heatingHours = 0;
    let degreeHours = 0;
    let tempHours = 0;
    for (const month of profile.months) {
      const mean = args.region.monthlyMeanTempC[month - 1] as number;
      const range = args.dailyRangeK[month - 1] as number;
      const sd = args.dayToDaySdK[month - 1] as number;
      for (const s of samples) {
        const mu = hourlyMeanTempC(mean, range, s.hour);
        const w = daysPerMonth * s.weightH;
        degreeHours +=
          w *
          expectedDegreeHoursK({
            meanTempC: mu,
            sdK: sd,
            indoorTempC: args.indoorTempC,
            cutoffTempC: args.cutoffTempC,
          });
        heatingHours += w * heatingShare(mu, sd, Math.min(args.cutoffTempC, args.indoorTempC));
        tempHours += s.weightH * mu;
      }
    }
    const schoolHours = dayHours * profile.schoolDays;
    out[season] = {
      schoolHours,
      heatingHours,
      degreeHoursKh: degreeHours,
      meanSchoolHoursTempC: tempHours / (dayHours * profile.months.length),
    };
  }
  return out;
}
