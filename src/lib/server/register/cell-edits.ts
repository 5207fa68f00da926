/**
 * Edits typed into the register's cells read with the import's own cell readers, so "1.6 m2", "2700 mm", "SW", "20 %"
 * or "mech extract" mean the same in a cell as in an uploaded file. Plain numbers and codes pass through unchanged.
 */
import { z } from 'zod';
import { RoomPatchSchema } from '../estate/estate.schemas';
import { badRequest } from '../http/errors';
import { columnOf, REGISTER_FIELDS, type RegisterField } from './columns';
import { parserFor } from './rows';

const READ_AS_CELLS = new Set<string>(REGISTER_FIELDS.filter((f) => columnOf(f).kind !== 'text'));

/** An edit's fields with typed text read as the import reads a cell; a cell it cannot read is a 400 saying why. */
export function readTypedCells(body: unknown): unknown {
  if (typeof body !== 'object' || body === null || Array.isArray(body)) return body;
  const out: Record<string, unknown> = { ...(body as Record<string, unknown>) };
  for (const [key, value] of Object.entries(out)) {
    if (typeof value !== 'string' || !READ_AS_CELLS.has(key)) continue;
    const column = columnOf(key as RegisterField);
    const parsed = parserFor(column.field, column.header)(value.slice(0, 200));
    if (!parsed.ok) throw badRequest(`${column.header}: ${parsed.message}.`, { field: key });
    out[key] = parsed.value;
  }
  return out;
}

/** PATCH /api/rooms/[id]: the room patch, with typed cell text read as the import reads it. */
export const RoomPatchInputSchema = z.preprocess(readTypedCells, RoomPatchSchema);
