/**
 * The demo scenario: an invented multi-academy trust with seven schools. Every name, address and
 * number here is fictional and exists only to show the product; it is generated deterministically
 * (fixed-seed PRNG) so every machine gets the same estate.
 */
import type {
  AgeGroup,
  ClimateRegion,
  ConstructionType,
  FrameMaterial,
  HeatingFuel,
  HeatingType,
  RoomUse,
  SchoolPhase,
  VentilationType,
  WindowType,
} from '../../src/lib/engine/vocabulary';
import { prng } from './prng';

export const DEMO_TRUST = {
  id: 'demo-trust',
  name: 'Brackenmoor Valley Learning Trust',
  slug: 'brackenmoor-valley',
} as const;

export interface DemoBlock {
  name: string;
  yearBuilt: number;
  constructionType: ConstructionType;
  airPermeabilityM3hM2: number;
  heatingType: HeatingType;
  heatingFuel: HeatingFuel;
  heatingInstalledYear: number;
  /** The block's own price and efficiency (null: the school's, else the trust's). */
  fuelPriceGbpPerKwh?: number;
  heatingEfficiency?: number;
  /** How the rooms of this block are ventilated today, with weights. */
  ventilation: [VentilationType, number][];
  /** The pupils' age group when it is not the school's (an all-through school's primary phase). */
  ageGroup?: AgeGroup;
  rooms: DemoRoomPlan[];
}

interface DemoRoomPlan {
  prefix: string;
  count: number;
  use: RoomUse;
  floorAreaM2: [number, number];
  ceilingHeightM: [number, number];
  pupils: [number, number];
  adults: number;
  /** Openable area as a fraction of floor area, min–max. */
  openableFraction: [number, number];
}

export interface DemoSchool {
  name: string;
  referenceNumber: string;
  phase: SchoolPhase;
  climateRegion: ClimateRegion;
  address: string;
  ageGroup: AgeGroup;
  heatingFuel: HeatingFuel;
  /** The school's own contract price; most demo schools inherit the trust's (null). */
  fuelPriceGbpPerKwh: number | null;
  heatingEfficiency: number;
  /** The school's own day, as editor lines; null: the trust's timetable. */
  timetable: string | null;
  blocks: DemoBlock[];
}

const classrooms = (
  prefix: string,
  count: number,
  pupils: [number, number],
  area: [number, number] = [52, 62],
): DemoRoomPlan => ({
  prefix,
  count,
  use: 'classroom',
  floorAreaM2: area,
  ceilingHeightM: [2.6, 3.1],
  pupils,
  adults: 1,
  openableFraction: [0.02, 0.07],
});

