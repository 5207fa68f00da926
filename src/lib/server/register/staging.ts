/**
 * An import's room writes as COPY text, made by the preview (in the worker) and streamed by the commit into a staging
 * table (apply.ts). The room's columns are the estate's (ROOM_COLUMNS): one mapping of fields to columns.
 */
import { copyLine } from '../db/copy';
import { ROOM_COLUMNS } from '../estate/rooms.repository';
import type { ImportPlan, RoomWrite } from './plan';

/** The columns of a staged room write, in the order of its COPY line (see stagedRoomLine). */
export const STAGED_COLUMNS = [
  'row_number',
  'room_id',
  'school_id',
  'school_key',
  'block_id',
  'block_key',
  ...ROOM_COLUMNS.map(([c]) => c),
  'before',
  'after',
];

/**
 * One room write as a line of COPY text for the commit's staging table: the row number, the room
 * (null when new), its school and block as an id or the key of one the import creates, the room's
 * fields, and for a changed room the changed values before and after as JSON (for the audit trail).
 */
export function stagedRoomLine(w: RoomWrite): string {
  const values: (string | number | null)[] = [
    w.rowNumber,
    w.roomId,
    'id' in w.school ? w.school.id : null,
    'newKey' in w.school ? w.school.newKey : null,
    w.block && 'id' in w.block ? w.block.id : null,
    w.block && 'newKey' in w.block ? w.block.newKey : null,
  ];
  for (const [, , key] of ROOM_COLUMNS) values.push(w.fields[key] as string | number | null);
  values.push(w.roomId ? JSON.stringify(w.before) : null, w.roomId ? JSON.stringify(w.after) : null);
  return copyLine(values);
}

/** An import plan as stored between preview and commit: everything but the room writes, which travel as COPY text. */
export type StoredPlan = Omit<ImportPlan, 'roomWrites' | 'problems' | 'roomChanges' | 'rejectedRows'>;
