/**
 * A register of our own, read by a spare preview worker while nobody waits (parse-in-worker.ts). V8 compiles the
 * reader's hot code with what it has seen so far: a worker that meets a 100,000-row upload cold settles on slower code
 * than one that has read a small register first (paired runs here: about 0.7 of the time once warmed).
 */
import ExcelJS from 'exceljs';
import { label } from '../../engine/vocabulary';
import { REGISTER_COLUMNS, type RegisterColumn } from './columns';
import { analyseSheets } from './analyse';
import { readXlsx, type SheetStream } from './reader';
import type { EstateSnapshot } from './plan';

/** Rows of the warm-up register: enough for the reader's code to be compiled with what a register holds. */
export const WARM_UP_ROWS = 2000;

const COMPASS = ['N', 'NE', 'E', 'SE', 'S', 'SW', 'W', 'NW'];

/**
 * A cell of row `n` (from 0) in `column`, of the kinds a register holds: names, codes, numbers in range, labels, compass
 * points and bearings, blanks. Five schools of four blocks; a school's and a block's own columns agree on every row.
 */
function warmUpCell(column: RegisterColumn, n: number): ExcelJS.CellValue {
  const school = n % 5;
  const block = n % 4;
  switch (column.field) {
    case 'school':
      return `Warm-up School ${school}`;
    case 'schoolPhase':
      return school % 2 ? 'Secondary' : 'Primary';
    case 'block':
      return `Block ${'ABCD'[block]}`;
    case 'yearBuilt':
      return 1950 + 5 * school + block;
    case 'code':
      return `W${String(n).padStart(5, '0')}`;
    case 'name':
      return `Room ${n}`;
    case 'notes':
      return n % 10 === 0 ? 'Surveyed this year' : null;
  }
  // The school's and blocks' heating, prices and airtightness are left to the trust's assumptions, as often.
  if (column.field.startsWith('school') || column.field.startsWith('block') || column.field === 'airPermeabilityM3hM2')
    return null;
  if (n % 7 === 3 && column.field !== 'floorAreaM2') return null;
  switch (column.kind) {
    case 'enum': {
      const values = column.values ?? [];
      return values.length ? label(values[n % values.length] ?? '') : null;
    }
    case 'orientation':
      return n % 2 ? COMPASS[n % COMPASS.length] : (n * 37) % 360;
    case 'number':
    case 'integer': {
      if (!column.limit) return null;
      // Between a tenth and a third of the way up the field's range, in the sheet's unit.
      const { min, max } = column.limit;
      const value = (min + (max - min) * (0.1 + ((n * 13) % 100) / 400)) * (column.sheetScale ?? 1);
      return column.kind === 'integer' ? Math.round(value) : Math.round(value * 100) / 100;
    }
    default:
      return null;
  }
}

/** The warm-up register as an .xlsx: the template's header and WARM_UP_ROWS rooms, shared strings as Excel writes them. */
export async function warmUpWorkbook(rows = WARM_UP_ROWS): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Rooms');
  ws.addRow(REGISTER_COLUMNS.map((c) => c.header));
  for (let n = 0; n < rows; n++) ws.addRow(REGISTER_COLUMNS.map((c) => warmUpCell(c, n)));
  return Buffer.from(await wb.xlsx.writeBuffer());
}

/** The estate the warm-up register is planned against: none yet, so every row is a new room. */
export const WARM_UP_ESTATE: EstateSnapshot = { schools: [], blocks: [], rooms: [], defaultClimateRegion: 'midlands' };

/**
 * Reads, checks and plans the warm-up register against an empty estate, as a preview would; the result is dropped.
 * `read` reads the workbook's sheets: in this thread, or in the sheet reader's (parse-worker.ts).
 */
export async function warmUpReader(
  read: (bytes: Buffer) => AsyncIterable<SheetStream> = (bytes) => readXlsx(bytes),
): Promise<void> {
  await analyseSheets(read(await warmUpWorkbook()), new Map(), {}, WARM_UP_ESTATE);
}
