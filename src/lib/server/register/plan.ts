import type { ClimateRegion, SchoolPhase } from '../../engine/vocabulary';
import { columnOf, type RegisterField } from './columns';
import type { DetectedColumn } from './headers';
import { physicalChecks, RoomFieldsSchema, type RoomFieldName, type RoomFields } from './register.schemas';
import { ageGroupForPhase, type ImportProblem, type ParsedRow } from './rows';

/** The trust's estate as it stands, reduced to what the import compares against. */
export interface EstateSnapshot {
  schools: { id: string; name: string; phase: SchoolPhase }[];
  blocks: {
    id: string;
    schoolId: string;
    name: string;
    yearBuilt: number | null;
    airPermeabilityM3hM2: number | null;
  }[];
  rooms: { id: string; schoolId: string; blockId: string | null; fields: RoomFields }[];
  /** Region given to schools the import creates (the trust's most common one). */
  defaultClimateRegion: ClimateRegion;
  /** False for members limited to some schools: they may only import rooms of those schools. */
  canCreateSchools?: boolean;
}

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

/** Everything a commit would do, and the counts the preview shows. */
export interface ImportPlan {
  newSchools: { key: string; name: string; phase: SchoolPhase; climateRegion: ClimateRegion }[];
  newBlocks: {
    key: string;
    school: Ref;
    name: string;
    yearBuilt: number | null;
    airPermeabilityM3hM2: number | null;
  }[];
  schoolChanges: { id: string; name: string; before: { phase: SchoolPhase }; after: { phase: SchoolPhase } }[];
  blockChanges: {
    id: string;
    name: string;
    before: Record<string, number | null>;
    after: Record<string, number | null>;
  }[];
  roomWrites: RoomWrite[];
  missingRooms: { id: string; schoolName: string; code: string; name: string }[];
  problems: ImportProblem[];
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

/** A key for matching school and block names whatever their case and spacing. */
export const nameKey = (name: string) => name.toLowerCase().replace(/\s+/g, ' ').trim();

const ROOM_FIELDS: RoomFieldName[] = [
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
  'ventilationType',
  'mechanicalSupplyLps',
  'notes',
];
const NULLABLE = new Set<RoomFieldName>(['orientationDeg', 'windowType', 'mechanicalSupplyLps', 'notes']);

const sameValue = (a: unknown, b: unknown) =>
  typeof a === 'number' && typeof b === 'number' ? Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a)) : a === b;

/** The data rows of a file with cells read: the rows that hold rooms, plus the count of skipped ones. */
export interface ReadRows {
  rows: ParsedRow[];
  skipped: number;
}

/**
 * Compares the file's rows with the estate and works out every create and change; adds the
 * problems that need the estate to see (duplicate codes, a new school without a phase, physics).
 * Pure: the same rows and snapshot always give the same plan.
 */
