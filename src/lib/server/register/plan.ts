import { phaseFromName, regionFromPostcode } from '../../engine/school-inference';
import { type ClimateRegion, type HeatingFuel, label, type SchoolPhase } from '../../engine/vocabulary';
import type { ActiveTrust } from '../auth/context';
import type { EstateRecords } from '../estate/estate.types';
import { columnOf, type RegisterField } from './columns';
import type { DetectedColumn } from './headers';
import { efficiencyProblem, physicalChecks } from '../estate/checks';
import {
  BlockPatchSchema,
  RoomFieldsSchema,
  type RoomFieldName,
  type RoomFields,
  SchoolPatchSchema,
} from '../estate/estate.schemas';
import { ageGroupForPhase, type ImportProblem, type ParsedRow } from './rows';
import { groupRepeatedWarnings } from './problems';
import type { CellValue } from './values';

/** The trust's estate as it stands, reduced to what the import compares against. */
export interface EstateSnapshot {
  schools: ({ id: string; name: string; phase: SchoolPhase } & Partial<SchoolHeating>)[];
  blocks: ({
    id: string;
    schoolId: string;
    name: string;
    yearBuilt: number | null;
    airPermeabilityM3hM2: number | null;
  } & Partial<BlockHeating>)[];
  rooms: { id: string; schoolId: string; blockId: string | null; fields: RoomFields }[];
  /** Region given to schools the import creates when neither a choice nor a postcode says (the trust's most common). */
  defaultClimateRegion: ClimateRegion;
  /** Phase given to schools the import creates when neither the file, a choice nor the name says (the trust's most common). */
  defaultPhase?: SchoolPhase;
  /** False for members limited to some schools: they may only import rooms of those schools. */
  canCreateSchools?: boolean;
}

/** The estate as the import compares against it: its records, the usual climate region, who may add schools. */
export function estateSnapshot(records: EstateRecords, trust: Pick<ActiveTrust, 'schoolIds'>): EstateSnapshot {
  const regionCounts = new Map<ClimateRegion, number>();
  for (const s of records.schools) regionCounts.set(s.climateRegion, (regionCounts.get(s.climateRegion) ?? 0) + 1);
  const defaultClimateRegion = [...regionCounts].sort((a, b) => b[1] - a[1])[0]?.[0] ?? 'midlands';
  const phaseCounts = new Map<SchoolPhase, number>();
  for (const s of records.schools) phaseCounts.set(s.phase, (phaseCounts.get(s.phase) ?? 0) + 1);
  const defaultPhase = [...phaseCounts].sort((a, b) => b[1] - a[1])[0]?.[0] ?? 'primary';
  return { ...records, defaultClimateRegion, defaultPhase, canCreateSchools: trust.schoolIds === null };
}

/** A school's heating as the register's school columns give it. */
export interface SchoolHeating {
  heatingFuel: HeatingFuel;
  fuelPriceGbpPerKwh: number | null;
  heatingEfficiency: number | null;
}

/** A block's heating as the register's block columns give it. */
export interface BlockHeating {
  heatingFuel: HeatingFuel | null;
  fuelPriceGbpPerKwh: number | null;
  heatingEfficiency: number | null;
}

/** One room of the preview: which fields change from what to what (a new room lists what it will hold). */
export interface RoomChange {
  row: number;
  school: string;
  code: string;
  kind: 'new' | 'changed';
  fields: { field: string; before: string | number | null; after: string | number | null }[];
}

/** Register columns of a school's heating and the school fields they set. */
const SCHOOL_HEATING_COLUMNS = [
  ['schoolHeatingFuel', 'heatingFuel'],
  ['schoolFuelPriceGbpPerKwh', 'fuelPriceGbpPerKwh'],
  ['schoolHeatingEfficiency', 'heatingEfficiency'],
] as const satisfies readonly (readonly [RegisterField, keyof SchoolHeating])[];

/** Register columns of a block's heating and the block fields they set. */
const BLOCK_HEATING_COLUMNS = [
  ['blockHeatingFuel', 'heatingFuel'],
  ['blockFuelPriceGbpPerKwh', 'fuelPriceGbpPerKwh'],
  ['blockHeatingEfficiency', 'heatingEfficiency'],
] as const satisfies readonly (readonly [RegisterField, keyof BlockHeating])[];

/** Most per-room changes a preview lists (the counts stay exact beyond it). */
export const MAX_ROOM_CHANGES_LISTED = 2000;

/** A school or block reference: an existing id, or the key of one this import creates. */
export type Ref = { id: string } | { newKey: string };

export interface RoomWrite {
  rowNumber: number;
  roomId: string | null;
  school: Ref;
  block: Ref | null;
  fields: RoomFields;
  /** Only the changed attributes, for the audit trail (null for a new room). */
  before: Partial<RoomFields & { blockId: string | null }> | null;
  after: Partial<RoomFields & { blockId: string | null }>;
}

/** Where a new school's phase came from: the file's phase column, the person's choice, its name, or the default. */
export type PhaseSource = 'file' | 'chosen' | 'name' | 'default';
/** Where a new school's climate region came from: the person's choice, its postcode, or the trust's usual one. */
export type RegionSource = 'chosen' | 'postcode' | 'default';

