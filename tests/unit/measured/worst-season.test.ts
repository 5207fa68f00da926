/**
 * The bid pack sets the measured mean of a room's stalest season beside the model's worst-season mean. Which
 * season counts is a rule of ours (a season needs MIN_DAYS_TO_COMPARE good school days, as in the comparison
 * with the model): common practice, no single source — a few days of readings are not evidence of a season.
 */
import { describe, expect, it } from 'vitest';
import {
  MIN_DAYS_TO_COMPARE,
  type MeasuredRoom,
  type MeasuredSeason,
  worstMeasuredSeasonMean,
} from '~/lib/engine/measured';

function season(name: MeasuredSeason['season'], days: number, occupiedMeanPpm: number | null): MeasuredSeason {
  return { season: name, days, occupiedMeanPpm } as MeasuredSeason;
}
function room(...seasons: MeasuredSeason[]): MeasuredRoom {
  return {
    seasons: Object.fromEntries(seasons.map((s) => [s.season, s])),
    days: seasons.reduce((n, s) => n + s.days, 0),
    firstDate: null,
    lastDate: null,
  };
}

describe('worstMeasuredSeasonMean', () => {
  it('takes the stalest season among those with enough school days', () => {
    const r = room(season('winter', 20, 1180), season('mid', 30, 1320), season('summer', 12, 760));
    expect(worstMeasuredSeasonMean(r)).toEqual({ season: 'mid', meanPpm: 1320, days: 30 });
  });

  it('ignores a staler season with too few days, and a season without a mean', () => {
    const r = room(
      season('winter', MIN_DAYS_TO_COMPARE - 1, 2400),
      season('mid', MIN_DAYS_TO_COMPARE, 1010),
      season('summer', 40, null),
    );
    expect(worstMeasuredSeasonMean(r)).toEqual({ season: 'mid', meanPpm: 1010, days: MIN_DAYS_TO_COMPARE });
  });

  it('answers null when no season has enough days', () => {
    expect(worstMeasuredSeasonMean(room(season('winter', 2, 1500)))).toBeNull();
    expect(worstMeasuredSeasonMean(room())).toBeNull();
  });
});
