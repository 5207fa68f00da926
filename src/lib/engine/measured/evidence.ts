/**
 * Measured evidence in the risk: where a room has enough good readings in a season, the occupancy-weighted
 * minutes above the criterion's risk threshold per school day, the daily mean and the longest run above the maximum come
 * from the log instead of the model, and the year's pupil-hours are built the same way as the model's (pupils × minutes
 * over per day × school days ÷ 60, summed over seasons). Seasons without enough readings keep the model's figures
 * (calibrated when the room is). Band (criterion measures) and score (exposure) are the engine's own rules (risk.ts).
 * An Airtally screening rule.
 */
import { formatInt } from '../format';
import { criterionBand, RISK_BAND_LABELS, riskScore, type SeasonCriterionMeasures } from '../risk';
import type { AssumptionSet, RiskResult, RoomAssessment, Season } from '../types';
import { MIN_DAYS_FOR_MEASURED_RISK } from './analyse-room';
import type { Evidence, MeasuredEvidenceInput } from './types';

/** Which seasons of a room's risk were measured, and whether its model is calibrated. */
export interface EvidenceSummary {
  kind: Evidence;
  measuredSeasons: Season[];
  measuredDays: number;
  calibrationLabel: string | null;
}

const SEASONS: readonly Season[] = ['winter', 'mid', 'summer'];
const SEASON_WORDS: Record<Season, string> = {
  winter: 'winter',
  mid: 'mid-season (spring and autumn)',
  summer: 'summer',
};

const list = (words: string[]) =>
  words.length <= 1 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}`;

/** The room's risk with its measured seasons taken from the log, and what evidence it rests on. */
export function applyMeasuredEvidence(args: {
  assessment: RoomAssessment;
  measured: MeasuredEvidenceInput | null;
  assumptions: AssumptionSet;
  calibrationLabel: string | null;
}): { risk: RiskResult; evidence: EvidenceSummary } {
  const { assessment, measured, assumptions: set } = args;
  const threshold = assessment.criterion.riskThresholdPpm;
  const runThreshold = assessment.criterion.maxLimitPpm ?? assessment.criterion.meanLimitPpm;
  const measuredSeasons: Season[] = [];
  let measuredDays = 0;
  let pupilHours = 0;
  let worst: { season: Season; meanPpm: number; runMinutes: number } | null = null;
  const measures: SeasonCriterionMeasures[] = [];
  for (const season of SEASONS) {
    const m = measured?.seasons[season];
    const entry = m?.thresholds.find((t) => t.thresholdPpm === threshold);
    const schoolDays = set.seasons.value[season].schoolDays;
    if (m && entry && m.days >= MIN_DAYS_FOR_MEASURED_RISK && m.occupiedMeanPpm !== null) {
      measuredSeasons.push(season);
      measuredDays += m.days;
      pupilHours += (assessment.pupils * entry.occupiedMinutesOverPerDay * schoolDays) / 60;
      const run = m.thresholds.find((t) => t.thresholdPpm === runThreshold)?.longestRunMinutesMedianDay ?? 0;
      measures.push({
        occupiedMeanCo2Ppm: m.occupiedMeanPpm,
        longestRunAboveMaxMinutes: assessment.criterion.maxLimitPpm === null ? 0 : run,
      });
      if (!worst || m.occupiedMeanPpm > worst.meanPpm) worst = { season, meanPpm: m.occupiedMeanPpm, runMinutes: run };
    } else {
      const s = assessment.seasons[season];
      const over = s.thresholds.find((t) => t.thresholdPpm === threshold)?.occupiedMinutesOver ?? 0;
      pupilHours += (assessment.pupils * over * schoolDays) / 60;
      measures.push(s);
    }
  }
  if (measuredSeasons.length === 0 || worst === null)
    return {
      risk: assessment.risk,
      evidence: {
        kind: args.calibrationLabel ? 'calibrated' : 'predicted',
        measuredSeasons,
        measuredDays: 0,
        calibrationLabel: args.calibrationLabel,
      },
    };
  const predicted = SEASONS.filter((s) => !measuredSeasons.includes(s)).map((s) => SEASON_WORDS[s]);
  const band = criterionBand({
    seasons: measures,
    meanLimitPpm: assessment.criterion.meanLimitPpm,
    maxMinutesCap: assessment.criterion.maxMinutesCap,
    farOverShare: set.risk.farOverShare.value,
  });
  const run =
    worst.runMinutes >= 1
      ? `over ${formatInt(runThreshold)} ppm for ${formatInt(worst.runMinutes)} minutes in a row on a typical day`
      : `not over ${formatInt(runThreshold)} ppm on a typical day`;
  const reason =
    `Measured over ${formatInt(measuredDays)} school days in ${list(measuredSeasons.map((s) => SEASON_WORDS[s]))}` +
    `${predicted.length > 0 ? ` (${list(predicted)} predicted${args.calibrationLabel ? ' by the calibrated model' : ''})` : ''}: ` +
    `${SEASON_WORDS[worst.season]} mean ${formatInt(worst.meanPpm)} ppm, ${run}; ` +
    `about ${formatInt(pupilHours)} pupil-hours a year above ${formatInt(threshold)} ppm.`;
  return {
    risk: {
      pupilHoursPerYearAbove: pupilHours,
      thresholdPpm: threshold,
      band,
      bandLabel: RISK_BAND_LABELS[band],
      score: riskScore(pupilHours, set.risk.scoreHalfPupilHours.value),
      reason,
    },
    evidence: { kind: 'measured', measuredSeasons, measuredDays, calibrationLabel: args.calibrationLabel },
  };
}