/** A school the import creates, as the preview lists it once (with why its phase and region are what they are). */
export interface NewSchool extends Partial<SchoolHeating> {
  key: string;
  name: string;
  phase: SchoolPhase;
  phaseSource: PhaseSource;
  climateRegion: ClimateRegion;
  regionSource: RegionSource;
  /** Why, in words ("the name says “High School”", "postcode area LS"). */
  phaseReason: string;
  regionReason: string;
  postcode: string | null;
  /** The rows of the file that create the school's rooms (the first one, and how many). */
  firstRow: number;
  rowCount: number;
}

/** Phase and region the person chose in the preview for a school the file creates, by its name key (nameKey). */
export type SchoolChoices = Record<
  string,
  { phase?: SchoolPhase | undefined; climateRegion?: ClimateRegion | undefined }
>;

/** A rejected row as the file holds it, with what to fix: for the rejected-rows workbook. */
export interface RejectedRow {
  row: number;
  cells: (string | number | boolean | null)[];
  fixes: string[];
}

/** Everything a commit would do, and the counts the preview shows. */
export interface ImportPlan {
  newSchools: NewSchool[];
  newBlocks: ({
    key: string;
    school: Ref;
    name: string;
    yearBuilt: number | null;
    airPermeabilityM3hM2: number | null;
  } & Partial<BlockHeating>)[];
  schoolChanges: {
    id: string;
    name: string;
    before: Record<string, string | number | null>;
    after: Record<string, string | number | null>;
  }[];
  blockChanges: {
    id: string;
    name: string;
    before: Record<string, string | number | null>;
    after: Record<string, string | number | null>;
  }[];
  roomWrites: RoomWrite[];
  /** Per room, the fields that change (at most MAX_ROOM_CHANGES_LISTED rooms). */
  roomChanges: RoomChange[];
  missingRooms: { id: string; schoolName: string; code: string; name: string }[];
  problems: ImportProblem[];
  /** The rejected rows' cells as read, with what to fix in each. */
  rejectedRows: RejectedRow[];
  summary: ImportSummary;
}

export interface ImportSummary {
  rowsRead: number;
  rowsSkipped: number;
  rowsRejected: number;
  schoolsToCreate: number;
  blocksToCreate: number;
  schoolsToChange: number;
  blocksToChange: number;
  roomsToCreate: number;
  roomsToChange: number;
  roomsUnchanged: number;
  roomsMissing: number;
  errors: number;
  warnings: number;
}

/** Register columns of a school's or block's own attributes, checked with the estate's declaration of each field. */
const ESTATE_VALUE_SCHEMAS = {
  schoolPhase: SchoolPatchSchema.shape.phase,
  schoolHeatingFuel: SchoolPatchSchema.shape.heatingFuel,
  schoolFuelPriceGbpPerKwh: SchoolPatchSchema.shape.fuelPriceGbpPerKwh,
  schoolHeatingEfficiency: SchoolPatchSchema.shape.heatingEfficiency,
  yearBuilt: BlockPatchSchema.shape.yearBuilt,
  airPermeabilityM3hM2: BlockPatchSchema.shape.airPermeabilityM3hM2,
  blockHeatingFuel: BlockPatchSchema.shape.heatingFuel,
  blockFuelPriceGbpPerKwh: BlockPatchSchema.shape.fuelPriceGbpPerKwh,
  blockHeatingEfficiency: BlockPatchSchema.shape.heatingEfficiency,
} as const satisfies Partial<Record<RegisterField, unknown>>;
const ESTATE_VALUE_FIELDS = Object.keys(ESTATE_VALUE_SCHEMAS) as (keyof typeof ESTATE_VALUE_SCHEMAS)[];

/** A key for matching school and block names whatever their case and spacing. */
export const nameKey = (name: string) => name.toLowerCase().replace(/\s+/g, ' ').trim();

const ROOM_FIELDS = [
  'code',
  'name',
  'use',
  'floorAreaM2',
  'ceilingHeightM',
  'pupils',
  'adults',
  'ageGroup',
  'orientationDeg',
  'glazingAreaM2',
  'openableAreaM2',
  'windowType',
  'frameMaterial',
  'glazingGValue',
  'ventilationType',
  'mechanicalSupplyLps',
  'winterWindowOpenFraction',
  'notes',
] as const satisfies readonly (RoomFieldName & RegisterField)[];
/** Fields that must hold a value (everything else may stay unknown). */
const REQUIRED = new Set<RoomFieldName>(['code', 'floorAreaM2']);
/**
 * A new room before the file's values: no name, every optional field unknown (a blank is never read as 0), the required
 * ones not given. Written out as one literal so that every draft has the same fast object layout.
 */
const newRoomDraft = (): Record<string, unknown> =>
  ({
    code: undefined,
    name: '',
    use: null,
    floorAreaM2: undefined,
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
    ventilationType: null,
    mechanicalSupplyLps: null,
    winterWindowOpenFraction: null,
    notes: null,
  }) satisfies Record<(typeof ROOM_FIELDS)[number], unknown>;

/** A room of the estate as the plan compares it. */
type EstateRoom = EstateSnapshot['rooms'][number];

/** The value of `key` in `map`, made by `make` and kept there the first time it is asked for. */
function getOrMake<K, V>(map: Map<K, V>, key: K, make: () => V): V {
  let value = map.get(key);
  if (value === undefined) {
    value = make();
    map.set(key, value);
  }
  return value;
}
const newMap = <K, V>() => new Map<K, V>();
const newSet = <T>() => new Set<T>();

