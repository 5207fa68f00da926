// A run's input snapshot gives back exactly the inputs the run assessed (issue 16): the rooms encoded by a worker
// decode to the same values, field for field, and snapshots stored gzip'd by runs before the switch to Brotli still
// decode. The expected rooms are written out here, not produced by the encoder.
import { brotliDecompressSync, gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import {
  decodeRoom,
  decodeRooms,
  encodeRooms,
  type SnapshotRoom,
} from '../../../src/lib/server/assessments/input-snapshot';

const SCHOOL = 'aaaaaaaa-1111-4111-8111-111111111111';
const BLOCK = 'bbbbbbbb-2222-4222-8222-222222222222';
const timetable = [
  { label: 'Period 1', startMinute: 525, endMinute: 585, occupancyFraction: 1, kind: 'lesson' as const },
  { label: 'Break', startMinute: 585, endMinute: 600, occupancyFraction: 0, kind: 'break' as const },
];
const school = {
  phase: 'secondary' as const,
  climateRegion: 'north_west' as const,
  heatingFuel: 'gas' as const,
  fuelPriceGbpPerKwh: 0.0612,
  heatingEfficiency: 0.84,
  timetable,
};
const block = {
  yearBuilt: 1968,
  constructionType: 'system_built' as const,
  airPermeabilityM3hM2: 11.5,
  heatingFuel: null,
  fuelPriceGbpPerKwh: null,
  heatingEfficiency: null,
  heatingInstalledYear: 2004,
};
const noBlock = {
  yearBuilt: null,
  constructionType: null,
  airPermeabilityM3hM2: null,
  heatingFuel: null,
  fuelPriceGbpPerKwh: null,
  heatingEfficiency: null,
  heatingInstalledYear: null,
};
const measured = {
  seasons: {
    winter: {
      days: 14,
      occupiedMeanPpm: 1312.5,
      thresholds: [{ thresholdPpm: 1500, occupiedMinutesOverPerDay: 37.25, longestRunMinutesMedianDay: 22 }],
    },
  },
};

const rooms: SnapshotRoom[] = [
  {
    roomId: '00000000-0000-4000-8000-000000000001',
    roomCode: 'S1.04',
    schoolId: SCHOOL,
    blockId: BLOCK,
    input: {
      room: {
        code: 'S1.04',
        name: 'Salle d’été – 1\tnorth',
        use: 'science_lab',
        floorAreaM2: 63.37,
        ceilingHeightM: 2.745,
        pupils: 30,
        adults: 2,
        ageGroup: 'secondary',
        orientationDeg: 135,
        glazingAreaM2: 14.1,
        openableAreaM2: 1.85,
        windowType: 'top_hung',
        frameMaterial: 'metal_thermal_break',
        glazingGValue: 0.63,
        ventilationType: 'natural_cross',
        mechanicalSupplyLps: null,
        winterWindowOpenFraction: 0.125,
      },
      block,
      school,
      calibration: { windowUseFactor: { winter: 0.55 }, infiltrationLps: 4.5, label: 'calibrated from 14 days' },
    },
    measured,
  },
  {
    roomId: '00000000-0000-4000-8000-000000000002',
    roomCode: 'HUT-2',
    schoolId: SCHOOL,
    blockId: null,
    input: {
      room: {
        code: 'HUT-2',
        name: '',
        use: null,
        floorAreaM2: 48,
        ceilingHeightM: null,
        pupils: null,
        adults: null,
        ageGroup: null,
        orientationDeg: null,
        glazingAreaM2: null,
        openableAreaM2: null,
        windowType: null,
        frameMaterial: null,
        glazingGValue: null,
        ventilationType: 'mechanical_supply_extract',
        mechanicalSupplyLps: 240,
        winterWindowOpenFraction: null,
      },
      block: noBlock,
      school,
      calibration: null,
    },
    measured: null,
  },
];

describe('a run chunk’s input snapshot', () => {
  it('gives back every room’s inputs as they were encoded', async () => {
    const bytes = await encodeRooms(rooms);
    expect(decodeRooms(bytes)).toEqual(rooms);
    expect(decodeRoom(bytes, rooms[1]!.roomId)).toEqual(rooms[1]);
    expect(decodeRoom(bytes, '00000000-0000-4000-8000-000000000009')).toBeNull();
  });

  it('is Brotli after a four-byte mark, and smaller than its JSON', async () => {
    const bytes = await encodeRooms(rooms);
    const json = brotliDecompressSync(bytes.subarray(4)).toString('utf8');
    expect(JSON.parse(json).v).toBe(1);
    expect(bytes.length).toBeLessThan(json.length);
  });

  it('still decodes a snapshot stored gzip’d (runs before the switch to Brotli)', () => {
    // The stored layout of those runs: schools and blocks once, each room as a list of its values.
    const stored = {
      v: 1,
      schools: { [SCHOOL]: ['secondary', 'north_west', 'gas', 0.0612, 0.84, timetable] },
      blocks: { [BLOCK]: [1968, 'system_built', 11.5, null, null, null, 2004] },
      rooms: [
        [
          '00000000-0000-4000-8000-000000000001',
          SCHOOL,
          BLOCK,
          'S1.04',
          'Salle d’été – 1\tnorth',
          'science_lab',
          63.37,
          2.745,
          30,
          2,
          'secondary',
          135,
          14.1,
          1.85,
          'top_hung',
          'metal_thermal_break',
          0.63,
          'natural_cross',
          null,
          0.125,
          { windowUseFactor: { winter: 0.55 }, infiltrationLps: 4.5, label: 'calibrated from 14 days' },
          measured,
        ],
      ],
    };
    expect(decodeRooms(gzipSync(JSON.stringify(stored)))).toEqual([rooms[0]]);
  });

  it('refuses bytes that are no snapshot', () => {
    expect(() => decodeRooms(Buffer.from('{"v":1}'))).toThrow(/neither Brotli nor gzip/);
  });
});
