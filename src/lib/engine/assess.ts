/**
 * Assess one room under an assumption set: the engine's one entry point. It reads like the physics:
 * the room (unknowns assumed) → who is in it and the CO2 they breathe out → the air each route brings
 * (windows, infiltration, fans) → CO2 over a school day per season → criterion and risk → comfort →
 * the heat-recovery retrofit against named baselines. Pure: no I/O, no clock, no randomness.
 */
import { appraiseRetrofit } from './appraisal';
import { assessComfort } from './comfort-screen';
import { buildStatusOf } from './criteria';
import { formatOneDecimal } from './format';
import { heatingSupply } from './heating-supply';
import { infiltrationLps } from './infiltration';
import { generationAtRoomLps } from './occupancy';
import {
  criteriaFor,
  dayOf,
  hoursOf,
  hoursUsedOf,
  perPersonGenerationLps,
  prepare,
  SEASON_ORDER,
  seasonTableOf,
  summerMeanTempCOf,
  type Prepared,
} from './prepared';
import { assessRisk, criterionBand, pupilHoursPerYear } from './risk';
import { resolveRoom, type ResolvedRoom } from './room-defaults';
import { assessSeasonDay } from './season-co2';
import type { SeasonHours } from './hours';
import type {
  AssessOptions,
  AssumedValue,
  AssumptionSet,
  BlockInput,
  RoomAssessment,
  RoomAssessmentInput,
  Season,
  SeasonAssessment,
  SeasonProfile,
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
/** No calibration: window use as the set says in every season. */
const NO_CALIBRATION: readonly number[] = [1, 1, 1];

/** A season record as a list in SEASON_ORDER. */
const listOf = (r: Record<Season, number>): number[] => [r.winter, r.mid, r.summer];

/** A calibration's window-use factors in SEASON_ORDER (a season it does not name keeps 1). */
const windowUseFactorList = (f: Partial<Record<Season, number>>): number[] => [
  f.winter ?? 1,
  f.mid ?? 1,
  f.summer ?? 1,
];

/** Scratch for the risk's per-season figures (the engine is synchronous, so one serves every room). */
const PER_SEASON = SEASONS.map(() => ({ occupiedMinutesOver: 0, schoolDays: 0 }));

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
  const { criterion, target, thresholds, riskIndex, runThresholdPpm, runIndex } = criteriaFor(
    p,
    ventilationClass,
    buildStatus,
  );

  // --- CO2 over a school day, per season ---------------------------------------------------------
  // Season figures as lists in SEASON_ORDER: the loop indexes them rather than looking records up by a changing key.
  const table = seasonTableOf(p, day, school.climateRegion);
  const openOccupied =
    windows.openFractionOccupied === p.windowShares.occupied
      ? p.windowShareLists.occupied
      : listOf(windows.openFractionOccupied);
  const openEmpty =
    windows.openFractionEmpty === p.windowShares.empty ? p.windowShareLists.empty : listOf(windows.openFractionEmpty);
  const useFactors = calibration ? windowUseFactorList(calibration.windowUseFactor) : NO_CALIBRATION;
  const flowList: SeasonFlows[] = [];
  const generationList: number[] = [];
  const seasonList: SeasonAssessment[] = [];
  let criteriaMet = true;
  let meetsTarget = true;
  let worstIndex = 0;
  for (let i = 0; i < 3; i++) {
    const profile = table.profiles[i] as SeasonProfile;
    const outdoorTempC = (table.hours[i] as SeasonHours).meanSchoolHoursTempC;
    const windSpeed10Ms = table.windSpeed10Ms[i] as number;
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
    const seasonWindowUse = windows.useWithMechanical * (useFactors[i] as number);
    const flows: SeasonFlows = {
      windowOccupiedLps: capacityLps * (openOccupied[i] as number) * seasonWindowUse,
      windowEmptyLps: capacityLps * (openEmpty[i] as number) * seasonWindowUse,
      infiltrationLps: infLps,
      balancedLps: existing.balance === 'balanced' ? fanLps : 0,
      unbalancedLps: existing.balance === 'unbalanced' ? fanLps : 0,
      recoveredLps: existing.balance === 'balanced' ? existing.heatRecoveryEfficiency * fanLps : 0,
    };
    flowList.push(flows);
    const generation = generationAtRoomLps({
      tableLps,
      roomTempC: profile.indoorTempC,
      pressureKpa: set.air.atmosphericPressureKpa.value,
    });
    generationList.push(generation);
    const result = assessSeasonDay({
      season: SEASON_ORDER[i] as Season,
      day,
      flows,
      generationLps: generation,
      volumeM3,
      outdoorCo2Ppm: outdoorCo2,
      outdoorTempC,
      indoorTempC: profile.indoorTempC,
      windSpeed10Ms,
      windowOpenFraction: (openOccupied[i] as number) * seasonWindowUse,
      thresholdsPpm: thresholds,
      criterion,
      target,
      withCurve,
    });
    seasonList.push(result.assessment);
    if (!result.assessment.criterionMet) criteriaMet = false;
    if (!result.meetsTarget) meetsTarget = false;
    if (result.assessment.occupiedMeanCo2Ppm > (seasonList[worstIndex] as SeasonAssessment).occupiedMeanCo2Ppm)
      worstIndex = i;
  }
  const worstSeason = SEASON_ORDER[worstIndex] as Season;
  const seasonFlows: Record<Season, SeasonFlows> = {
    winter: flowList[0] as SeasonFlows,
    mid: flowList[1] as SeasonFlows,
    summer: flowList[2] as SeasonFlows,
  };
  const generationLps: Record<Season, number> = {
    winter: generationList[0] as number,
    mid: generationList[1] as number,
    summer: generationList[2] as number,
  };
  const seasons: Record<Season, SeasonAssessment> = {
    winter: seasonList[0] as SeasonAssessment,
    mid: seasonList[1] as SeasonAssessment,
    summer: seasonList[2] as SeasonAssessment,
  };

  // --- Risk: pupil-hours a year above the criterion's threshold ---------------------------------
  for (let i = 0; i < 3; i++) {
    const entry = PER_SEASON[i] as { occupiedMinutesOver: number; schoolDays: number };
    entry.occupiedMinutesOver = (seasonList[i] as SeasonAssessment).thresholds[riskIndex]?.occupiedMinutesOver ?? 0;
    entry.schoolDays = (table.profiles[i] as SeasonProfile).schoolDays;
  }
  const todayPupilHours = pupilHoursPerYear({ pupils: resolved.pupils, perSeason: PER_SEASON });
  const worst = seasonList[worstIndex] as SeasonAssessment;
  const runEntry = worst.thresholds[runIndex];
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
    runThresholdPpm,
    worstRunMinutes: runEntry ? runEntry.longestRunMinutes : 0,
  });

  // --- Comfort ------------------------------------------------------------------------------------
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
    summerDailyMeanTempC: summerMeanTempCOf(p, school.climateRegion),
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
          degreeHoursKh: table.degreeHoursKh,
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
