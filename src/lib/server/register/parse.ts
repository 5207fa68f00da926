import { AppError } from '../http/errors';
import { REGISTER_COLUMNS } from './columns';
import { applyMapping, detectHeader, HEADER_SEARCH_ROWS, type DetectedHeader, type SavedMappings } from './headers';
import type { ReadRows } from './plan';
import { batchesOf, readCsv, readXlsx, type SheetRow, type SheetStream } from './reader';
import { classifyRow, compileColumns, parseRow, type ParsedRow } from './rows';
import { cellText, type CellValue } from './values';
import type { ImportOptions } from './register.schemas';

/** What reading a register file gives: the sheet used, its header, and the rows with cells read. */
export interface ReadRegister {
  sheetName: string;
  header: DetectedHeader;
  /** The first rows as text, for the header-row picker when detection is unsure. */
  topRows: string[][];
  read: ReadRows;
}

const topText = (rows: SheetRow[]) =>
  rows.slice(0, 15).map((r) => r.values.slice(0, 24).map((v) => cellText(v ?? null)));

/** Reads an .xlsx or .csv upload, finds its header and reads every data row (no database). */
export function readRegisterFile(
  buf: Buffer,
  kind: 'xlsx' | 'csv',
  saved: SavedMappings,
  options: ImportOptions = {},
): Promise<ReadRegister> {
  return readRegisterSheets(kind === 'xlsx' ? readXlsx(buf) : readCsv(buf), saved, options);
}

/**
 * readRegisterFile over sheets as they are read (reader.ts, or another thread's reading: parse-worker.ts). Once the
 * header is found, `startRows` is asked for what takes each data row the moment it is read (e.g. startPlan's `add`);
 * the rows then go to it alone, and `read.rows` stays empty.
 */
export async function readRegisterSheets(
  sheets: AsyncIterable<SheetStream>,
  saved: SavedMappings,
  options: ImportOptions = {},
  startRows?: (header: DetectedHeader) => (row: ParsedRow) => void,
): Promise<ReadRegister> {
  let firstTop: string[][] = [];
  for await (const sheet of sheets) {
    const batches = batchesOf(sheet);
    const head: SheetRow[] = [];
    // Rows read with the head's last batch, past HEADER_SEARCH_ROWS.
    let rest: SheetRow[] = [];
    while (head.length < HEADER_SEARCH_ROWS) {
      const next = await batches.next();
      if (next.done) break;
      const room = HEADER_SEARCH_ROWS - head.length;
      head.push(...next.value.slice(0, room));
      rest = next.value.slice(room);
    }
    // Rows are numbered as the spreadsheet shows them; gaps (empty rows) are filled so indexes match.
    const grid: CellValue[][] = [];
    for (const r of head) grid[r.rowNumber - 1] = r.values;
    for (let i = 0; i < grid.length; i++) grid[i] ??= [];
    if (firstTop.length === 0) firstTop = topText(head);
    let header = detectHeader(grid, saved, options.headerRow);
    if (!header) {
      // Not this sheet (e.g. a guide or a cover sheet): drain it and try the next.
      for await (const _batch of batches);
      continue;
    }
    if (options.mapping) header = { ...header, columns: applyMapping(header.columns, options.mapping) };
    const firstDataRow = header.row + header.rowCount;
    const compiled = compileColumns(header.columns);
    const rows: ParsedRow[] = [];
    const onRow = startRows?.(header);
    let skipped = 0;
    const notes: { rowNumber: number; text: string }[] = [];
    const take = (row: SheetRow) => {
      if (row.rowNumber < firstDataRow) return;
      const kindOfRow = classifyRow(row.values, compiled);
      if (kindOfRow === 'blank') return;
      if (kindOfRow === 'subtotal') {
        skipped++;
        return;
      }
      if (kindOfRow === 'note') {
        skipped++;
        notes.push({ rowNumber: row.rowNumber, text: row.values.map((v) => cellText(v ?? null)).find(Boolean) ?? '' });
        return;
      }
      const parsed = parseRow(row.rowNumber, row.values, compiled);
      // Rows given to `startRows`'s taker are its to keep.
      if (onRow) onRow(parsed);
      else rows.push(parsed);
    };
    for (const row of head) take(row);
    for (const row of rest) take(row);
    for await (const batch of batches) for (const row of batch) take(row);
    return { sheetName: sheet.name, header, topRows: topText(head), read: { rows, skipped, notes } };
  }
  throw new AppError(
    400,
    'header_not_found',
    `We could not find the header row (the row naming the columns, such as ${REGISTER_COLUMNS.slice(0, 5)
      .map((c) => `"${c.header}"`)
      .join(', ')}). Pick the header row, or start from our template.`,
    { topRows: firstTop },
  );
}
