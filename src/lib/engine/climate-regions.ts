/**
 * A small table of UK climate regions: monthly mean outdoor temperatures and seasonal wind speeds at 10 m,
 * with the daily range and day-to-day spread the hourly model of hours.ts needs.
 * Values are approximate regional averages recalled from Met Office 1991–2020 climate summaries:
 * status from_memory. Each school can override them through its assumption set.
 */
import type { ClimateRegion, ClimateRegionData } from './types';

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

/**
 * Mean daily range (daily maximum − minimum) of outdoor temperature by month, January first, K: typical of
 * English lowland stations in the Met Office 1991–2020 averages (recalled, not checked: from memory).
 */
export const UK_DAILY_RANGE_K = [5.3, 5.8, 7.0, 8.6, 9.2, 9.4, 9.4, 9.0, 8.3, 6.9, 5.6, 5.1] as const;

/**
 * Standard deviation of daily mean temperature about its monthly mean, January first, K: larger in winter when
 * cold and mild spells alternate (recalled from UK station records: from memory).
 */
export const UK_DAY_TO_DAY_SD_K = [3.4, 3.3, 2.9, 2.5, 2.4, 2.3, 2.3, 2.2, 2.3, 2.6, 2.9, 3.3] as const;
