/**
 * The engine inputs a chunk of a run read, kept compact: each school and block once, each room as a list of its
 * register values, the calibration and the part of the measured analysis the risk reads; JSON, compressed by Brotli
 * (50-130 bytes a room; runs before 2026-12-03 stored it gzip'd, which still decodes). With the run's assumption set
 * they give back exactly what the run assessed, so a result's detail (curves, baselines, reasons) is recomputed when
 * someone opens it instead of being stored for every room.
 */
import { promisify } from 'node:util';
import { brotliCompress, brotliDecompressSync, constants, gunzipSync } from 'node:zlib';
import type { RoomAssessmentInput, RoomCalibration, TimetableSegment } from '../../engine';
import type { MeasuredEvidenceInput, MeasuredRoom } from '../../engine/measured';

const brotliAsync = promisify(brotliCompress);

/**
 * What starts a Brotli snapshot (Brotli has no signature of its own; a gzip'd one starts 1f 8b). Brotli at quality 1
 * took 47 ms for 20,000 rooms of the national benchmark against gzip's 129 ms at level 1, and 131 bytes a room
 * against 142 (the gzip'd snapshot took more CPU per room than assessing the room).
 */
const BROTLI_MARK = Buffer.from('ATB1', 'latin1');
const GZIP_MARK = Buffer.from([0x1f, 0x8b]);

type Input = RoomAssessmentInput;

/** A room as a snapshot gives it back: its ids and the inputs the run assessed. */
export interface SnapshotRoom {
  roomId: string;
  roomCode: string;
  schoolId: string;
  blockId: string | null;
  input: RoomAssessmentInput;
  measured: MeasuredEvidenceInput | null;
}

/** What encodeRooms needs of a room (an EngineRoom, whose measured analysis may be whole). */
export interface RoomToKeep {
  roomId: string;
  roomCode: string;
  schoolId: string;
  blockId: string | null;
  input: RoomAssessmentInput;
  measured?: MeasuredRoom | MeasuredEvidenceInput | null;
}

type SchoolValues = [
  Input['school']['phase'],
  Input['school']['climateRegion'],
  Input['school']['heatingFuel'],
  number | null,
  number | null,
  readonly TimetableSegment[] | null,
];
type BlockValues = [
  number | null,
  Input['block']['constructionType'],
  number | null,
  Input['block']['heatingFuel'],
  number | null,
  number | null,
  number | null,
];
type RoomValues = [
  roomId: string,
  schoolId: string,
  blockId: string | null,
  code: string,
  name: string,
  use: Input['room']['use'],
  floorAreaM2: number,
  ceilingHeightM: number | null,
  pupils: number | null,
  adults: number | null,
  ageGroup: Input['room']['ageGroup'],
  orientationDeg: number | null,
  glazingAreaM2: number | null,
  openableAreaM2: number | null,
  windowType: Input['room']['windowType'],
  frameMaterial: Input['room']['frameMaterial'],
  glazingGValue: number | null,
  ventilationType: Input['room']['ventilationType'],
  mechanicalSupplyLps: number | null,
  winterWindowOpenFraction: number | null,
  calibration: RoomCalibration | null,
  measured: MeasuredEvidenceInput | null,
];

interface ChunkInputs {
  v: 1;
  schools: Record<string, SchoolValues>;
  blocks: Record<string, BlockValues>;
  rooms: RoomValues[];
}

const schoolValues = (s: Input['school']): SchoolValues => [
  s.phase,
  s.climateRegion,
  s.heatingFuel,
  s.fuelPriceGbpPerKwh,
  s.heatingEfficiency,
  s.timetable,
];

const blockValues = (b: Input['block']): BlockValues => [
  b.yearBuilt,
  b.constructionType,
  b.airPermeabilityM3hM2,
  b.heatingFuel,
  b.fuelPriceGbpPerKwh,
  b.heatingEfficiency,
  b.heatingInstalledYear,
];

/** The part of a measured analysis the risk reads (MeasuredEvidenceInput), in a fixed key order. */
export function evidenceInput(
  m: MeasuredRoom | MeasuredEvidenceInput | null | undefined,
): MeasuredEvidenceInput | null {
  if (!m) return null;
  const seasons: MeasuredEvidenceInput['seasons'] = {};
  for (const season of ['winter', 'mid', 'summer'] as const) {
    const s = m.seasons[season];
    if (!s) continue;
    seasons[season] = {
      days: s.days,
      occupiedMeanPpm: s.occupiedMeanPpm,
      thresholds: s.thresholds.map((t) => ({
        thresholdPpm: t.thresholdPpm,
        occupiedMinutesOverPerDay: t.occupiedMinutesOverPerDay,
        longestRunMinutesMedianDay: t.longestRunMinutesMedianDay,
      })),
    };
  }
  return { seasons };
}

/** A calibration in a fixed key order (so equal calibrations encode alike). */
const calibrationValues = (c: RoomCalibration | null | undefined): RoomCalibration | null =>
  c ? { windowUseFactor: { ...c.windowUseFactor }, infiltrationLps: c.infiltrationLps, label: c.label } : null;

