/**
 * A small table of UK climate regions: monthly mean outdoor temperatures and seasonal wind speeds,
 * and the derived season temperatures and occupied heating degree-hours.
 * Values are approximate regional averages recalled from Met Office 1991–2020 climate summaries:
 * status from_memory. Each school can override them through its assumption set.
 */
import type { ClimateRegion, ClimateRegionData, Season, SeasonProfile, TimetableSegment } from './types';

/** Source line shared by every region of the table. */
export const CLIMATE_SOURCE = 'Approximate Met Office 1991–2020 regional climate averages (recalled, not checked)';

function region(name: string, temps: number[], winter: number, mid: number, summer: number): ClimateRegionData {
  return {
    name,
    monthlyMeanTempC: temps,
    windSpeedMs: { winter, mid, summer },
    source: CLIMATE_SOURCE,
    status: 'from_memory',
  };
}

/** Monthly mean temperature (Jan–Dec, °C) and seasonal 10 m wind speed (m/s) by region. */
export const CLIMATE_REGION_DATA: Record<ClimateRegion, ClimateRegionData> = {
  london_south_east: region(
    'London and South East',
    [5.5, 5.8, 7.9, 10.4, 13.7, 16.8, 19.0, 18.7, 15.9, 12.4, 8.5, 5.9],
    4.5,
    4.2,
    3.6,
  ),
  south_west: region('South West', [6.0, 5.9, 7.4, 9.4, 12.3, 15.0, 16.9, 16.9, 14.9, 12.0, 8.9, 6.6], 5.5, 5.0, 4.2),
  east_anglia: region(
    'East of England',
    [4.5, 4.8, 6.9, 9.2, 12.4, 15.5, 17.9, 17.8, 15.1, 11.6, 7.6, 5.0],
    4.8,
    4.5,
    3.8,
  ),
  midlands: region('Midlands', [4.2, 4.5, 6.4, 8.8, 11.9, 14.9, 17.0, 16.7, 14.1, 10.7, 7.0, 4.6], 4.6, 4.3, 3.6),
  north_west: region('North West', [4.4, 4.6, 6.2, 8.4, 11.4, 14.0, 15.9, 15.7, 13.5, 10.4, 7.0, 4.7], 5.3, 4.8, 4.0),
  north_east: region(
    'North East and Yorkshire',
    [3.9, 4.2, 5.9, 8.0, 10.8, 13.7, 15.9, 15.8, 13.5, 10.2, 6.6, 4.2],
    5.0,
    4.6,
    3.9,
  ),
  wales: region('Wales', [5.0, 5.0, 6.5, 8.6, 11.5, 14.1, 15.9, 15.8, 13.8, 10.9, 7.7, 5.4], 5.6, 5.0, 4.2),
  scotland: region('Scotland', [3.3, 3.6, 5.1, 7.3, 10.1, 12.8, 14.6, 14.3, 12.2, 8.9, 5.6, 3.4], 5.8, 5.2, 4.3),
  northern_ireland: region(
    'Northern Ireland',
    [4.8, 5.0, 6.4, 8.3, 11.0, 13.6, 15.3, 15.0, 13.1, 10.2, 7.1, 5.0],
    5.5,
    5.0,
    4.2,
  ),
};

/** Mean of the monthly means over the season's months, plus the school-hours offset, °C. */
export function seasonOutdoorTempC(
  regionData: ClimateRegionData,
  profile: SeasonProfile,
  daytimeOffsetK: number,
): number {
  let sum = 0;
  for (const m of profile.months) sum += regionData.monthlyMeanTempC[m - 1] ?? 0;
  return sum / profile.months.length + daytimeOffsetK;
}

/** Length of the school day covered by the timetable, hours. */
export function schoolDayHours(timetable: readonly TimetableSegment[]): number {
  let minutes = 0;
  for (const s of timetable) minutes += s.endMinute - s.startMinute;
  return minutes / 60;
}

/**
 * Occupied heating degree-hours by season, K·h a year:
 * DH_occ = Σ_months days_m · h_day · (θ_i − θ_e,m) for months with θ_e,m < θ_cutoff,
 * where θ_e,m is the month's mean plus the school-hours offset and days_m the season's school days
 * shared equally among its months.
 * Method: occupied degree-hours in place of degree-days for schools (domain reference §5.2, [CP]);
 * monthly resolution is our screening simplification of the hourly sum.
 */
export function occupiedHeatingDegreeHours(args: {
  region: ClimateRegionData;
  seasons: Record<Season, SeasonProfile>;
  dayHours: number;
  indoorTempC: number;
  cutoffTempC: number;
  daytimeOffsetK: number;
}): Record<Season, number> {
  const out: Record<Season, number> = { winter: 0, mid: 0, summer: 0 };
  for (const season of ['winter', 'mid', 'summer'] as const) {
    const profile = args.seasons[season];
    const daysPerMonth = profile.schoolDays / profile.months.length;
    for (const m of profile.months) {
      const outdoor = (args.region.monthlyMeanTempC[m - 1] ?? 0) + args.daytimeOffsetK;
      if (outdoor < args.cutoffTempC && outdoor < args.indoorTempC) {
        out[season] += daysPerMonth * args.dayHours * (args.indoorTempC - outdoor);
      }
    }
  }
  return out;
}

/** Occupied hours a year in months where heating runs (for fan run time), h. */
export function occupiedHeatingHours(args: {
  region: ClimateRegionData;
  seasons: Record<Season, SeasonProfile>;
  dayHours: number;
  cutoffTempC: number;
  daytimeOffsetK: number;
}): number {
  let total = 0;
  for (const season of ['winter', 'mid', 'summer'] as const) {
    const profile = args.seasons[season];
    const daysPerMonth = profile.schoolDays / profile.months.length;
    for (const m of profile.months) {
      const outdoor = (args.region.monthlyMeanTempC[m - 1] ?? 0) + args.daytimeOffsetK;
      if (outdoor < args.cutoffTempC) total += daysPerMonth * args.dayHours;
    }
  }
  return total;
}
