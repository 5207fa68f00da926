import { AGE_GROUPS, ROOM_USES, SCHOOL_PHASES, VENTILATION_TYPES, WINDOW_TYPES, type SchoolPhase } from '../../engine/vocabulary';
import { columnOf, type RegisterField } from './columns';
import { headerScale, type DetectedColumn } from './headers';
import {
  cellText, parseEnum, parseOrientation, parseQuantity, parseText, parseWholeNumber, parseYear, type CellValue, type Parsed,
} from './values';

/** A problem the preview shows, named by the row and column as the spreadsheet shows them. */
export interface ImportProblem {
  row: number;
  column: string;
  columnLetter: string | null;
  value: string;
  severity: 'error' | 'warning';
  message: string;
}

/** A data row after each cell is read: values of the mapped columns (null = blank), keyed by field. */
export interface ParsedRow {
  rowNumber: number;
  values: Partial<Record<RegisterField, string | number | null>>;
  /** Raw text of each mapped field, for problem messages. */
  problems: ImportProblem[];
}

/** What a row is: nothing, a total line to skip, or a room. */
export type RowKind = 'blank' | 'subtotal' | 'room';

function parseCell(field: RegisterField, value: CellValue, header: string): Parsed<string | number> {
  const column = columnOf(field);
  switch (column.kind) {
    case 'text':
      return parseText(value);
    case 'integer':
      return parseWholeNumber(value);
    case 'year':
      return parseYear(value);
    case 'orientation':
      return parseOrientation(value);
    case 'number':
      return parseQuantity(value, column.quantity ?? 'count', headerScale(header, field));
    case 'enum':
      switch (field) {
        case 'schoolPhase': return parseEnum(value, SCHOOL_PHASES);
        case 'use': return parseEnum(value, ROOM_USES);
        case 'ageGroup': return parseEnum(value, AGE_GROUPS);
        case 'windowType': return parseEnum(value, WINDOW_TYPES);
        case 'ventilationType': return parseEnum(value, VENTILATION_TYPES);
        default: return parseText(value);
      }
  }
}

const TOTAL_WORDS = /\b(sub-?total|totals?|grand total|sum)\b/i;

/** Blank rows and total lines ("Subtotal", "Total") carry no room and are skipped. */
export function classifyRow(values: CellValue[], columns: DetectedColumn[]): RowKind {
  const texts = columns.filter((c) => c.field).map((c) => cellText(values[c.index] ?? null));
  if (texts.every((t) => t === '')) return 'blank';
  const codeColumn = columns.find((c) => c.field === 'code');
  const code = codeColumn ? cellText(values[codeColumn.index] ?? null) : '';
  if (values.some((v) => typeof v === 'string' && TOTAL_WORDS.test(v)) && (code === '' || TOTAL_WORDS.test(code))) return 'subtotal';
  return 'room';
}

/** Reads every mapped cell of a data row; unreadable cells become errors, placeholders warnings. */
export function parseRow(rowNumber: number, cells: CellValue[], columns: DetectedColumn[]): ParsedRow {
  const row: ParsedRow = { rowNumber, values: {}, problems: [] };
  for (const column of columns) {
    if (!column.field) continue;
    const raw = cells[column.index] ?? null;
    const parsed = parseCell(column.field, raw, column.header);
    const problem = (severity: 'error' | 'warning', message: string) =>
      row.problems.push({ row: rowNumber, column: column.header, columnLetter: column.letter, value: cellText(raw), severity, message });
    if (!parsed.ok) {
      problem('error', `${columnOf(column.field).header}: ${parsed.message}.`);
      continue;
    }
    row.values[column.field] = parsed.value;
    if (parsed.placeholder) problem('warning', `"${cellText(raw)}" is a placeholder; the cell is read as blank.`);
  }
  return row;
}

/** The age group a school's phase implies, for rows that leave it blank. */
export function ageGroupForPhase(phase: SchoolPhase | null): (typeof AGE_GROUPS)[number] | null {
  switch (phase) {
    case 'nursery': return 'early_years';
    case 'primary': return 'primary';
    case 'secondary': case 'all_through': return 'secondary';
    case 'further_education': return 'sixth_form';
    default: return null;
  }
}