function roomValues(r: RoomToKeep): RoomValues {
  const room = r.input.room;
  return [
    r.roomId,
    r.schoolId,
    r.blockId,
    room.code,
    room.name,
    room.use,
    room.floorAreaM2,
    room.ceilingHeightM,
    room.pupils,
    room.adults,
    room.ageGroup,
    room.orientationDeg,
    room.glazingAreaM2,
    room.openableAreaM2,
    room.windowType,
    room.frameMaterial,
    room.glazingGValue,
    room.ventilationType,
    room.mechanicalSupplyLps,
    room.winterWindowOpenFraction,
    calibrationValues(r.input.calibration),
    evidenceInput(r.measured),
  ];
}

/** The rooms' inputs, compressed (off the main thread, so the engine goes on meanwhile). */
export async function encodeRooms(rooms: readonly RoomToKeep[]): Promise<Buffer> {
  const inputs: ChunkInputs = { v: 1, schools: {}, blocks: {}, rooms: [] };
  for (const r of rooms) {
    inputs.schools[r.schoolId] ??= schoolValues(r.input.school);
    if (r.blockId !== null) inputs.blocks[r.blockId] ??= blockValues(r.input.block);
    inputs.rooms.push(roomValues(r));
  }
  const json = JSON.stringify(inputs);
  const compressed = await brotliAsync(json, {
    params: {
      [constants.BROTLI_PARAM_QUALITY]: 1,
      [constants.BROTLI_PARAM_MODE]: constants.BROTLI_MODE_TEXT,
      [constants.BROTLI_PARAM_SIZE_HINT]: json.length,
    },
  });
  return Buffer.concat([BROTLI_MARK, compressed]);
}

const NO_BLOCK: BlockValues = [null, null, null, null, null, null, null];

function toSnapshotRoom(v: RoomValues, inputs: ChunkInputs): SnapshotRoom {
  const school = inputs.schools[v[1]];
  if (!school) throw new Error(`Input snapshot has no school ${v[1]}`);
  const block = v[2] === null ? NO_BLOCK : (inputs.blocks[v[2]] ?? NO_BLOCK);
  return {
    roomId: v[0],
    roomCode: v[3],
    schoolId: v[1],
    blockId: v[2],
    input: {
      room: {
        code: v[3],
        name: v[4],
        use: v[5],
        floorAreaM2: v[6],
        ceilingHeightM: v[7],
        pupils: v[8],
        adults: v[9],
        ageGroup: v[10],
        orientationDeg: v[11],
        glazingAreaM2: v[12],
        openableAreaM2: v[13],
        windowType: v[14],
        frameMaterial: v[15],
        glazingGValue: v[16],
        ventilationType: v[17],
        mechanicalSupplyLps: v[18],
        winterWindowOpenFraction: v[19],
      },
      block: {
        yearBuilt: block[0],
        constructionType: block[1],
        airPermeabilityM3hM2: block[2],
        heatingFuel: block[3],
        fuelPriceGbpPerKwh: block[4],
        heatingEfficiency: block[5],
        heatingInstalledYear: block[6],
      },
      school: {
        phase: school[0],
        climateRegion: school[1],
        heatingFuel: school[2],
        fuelPriceGbpPerKwh: school[3],
        heatingEfficiency: school[4],
        timetable: school[5],
      },
      calibration: v[20],
    },
    measured: v[21],
  };
}

/** A snapshot's JSON: Brotli after its mark, or gzip (runs before 2026-12-03). */
function unpack(bytes: Buffer): string {
  if (bytes.subarray(0, BROTLI_MARK.length).equals(BROTLI_MARK))
    return brotliDecompressSync(bytes.subarray(BROTLI_MARK.length)).toString('utf8');
  if (bytes.subarray(0, GZIP_MARK.length).equals(GZIP_MARK)) return gunzipSync(bytes).toString('utf8');
  throw new Error('Input snapshot is neither Brotli nor gzip');
}

function decode(bytes: Buffer): ChunkInputs {
  const inputs = JSON.parse(unpack(bytes)) as ChunkInputs;
  if (inputs.v !== 1) throw new Error(`Unknown input snapshot version ${String(inputs.v)}`);
  return inputs;
}

/** Every room of a snapshot. */
export function decodeRooms(bytes: Buffer): SnapshotRoom[] {
  const inputs = decode(bytes);
  return inputs.rooms.map((v) => toSnapshotRoom(v, inputs));
}

/** One room of a snapshot, or null when it is not in it. */
export function decodeRoom(bytes: Buffer, roomId: string): SnapshotRoom | null {
  const inputs = decode(bytes);
  const values = inputs.rooms.find((v) => v[0] === roomId);
  return values ? toSnapshotRoom(values, inputs) : null;
}

/**
 * A room's inputs as one string, equal for equal inputs: compares what a run assessed with the register as it is
 * now (school and block values included, the measured analysis as far as the risk reads it).
 */
export function inputsKey(r: RoomToKeep): string {
  const values = roomValues(r);
  return JSON.stringify([values, schoolValues(r.input.school), r.blockId === null ? null : blockValues(r.input.block)]);
}