export const DEMO_SCHOOLS: DemoSchool[] = [
  {
    name: 'Thistlegate Primary School',
    referenceNumber: 'BV-1001',
    phase: 'primary',
    climateRegion: 'midlands',
    address: '14 Foundry Row, Brackenmoor, BV1 4TG',
    ageGroup: 'primary',
    heatingFuel: 'gas',
    fuelPriceGbpPerKwh: null,
    heatingEfficiency: 0.78,
    timetable: '08:50-10:20 lesson\n10:20-10:35 break\n10:35-12:00 lesson\n12:00-13:00 lunch\n13:00-15:15 lesson',
    blocks: [
      {
        name: 'Board School Building',
        yearBuilt: 1897,
        constructionType: 'solid_masonry',
        airPermeabilityM3hM2: 18,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2004,
        ventilation: [['natural_single_sided', 1]],
        rooms: [
          classrooms('V', 10, [26, 31], [56, 68]),
          {
            prefix: 'VH',
            count: 1,
            use: 'hall',
            floorAreaM2: [150, 170],
            ceilingHeightM: [5, 6],
            pupils: [0, 0],
            adults: 2,
            openableFraction: [0.03, 0.05],
          },
          {
            prefix: 'VO',
            count: 2,
            use: 'office',
            floorAreaM2: [12, 18],
            ceilingHeightM: [3, 3.5],
            pupils: [0, 0],
            adults: 2,
            openableFraction: [0.05, 0.08],
          },
        ],
      },
      {
        name: 'Infant Annexe',
        yearBuilt: 1974,
        constructionType: 'system_built',
        airPermeabilityM3hM2: 14,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2006,
        ventilation: [
          ['natural_single_sided', 4],
          ['mechanical_extract', 1],
        ],
        rooms: [classrooms('A', 6, [25, 30], [50, 58])],
      },
      {
        name: 'Early Years Pod',
        yearBuilt: 2012,
        constructionType: 'modular',
        airPermeabilityM3hM2: 7,
        heatingType: 'underfloor',
        heatingFuel: 'electric',
        heatingInstalledYear: 2012,
        heatingEfficiency: 1,
        ventilation: [['hybrid', 1]],
        rooms: [{ ...classrooms('EY', 2, [24, 28], [60, 70]) }],
      },
    ],
  },
  {
    name: 'Copperwick Academy',
    referenceNumber: 'BV-2001',
    phase: 'secondary',
    climateRegion: 'north_west',
    address: 'Copperwick Lane, Harrowfold, BV7 2CW',
    ageGroup: 'secondary',
    heatingFuel: 'gas',
    fuelPriceGbpPerKwh: 0.061,
    heatingEfficiency: 0.8,
    timetable: null,
    blocks: [
      {
        name: 'Main Teaching Block',
        yearBuilt: 1964,
        constructionType: 'system_built',
        airPermeabilityM3hM2: 16,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 1998,
        ventilation: [
          ['natural_single_sided', 5],
          ['natural_cross', 1],
        ],
        rooms: [
          classrooms('M', 44, [27, 32], [48, 58]),
          {
            prefix: 'MI',
            count: 4,
            use: 'ict_room',
            floorAreaM2: [58, 66],
            ceilingHeightM: [2.6, 2.8],
            pupils: [28, 30],
            adults: 1,
            openableFraction: [0.01, 0.03],
          },
        ],
      },
      {
        name: 'Science Wing',
        yearBuilt: 1971,
        constructionType: 'concrete_frame',
        airPermeabilityM3hM2: 13,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2001,
        ventilation: [
          ['mechanical_extract', 2],
          ['natural_single_sided', 1],
        ],
        rooms: [
          {
            prefix: 'S',
            count: 12,
            use: 'science_lab',
            floorAreaM2: [80, 92],
            ceilingHeightM: [2.8, 3.2],
            pupils: [28, 32],
            adults: 2,
            openableFraction: [0.02, 0.05],
          },
        ],
      },
      {
        name: 'Academy Building',
        yearBuilt: 2008,
        constructionType: 'steel_frame',
        airPermeabilityM3hM2: 5,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2008,
        ventilation: [
          ['mechanical_supply_extract', 2],
          ['hybrid', 1],
        ],
        rooms: [
          classrooms('AB', 24, [28, 32], [55, 62]),
          {
            prefix: 'ABL',
            count: 1,
            use: 'library',
            floorAreaM2: [140, 160],
            ceilingHeightM: [3.2, 3.6],
            pupils: [40, 60],
            adults: 2,
            openableFraction: [0.03, 0.05],
          },
        ],
      },
      {
        name: 'Sixth Form Centre',
        yearBuilt: 2019,
        constructionType: 'timber_frame',
        airPermeabilityM3hM2: 3,
        heatingType: 'heat_pump_wet',
        heatingFuel: 'heat_pump',
        heatingInstalledYear: 2019,
        heatingEfficiency: 3.1,
        fuelPriceGbpPerKwh: 0.22,
        ventilation: [['heat_recovery_unit', 1]],
        rooms: [{ ...classrooms('SF', 8, [18, 24], [45, 52]) }],
      },
    ],
  },
  {
    name: 'Fennimore Lane Primary School',
    referenceNumber: 'BV-1002',
    phase: 'primary',
    climateRegion: 'london_south_east',
    address: '2 Fennimore Lane, Eastwick Vale, BV3 8FL',
    ageGroup: 'primary',
    heatingFuel: 'gas',
    fuelPriceGbpPerKwh: null,
    heatingEfficiency: 0.84,
    timetable: null,
    blocks: [
      {
        name: 'Main Building',
        yearBuilt: 1936,
        constructionType: 'cavity_masonry',
        airPermeabilityM3hM2: 12,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2010,
        ventilation: [
          ['natural_single_sided', 3],
          ['natural_cross', 1],
        ],
        rooms: [
          classrooms('F', 16, [28, 30], [54, 60]),
          {
            prefix: 'FH',
            count: 1,
            use: 'hall',
            floorAreaM2: [180, 200],
            ceilingHeightM: [4.5, 5.5],
            pupils: [0, 0],
            adults: 2,
            openableFraction: [0.03, 0.05],
          },
        ],
      },
      {
        name: 'Key Stage 2 Extension',
        yearBuilt: 2003,
        constructionType: 'cavity_masonry',
        airPermeabilityM3hM2: 9,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2003,
        ventilation: [['natural_single_sided', 1]],
        rooms: [classrooms('K', 8, [29, 31], [55, 58])],
      },
    ],
  },
  {
    name: 'Saltmarsh Rise School',
    referenceNumber: 'BV-2002',
    phase: 'secondary',
    climateRegion: 'east_anglia',
    address: 'Rise Road, Saltmarsh Staithe, BV9 5SR',
    ageGroup: 'secondary',
    heatingFuel: 'oil',
    fuelPriceGbpPerKwh: 0.072,
    heatingEfficiency: 0.76,
    timetable: null,
    blocks: [
      {
        name: 'North Block',
        yearBuilt: 1958,
        constructionType: 'solid_masonry',
        airPermeabilityM3hM2: 15,
        heatingType: 'wet_radiators',
        heatingFuel: 'oil',
        heatingInstalledYear: 1996,
        ventilation: [['natural_single_sided', 1]],
        rooms: [
          classrooms('N', 30, [26, 31], [50, 60]),
          {
            prefix: 'NM',
            count: 2,
            use: 'music_room',
            floorAreaM2: [60, 70],
            ceilingHeightM: [2.8, 3],
            pupils: [25, 30],
            adults: 1,
            openableFraction: [0.005, 0.015],
          },
        ],
      },
      {
        name: 'Technology Block',
        yearBuilt: 1968,
        constructionType: 'system_built',
        airPermeabilityM3hM2: 17,
        heatingType: 'warm_air',
        heatingFuel: 'oil',
        heatingInstalledYear: 1999,
        ventilation: [
          ['mechanical_extract', 1],
          ['natural_single_sided', 2],
        ],
        rooms: [
          {
            prefix: 'T',
            count: 10,
            use: 'practical',
            floorAreaM2: [85, 100],
            ceilingHeightM: [2.8, 3.2],
            pupils: [20, 24],
            adults: 2,
            openableFraction: [0.02, 0.04],
          },
        ],
      },
      {
        name: 'Humanities Block',
        yearBuilt: 2001,
        constructionType: 'steel_frame',
        airPermeabilityM3hM2: 8,
        heatingType: 'wet_radiators',
        heatingFuel: 'oil',
        heatingInstalledYear: 2001,
        ventilation: [
          ['natural_cross', 1],
          ['natural_single_sided', 1],
        ],
        rooms: [classrooms('H', 20, [28, 32], [55, 62])],
      },
    ],
  },
  {
    name: 'Wrenfield Infant and Nursery School',
    referenceNumber: 'BV-1003',
    phase: 'nursery',
    climateRegion: 'south_west',
    address: '7 Wrenfield Close, Lower Pennock, BV4 1WN',
    ageGroup: 'early_years',
    heatingFuel: 'gas',
    fuelPriceGbpPerKwh: null,
    heatingEfficiency: 0.86,
    timetable: null,
    blocks: [
      {
        name: 'Nursery and Infants',
        yearBuilt: 1989,
        constructionType: 'cavity_masonry',
        airPermeabilityM3hM2: 10,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2014,
        ventilation: [['natural_single_sided', 1]],
        rooms: [
          classrooms('W', 9, [24, 30], [58, 66]),
          {
            prefix: 'WS',
            count: 2,
            use: 'staff_room',
            floorAreaM2: [20, 28],
            ceilingHeightM: [2.5, 2.7],
            pupils: [0, 0],
            adults: 6,
            openableFraction: [0.05, 0.07],
          },
        ],
      },
    ],
  },
  {
    name: 'Kestrel Hill School',
    referenceNumber: 'BV-3001',
    phase: 'special',
    climateRegion: 'wales',
    address: 'Kestrel Hill, Pontybrack, BV6 3KH',
    ageGroup: 'secondary',
    heatingFuel: 'gas',
    fuelPriceGbpPerKwh: null,
    heatingEfficiency: 0.83,
    timetable: null,
    blocks: [
      {
        name: 'Teaching Block',
        yearBuilt: 1978,
        constructionType: 'system_built',
        airPermeabilityM3hM2: 14,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2000,
        ventilation: [
          ['natural_single_sided', 3],
          ['mechanical_extract', 1],
        ],
        rooms: [classrooms('KH', 12, [8, 12], [40, 50])],
      },
      {
        name: 'Therapy Suite',
        yearBuilt: 2015,
        constructionType: 'timber_frame',
        airPermeabilityM3hM2: 4,
        heatingType: 'underfloor',
        heatingFuel: 'gas',
        heatingInstalledYear: 2015,
        ventilation: [['heat_recovery_unit', 1]],
        rooms: [classrooms('TS', 4, [6, 8], [35, 45])],
      },
    ],
  },
  {
    name: 'Brackenmoor Vale All-Through Academy',
    referenceNumber: 'BV-4001',
    phase: 'all_through',
    climateRegion: 'north_east',
    address: '100 Vale Parade, Brackenmoor, BV2 9AV',
    ageGroup: 'secondary',
    heatingFuel: 'gas',
    fuelPriceGbpPerKwh: null,
    heatingEfficiency: 0.81,
    timetable: null,
    blocks: [
      {
        name: 'Primary Phase',
        ageGroup: 'primary',
        yearBuilt: 1966,
        constructionType: 'system_built',
        airPermeabilityM3hM2: 15,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 1997,
        ventilation: [['natural_single_sided', 1]],
        rooms: [classrooms('P', 28, [28, 31], [50, 58])],
      },
      {
        name: 'Secondary Phase',
        yearBuilt: 2006,
        constructionType: 'concrete_frame',
        airPermeabilityM3hM2: 6,
        heatingType: 'wet_radiators',
        heatingFuel: 'gas',
        heatingInstalledYear: 2006,
        ventilation: [
          ['mechanical_supply_extract', 1],
          ['natural_cross', 1],
          ['hybrid', 1],
        ],
        rooms: [
          classrooms('SP', 40, [27, 32], [52, 62]),
          {
            prefix: 'SL',
            count: 8,
            use: 'science_lab',
            floorAreaM2: [82, 90],
            ceilingHeightM: [3, 3.3],
            pupils: [28, 30],
            adults: 2,
            openableFraction: [0.02, 0.04],
          },
          {
            prefix: 'SSH',
            count: 1,
            use: 'sports_hall',
            floorAreaM2: [550, 600],
            ceilingHeightM: [7.5, 8],
            pupils: [0, 0],
            adults: 2,
            openableFraction: [0.005, 0.01],
          },
        ],
      },
    ],
  },
];