export function planImport(read: ReadRows, columns: DetectedColumn[], estate: EstateSnapshot): ImportPlan {
  const problems: ImportProblem[] = [];
  const byField = new Map<RegisterField, DetectedColumn>();
  for (const c of columns) if (c.field) byField.set(c.field, c);
  const has = (f: RegisterField) => byField.has(f);
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
  const schoolsByKey = new Map(estate.schools.map((s) => [nameKey(s.name), s]));
  const blocksByKey = new Map(estate.blocks.map((b) => [`${b.schoolId}|${nameKey(b.name)}`, b]));
  const roomsByKey = new Map(estate.rooms.map((r) => [`${r.schoolId}|${r.fields.code}`, r]));

  // Pass 1: the phase of each school the file names, and the first value of each block's attributes.
  const phaseOf = new Map<string, { phase: SchoolPhase; row: number }>();
  const blockAttrs = new Map<
    string,
    { yearBuilt: number | null; airPermeabilityM3hM2: number | null; row: number; name: string }
  >();
  const schoolNameOf = new Map<string, string>();
  for (const row of read.rows) {
    const school = row.values.school;
    if (typeof school !== 'string') continue;
    const phase = row.values.schoolPhase;
    const sk = keyOf(school);
    if (!schoolNameOf.has(sk)) schoolNameOf.set(sk, school);
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
    const block = row.values.block;
    if (typeof block === 'string') {
      const bk = `${sk}|${keyOf(block)}`;
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
  }

  // Pass 2: each row becomes a room write, an unchanged room, or a rejected row.
  const writes: RoomWrite[] = [];
  const codesInFile = new Set<string>();
  const firstRowOfCode = new Map<string, number>();
  const acceptedSchools = new Set<string>();
  const acceptedBlocks = new Set<string>();
  const warnedNewSchool = new Set<string>();
  let rejected = 0;
  let unchanged = 0;

  for (const row of read.rows) {
    let hasError = row.problems.some((p) => p.severity === 'error');
    problems.push(...row.problems);
    const error = (field: RegisterField, message: string) => {
      problem(row, field, 'error', message);
      hasError = true;
    };
    const schoolName = typeof row.values.school === 'string' ? row.values.school : null;
    const code = row.values.code === null || row.values.code === undefined ? null : String(row.values.code).trim();
    if (!schoolName) error('school', 'The school is missing; every room must name its school.');
    if (!code) error('code', 'The room code is missing; every room needs a code that is unique within its school.');
    if (!schoolName || !code) {
      rejected++;
      continue;
    }
    const sk = keyOf(schoolName);
    const existingSchool = schoolsByKey.get(sk) ?? null;
    const phase = phaseOf.get(sk)?.phase ?? existingSchool?.phase ?? null;
    if (!existingSchool && estate.canCreateSchools === false)
      error(
        'school',
        `"${schoolName}" is not one of the schools your membership covers; rooms can only be imported into those schools.`,
      );
    else if (!existingSchool && !phase)
      error('schoolPhase', `"${schoolName}" is a new school; give its phase (e.g. Primary) so Airtally can create it.`);
    if (!existingSchool && phase && estate.canCreateSchools !== false && !warnedNewSchool.has(sk)) {
      warnedNewSchool.add(sk);
      problem(
        row,
        'school',
        'warning',
        `"${schoolName}" is not in Airtally yet and will be created (climate region set to the trust's usual one; check it on the school page).`,
      );
    }
    const dupKey = `${sk}|${code}`;
    const first = firstRowOfCode.get(dupKey);
    if (first !== undefined)
      error(
        'code',
        `Room code "${code}" appears again for ${schoolName} (first on row ${first}); room codes must be unique within a school.`,
      );
    else firstRowOfCode.set(dupKey, row.rowNumber);
    if (existingSchool) codesInFile.add(`${existingSchool.id}|${code}`);

    const existingRoom = existingSchool ? (roomsByKey.get(`${existingSchool.id}|${code}`) ?? null) : null;
    const blockName = typeof row.values.block === 'string' ? row.values.block : null;
    const blockKey = blockName ? `${sk}|${keyOf(blockName)}` : null;
    const existingBlock =
      blockName && existingSchool ? (blocksByKey.get(`${existingSchool.id}|${keyOf(blockName)}`) ?? null) : null;

    // Start from the room as it stands (columns missing from the file keep their values), else from blanks.
    const draft: Record<string, unknown> = existingRoom
      ? { ...existingRoom.fields }
      : {
          name: '',
          pupils: 0,
          adults: 0,
          orientationDeg: null,
          windowType: null,
          mechanicalSupplyLps: null,
          notes: null,
        };
    for (const field of ROOM_FIELDS) {
      if (!has(field)) continue;
      const value = row.values[field];
      if (value !== null && value !== undefined) draft[field] = field === 'code' ? code : value;
      else if (NULLABLE.has(field)) draft[field] = null;
      else if (field === 'name') draft.name = '';
    }
    draft.code = code;
    if (!existingRoom) {
      if (draft.use === undefined) {
        draft.use = 'classroom';
        if (has('use')) problem(row, 'use', 'warning', 'Room use is blank; the room is recorded as a classroom.');
      }
      if (draft.ventilationType === undefined) {
        draft.ventilationType = 'natural_single_sided';
        problem(
          row,
          'ventilationType',
          'warning',
          'Ventilation type is blank; the room is recorded as naturally ventilated from one side.',
        );
      }
      if (draft.ageGroup === undefined) {
        const fromPhase = ageGroupForPhase(phase);
        if (fromPhase) draft.ageGroup = fromPhase;
      }
      if (draft.glazingAreaM2 === undefined) {
        draft.glazingAreaM2 = typeof draft.openableAreaM2 === 'number' ? draft.openableAreaM2 : 0;
        if (typeof draft.openableAreaM2 === 'number')
          problem(row, 'glazingAreaM2', 'warning', 'Glazing area is blank; it is taken as equal to the openable area.');
      }
      draft.openableAreaM2 ??= 0;
    }
    const parsed = RoomFieldsSchema.safeParse(draft);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const field = String(issue.path[0] ?? 'code') as RegisterField;
        const missing = draft[field] === undefined || draft[field] === null;
        error(field, missing ? `${columnOf(field).header} is required for a new room.` : `${issue.message}.`);
      }
    } else {
      for (const p of physicalChecks(parsed.data)) {
        if (p.severity === 'error') error(p.field, p.message);
        else problem(row, p.field, 'warning', p.message);
      }
    }
    if (hasError || !parsed.success) {
      rejected++;
      // A rejected row keeps its problems; nothing of it is written.
      continue;
    }
    const fields = parsed.data;
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
    acceptedSchools.add(sk);
    if (blockKey && !existingBlock) acceptedBlocks.add(blockKey);

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
      if (Object.keys(changedAfter).length === 0) {
        unchanged++;
        continue;
      }
      writes.push({
        rowNumber: row.rowNumber,
        roomId: existingRoom.id,
        school,
        block,
        fields,
        before: changedBefore,
        after: changedAfter,
      });
    } else {
      writes.push({ rowNumber: row.rowNumber, roomId: null, school, block, fields, before: null, after: fields });
    }
  }

  const newSchools: ImportPlan['newSchools'] = [];
  const schoolChanges: ImportPlan['schoolChanges'] = [];
  for (const sk of acceptedSchools) {
    const existing = schoolsByKey.get(sk);
    const phase = phaseOf.get(sk)?.phase;
    if (!existing && phase) {
      newSchools.push({ key: sk, name: schoolNameOf.get(sk) ?? sk, phase, climateRegion: estate.defaultClimateRegion });
    } else if (existing && phase && phase !== existing.phase) {
      schoolChanges.push({ id: existing.id, name: existing.name, before: { phase: existing.phase }, after: { phase } });
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
    });
  }
  const blockChanges: ImportPlan['blockChanges'] = [];
  for (const [bk, attrs] of blockAttrs) {
    const [sk = ''] = bk.split('|');
    const school = schoolsByKey.get(sk);
    const block = school ? blocksByKey.get(`${school.id}|${bk.slice(sk.length + 1)}`) : undefined;
    if (!block || !acceptedSchools.has(sk)) continue;
    const before: Record<string, number | null> = {};
    const after: Record<string, number | null> = {};
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
    .filter((r) => schoolIdsInFile.has(r.schoolId) && !codesInFile.has(`${r.schoolId}|${r.fields.code}`))
    .map((r) => ({
      id: r.id,
      schoolName: schoolNames.get(r.schoolId) ?? '',
      code: r.fields.code,
      name: r.fields.name,
    }));

  problems.sort((a, b) => a.row - b.row);
  return {
    newSchools,
    newBlocks,
    schoolChanges,
    blockChanges,
    roomWrites: writes,
    missingRooms,
    problems,
    summary: {
      rowsRead: read.rows.length + read.skipped,
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
      errors: problems.filter((p) => p.severity === 'error').length,
      warnings: problems.filter((p) => p.severity === 'warning').length,
    },
  };
}
