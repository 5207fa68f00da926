import { Readable } from 'node:stream';
import ExcelJS from 'exceljs';
import { AppError, badRequest } from '../http/errors';
import { MAX_UPLOAD_BYTES } from '../http/request-guard';
import { plainCellValue, type CellValue } from './values';
import { forStreamingReader, inspectXlsx, type MergedRange } from './zip-guard';

/** The most rows a register may have; larger files are refused before they are read. */
export const MAX_ROWS = 200_000;
/** The largest upload we accept, in bytes. */
export const MAX_FILE_BYTES = MAX_UPLOAD_BYTES;
/** Columns read from each row; a register has about twenty, a surveyor's sheet a few dozen. */
export const MAX_COLUMNS = 256;
/** The last row number a spreadsheet program can have (Excel's limit, 2^20). */
const LAST_SHEET_ROW = 1_048_576;

/** One row as read: its row number as the spreadsheet shows it, and its cells from column A. */
export interface SheetRow {
  rowNumber: number;
  values: CellValue[];
}

/** A worksheet being read: its name and its rows in order. */
export interface SheetStream {
  name: string;
  rows: AsyncIterable<SheetRow>;
  /**
   * The same rows in the batches the reader finds them in (an .xlsx, or one read in another thread), for a consumer
   * that takes them in bulk: one wait per batch instead of one per row. A sheet is read by `rows` or by `batches`, not
   * both (batchesOf picks).
   */
  batches?: AsyncIterable<SheetRow[]>;
}

/** A sheet's rows in batches: the reader's own, or batches of one row when it has none (a CSV). */
export async function* batchesOf(sheet: SheetStream): AsyncGenerator<SheetRow[]> {
  if (sheet.batches) yield* sheet.batches;
  else for await (const row of sheet.rows) yield [row];
}

export const tooManyRows = () =>
  badRequest(
    `This file has more than ${MAX_ROWS.toLocaleString('en-GB')} rows. Split it into smaller files (for example one per school) and import them one by one.`,
  );

const unreadable = (error: unknown) =>
  error instanceof AppError
    ? error
    : badRequest(
        `We could not read this workbook (${error instanceof Error ? error.message : 'unknown reason'}). Open it in your spreadsheet program, save it again as .xlsx and retry.`,
      );

const nulInRow = (rowNumber: number) =>
  badRequest(
    `Row ${rowNumber} contains a NUL character (binary data, not text). Check that this is the register itself, open it in your spreadsheet program and save it again.`,
  );

/** Copies each merged range's top-left value into the rest of the range, row by row as rows arrive. */
class MergeFiller {
  private readonly byRow = new Map<number, MergedRange[]>();
  private readonly topValues = new Map<MergedRange, CellValue>();
  constructor(merges: MergedRange[]) {
    for (const m of merges) {
      // The guard has capped the cells merges cover (zip-guard.ts); columns past MAX_COLUMNS are not read.
      for (let r = m.top; r <= m.bottom && r - m.top < 5000; r++) {
        const list = this.byRow.get(r) ?? [];
        list.push(m);
        this.byRow.set(r, list);
      }
    }
  }
  fill(row: SheetRow): void {
    for (const m of this.byRow.get(row.rowNumber) ?? []) {
      if (row.rowNumber === m.top) this.topValues.set(m, row.values[m.left] ?? null);
      const value = this.topValues.get(m) ?? null;
      for (let c = m.left; c <= Math.min(m.right, MAX_COLUMNS - 1); c++)
        if (!(row.rowNumber === m.top && c === m.left)) row.values[c] = value;
    }
  }
}

/** A piece of a worksheet as exceljs parses it: its events, rows among them. */
type SheetEvents = { eventType: string; value: unknown }[];

/**
 * Streams the worksheets of an .xlsx (exceljs's streaming reader, cached shared strings and styles). `maxRows`
 * (a register's MAX_ROWS unless given) refuses longer sheets with `tooMany`.
 */
