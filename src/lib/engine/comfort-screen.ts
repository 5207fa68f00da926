/**
 * A room's comfort indicators for ranking: winter PMV/PPD (ISO 7730:2005) and draught at the first desks
 * (ISO 7730 draught model with the Heiselberg 1994 downdraught), the summer steady daily-mean overheating index
 * against the CIBSE TM52 / EN 16798-1 adaptive limit, and the Approved Document O glazing proxy. An indicator whose
 * screening case falls outside its model's range is reported as null with the reason; nothing is extrapolated.
 */
import {
  adaptiveMaxTempC,
  coldDowndraughtSpeedMs,
  draughtRatePct,
  glazingProxy,
  overheatingIndex,
  pmvPpd,
} from './comfort';
import type { ResolvedRoom } from './room-defaults';
import type { AssumptionSet, ComfortResult, FrameMaterial } from './types';
import { meanDayFlowLps, type SeasonFlows } from './ventilation';
import type { PreparedDay } from './prepared';

/** The comfort indicators of one room. Temperatures °C, flows L/s, areas m². */
export function assessComfort(args: {
  set: AssumptionSet;
  day: PreparedDay;
  room: ResolvedRoom;
  floorAreaM2: number;
  orientationDeg: number | null;
  frameMaterial: FrameMaterial | null;
  cross: boolean;
  pupilMet: number;
  /** Winter outdoor temperature over school hours. */
  winterOutdoorTempC: number;
  /** Mean of the summer months' 24-hour means (stands in for the TM52 running mean). */
  summerDailyMeanTempC: number;
  summerFlows: SeasonFlows;
  summerWindowOpenFraction: number;
}): ComfortResult {
  const { set, room } = args;
  const c = set.comfort;
  const outOfRange: string[] = [];

  // Winter radiant temperature lowered by cold glazing: surfaces other than glazing at air temperature; glazing
  // inner surface θ_si = θ_i − U·R_si·(θ_i − θ_e) (BS EN ISO 6946 surface resistance); t_r the area-weighted mean
  // over floor, ceiling and four walls of a square room (our screening geometry).
  const ti = set.seasons.value.winter.indoorTempC;
  const te = args.winterOutdoorTempC;
  const glazingSurfaceTempC = ti - c.glazingUValueWm2K.value * c.insideSurfaceResistanceM2KW.value * (ti - te);
  const side = Math.sqrt(args.floorAreaM2);
  const surfaceM2 = 2 * args.floorAreaM2 + 4 * side * room.ceilingHeightM;
  const glazedShare = Math.min(room.glazingAreaM2 / surfaceM2, 1);
  const meanRadiantTempC = ti - glazedShare * (ti - glazingSurfaceTempC);
  let pmv: number | null = null;
  let ppdPct: number | null = null;
  if (meanRadiantTempC < 10 || meanRadiantTempC > 40 || ti < 10 || ti > 30)
    outOfRange.push('PMV: the winter case is outside ISO 7730 (air 10–30 °C, radiant 10–40 °C)');
  else
    ({ pmv, ppdPct } = pmvPpd({
      airTempC: ti,
      radiantTempC: meanRadiantTempC,
      airSpeedMs: c.winterAirSpeedMs.value,
      relativeHumidityPct: c.winterRelativeHumidityPct.value,
      met: args.pupilMet,
      clo: c.winterClothingClo.value,
    }));
  // Draught at the first desks: the larger of the occupied-zone air speed and the cold downdraught off the glazing
  // (height: glazed area over the façade width of a square room, at most the ceiling height).
  const glazingHeightM = Math.min(room.glazingAreaM2 / side, room.ceilingHeightM);
  const downdraughtSpeedMs = coldDowndraughtSpeedMs({
    surfaceDeltaTK: ti - glazingSurfaceTempC,
    surfaceHeightM: glazingHeightM,
    distanceM: c.deskDistanceFromWindowM.value,
  });
  const localSpeed = Math.max(c.winterAirSpeedMs.value, downdraughtSpeedMs);
  let draught: number | null = null;
  if (ti < 20 || ti > 26 || localSpeed >= 0.5)
    outOfRange.push('Draught rate: outside the ISO 7730 model (local air 20–26 °C, speed below 0.5 m/s)');
  else
    draught = draughtRatePct({
      localAirTempC: ti,
      localAirSpeedMs: localSpeed,
      turbulencePct: c.draughtTurbulencePct.value,
    });
  const concern =
    pmv !== null && pmv < -0.5
      ? 'Feels cool in winter: cold glazing lowers the radiant temperature'
      : (draught ?? 0) > 20 || localSpeed >= 0.5
        ? 'Draught risk near the windows in winter'
        : null;

  // Summer: the steady daily-mean screening index.
  const facing = glazingProxy({
    glazingAreaM2: room.glazingAreaM2,
    floorAreaM2: args.floorAreaM2,
    orientationDeg: args.orientationDeg,
    crossVentilated: args.cross,
  });
  const irr = c.julyIrradianceWm2.value;
  const irradiance = facing.facing === null ? irr.unknown : irr[facing.facing];
  const facadeM2 = side * room.ceilingHeightM;
  const opaqueM2 = Math.max(0, facadeM2 - room.glazingAreaM2);
  const fabric = c.glazingUValueWm2K.value * room.glazingAreaM2 + c.wallUValueWm2K.value * opaqueM2;
  const dayFlow = meanDayFlowLps(args.day.occupiedShare, args.summerFlows);
  const capacityPerFraction =
    args.summerWindowOpenFraction > 0 ? args.summerFlows.windowOccupiedLps / args.summerWindowOpenFraction : 0;
  const nightLps = args.summerFlows.infiltrationLps + capacityPerFraction * c.summerNightOpenFraction.value;
  const nightHours = Math.max(0, 24 - args.day.dayHours);
  const q24 = (dayFlow * args.day.dayHours + nightLps * nightHours) / 24;
  const frames = set.windows.frameFactorByMaterial.value;
  const index = overheatingIndex({
    glazingAreaM2: room.glazingAreaM2,
    gValue: room.glazingGValue,
    frameFactor: args.frameMaterial === null ? frames.unknown : frames[args.frameMaterial],
    shadingFactor: c.shadingFactor.value,
    irradianceWm2: irradiance,
    occupiedGainW: (room.pupils + room.adults) * c.sensibleGainPerPersonW.value + c.equipmentLightingGainW.value,
    occupiedHours: args.day.occupiedHours,
    fabricHeatTransferWPerK: fabric,
    meanVentilationLps: q24,
  });
  const adaptiveMax = adaptiveMaxTempC(args.summerDailyMeanTempC, c.adaptiveCategoryOffsetK.value);
  const predicted = args.summerDailyMeanTempC + index.deltaTK;
  return {
    winter: {
      airTempC: ti,
      meanRadiantTempC,
      glazingSurfaceTempC,
      pmv,
      ppdPct,
      downdraughtSpeedMs,
      draughtRatePct: draught,
      concern,
      outOfRange,
    },
    summer: {
      solarGainW: index.solarGainW,
      internalGainW: index.internalGainW,
      heatTransferWPerK: index.heatTransferWPerK,
      overheatingIndexK: index.deltaTK,
      predictedMeanTempC: predicted,
      adaptiveMaxTempC: adaptiveMax,
      overheatingLikely: predicted > adaptiveMax,
    },
    glazingProxy: facing,
  };
}
