import {
  AGE_GROUPS,
  FRAME_MATERIALS,
  HEATING_FUELS,
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
  type SchoolPhase,
} from '../../engine/vocabulary';
import { columnOf, type RegisterField } from './columns';
import { headerScale, type DetectedColumn } from './headers';
import {
  cellText,
  parseEnum,
  parseOrientation,
  parseQuantity,
  parseText,
  parseWholeNumber,
  parseYear,
  type CellValue,
  type Parsed,
} from './values';

/** A problem the preview shows, named by the row and column as the spreadsheet shows them. */
export interface ImportProblem {
  row: number;
  column: string;
  columnLetter: string | null;
  value: string;
  severity: 'error' | 'warning';
  message: string;
  /** When the same warning applies to several rows: all of them (`row` is the first). */
  rows?: number[];
}

/** A data row after each cell is read: values of the mapped columns, keyed by field. */
export interface ParsedRow {
  rowNumber: number;
  /** null: the cell is blank; undefined: it could not be read (or its value was refused). */
  values: Partial<Record<RegisterField, string | number | null | undefined>>;
  problems: ImportProblem[];
  /** Every cell of the row as read (kept for the rejected-rows workbook; let go once the row is sure to import). */
  cells?: CellValue[] | undefined;
}

/** What a row is: nothing, a total line to skip, a note or heading to skip, or a room. */
export type RowKind = 'blank' | 'subtotal' | 'note' | 'room';

/** Reads one cell of a column. */
export type CellParser = (value: CellValue) => Parsed<string | number>;

/** The reader of a register column's cells (its header may carry a unit, e.g. "Ceiling height (mm)"). */
export function parserFor(field: RegisterField, header: string): CellParser {
  const column = columnOf(field);
  switch (column.kind) {
    case 'text':
      return parseText;
    case 'integer':
      return parseWholeNumber;
    case 'year':
      return parseYear;
    case 'orientation':
      return parseOrientation;
    case 'number': {
      const quantity = column.quantity ?? 'count';
      const scale = headerScale(header, field);
      return (v) => parseQuantity(v, quantity, scale);
    }
    case 'enum':
      switch (field) {
        case 'schoolPhase':
          return (v) => parseEnum(v, SCHOOL_PHASES);
        case 'use':
          return (v) => parseEnum(v, ROOM_USES);
        case 'ageGroup':
          return (v) => parseEnum(v, AGE_GROUPS);
        case 'windowType':
          return (v) => parseEnum(v, WINDOW_TYPES);
        case 'ventilationType':
          return (v) => parseEnum(v, VENTILATION_TYPES);
        case 'frameMaterial':
          return (v) => parseEnum(v, FRAME_MATERIALS);
        case 'schoolHeatingFuel':
        case 'blockHeatingFuel':
          return (v) => parseEnum(v, HEATING_FUELS);
        default:
          return parseText;
      }
  }
}

/** A mapped column with its cell reader, worked out once per file rather than once per cell. */
export interface CompiledColumn {
  index: number;
  field: RegisterField;
  header: string;
  letter: string;
  parse: CellParser;
}

/** The mapped columns of a header, each with its reader. */
export function compileColumns(columns: DetectedColumn[]): CompiledColumn[] {
  return columns
    .filter((c) => c.field)
    .map((c) => ({
      index: c.index,
      field: c.field as RegisterField,
      header: c.header,
      letter: c.letter,
      // The unit may be written in the header's other row: read it from both cells.
      parse: parserFor(c.field as RegisterField, c.headerCells ?? c.header),
    }));
}

/**
 * What each row of a file needs from its compiled columns, worked out once per set: the room-code column, and a values
 * object with every mapped field blank, which each row's values start as a copy of. Built by JSON.parse and copied by
 * spread, every row's object has the same fixed shape; one filled in by computed keys would be turned into a dictionary
 * by V8 past a dozen or so fields, about 1.7 kB a row instead of a few hundred bytes, and 100,000 of those are what the
 * garbage collector then spends its time on.
 */
