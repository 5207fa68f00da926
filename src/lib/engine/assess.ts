/**
 * Assess one room under an assumption set: the engine's one entry point. It reads like the physics:
 * the room (unknowns assumed) → who is in it and the CO2 they breathe out → the air each route brings
 * (windows, infiltration, fans) → CO2 over a school day per season → criterion and risk → comfort →
 * the heat-recovery retrofit against named baselines. Pure: no I/O, no clock, no randomness.
 */
import { appraiseRetrofit } from './appraisal';
import { assessComfort } from './comfort-screen';
import { applyPack, buildStatusOf, choosePack } from './criteria';
import { formatOneDecimal } from './format';
import { heatingSupply } from './heating-supply';
import { infiltrationLps } from './infiltration';
import { generationAtRoomLps } from './occupancy';
import { dayOf, hoursOf, hoursUsedOf, perPersonGenerationLps, prepare, thresholdsFor, type Prepared } from './prepared';
import { assessRisk, criterionBand, pupilHoursPerYear } from './risk';
import { resolveRoom, type ResolvedRoom } from './room-defaults';
import { assessSeasonDay } from './season-co2';
import type {
  AssessOptions,
  AssumedValue,
  AssumptionSet,
  BlockInput,
  RoomAssessment,
  RoomAssessmentInput,
  Season,
  SeasonAssessment,
  WindowAssumptions,
} from './types';
import { calibrationOf, describeCalibration } from './measured/calibration-hook';
import { validateRoomInput } from './validate-input';
import type { SeasonFlows } from './ventilation';
import { windowAirflowLps } from './window-airflow';

/** Cautions every result carries. */
export const ENGINE_CAUTIONS: readonly string[] = [
  'Screening estimates for prioritising, not a design.',
  'Ventilation design and installation defer to local building regulations, school guidance and a competent, licensed engineer.',
];

const SEASONS: readonly Season[] = ['winter', 'mid', 'summer'];

/** Air permeability of the block: measured, else the default for its construction, else for its era. */
function blockAirPermeability(block: BlockInput, set: AssumptionSet, assumed: AssumedValue[]): number {
  if (block.airPermeabilityM3hM2 !== null) return block.airPermeabilityM3hM2;
  if (block.constructionType !== null) {
    const value = set.infiltration.defaultAirPermeabilityByConstruction.value[block.constructionType];
    assumed.push({ field: 'block.airPermeabilityM3hM2', value, reason: 'not measured: default for the construction' });
    return value;
  }
  const byEra = set.infiltration.defaultAirPermeabilityByEra.value;
  const y = block.yearBuilt;
  const value =
    y === null ? byEra.unknown : y < 1980 ? byEra.before1980 : y < 2006 ? byEra.from1980to2005 : byEra.from2006;
  assumed.push({ field: 'block.airPermeabilityM3hM2', value, reason: 'not measured: default by year built' });
  return value;
}

/** How far windows open in each season: the set's profile, with this room's own winter observation when recorded. */
function windowOpening(
  p: Prepared,
  room: RoomAssessmentInput['room'],
  resolved: ResolvedRoom,
  effectiveAreaM2: number,
  cross: boolean,
  hasFan: boolean,
): WindowAssumptions {
  const set = p.set;
  const own = room.winterWindowOpenFraction;
  const shared = p.windowShares;
  if (own === null)
    return {
      effectiveAreaM2,
      effectiveOpeningFactor: set.windows.effectiveOpeningFactor.value[resolved.windowType],
      method: cross ? 'cross' : set.windows.method.value,
      openFractionOccupied: shared.occupied,
      openFractionEmpty: shared.empty,
      winterSource: 'assumption set',
      useWithMechanical: hasFan ? set.windows.windowUseWithMechanical.value : 1,
    };
  // Breaks keep the season's ratio of break to lesson opening.
  const ratio = shared.occupied.winter > 0 ? shared.empty.winter / shared.occupied.winter : 1;
  const occupied = { winter: own, mid: shared.occupied.mid, summer: shared.occupied.summer };
  const empty = { winter: Math.min(1, own * ratio), mid: shared.empty.mid, summer: shared.empty.summer };
  return {
    effectiveAreaM2,
    effectiveOpeningFactor: set.windows.effectiveOpeningFactor.value[resolved.windowType],
    method: cross ? 'cross' : set.windows.method.value,
    openFractionOccupied: occupied,
    openFractionEmpty: empty,
    winterSource: 'room',
    useWithMechanical: hasFan ? set.windows.windowUseWithMechanical.value : 1,
  };
}

