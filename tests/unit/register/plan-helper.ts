/** Plans an import of rows given as cell arrays, with one column per field in the order given (no file reading). */
import type { RegisterField } from '~/lib/server/register/columns';
import type { DetectedColumn } from '~/lib/server/register/headers';
import { type EstateSnapshot, planImport } from '~/lib/server/register/plan';
import { compileColumns, parseRow } from '~/lib/server/register/rows';

/** A planner for files whose columns are `fields`, against `estate`; rows start at spreadsheet row 2. */
export function plannerFor(fields: readonly RegisterField[], estate: EstateSnapshot) {
  const columns: DetectedColumn[] = fields.map((field, index) => ({
    index,
    letter: String.fromCharCode(65 + index),
    header: field,
    headerKey: field,
    field,
  }));
  const compiled = compileColumns(columns);
  return (cells: (string | number | null)[][], options: { clearBlanks?: boolean } = {}) =>
    planImport({ rows: cells.map((c, i) => parseRow(i + 2, c, compiled)), skipped: 0 }, columns, estate, options);
}