interface ColumnFacts {
  codeColumn: CompiledColumn | undefined;
  blankValues: ParsedRow['values'];
}
const factsByColumns = new WeakMap<CompiledColumn[], ColumnFacts>();
function columnFacts(columns: CompiledColumn[]): ColumnFacts {
  let facts = factsByColumns.get(columns);
  if (!facts) {
    facts = {
      codeColumn: columns.find((c) => c.field === 'code'),
      blankValues: JSON.parse(JSON.stringify(Object.fromEntries(columns.map((c) => [c.field, null])))),
    };
    factsByColumns.set(columns, facts);
  }
  return facts;
}

const TOTAL_WORDS = /\b(sub-?total|totals?|grand total|sum)\b/i;
/** A room code: one short word ("G12", "SC-3"), unlike a note's sentence. */
const CODE_LIKE = /^\S{1,40}$/;

/** A row without a room code that says "Total" (or the like) in any cell. */
const totalLine = (code: string, values: CellValue[]) =>
  code === '' && values.some((v) => typeof v === 'string' && TOTAL_WORDS.test(v));

/**
 * Blank rows and total lines ("Subtotal", "Total") carry no room and are skipped; so are notes and headings: rows
 * holding one text and nothing else ("Notes: areas are GIA", "Surveyed by …", "Ground floor", a merged banner), unless
 * that text is in the room-code column and reads like a code (a room with everything else missing is reported).
 */
export function classifyRow(values: CellValue[], columns: CompiledColumn[]): RowKind {
  // One pass over the mapped cells until two different texts are found (then a room or a total line), else blank or
  // one text.
  let only: string | null = null;
  let several = false;
  for (const c of columns) {
    const text = cellText(values[c.index] ?? null);
    if (text === '' || text === only) continue;
    if (only === null) only = text;
    else {
      several = true;
      break;
    }
  }
  const { codeColumn } = columnFacts(columns);
  const code = codeColumn ? cellText(values[codeColumn.index] ?? null) : '';
  if (only === null) return 'blank';
  if (code !== '' && TOTAL_WORDS.test(code)) return 'subtotal';
  if (several) return totalLine(code, values) ? 'subtotal' : 'room';
  // One text among the mapped cells: a note or heading unless an unmapped cell says something else too.
  for (const value of values) {
    const text = cellText(value ?? null);
    if (text !== '' && text !== only) return totalLine(code, values) ? 'subtotal' : 'room';
  }
  if (TOTAL_WORDS.test(only)) return 'subtotal';
  return code === only && CODE_LIKE.test(only) ? 'room' : 'note';
}

/**
 * Reads every mapped cell of a data row; unreadable cells become errors (their field left undefined), placeholders
 * warnings.
 */
export function parseRow(rowNumber: number, cells: CellValue[], columns: CompiledColumn[]): ParsedRow {
  const row: ParsedRow = { rowNumber, values: { ...columnFacts(columns).blankValues }, problems: [], cells };
  for (const column of columns) {
    const raw = cells[column.index] ?? null;
    const parsed = column.parse(raw);
    if (!parsed.ok) {
      row.values[column.field] = undefined;
      row.problems.push({
        row: rowNumber,
        column: column.header,
        columnLetter: column.letter,
        value: cellText(raw),
        severity: 'error',
        message: `${columnOf(column.field).header}: ${parsed.message}.`,
      });
      continue;
    }
    row.values[column.field] = parsed.value;
    if (parsed.placeholder) {
      row.problems.push({
        row: rowNumber,
        column: column.header,
        columnLetter: column.letter,
        value: cellText(raw),
        severity: 'warning',
        message: `"${cellText(raw)}" is a placeholder; the cell is read as blank.`,
      });
    }
  }
  return row;
}

/** The age group a school's phase implies, for rows that leave it blank. */
export function ageGroupForPhase(phase: SchoolPhase | null): (typeof AGE_GROUPS)[number] | null {
  switch (phase) {
    case 'nursery':
      return 'early_years';
    case 'primary':
      return 'primary';
    case 'secondary':
    case 'all_through':
      return 'secondary';
    case 'further_education':
      return 'sixth_form';
    default:
      return null;
  }
}
