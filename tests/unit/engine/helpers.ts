/** Shared builders for engine tests: a typical classroom input and an assumption set reshaped for worked example 1. */
import { DEFAULT_ASSUMPTIONS } from '~/lib/engine/assumptions';
import type { AssumptionSet, RoomAssessmentInput } from '~/lib/engine/types';

/** A 1960s system-built secondary classroom, 56 m², 30 pupils, single-sided windows (demo values). */
export function typicalClassroom(): RoomAssessmentInput {
  return {
    room: {
      code: 'T1',
      name: 'Test classroom',
      use: 'classroom',
      floorAreaM2: 56,
      ceilingHeightM: 3,
      pupils: 30,
      adults: 1,
      ageGroup: 'secondary',
      orientationDeg: 180,
      glazingAreaM2: 12,
      openableAreaM2: 3,
      windowType: 'top_hung',
      frameMaterial: null,
      glazingGValue: null,
      ventilationType: 'natural_single_sided',
      mechanicalSupplyLps: null,
      winterWindowOpenFraction: null,
    },
    block: {
      yearBuilt: 1968,
      constructionType: 'system_built',
      airPermeabilityM3hM2: null,
      heatingFuel: null,
      fuelPriceGbpPerKwh: null,
      heatingEfficiency: null,
      heatingInstalledYear: 1995,
    },
    school: {
      phase: 'secondary',
      climateRegion: 'midlands',
      heatingFuel: 'gas',
      fuelPriceGbpPerKwh: null,
      heatingEfficiency: null,
      timetable: null,
    },
  };
}

/**
 * The default set changed so that a room reproduces worked example 1 (docs/sources.md, "Worked examples"):
 * no infiltration, no window use with a fan, pupils and teacher at 1.4 met, every season at 20 °C.
 */
export function exampleOneAssumptions(): AssumptionSet {
  const set = structuredClone(DEFAULT_ASSUMPTIONS);
  set.version = 'test-example-1';
  set.infiltration.envelopeAreaPerFloorArea.value = 0;
  set.air.outdoorCo2Ppm.value = 420;
  set.windows.windowUseWithMechanical.value = 0;
  set.occupancy.adultMet.value = 1.4;
  set.occupancy.pupilMetByUse.value.classroom = 1.4;
  set.occupancy.pupilMetAdjustByAge.value.secondary = 0;
  for (const s of ['winter', 'mid', 'summer'] as const) set.seasons.value[s].indoorTempC = 20;
  return set;
}

/** Worked example 1's room with a constant mechanical outdoor-air flow. */
export function exampleOneRoom(flowLps: number): RoomAssessmentInput {
  const input = typicalClassroom();
  input.room.openableAreaM2 = 0;
  input.room.ventilationType = 'mechanical_supply_extract';
  input.room.mechanicalSupplyLps = flowLps;
  input.block.airPermeabilityM3hM2 = 5;
  return input;
}
