import type { ColumnType, Generated } from 'kysely';
import type { Json } from './json';

type CreatedAt = ColumnType<Date, never, never>;
type UpdatedAt = ColumnType<Date, never, Date | undefined>;

/** One uploaded register file: its preview, problems and, once committed or cancelled, its outcome. */
export interface RegisterImportsTable {
  id: Generated<string>;
  trust_id: string;
  created_by_user_id: string | null;
  created_by_email: string | null;
  file_name: string;
  file_kind: 'xlsx' | 'csv';
  file_size_bytes: number;
  status: Generated<'previewed' | 'committed' | 'cancelled' | 'failed'>;
  header: Json<unknown> | null;
  summary: Json<unknown>;
  problems: Json<unknown>;
  problem_count: Generated<number>;
  missing_rooms: Json<unknown>;
  /** Per room of the preview: which fields change from what to what. */
  room_changes: Json<unknown> | null;
  /** What the commit will write (the import plan), gzip-compressed JSON; cleared once committed or cancelled. */
  rows_gz: Buffer | null;
  /** The schools the import creates, as the preview lists them (NewSchool[]). */
  new_schools: Json<unknown> | null;
  /** The rejected rows as the file held them, with what to fix: gzip-compressed JSON (RejectedRows). */
  rejected_rows_gz: Buffer | null;
  /** Counts and latest change times of the trust's schools, blocks and rooms when the preview was made. */
  estate_fingerprint: string | null;
  outcome: Json<unknown> | null;
  committed_by_email: string | null;
  committed_at: Date | null;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

/** A header text (normalised) the trust has mapped to a register field. */
export interface RegisterColumnMappingsTable {
  trust_id: string;
  header_key: string;
  field: string;
  updated_at: Generated<Date>;
}

/** Tables of the register imports and saved column mappings feature. */
export interface RegisterTables {
  register_imports: RegisterImportsTable;
  register_column_mappings: RegisterColumnMappingsTable;
}