/** Unknown inputs and filled assumptions as sentences, e.g. 'room.pupils → 28 (not recorded: 2 m² of floor a pupil)'. */
export function assumedWords(a: Pick<RoomAssessment, 'assumed' | 'assumptionsFilled'>): string[] {
  const out = a.assumptionsFilled.map((path) => `assumptions.${path} → Airtally default (not in this stored set)`);
  for (const v of a.assumed)
    out.push(
      `${v.field} → ${typeof v.value === 'number' ? formatOneDecimal(v.value) : v.value.replace(/_/g, ' ')} (${v.reason})`,
    );
  return out;
}

/** Assess one room: CO2 per season, criteria, risk, comfort and the heat-recovery retrofit against each baseline. */
export function assessRoom(
  input: RoomAssessmentInput,
  assumptions: AssumptionSet,
  options: AssessOptions = {},
): RoomAssessment {
  validateRoomInput(input);
  const p = prepare(assumptions);
  const set = p.set;
  const { room, block, school } = input;
  const withCurve = options.withCurve !== false;
  const assumed: AssumedValue[] = [];

  // --- The room, with unknown values assumed ----------------------------------------------------
  const resolved = resolveRoom(room, school.phase, set, assumed);
  const volumeM3 = room.floorAreaM2 * resolved.ceilingHeightM;
  const occupants = resolved.pupils + resolved.adults;
  const isTeachingRoom = set.occupancy.teachingUses.value.includes(resolved.use);
  const ventilationClass = set.mechanical.ventilationClass.value[resolved.ventilationType];
  const buildStatus = buildStatusOf(set, block.yearBuilt);
  const outdoorCo2 = set.air.outdoorCo2Ppm.value;
  const heating = heatingSupply(block, school, set, assumed);
  const day = dayOf(p, school.timetable);
  const hours = hoursOf(p, day, school.climateRegion);
  const region = set.climate.regions.value[school.climateRegion];
  const profiles = set.seasons.value;

  // --- Who is in the room and the CO2 they breathe out (Persily & de Jonge 2017 Table 4) ----------
  const pupilMet =
    set.occupancy.pupilMetByUse.value[resolved.use] + set.occupancy.pupilMetAdjustByAge.value[resolved.ageGroup];
  const tableLps =
    (resolved.pupils > 0 ? resolved.pupils * perPersonGenerationLps(p, resolved.ageGroup, pupilMet) : 0) +
    (resolved.adults > 0 ? resolved.adults * perPersonGenerationLps(p, 'adult', set.occupancy.adultMet.value) : 0);

  // --- The air each route brings ----------------------------------------------------------------
  const airPermeability = blockAirPermeability(block, set, assumed);
  // A calibration from measured CO2 replaces the infiltration estimate and scales window use per season.
  const calibration = calibrationOf(input);
  if (calibration)
    assumed.push({ field: 'calibration', value: 'from measured CO2', reason: describeCalibration(calibration) });
  const infLps =
    calibration?.infiltrationLps ??
    infiltrationLps({
      airPermeabilityM3hM2: airPermeability,
      envelopeAreaM2: room.floorAreaM2 * set.infiltration.envelopeAreaPerFloorArea.value,
      volumeM3,
      divisor: set.infiltration.kpDivisor.value,
    });
  const existing = set.mechanical.existingSystems.value[resolved.ventilationType];
  const hasFan = existing.balance !== 'none';
  let fanLps = 0;
  if (hasFan) {
    fanLps = room.mechanicalSupplyLps ?? set.mechanical.defaultSupplyLpsPerM2.value * room.floorAreaM2;
    if (room.mechanicalSupplyLps === null)
      assumed.push({
        field: 'room.mechanicalSupplyLps',
        value: Math.round(fanLps),
        reason: 'not recorded: the default supply per m² of floor',
      });
  }
  const cross = resolved.ventilationType === 'natural_cross';
  const effectiveAreaM2 = resolved.openableAreaM2 * set.windows.effectiveOpeningFactor.value[resolved.windowType];
  const windows = windowOpening(p, room, resolved, effectiveAreaM2, cross, hasFan);

  // --- Criteria: the room's own pack, and the mechanical pack units are sized to ------------------
  const criterion = applyPack(choosePack(set, ventilationClass, buildStatus), outdoorCo2);
  const target = applyPack(choosePack(set, 'mechanical', buildStatus), outdoorCo2);
  const thresholds = thresholdsFor(p, criterion, target);

  // --- CO2 over a school day, per season ---------------------------------------------------------
  const seasonFlows = {} as Record<Season, SeasonFlows>;
  const generationLps = {} as Record<Season, number>;
  const seasons = {} as Record<Season, SeasonAssessment>;
  let criteriaMet = true;
  let meetsTarget = true;
  let worstSeason: Season = 'winter';
  for (const season of SEASONS) {
    const profile = profiles[season];
    const outdoorTempC = hours[season].meanSchoolHoursTempC;
    const windSpeed10Ms = region.windSpeedMs[season];
    const capacityLps = windowAirflowLps({
      method: set.windows.method.value,
      cross,
      effectiveAreaM2,
      windSpeed10Ms,
      siteWindFactor: set.windows.siteWindFactor.value,
      openingHeightM: set.windows.openingHeightM.value,
      indoorTempC: profile.indoorTempC,
      outdoorTempC,
      dischargeCoefficient: set.windows.dischargeCoefficient.value,
      deltaCp: set.windows.crossWindDeltaCp.value,
    });
    const seasonWindowUse = windows.useWithMechanical * (calibration?.windowUseFactor[season] ?? 1);
    const flows: SeasonFlows = {
      windowOccupiedLps: capacityLps * windows.openFractionOccupied[season] * seasonWindowUse,
      windowEmptyLps: capacityLps * windows.openFractionEmpty[season] * seasonWindowUse,
      infiltrationLps: infLps,
      balancedLps: existing.balance === 'balanced' ? fanLps : 0,
      unbalancedLps: existing.balance === 'unbalanced' ? fanLps : 0,
      recoveredLps: existing.balance === 'balanced' ? existing.heatRecoveryEfficiency * fanLps : 0,
    };
    seasonFlows[season] = flows;
    generationLps[season] = generationAtRoomLps({
      tableLps,
      roomTempC: profile.indoorTempC,
      pressureKpa: set.air.atmosphericPressureKpa.value,
    });
    const result = assessSeasonDay({
      season,
      day,
      flows,
      generationLps: generationLps[season],
      volumeM3,
      outdoorCo2Ppm: outdoorCo2,
      outdoorTempC,
      indoorTempC: profile.indoorTempC,
      windSpeed10Ms,
      windowOpenFraction: windows.openFractionOccupied[season] * seasonWindowUse,
      thresholdsPpm: thresholds,
      criterion,
      target,
      withCurve,
    });
    seasons[season] = result.assessment;
    if (!result.assessment.criterionMet) criteriaMet = false;
    if (!result.meetsTarget) meetsTarget = false;
    if (result.assessment.occupiedMeanCo2Ppm > seasons[worstSeason].occupiedMeanCo2Ppm) worstSeason = season;
  }

  // --- Risk: pupil-hours a year above the criterion's threshold ---------------------------------
  const riskIdx = thresholds.indexOf(criterion.riskThresholdPpm);
  const todayPupilHours = pupilHoursPerYear({
    pupils: resolved.pupils,
    perSeason: SEASONS.map((s) => ({
      occupiedMinutesOver: seasons[s].thresholds[riskIdx]?.occupiedMinutesOver ?? 0,
      schoolDays: profiles[s].schoolDays,
    })),
  });
  const worst = seasons[worstSeason];
  const runThreshold = criterion.maxLimitPpm ?? criterion.meanLimitPpm;
  const runEntry = worst.thresholds[thresholds.indexOf(runThreshold)];
  const risk = assessRisk({
    pupils: resolved.pupils,
    openableAreaM2: resolved.openableAreaM2,
    mechanicalLps: fanLps,
    pupilHours: todayPupilHours,
    thresholdPpm: criterion.riskThresholdPpm,
    band: criterionBand({
      seasons: SEASONS.map((s) => seasons[s]),
      meanLimitPpm: criterion.meanLimitPpm,
      maxMinutesCap: criterion.maxMinutesCap,
      farOverShare: set.risk.farOverShare.value,
    }),
    halfPupilHours: set.risk.scoreHalfPupilHours.value,
    worstSeason,
    worstMeanPpm: worst.occupiedMeanCo2Ppm,
    runThresholdPpm: runThreshold,
    worstRunMinutes: runEntry ? runEntry.longestRunMinutes : 0,
  });

  // --- Comfort ------------------------------------------------------------------------------------
  let summerDailyMeanTempC = 0;
  for (const m of profiles.summer.months) summerDailyMeanTempC += region.monthlyMeanTempC[m - 1] as number;
  summerDailyMeanTempC /= profiles.summer.months.length;
  const comfort = assessComfort({
    set,
    day,
    room: resolved,
    floorAreaM2: room.floorAreaM2,
    orientationDeg: room.orientationDeg,
    frameMaterial: room.frameMaterial,
    cross,
    pupilMet,
    winterOutdoorTempC: hours.winter.meanSchoolHoursTempC,
    summerDailyMeanTempC,
    summerFlows: seasonFlows.summer,
    summerWindowOpenFraction:
      windows.openFractionOccupied.summer * windows.useWithMechanical * (calibration?.windowUseFactor.summer ?? 1),
  });

  // --- Hours behind every energy figure -----------------------------------------------------------
  const hoursUsed = hoursUsedOf(p, day, school.climateRegion, school.timetable !== null);

  // --- The heat-recovery retrofit against each baseline ------------------------------------------
  const appraisal =
    isTeachingRoom && resolved.pupils > 0
      ? appraiseRetrofit({
          p,
          day,
          hours,
          degreeHoursKh: {
            winter: hours.winter.degreeHoursKh,
            mid: hours.mid.degreeHoursKh,
            summer: hours.summer.degreeHoursKh,
          },
          volumeM3,
          pupils: resolved.pupils,
          ventilationType: resolved.ventilationType,
          existing,
          existingFanLps: fanLps,
          todayFlows: seasonFlows,
          generationLps,
          target,
          criterion,
          meetsTargetToday: meetsTarget,
          criterionMetToday: criteriaMet,
          todayPupilHours,
          heating,
          hoursUsed,
          winterOutdoorTempC: hours.winter.meanSchoolHoursTempC,
        })
      : null;

  return {
    roomCode: room.code,
    assumptionsVersion: set.version,
    isTeachingRoom,
    pupils: resolved.pupils,
    occupants,
    volumeM3,
    ventilationClass,
    buildStatus,
    airPermeabilityM3hM2: airPermeability,
    heatingFuel: heating.fuel,
    heating,
    hours: hoursUsed,
    windows,
    criterion,
    seasons,
    worstSeason,
    criteriaMet,
    risk,
    comfort,
    appraisal,
    assumed,
    assumptionsFilled: p.filled,
    cautions: ENGINE_CAUTIONS as string[],
  };
}
