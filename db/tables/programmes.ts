import type { ColumnType, Generated } from 'kysely';
import type { Json } from './json';

type CreatedAt = ColumnType<Date, never, never>;
type UpdatedAt = ColumnType<Date, never, Date | undefined>;

/** A saved capital programme (scenario): settings, candidate snapshot, placements and how they were found. */
export interface ProgrammesTable {
  id: Generated<string>;
  trust_id: string;
  name: string;
  school_ids: string[] | null;
  settings: Json<unknown>;
  candidates: Json<unknown>;
  unplannable: Json<unknown>;
  source: Json<unknown>;
  placements: Json<unknown>;
  solve: Json<unknown>;
  free_objective: number | null;
  created_by_email: string | null;
  updated_by_email: string | null;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

/** Tables of the capital programme feature. */
export interface ProgrammeTables {
  programmes: ProgrammesTable;
}