const sameValue = (a: unknown, b: unknown) =>
  typeof a === 'number' && typeof b === 'number' ? Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a)) : a === b;

/** The data rows of a file with cells read: the rows that hold rooms, plus the count of skipped ones. */
export interface ReadRows {
  rows: ParsedRow[];
  skipped: number;
  /** Rows skipped as notes or headings (one text and nothing else), said in the preview so nothing vanishes unseen. */
  notes?: { rowNumber: number; text: string }[];
}

/** A room as its row gives it, worked out when the row arrives: it needs only the row and the estate (startPlan). */
interface RoomOfRow {
  code: string;
  sk: string;
  existingSchool: EstateSnapshot['schools'][number] | null;
  existingRoom: EstateRoom | null;
  blockKey: string | null;
  existingBlock: EstateSnapshot['blocks'][number] | null;
  /** The row that first gave this room code in this school, when this row repeats it. */
  repeats: number | undefined;
  /** The room's own checks (its fields' rules, then physics), in the order the preview says them. */
  said: { field: RegisterField; severity: 'error' | 'warning'; message: string }[];
  /** The room's fields, when they pass their rules. */
  fields: RoomFields | null;
  /** What writing the row would do: null when its fields fail their rules or the room would not change. */
  write: RoomWrite | null;
  /** A new room's fields left blank, said as warnings if it imports. */
  blanks: ('use' | 'pupils' | 'ventilationType' | 'ageGroup')[];
}

/** The register columns of a school's or block's heating: a file's heating can refuse every row that carries it. */
const HEATING_COLUMNS = [
  ...SCHOOL_HEATING_COLUMNS.map(([column]) => column),
  ...BLOCK_HEATING_COLUMNS.map(([column]) => column),
];

/** A new room's fields that, left blank, are said as warnings if it imports (age group only where the phase does not say). */
const BLANK_WARNED = ['use', 'pupils', 'ventilationType', 'ageGroup'] as const;
const NO_BLANKS: RoomOfRow['blanks'] = [];
/** A room with nothing to say (shared: most rooms have nothing). */
const NOTHING_SAID: RoomOfRow['said'] = [];

/** Whether a row gives a value for `field` (not blank, and read). */
const carried = (row: ParsedRow, field: RegisterField) => row.values[field] !== null && row.values[field] !== undefined;

/** The room code of a row as the plan matches it (trimmed), or null when blank. */
const codeOf = (row: ParsedRow) =>
  row.values.code === null || row.values.code === undefined ? null : String(row.values.code).trim() || null;

/** A plan being made while the file is read (startPlan): each row is added as it arrives, in file order. */
export interface PlanInProgress {
  add(row: ParsedRow): void;
  /** The plan, once every row of the file has been added (`read` gives the skipped rows and notes). */
  finish(read: Pick<ReadRows, 'skipped' | 'notes'>): ImportPlan;
}

/** How a plan is made, besides the rows, columns and estate. */
export interface PlanOptions {
  clearBlanks?: boolean;
  schoolChoices?: SchoolChoices | undefined;
  /** Called with each room write as soon as its row is worked out (before the plan is finished), e.g. to encode it. */
  onRoomWrite?: (write: RoomWrite) => void;
}

/**
 * Compares the file's rows with the estate and works out every create and change; adds the
 * problems that need the estate to see (duplicate codes, a new school without a phase, physics).
 * Pure: the same rows and snapshot always give the same plan.
 */
export function planImport(
  read: ReadRows,
  columns: DetectedColumn[],
  estate: EstateSnapshot,
  options: PlanOptions = {},
): ImportPlan {
  const plan = startPlan(columns, estate, options);
  for (const row of read.rows) plan.add(row);
  return plan.finish(read);
}

/**
 * planImport as the rows arrive. What one row and the estate decide (its school and block values' checks, its room's
 * fields, rules, physics and changes) is worked out in `add`, so it overlaps the reading of the rest of the file; what
 * needs every row (a school's phase and heating, duplicate codes, new schools and blocks, missing rooms) is decided in
 * `finish`. The plan is the same as planImport's with every row given at once.
 */