export async function* readXlsx(
  buf: Buffer,
  maxRows = MAX_ROWS,
  tooMany: () => Error = tooManyRows,
): AsyncGenerator<SheetStream> {
  const facts = await inspectXlsx(buf);
  for (const sheet of facts.sheets.values()) if ((sheet.lastRow ?? 0) > maxRows + 50) throw tooMany();
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(Readable.from(forStreamingReader(buf, facts)), {
    sharedStrings: 'cache',
    styles: 'cache',
    hyperlinks: 'ignore',
    worksheets: 'emit',
    entries: 'emit',
  });
  try {
    for await (const worksheet of reader) {
      const ws = worksheet as unknown as { id: number; name?: string; parse(): AsyncIterable<SheetEvents> };
      // Before the workbook part is read, exceljs numbers a sheet by its part (sheet<N>.xml) and calls it "Sheet<N>";
      // after, it gives the workbook's sheet id and name. Either way the part, and so the sheet's own name, is known.
      const workbookRead = (reader as unknown as { model?: unknown }).model !== undefined;
      const named = workbookRead ? [...facts.sheetNames].find(([, s]) => s.sheetId === Number(ws.id)) : undefined;
      const part = named?.[0] ?? `xl/worksheets/sheet${ws.id}.xml`;
      const sheetName = facts.sheetNames.get(part)?.name ?? ws.name ?? `Sheet ${ws.id}`;
      const merges = facts.sheets.get(part)?.merges ?? [];
      const filler = merges.length ? new MergeFiller(merges) : null;
      // exceljs's worksheet reader gives the rows of each piece of the sheet it parses as one batch of events; its own
      // row iterator waits once per row on top of that.
      const pieces = ws.parse();
      async function* batches(): AsyncGenerator<SheetRow[]> {
        let previous = 0;
        try {
          for await (const events of pieces) {
            const batch: SheetRow[] = [];
            for (const event of events) {
              if (event.eventType !== 'row') continue;
              const row = event.value as { number: number; values: unknown[] };
              // Row numbers come from the file: each must be a sheet row after the one before.
              if (!Number.isInteger(row.number) || row.number <= previous || row.number > LAST_SHEET_ROW)
                throw badRequest(
                  `The sheet "${sheetName}" lists its rows out of order or with impossible row numbers (after row ${previous}), so the file is damaged. Open it in your spreadsheet program, save it again as .xlsx and retry.`,
                );
              if (row.number > maxRows + 50) throw tooMany();
              previous = row.number;
              // exceljs row.values is 1-based (index 0 unused) and a fresh array each time; it is
              // shifted down in place rather than copied.
              const values = row.values as CellValue[];
              const length = Math.min(values.length, MAX_COLUMNS + 1);
              for (let i = 1; i < length; i++) {
                const value = plainCellValue(values[i]);
                if (typeof value === 'string' && value.includes('\u0000')) throw nulInRow(row.number);
                values[i - 1] = value;
              }
              if (length > 0) values.length = length - 1;
              const sheetRow = { rowNumber: row.number, values };
              filler?.fill(sheetRow);
              batch.push(sheetRow);
            }
            if (batch.length > 0) yield batch;
          }
        } catch (error) {
          throw unreadable(error);
        }
      }
      const inBatches = batches();
      async function* rows(): AsyncGenerator<SheetRow> {
        for await (const batch of inBatches) yield* batch;
      }
      yield { name: sheetName, rows: rows(), batches: inBatches };
    }
  } catch (error) {
    throw unreadable(error);
  }
}

/** Decodes CSV bytes: UTF-8 (with or without BOM), falling back to Windows-1252 for older exports. */
export function decodeCsv(buf: Buffer): string {
  if (buf.subarray(0, 512).includes(0)) {
    throw badRequest(
      'This file is not a CSV text file (it contains binary data). If it is a workbook, give it an .xlsx name.',
    );
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buf);
  } catch {
    text = new TextDecoder('windows-1252').decode(buf);
  }
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

/** The CSV delimiter: comma, semicolon or tab, whichever the first lines use most. */
export function sniffDelimiter(text: string): string {
  const head = text.slice(0, 8192).split(/\r?\n/).slice(0, 10).join('\n');
  const counts = [',', ';', '\t'].map((d) => ({ d, n: head.split(d).length }));
  counts.sort((a, b) => b.n - a.n);
  return counts[0]?.d ?? ',';
}

/** Parses CSV text (RFC 4180 quoting, any line ending) into rows of strings. */
export function* parseCsv(text: string, delimiter = sniffDelimiter(text)): Generator<string[]> {
  let row: string[] = [];
  let field = '';
  let quoted = false;
  let i = 0;
  const n = text.length;
  while (i < n) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i += 2;
          continue;
        }
        quoted = false;
      } else field += ch;
      i++;
      continue;
    }
    if (ch === '"' && field === '') quoted = true;
    else if (ch === delimiter) {
      row.push(field);
      field = '';
    } else if (ch === '\n' || ch === '\r') {
      row.push(field);
      yield row;
      row = [];
      field = '';
      if (ch === '\r' && text[i + 1] === '\n') i++;
    } else field += ch;
    i++;
  }
  if (field !== '' || row.length > 0) {
    row.push(field);
    yield row;
  }
}

/** Reads a CSV upload as one sheet. */
export async function* readCsv(buf: Buffer): AsyncGenerator<SheetStream> {
  const text = decodeCsv(buf);
  const hasNul = text.includes('\u0000');
  async function* rows(): AsyncGenerator<SheetRow> {
    let rowNumber = 0;
    for (const values of parseCsv(text)) {
      rowNumber++;
      if (rowNumber > MAX_ROWS + 50) throw tooManyRows();
      if (hasNul && values.some((v) => v.includes('\u0000'))) throw nulInRow(rowNumber);
      yield { rowNumber, values: values.length > MAX_COLUMNS ? values.slice(0, MAX_COLUMNS) : values };
    }
  }
  yield { name: 'CSV', rows: rows() };
}
