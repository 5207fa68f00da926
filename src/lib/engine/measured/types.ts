/**
 * Measured CO2: what the analysis reads (one room's logged days) and what it answers (per season, each
 * method named with its source and a confidence). Plain data; the engine does no I/O.
 */
import type { Season } from '../types';

/** One local calendar day of one room's readings, in time order, without duplicates. */
export interface MeasuredDay {
  /** Local calendar date, 'YYYY-MM-DD'. */
  date: string;
  /** Day of the week, 0 = Sunday … 6 = Saturday. */
  weekday: number;
  season: Season;
  /** Real minutes elapsed since local midnight (0–1,500 on the October clock-change day). */
  elapsedMin: ArrayLike<number>;
  /** Local wall-clock minute of each reading, 0–1,440 (what the timetable is written in). */
  wallMin: ArrayLike<number>;
  co2Ppm: ArrayLike<number>;
}

/** How far an estimate can be trusted: an Airtally screening rule stated beside each estimate. */
export type Confidence = 'high' | 'medium' | 'low' | 'none';

/** A measured quantity's method, in words a person reads, with its published source. */
export interface MethodNote {
  method: string;
  source: string;
}

/** Where a room's risk figure comes from, as the ranking, dashboard and exports show it. */
export type Evidence = 'measured' | 'calibrated' | 'predicted';

/** An air-change rate estimated from many events (decays or build-ups) of one season. */
export interface AirChangeEstimate {
  /** Median of the events' air-change rates, h⁻¹. */
  achPerH: number;
  /** Outdoor-air flow the median implies, Q = λ·V/3.6, L/s. */
  flowLps: number;
  /** Usable events behind the median. */
  events: number;
  /** Events found but refused (poor fit, too short, too close to outdoor air). */
  rejected: number;
  /** Interquartile range of the events' rates, h⁻¹. */
  iqrAchPerH: number;
  /** Fit quality: median R² of the log-linear decays, or median RMS residual (ppm) of the build-ups. */
  fitQuality: number;
  confidence: Confidence;
  note: MethodNote;
}

/** Outdoor CO2 as the room's own sensor sees it. */
export interface BaselineEstimate {
  ppm: number;
  /** 'night_minima' when estimated from the log, 'assumed' when the assumption set's value stands in. */
  basis: 'night_minima' | 'assumed';
  nights: number;
  confidence: Confidence;
  /** Why the log's own value was not used, or what to check. */
  warning: string | null;
  note: MethodNote;
}

/** Time above one threshold over the occupied period. */
export interface MeasuredThreshold {
  thresholdPpm: number;
  /** Share of the occupied period's covered time above the threshold, 0–1. */
  shareAbove: number;
  /** Occupancy-weighted minutes above, per occupied day (the model's occupiedMinutesOver). */
  occupiedMinutesOverPerDay: number;
  /** Longest uninterrupted run above, on the worst day and on the median day, minutes. */
  longestRunMinutesMax: number;
  longestRunMinutesMedianDay: number;
}

/** One season of one room, measured. */
export interface MeasuredSeason {
  season: Season;
  /** Occupied school days with enough readings (≥ 75 % of the occupied period). */
  days: number;
  /** Days with readings in the season, any kind (weekends, holidays, partial days). */
  daysWithReadings: number;
  readings: number;
  /** Mean over days of each day's time-weighted mean over the occupied period, ppm (null without good days). */
  occupiedMeanPpm: number | null;
  /** 10th and 90th percentile of the daily occupied means, ppm. */
  dailyMeanP10Ppm: number | null;
  dailyMeanP90Ppm: number | null;
  /** Highest reading on an occupied day, ppm. */
  peakPpm: number | null;
  thresholds: MeasuredThreshold[];
  /** The criterion judged like the model's typical day: mean of daily means, and the median day's longest run. */
  meanMet: boolean | null;
  maxMet: boolean | null;
  criterionMet: boolean | null;
  occupiedStatsConfidence: Confidence;
  baseline: BaselineEstimate;
  /** Decays while the room is empty during the school day (breaks, lunch). */
  decayInDay: AirChangeEstimate | null;
  /** Decays after the last lesson (often windows shut: closest to infiltration alone). */
  decayAfterSchool: AirChangeEstimate | null;
  /** Build-up during lessons with the register's occupants' CO2 generation. */
  buildUp: AirChangeEstimate | null;
  notes: MethodNote[];
}

/**
 * What the risk's measured evidence reads of a room's analysis (evidence.ts): per season the good days, the mean and,
 * per threshold, the minutes above per day and the median day's longest run. A MeasuredRoom is one; a run keeps
 * only this much of it in its input snapshot.
 */
export interface MeasuredEvidenceInput {
  seasons: Partial<
    Record<
      Season,
      {
        days: number;
        occupiedMeanPpm: number | null;
        thresholds: readonly Pick<
          MeasuredThreshold,
          'thresholdPpm' | 'occupiedMinutesOverPerDay' | 'longestRunMinutesMedianDay'
        >[];
      }
    >
  >;
}

/** What the analysis of one room answers. */
export interface MeasuredRoom {
  seasons: Partial<Record<Season, MeasuredSeason>>;
  /** Occupied school days with enough readings, all seasons. */
  days: number;
  firstDate: string | null;
  lastDate: string | null;
}

/** Statistics of one room-day, as the day lists and calendars show them. */
export interface DayMeasure {
  date: string;
  season: Season;
  readings: number;
  /** Share of the occupied period covered by readings, 0–1. */
  coverage: number;
  /** A school day with pupils in (weekday, CO2 rising well above the night). */
  occupied: boolean;
  /** Time-weighted mean over the occupied period, ppm (null without readings in it). */
  occupiedMeanPpm: number | null;
  minPpm: number;
  maxPpm: number;
  /** Lowest 30-minute running mean of the readings between midnight and 06:00, ppm. */
  nightMinPpm: number | null;
  /** Per threshold (ascending): minutes above, occupancy-weighted minutes above, longest run, within the occupied period. */
  minutesOver: number[];
  occupiedMinutesOver: number[];
  longestRunMinutes: number[];
}
