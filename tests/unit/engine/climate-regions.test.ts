import { describe, expect, it } from 'vitest';
import {
  CLIMATE_REGION_DATA,
  occupiedHeatingDegreeHours,
  schoolDayHours,
  seasonOutdoorTempC,
} from '~/lib/engine/climate-regions';
import { DEFAULT_ASSUMPTIONS } from '~/lib/engine/assumptions';
import type { ClimateRegionData, Season, SeasonProfile } from '~/lib/engine/types';

const flat = (t: number): ClimateRegionData => ({
  name: 'test',
  monthlyMeanTempC: [t, t, t, t, t, t, t, t, t, t, t, t],
  windSpeedMs: { winter: 4, mid: 4, summer: 4 },
  source: 'test',
  status: 'common_practice',
});

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

describe('occupied heating degree-hours (§5.2: DH_occ = Σ (θ_i − θ_e) over occupied hours below the cut-off)', () => {
  it('sums 190 days × 7 h × 12 K = 15,960 K·h when every month sits at 6 °C (after a 2 K daytime offset) ', () => {
    // Hand: monthly mean 6 + offset 2 = 8 °C < 14 °C cut-off in every month; θ_i − θ_e = 20 − 8 = 12 K;
    // winter 60·7·12 = 5040, mid 60·7·12 = 5040, summer 70·7·12 = 5880 → 15,960 K·h.
    const dh = occupiedHeatingDegreeHours({
      region: flat(6),
      seasons,
      dayHours: 7,
      indoorTempC: 20,
      cutoffTempC: 14,
      daytimeOffsetK: 2,
    });
    expect(dh).toEqual({ winter: 5040, mid: 5040, summer: 5880 });
  });

  it('counts nothing in months at or above the cut-off', () => {
    // 13 + 2 = 15 °C ≥ 14 °C cut-off → 0
    const dh = occupiedHeatingDegreeHours({
      region: flat(13),
      seasons,
      dayHours: 7,
      indoorTempC: 20,
      cutoffTempC: 14,
      daytimeOffsetK: 2,
    });
    expect(dh).toEqual({ winter: 0, mid: 0, summer: 0 });
  });

  it('takes the season temperature as the mean of its months plus the daytime offset', () => {
    // Midlands winter: (Dec 4.6 + Jan 4.2 + Feb 4.5)/3 + 2 = 4.4333 + 2 = 6.4333 °C (table values, from memory)
    const midlands = CLIMATE_REGION_DATA.midlands;
    expect(seasonOutdoorTempC(midlands, DEFAULT_ASSUMPTIONS.seasons.value.winter, 2)).toBeCloseTo(6.4333, 4);
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
