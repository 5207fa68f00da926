import { describe, expect, it } from 'vitest';
import { CLIMATE_REGION_DATA } from '~/lib/engine/climate-regions';
import { DEFAULT_ASSUMPTIONS } from '~/lib/engine/assumptions';
import { expectedDegreeHoursK, hourlyMeanTempC, normalCdf, schoolDayHours, schoolYearHours } from '~/lib/engine/hours';
import type { ClimateRegionData, Season, SeasonProfile, TimetableSegment } from '~/lib/engine/types';

const flat = (t: number): ClimateRegionData => ({
  name: 'test',
  monthlyMeanTempC: [t, t, t, t, t, t, t, t, t, t, t, t],
  windSpeedMs: { winter: 4, mid: 4, summer: 4 },
  source: 'test',
  status: 'common_practice',
});
const zeros = Array.from({ length: 12 }, () => 0);

const seasons: Record<Season, SeasonProfile> = {
  winter: {
    months: [12, 1, 2],
    schoolDays: 60,
    indoorTempC: 20,
    windowOpenFractionOccupied: 0.1,
    windowOpenFractionEmpty: 0.1,
  },
  mid: {
    months: [3, 4, 10, 11],
    schoolDays: 60,
    indoorTempC: 20,
    windowOpenFractionOccupied: 0.3,
    windowOpenFractionEmpty: 0.3,
  },
  summer: {
    months: [5, 6, 7, 9],
    schoolDays: 70,
    indoorTempC: 22,
    windowOpenFractionOccupied: 0.7,
    windowOpenFractionEmpty: 0.7,
  },
};
const sevenHours: TimetableSegment[] = [
  { label: 'day', kind: 'lesson', startMinute: 540, endMinute: 960, occupancyFraction: 1 },
];

/** Trapezoid integral of f over [a, b] with n steps (an independent numerical check). */
function integrate(f: (x: number) => number, a: number, b: number, n = 20000): number {
  const h = (b - a) / n;
  let sum = (f(a) + f(b)) / 2;
  for (let i = 1; i < n; i++) sum += f(a + i * h);
  return sum * h;
}

describe('occupied heating degree-hours from hourly temperatures (CIBSE TM41 degree-hour form)', () => {
  it('sums 190 days × 7 h × 14 K = 18,620 K·h when every hour sits at 6 °C (no daily cycle, no spread)', () => {
    // Hand: θ_i − θ_e = 20 − 6 = 14 K below the 14 °C cut-off; winter 60·7·14 = 5880, mid 5880, summer 70·7·14 = 6860.
    const h = schoolYearHours({
      region: flat(6),
      dailyRangeK: zeros,
      dayToDaySdK: zeros,
      seasons,
      timetable: sevenHours,
      indoorTempC: 20,
      cutoffTempC: 14,
    });
    expect(h.winter.degreeHoursKh).toBeCloseTo(5880, 6);
    expect(h.mid.degreeHoursKh).toBeCloseTo(5880, 6);
    expect(h.summer.degreeHoursKh).toBeCloseTo(6860, 6);
    expect(h.winter.heatingHours).toBeCloseTo(420, 6);
  });

  it('counts nothing when every hour is at or above the cut-off and days do not scatter', () => {
    const h = schoolYearHours({
      region: flat(15),
      dailyRangeK: zeros,
      dayToDaySdK: zeros,
      seasons,
      timetable: sevenHours,
      indoorTempC: 20,
      cutoffTempC: 14,
    });
    expect(h.winter.degreeHoursKh).toBe(0);
  });

  it('counts cold days of a mild month when days scatter: the closed form equals a numerical integral over N(μ, σ)', () => {
    // μ 15 °C, σ 3 K, θ_i 20, θ_c 14: E[(20 − T)·1(T < 14)] by direct integration of (20 − t)·φ((t − 15)/3)/3 over t < 14.
    const numeric = integrate(
      (t) => ((20 - t) * Math.exp(-0.5 * ((t - 15) / 3) ** 2)) / (3 * Math.sqrt(2 * Math.PI)),
      -25,
      14,
    );
    const closed = expectedDegreeHoursK({ meanTempC: 15, sdK: 3, indoorTempC: 20, cutoffTempC: 14 });
    expect(Math.abs(closed - numeric)).toBeLessThanOrEqual(1e-4);
    expect(closed).toBeGreaterThan(0);
  });

  it('uses a normal distribution function matching published tables: Φ(1) = 0.84134, Φ(−1.96) = 0.02500', () => {
    // Standard normal table values (any statistics handbook; Abramowitz & Stegun 1964 Table 26.1).
    expect(Math.abs(normalCdf(1) - 0.84134)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(normalCdf(-1.96) - 0.025)).toBeLessThanOrEqual(1e-5);
  });

  it('takes the school-hours temperature as the daily cosine averaged over the timetable', () => {
    // 09:00–16:00 with a 6 K daily range about 5 °C: mean of 5 + 3·cos(2π(h − 15)/24) over h ∈ [9, 16], integrated here.
    const expected = integrate((h) => 5 + 3 * Math.cos((2 * Math.PI * (h - 15)) / 24), 9, 16) / 7;
    const h = schoolYearHours({
      region: flat(5),
      dailyRangeK: Array.from({ length: 12 }, () => 6),
      dayToDaySdK: zeros,
      seasons,
      timetable: sevenHours,
      indoorTempC: 20,
      cutoffTempC: 14,
    });
    expect(Math.abs(h.winter.meanSchoolHoursTempC - expected)).toBeLessThanOrEqual(0.01);
    expect(hourlyMeanTempC(5, 6, 15)).toBe(8);
  });

  it('measures the default school day as 6.25 hours (09:00–15:15)', () => {
    expect(schoolDayHours(DEFAULT_ASSUMPTIONS.occupancy.timetable.value)).toBe(6.25);
  });

  it('marks every region as from memory with its source', () => {
    for (const r of Object.values(CLIMATE_REGION_DATA)) {
      expect(r.status).toBe('from_memory');
      expect(r.monthlyMeanTempC).toHaveLength(12);
      expect(r.source).toMatch(/Met Office/);
    }
  });
});