export interface DemoRoom {
  blockName: string;
  code: string;
  name: string;
  use: RoomUse;
  floorAreaM2: number;
  ceilingHeightM: number;
  pupils: number;
  adults: number;
  ageGroup: AgeGroup;
  orientationDeg: number;
  glazingAreaM2: number;
  openableAreaM2: number;
  windowType: WindowType;
  frameMaterial: FrameMaterial;
  glazingGValue: number;
  ventilationType: VentilationType;
  mechanicalSupplyLps: number | null;
  notes: string | null;
}

const BEARINGS = [0, 45, 90, 135, 180, 225, 270, 315];
const WINDOWS_BY_ERA = (year: number): WindowType[] =>
  year < 1919
    ? ['sliding_sash', 'top_hung']
    : year < 1990
      ? ['top_hung', 'pivot', 'bottom_hung']
      : ['side_hung', 'tilt_and_turn', 'top_hung'];

const round = (value: number, places: number) => Math.round(value * 10 ** places) / 10 ** places;

/** Expands a school's block plans into concrete, deterministic rooms. */
export function demoRooms(school: DemoSchool, schoolIndex: number): DemoRoom[] {
  const random = prng(2026 + schoolIndex * 97);
  const between = ([lo, hi]: [number, number]) => lo + (hi - lo) * random();
  const pick = <T>(items: T[]) => items[Math.floor(random() * items.length)] as T;
  const rooms: DemoRoom[] = [];
  for (const block of school.blocks) {
    const totalWeight = block.ventilation.reduce((sum, [, w]) => sum + w, 0);
    for (const plan of block.rooms) {
      for (let i = 1; i <= plan.count; i += 1) {
        const floorAreaM2 = round(between(plan.floorAreaM2), 1);
        let r = random() * totalWeight;
        const ventilationType =
          block.ventilation.find(([, w]) => {
            r -= w;
            return r < 0;
          })?.[0] ?? block.ventilation[0]![0];
        // Every seventh teaching room has windows that barely open (restrictors, painted shut, or fixed lights).
        const tinyOpening = plan.pupils[1] > 0 && i % 7 === 3;
        const glazingAreaM2 = round(floorAreaM2 * between([0.14, 0.32]), 1);
        const openable = tinyOpening ? between([0.7, 1.2]) : floorAreaM2 * between(plan.openableFraction);
        const mechanical =
          ventilationType === 'mechanical_supply_extract' ||
          ventilationType === 'heat_recovery_unit' ||
          ventilationType === 'hybrid';
        const pupils = Math.round(between(plan.pupils));
        rooms.push({
          blockName: block.name,
          code: `${plan.prefix}${String(i).padStart(2, '0')}`,
          name:
            plan.use === 'classroom'
              ? `Classroom ${plan.prefix}${i}`
              : `${plan.use.replace('_', ' ')} ${i}`.replace(/^./, (c) => c.toUpperCase()),
          use: plan.use,
          floorAreaM2,
          ceilingHeightM: round(between(plan.ceilingHeightM), 2),
          pupils,
          adults: plan.adults,
          ageGroup: plan.pupils[1] === 0 ? 'adult' : (block.ageGroup ?? school.ageGroup),
          orientationDeg: pick(BEARINGS),
          glazingAreaM2,
          openableAreaM2: round(Math.min(openable, glazingAreaM2), 2),
          windowType: pick(WINDOWS_BY_ERA(block.yearBuilt)),
          frameMaterial: block.yearBuilt < 1919 ? 'timber' : block.yearBuilt < 1990 ? 'metal' : 'pvc_u',
          glazingGValue: round(block.yearBuilt < 1990 ? between([0.7, 0.8]) : between([0.4, 0.6]), 2),
          ventilationType,
          mechanicalSupplyLps: mechanical ? round((pupils + plan.adults) * between([4, 9]), 0) : null,
          notes: tinyOpening ? 'Window restrictors limit opening; survey to confirm.' : null,
        });
      }
    }
  }
  return rooms;
}
