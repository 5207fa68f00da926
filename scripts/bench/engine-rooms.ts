/**
 * Varied generated rooms for the engine benchmarks (engine.bench.ts, engine-compare.ts): mostly naturally
 * ventilated classrooms with every register field drawn from a fixed-seed generator, so every run and
 * machine assesses the same rooms.
 */
import type { RoomAssessmentInput } from '../../src/lib/engine/types';
import {
  AGE_GROUPS,
  CLIMATE_REGIONS,
  CONSTRUCTION_TYPES,
  HEATING_FUELS,
  ROOM_USES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
} from '../../src/lib/engine/vocabulary';
import { prng } from '../seed/prng';

function pick<T>(rand: () => number, list: readonly T[]): T {
  return list[Math.floor(rand() * list.length)] as T;
}

/** A school; a recorded efficiency fits its fuel (direct electric 1, heat pumps a seasonal COP). */
function schoolOf(rand: () => number): RoomAssessmentInput['school'] {
  const phase = rand() < 0.5 ? 'primary' : 'secondary';
  const climateRegion = pick(rand, CLIMATE_REGIONS);
  const heatingFuel = rand() < 0.85 ? 'gas' : pick(rand, HEATING_FUELS);
  const fuelPriceGbpPerKwh = rand() < 0.5 ? 0.05 + rand() * 0.05 : null;
  const boiler = rand() < 0.5 ? 0.7 + rand() * 0.2 : null;
  const heatingEfficiency =
    boiler === null ? null : heatingFuel === 'electric' ? 1 : heatingFuel === 'heat_pump' ? 4 * boiler : boiler;
  return { phase, climateRegion, heatingFuel, fuelPriceGbpPerKwh, heatingEfficiency, timetable: null };
}

/** `n` rooms, the same on every run. */
export function buildRooms(n: number): RoomAssessmentInput[] {
  const rand = prng(20261201);
  const rooms: RoomAssessmentInput[] = [];
  for (let i = 0; i < n; i++) {
    const floor = 30 + rand() * 90;
    const glazing = floor * (0.05 + rand() * 0.35);
    const ventilation =
      rand() < 0.75 ? pick(rand, ['natural_single_sided', 'natural_cross'] as const) : pick(rand, VENTILATION_TYPES);
    rooms.push({
      room: {
        code: `R${i}`,
        name: `Room ${i}`,
        use: rand() < 0.8 ? 'classroom' : pick(rand, ROOM_USES),
        floorAreaM2: floor,
        ceilingHeightM: 2.4 + rand() * 1.2,
        pupils: Math.floor(10 + rand() * 25),
        adults: 1 + Math.floor(rand() * 2),
        ageGroup: pick(rand, AGE_GROUPS.slice(0, 4)),
        orientationDeg: rand() < 0.9 ? Math.floor(rand() * 360) : null,
        glazingAreaM2: glazing,
        openableAreaM2: glazing * (0.05 + rand() * 0.3),
        windowType: pick(rand, WINDOW_TYPES),
        glazingGValue: rand() < 0.5 ? 0.4 + rand() * 0.35 : null,
        ventilationType: ventilation,
        mechanicalSupplyLps: ventilation.startsWith('natural') || rand() < 0.5 ? null : 50 + rand() * 200,
        frameMaterial: null,
        winterWindowOpenFraction: null,
      },
      block: {
        yearBuilt: rand() < 0.9 ? 1900 + Math.floor(rand() * 125) : null,
        constructionType: rand() < 0.8 ? pick(rand, CONSTRUCTION_TYPES) : null,
        airPermeabilityM3hM2: rand() < 0.3 ? 3 + rand() * 20 : null,
        heatingFuel: rand() < 0.2 ? pick(rand, HEATING_FUELS) : null,
        fuelPriceGbpPerKwh: null,
        heatingEfficiency: null,
        heatingInstalledYear: rand() < 0.7 ? 1980 + Math.floor(rand() * 45) : null,
      },
      school: schoolOf(rand),
    });
  }
  return rooms;
}