export function startPlan(
  columns: DetectedColumn[],
  estate: EstateSnapshot,
  options: PlanOptions = {},
): PlanInProgress {
  const clearBlanks = options.clearBlanks === true;
  const choices = options.schoolChoices ?? {};
  const roomChanges: RoomChange[] = [];
  const problems: ImportProblem[] = [];
  const byField = new Map<RegisterField, DetectedColumn>();
  for (const c of columns) if (c.field) byField.set(c.field, c);
  const has = (f: RegisterField) => byField.has(f);
  // Each room field, whether it must hold a value and whether the file has a column for it.
  const roomFieldSteps = ROOM_FIELDS.map((field) => ({ field, required: REQUIRED.has(field), inFile: has(field) }));
  const problem = (row: ParsedRow, field: RegisterField, severity: 'error' | 'warning', message: string) => {
    const column = byField.get(field);
    const value = row.values[field];
    problems.push({
      row: row.rowNumber,
      column: column?.header ?? columnOf(field).header,
      columnLetter: column?.letter ?? null,
      value: value === null || value === undefined ? '' : String(value),
      severity,
      message,
    });
  };

  // A register names the same few schools and blocks on every row: each distinct name is keyed once.
  const keys = new Map<string, string>();
  const keyOf = (name: string) => {
    let key = keys.get(name);
    if (key === undefined) {
      key = nameKey(name);
      keys.set(name, key);
    }
    return key;
  };
  // "a|b" keys of the few schools and blocks made once each and reused: a key built afresh on every row would be hashed
  // afresh on every lookup.
  const pairKeys = new Map<string, Map<string, string>>();
  const pairKey = (a: string, b: string) => {
    const inner = getOrMake(pairKeys, a, newMap<string, string>);
    let key = inner.get(b);
    if (key === undefined) {
      key = `${a}|${b}`;
      inner.set(b, key);
    }
    return key;
  };
  const schoolsByKey = new Map(estate.schools.map((s) => [nameKey(s.name), s]));
  const blocksByKey = new Map(estate.blocks.map((b) => [`${b.schoolId}|${nameKey(b.name)}`, b]));
  // The estate's rooms by school, then by code.
  const roomsBySchool = new Map<string, Map<string, EstateRoom>>();
  for (const r of estate.rooms) getOrMake(roomsBySchool, r.schoolId, newMap<string, EstateRoom>).set(r.fields.code, r);

  // School and block values the estate's editors would refuse are refused here too: the value is not applied and its
  // row is rejected. A register repeats the same few values on every row, so each is checked once.
  const refusedRows = new Set<number>();
  const verdictsByField = ESTATE_VALUE_FIELDS.map((field) => ({ field, verdicts: new Map<unknown, string | null>() }));
  const checkEstateValues = (row: ParsedRow) => {
    for (const { field, verdicts } of verdictsByField) {
      const value = row.values[field];
      if (value === null || value === undefined) continue;
      let message = verdicts.get(value);
      if (message === undefined) {
        const parsed = ESTATE_VALUE_SCHEMAS[field].safeParse(value);
        message = parsed.success
          ? null
          : (parsed.error.issues[0]?.message ?? `${columnOf(field).header} is not valid.`);
        verdicts.set(value, message);
      }
      if (message === null) continue;
      problem(row, field, 'error', message);
      row.values[field] = undefined;
      refusedRows.add(row.rowNumber);
    }
  };

  // Pass 1: the phase of each school the file names, and the first value of each block's attributes.
  const phaseOf = new Map<string, { phase: SchoolPhase; row: number }>();
  const schoolHeatingOf = new Map<string, Partial<SchoolHeating>>();
  const blockHeatingOf = new Map<string, Partial<BlockHeating>>();
  const blockAttrs = new Map<
    string,
    { yearBuilt: number | null; airPermeabilityM3hM2: number | null; row: number; name: string }
  >();
  const schoolNameOf = new Map<string, string>();
  const postcodeOf = new Map<string, string>();
  const rowsOfSchool = new Map<string, { first: number; count: number }>();
  const noteSchoolAndBlock = (row: ParsedRow) => {
    const school = row.values.school;
    if (typeof school !== 'string') return;
    const phase = row.values.schoolPhase;
    const sk = keyOf(school);
    if (!schoolNameOf.has(sk)) schoolNameOf.set(sk, school);
    const postcode = row.values.schoolPostcode;
    if (typeof postcode === 'string' && postcode !== '' && !postcodeOf.has(sk)) postcodeOf.set(sk, postcode);
    const counted = rowsOfSchool.get(sk);
    if (counted) counted.count++;
    else rowsOfSchool.set(sk, { first: row.rowNumber, count: 1 });
    if (typeof phase === 'string') {
      const seen = phaseOf.get(sk);
      if (!seen) phaseOf.set(sk, { phase: phase as SchoolPhase, row: row.rowNumber });
      else if (seen.phase !== phase)
        problem(
          row,
          'schoolPhase',
          'warning',
          `School phase differs from row ${seen.row}; the phase on row ${seen.row} is used.`,
        );
    }
    const heating = schoolHeatingOf.get(sk) ?? {};
    for (const [column, key] of SCHOOL_HEATING_COLUMNS) {
      const v = row.values[column];
      if (v !== null && v !== undefined && heating[key] === undefined) (heating as Record<string, unknown>)[key] = v;
    }
    schoolHeatingOf.set(sk, heating);
    const block = row.values.block;
    if (typeof block === 'string') {
      const bk = pairKey(sk, keyOf(block));
      const bh = blockHeatingOf.get(bk) ?? {};
      for (const [column, key] of BLOCK_HEATING_COLUMNS) {
        const v = row.values[column];
        if (v !== null && v !== undefined && bh[key] === undefined) (bh as Record<string, unknown>)[key] = v;
      }
      blockHeatingOf.set(bk, bh);
      const year = typeof row.values.yearBuilt === 'number' ? row.values.yearBuilt : null;
      const perm = typeof row.values.airPermeabilityM3hM2 === 'number' ? row.values.airPermeabilityM3hM2 : null;
      const seen = blockAttrs.get(bk);
      if (!seen) blockAttrs.set(bk, { yearBuilt: year, airPermeabilityM3hM2: perm, row: row.rowNumber, name: block });
      else {
        if (year !== null && seen.yearBuilt !== null && year !== seen.yearBuilt)
          problem(
            row,
            'yearBuilt',
            'warning',
            `Year built differs from row ${seen.row} for the same block; the value on row ${seen.row} is used.`,
          );
        if (perm !== null && seen.airPermeabilityM3hM2 !== null && !sameValue(perm, seen.airPermeabilityM3hM2))
          problem(
            row,
            'airPermeabilityM3hM2',
            'warning',
            `Air permeability differs from row ${seen.row} for the same block; the value on row ${seen.row} is used.`,
          );
        seen.yearBuilt ??= year;
        seen.airPermeabilityM3hM2 ??= perm;
      }
    }
  };

  // The codes the file names in each of the estate's schools.
  const codesInFile = new Map<string, Set<string>>();
  // The first row of each room code, by school key then code.
  const firstRowOfCode = new Map<string, Map<string, number>>();
  // The room of each row, as far as the row and the estate decide it.
  const workOutRoom = (row: ParsedRow): RoomOfRow | null => {
    const schoolName = typeof row.values.school === 'string' ? row.values.school : null;
    const code = codeOf(row);
    if (!schoolName || !code) return null;
    const sk = keyOf(schoolName);
    const existingSchool = schoolsByKey.get(sk) ?? null;
    const existingRoom = existingSchool ? (roomsBySchool.get(existingSchool.id)?.get(code) ?? null) : null;
    const blockName = typeof row.values.block === 'string' ? row.values.block : null;
    const blockKey = blockName ? pairKey(sk, keyOf(blockName)) : null;
    const existingBlock =
      blockName && existingSchool ? (blocksByKey.get(pairKey(existingSchool.id, keyOf(blockName))) ?? null) : null;
    // A room code given twice for one school: the later rows are refused (finish).
    const codesOfSchool = getOrMake(firstRowOfCode, sk, newMap<string, number>);
    const repeats = codesOfSchool.get(code);
    if (repeats === undefined) codesOfSchool.set(code, row.rowNumber);
    if (existingSchool) getOrMake(codesInFile, existingSchool.id, newSet<string>).add(code);
    let said = NOTHING_SAID;
    const say = (field: RegisterField, severity: 'error' | 'warning', message: string) => {
      if (said === NOTHING_SAID) said = [];
      said.push({ field, severity, message });
    };

    // Start from the room as it stands (columns missing from the file, and blank cells unless the person chose to
    // clear blanks, keep their values), else from unknowns: a blank is never read as 0.
    const draft = existingRoom ? { ...existingRoom.fields } : newRoomDraft();
    for (const { field, required, inFile } of roomFieldSteps) {
      if (!inFile) continue;
      const value = row.values[field];
      if (value !== null && value !== undefined) draft[field] = field === 'code' ? code : value;
      else if (required) continue;
      else if (!existingRoom || clearBlanks) draft[field] = field === 'name' ? '' : null;
    }
    draft.code = code;
    const parsed = RoomFieldsSchema.safeParse(draft);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const field = String(issue.path[0] ?? 'code') as RegisterField;
        const missing = draft[field] === undefined || draft[field] === null;
        // A cell that could not be read has said so already; "required" would only repeat it.
        if (
          missing &&
          row.problems.some((p) => p.severity === 'error' && p.columnLetter === byField.get(field)?.letter)
        )
          continue;
        say(field, 'error', missing ? `${columnOf(field).header} is required for a new room.` : `${issue.message}.`);
      }
      return {
        code,
        sk,
        existingSchool,
        existingRoom,
        blockKey,
        existingBlock,
        repeats,
        said,
        fields: null,
        write: null,
        blanks: NO_BLANKS,
      };
    }
    for (const p of physicalChecks(parsed.data)) say(p.field, p.severity, p.message);
    const fields = parsed.data;
    let blanks = NO_BLANKS;
    if (
      !existingRoom &&
      (draft.use === null || draft.pupils === null || draft.ventilationType === null || draft.ageGroup === null)
    )
      blanks = BLANK_WARNED.filter((f) => draft[f] === null);
    const school: Ref = existingSchool ? { id: existingSchool.id } : { newKey: sk };
    const block: Ref | null = has('block')
      ? blockKey
        ? existingBlock
          ? { id: existingBlock.id }
          : { newKey: blockKey }
        : null
      : existingRoom?.blockId
        ? { id: existingRoom.blockId }
        : null;
    let write: RoomWrite | null = null;
    if (existingRoom) {
      const changedBefore: Record<string, unknown> = {};
      const changedAfter: Record<string, unknown> = {};
      for (const field of ROOM_FIELDS) {
        if (!sameValue(existingRoom.fields[field], fields[field])) {
          changedBefore[field] = existingRoom.fields[field];
          changedAfter[field] = fields[field];
        }
      }
      const newBlockId = block && 'id' in block ? block.id : null;
      const blockChanged = block && 'newKey' in block ? true : newBlockId !== existingRoom.blockId;
      if (blockChanged) {
        changedBefore.blockId = existingRoom.blockId;
        changedAfter.blockId = newBlockId ?? blockName;
      }
      if (Object.keys(changedAfter).length > 0)
        write = {
          rowNumber: row.rowNumber,
          roomId: existingRoom.id,
          school,
          block,
          fields,
          before: changedBefore,
          after: changedAfter,
        };
    } else write = { rowNumber: row.rowNumber, roomId: null, school, block, fields, before: null, after: fields };
    if (write) options.onRoomWrite?.(write);
    return { code, sk, existingSchool, existingRoom, blockKey, existingBlock, repeats, said, fields, write, blanks };
  };

  const rows: ParsedRow[] = [];
  const roomOfRow: (RoomOfRow | null)[] = [];
  return {
    add(row) {
      rows.push(row);
      checkEstateValues(row);
      noteSchoolAndBlock(row);
      const room = workOutRoom(row);
      roomOfRow.push(room);
      // A row's cells as read are kept for the rejected-rows workbook. A row that imports whatever the other rows hold
      // (only a school's or block's heating, which this row does not carry, could still refuse it) lets them go.
      if (
        room?.fields &&
        room.repeats === undefined &&
        (room.existingSchool || estate.canCreateSchools !== false) &&
        !refusedRows.has(row.rowNumber) &&
        !room.said.some((p) => p.severity === 'error') &&
        !row.problems.some((p) => p.severity === 'error') &&
        !HEATING_COLUMNS.some((field) => carried(row, field))
      )
        row.cells = undefined;
    },
    finish(read) {
      // The heating the file would leave each school and block with must pass the editors' rule (an efficiency that fits
      // its fuel; a block without its own fuel burns the school's). Where it does not, the file's fuel and efficiency are
      // not applied and the rows that carry them are refused.
      const schoolHeatingProblem = new Map<string, string>();
      const schoolFuelAfter = new Map<string, string>();
      for (const [sk, heating] of schoolHeatingOf) {
        const existing = schoolsByKey.get(sk);
        const fuel = heating.heatingFuel ?? existing?.heatingFuel ?? 'gas';
        const problem = efficiencyProblem(fuel, heating.heatingEfficiency ?? existing?.heatingEfficiency ?? null);
        if (problem) {
          schoolHeatingProblem.set(sk, problem);
          delete heating.heatingFuel;
          delete heating.heatingEfficiency;
        }
        schoolFuelAfter.set(sk, heating.heatingFuel ?? existing?.heatingFuel ?? 'gas');
      }
      const blockHeatingProblem = new Map<string, string>();
      for (const [bk, heating] of blockHeatingOf) {
        const sk = bk.slice(0, bk.indexOf('|'));
        const school = schoolsByKey.get(sk);
        const existing = school ? blocksByKey.get(`${school.id}|${bk.slice(sk.length + 1)}`) : undefined;
        const fuel = heating.heatingFuel ?? existing?.heatingFuel ?? schoolFuelAfter.get(sk) ?? 'gas';
        const problem = efficiencyProblem(fuel, heating.heatingEfficiency ?? existing?.heatingEfficiency ?? null);
        if (problem) {
          blockHeatingProblem.set(bk, problem);
          delete heating.heatingFuel;
          delete heating.heatingEfficiency;
        }
      }

      // Pass 2: each row becomes a room write, an unchanged room, or a rejected row.
      const writes: RoomWrite[] = [];
      const acceptedSchools = new Set<string>();
      const acceptedBlocks = new Set<string>();
      const warnedNewSchool = new Set<string>();
      const rejectedRows: RejectedRow[] = [];
      let rejected = 0;
      // A rejected row's cells as read; what to fix in it is filled in from its errors once every problem is known.
      const rejectedRow = (row: ParsedRow): RejectedRow => ({
        row: row.rowNumber,
        cells: (row.cells ?? []).map(plainCell),
        fixes: [],
      });
      // Each school the file creates is described once: phase and region from the file, the person, the name or postcode.
      const described = new Map<string, NewSchool>();
      const describeNewSchool = (sk: string, name: string): NewSchool => {
        let found = described.get(sk);
        if (found) return found;
        const choice = choices[sk] ?? {};
        const fromFile = phaseOf.get(sk)?.phase;
        const fromName = phaseFromName(name);
        const postcode = postcodeOf.get(sk) ?? null;
        const fromPostcode = regionFromPostcode(postcode ?? name);
        const defaultPhase = estate.defaultPhase ?? 'primary';
        const rows = rowsOfSchool.get(sk) ?? { first: 0, count: 0 };
        found = {
          key: sk,
          name,
          ...(fromFile
            ? { phase: fromFile, phaseSource: 'file', phaseReason: 'the file’s phase column' }
            : choice.phase
              ? { phase: choice.phase, phaseSource: 'chosen', phaseReason: 'chosen in the preview' }
              : fromName
                ? { phase: fromName.phase, phaseSource: 'name', phaseReason: `the name says “${fromName.because}”` }
                : { phase: defaultPhase, phaseSource: 'default', phaseReason: 'not known: the trust’s usual phase' }),
          ...(choice.climateRegion
            ? { climateRegion: choice.climateRegion, regionSource: 'chosen', regionReason: 'chosen in the preview' }
            : fromPostcode
              ? {
                  climateRegion: fromPostcode.climateRegion,
                  regionSource: 'postcode',
                  regionReason: `postcode area ${fromPostcode.area}`,
                }
              : {
                  climateRegion: estate.defaultClimateRegion,
                  regionSource: 'default',
                  regionReason: 'not known: the trust’s usual region',
                }),
          postcode,
          firstRow: rows.first,
          rowCount: rows.count,
          ...(schoolHeatingOf.get(sk) ?? {}),
        };
        described.set(sk, found);
        return found;
      };
      let unchanged = 0;

      for (let i = 0; i < rows.length; i++) {
        const row = rows[i] as ParsedRow;
        const room = roomOfRow[i];
        let hasError = row.problems.some((p) => p.severity === 'error') || refusedRows.has(row.rowNumber);
        problems.push(...row.problems);
        const error = (field: RegisterField, message: string) => {
          problem(row, field, 'error', message);
          hasError = true;
        };
        if (!room) {
          if (typeof row.values.school !== 'string' || !row.values.school)
            error('school', 'The school is missing; every room must name its school.');
          if (!codeOf(row))
            error('code', 'The room code is missing; every room needs a code that is unique within its school.');
          rejected++;
          rejectedRows.push(rejectedRow(row));
          continue;
        }
        const { code, sk, existingSchool, existingRoom, blockKey, existingBlock } = room;
        const schoolName = row.values.school as string;
        const phase =
          phaseOf.get(sk)?.phase ??
          existingSchool?.phase ??
          (estate.canCreateSchools !== false ? describeNewSchool(sk, schoolName).phase : null);
        const schoolHeating = schoolHeatingProblem.get(sk);
        if (schoolHeating && carried(row, 'schoolHeatingEfficiency')) error('schoolHeatingEfficiency', schoolHeating);
        else if (schoolHeating && carried(row, 'schoolHeatingFuel')) error('schoolHeatingFuel', schoolHeating);
        const blockHeating = blockKey ? blockHeatingProblem.get(blockKey) : undefined;
        if (blockHeating && carried(row, 'blockHeatingEfficiency')) error('blockHeatingEfficiency', blockHeating);
        else if (blockHeating && carried(row, 'blockHeatingFuel')) error('blockHeatingFuel', blockHeating);
        if (!existingSchool && estate.canCreateSchools === false)
          error(
            'school',
            `"${schoolName}" is not one of the schools your membership covers; rooms can only be imported into those schools.`,
          );
        const newSchool =
          !existingSchool && estate.canCreateSchools !== false ? describeNewSchool(sk, schoolName) : null;
        if (newSchool && !warnedNewSchool.has(sk)) {
          // Said once per school, on its first row: never an error, so the school's rooms still import.
          warnedNewSchool.add(sk);
          const guessed = [
            newSchool.phaseSource === 'default' ? `phase set to ${label(newSchool.phase)}` : null,
            newSchool.regionSource === 'default' ? `climate region set to ${label(newSchool.climateRegion)}` : null,
          ].filter(Boolean);
          if (guessed.length > 0)
            problem(
              row,
              newSchool.phaseSource === 'default' ? 'schoolPhase' : 'school',
              'warning',
              `"${schoolName}" is a new school and the file does not say its ${newSchool.phaseSource === 'default' ? 'phase' : 'region'}${newSchool.phaseSource === 'default' && newSchool.regionSource === 'default' ? ' or region' : ''}: ${guessed.join(' and ')} (the trust's usual). Choose in the new schools list before importing, or change it later on the school's page.`,
            );
        }
        if (room.repeats !== undefined)
          error(
            'code',
            `Room code "${code}" appears again for ${schoolName} (first on row ${room.repeats}); room codes must be unique within a school.`,
          );

        for (const s of room.said) {
          if (s.severity === 'error') error(s.field, s.message);
          else problem(row, s.field, 'warning', s.message);
        }
        if (hasError || !room.fields) {
          rejected++;
          rejectedRows.push(rejectedRow(row));
          // A rejected row keeps its problems; nothing of it is written.
          continue;
        }
        // Said only of rows that import: a rejected row's errors are what to fix first.
        for (const f of room.blanks) {
          if (f !== 'ageGroup')
            problem(
              row,
              f,
              'warning',
              `${columnOf(f).header} blank: stored as unknown; assessments assume a value and say so.`,
            );
          else if (ageGroupForPhase(phase) === null && has('ageGroup'))
            problem(row, 'ageGroup', 'warning', 'Age group blank: assessments take it from the school phase.');
        }
        const { fields, write } = room;
        acceptedSchools.add(sk);
        if (blockKey && !existingBlock) acceptedBlocks.add(blockKey);

        if (existingRoom) {
          // The room's own fields that change (a change of block is a write, but not listed here).
          const changedBefore = (write?.before ?? {}) as Record<string, unknown>;
          const changedAfter = (write?.after ?? {}) as Record<string, unknown>;
          const changed = Object.keys(changedAfter).filter((field) => field !== 'blockId');
          if (changed.length > 0 && roomChanges.length < MAX_ROOM_CHANGES_LISTED)
            roomChanges.push({
              row: row.rowNumber,
              school: schoolName,
              code,
              kind: 'changed',
              fields: changed.map((field) => ({
                field,
                before: (changedBefore[field] ?? null) as string | number | null,
                after: (changedAfter[field] ?? null) as string | number | null,
              })),
            });
          if (!write) {
            unchanged++;
            continue;
          }
          writes.push(write);
        } else {
          writes.push(write as RoomWrite);
          if (roomChanges.length < MAX_ROOM_CHANGES_LISTED)
            roomChanges.push({
              row: row.rowNumber,
              school: schoolName,
              code,
              kind: 'new',
              fields: ROOM_FIELDS.filter((f) => f !== 'code' && fields[f] !== null && fields[f] !== '').map((f) => ({
                field: f,
                before: null,
                after: fields[f] as string | number | null,
              })),
            });
        }
      }

      const newSchools: ImportPlan['newSchools'] = [];
      const schoolChanges: ImportPlan['schoolChanges'] = [];
      for (const sk of acceptedSchools) {
        const existing = schoolsByKey.get(sk);
        const phase = phaseOf.get(sk)?.phase;
        const heating = schoolHeatingOf.get(sk) ?? {};
        if (!existing) {
          const school = described.get(sk);
          if (school) newSchools.push({ ...school, ...heating });
        } else {
          const before: Record<string, string | number | null> = {};
          const after: Record<string, string | number | null> = {};
          if (phase && phase !== existing.phase) {
            before.phase = existing.phase;
            after.phase = phase;
          }
          for (const [, key] of SCHOOL_HEATING_COLUMNS) {
            const v = heating[key];
            if (v !== undefined && !sameValue(v, existing[key] ?? null)) {
              before[key] = existing[key] ?? null;
              after[key] = v;
            }
          }
          if (Object.keys(after).length) schoolChanges.push({ id: existing.id, name: existing.name, before, after });
        }
      }
      const newBlocks: ImportPlan['newBlocks'] = [];
      for (const bk of acceptedBlocks) {
        const [sk = ''] = bk.split('|');
        const existingSchool = schoolsByKey.get(sk);
        const attrs = blockAttrs.get(bk);
        newBlocks.push({
          key: bk,
          school: existingSchool ? { id: existingSchool.id } : { newKey: sk },
          name: attrs?.name ?? bk,
          yearBuilt: attrs?.yearBuilt ?? null,
          airPermeabilityM3hM2: attrs?.airPermeabilityM3hM2 ?? null,
          ...(blockHeatingOf.get(bk) ?? {}),
        });
      }
      const blockChanges: ImportPlan['blockChanges'] = [];
      for (const [bk, attrs] of blockAttrs) {
        const [sk = ''] = bk.split('|');
        const school = schoolsByKey.get(sk);
        const block = school ? blocksByKey.get(`${school.id}|${bk.slice(sk.length + 1)}`) : undefined;
        if (!block || !acceptedSchools.has(sk)) continue;
        const before: Record<string, string | number | null> = {};
        const after: Record<string, string | number | null> = {};
        const bh = blockHeatingOf.get(bk) ?? {};
        for (const [, key] of BLOCK_HEATING_COLUMNS) {
          const v = bh[key];
          if (v !== undefined && !sameValue(v, block[key] ?? null)) {
            before[key] = block[key] ?? null;
            after[key] = v;
          }
        }
        if (has('yearBuilt') && attrs.yearBuilt !== null && attrs.yearBuilt !== block.yearBuilt) {
          before.yearBuilt = block.yearBuilt;
          after.yearBuilt = attrs.yearBuilt;
        }
        if (
          has('airPermeabilityM3hM2') &&
          attrs.airPermeabilityM3hM2 !== null &&
          !sameValue(attrs.airPermeabilityM3hM2, block.airPermeabilityM3hM2)
        ) {
          before.airPermeabilityM3hM2 = block.airPermeabilityM3hM2;
          after.airPermeabilityM3hM2 = attrs.airPermeabilityM3hM2;
        }
        if (Object.keys(after).length) blockChanges.push({ id: block.id, name: block.name, before, after });
      }

      const schoolIdsInFile = new Set([...schoolNameOf.keys()].map((sk) => schoolsByKey.get(sk)?.id).filter(Boolean));
      const schoolNames = new Map(estate.schools.map((s) => [s.id, s.name]));
      const missingRooms = estate.rooms
        .filter((r) => schoolIdsInFile.has(r.schoolId) && !codesInFile.get(r.schoolId)?.has(r.fields.code))
        .map((r) => ({
          id: r.id,
          schoolName: schoolNames.get(r.schoolId) ?? '',
          code: r.fields.code,
          name: r.fields.name,
        }));

      for (const note of read.notes ?? [])
        problems.push({
          row: note.rowNumber,
          column: '',
          columnLetter: null,
          value: note.text.slice(0, 200),
          severity: 'warning',
          message: 'Not a room (a note or heading, one text and nothing else): skipped.',
        });
      problems.sort((a, b) => a.row - b.row);
      const fixesOf = new Map(rejectedRows.map((r) => [r.row, r.fixes]));
      for (const p of problems) if (p.severity === 'error') fixesOf.get(p.row)?.push(p.message);
      const shown = groupRepeatedWarnings(problems);
      return {
        newSchools,
        newBlocks,
        schoolChanges,
        blockChanges,
        roomWrites: writes,
        roomChanges,
        missingRooms,
        problems: shown,
        rejectedRows,
        summary: {
          rowsRead: rows.length + read.skipped,
          rowsSkipped: read.skipped,
          rowsRejected: rejected,
          schoolsToCreate: newSchools.length,
          blocksToCreate: newBlocks.length,
          schoolsToChange: schoolChanges.length,
          blocksToChange: blockChanges.length,
          roomsToCreate: writes.filter((w) => !w.roomId).length,
          roomsToChange: writes.filter((w) => w.roomId).length,
          roomsUnchanged: unchanged,
          roomsMissing: missingRooms.length,
          errors: shown.filter((p) => p.severity === 'error').length,
          warnings: shown.filter((p) => p.severity === 'warning').length,
        },
      };
    },
  };
}

/** A cell as the rejected-rows workbook writes it back (dates as the day they show). */
function plainCell(value: CellValue | undefined): string | number | boolean | null {
  if (value === undefined || value === null) return null;
  return value instanceof Date ? value.toISOString().slice(0, 10) : value;
}
