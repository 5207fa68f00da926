/**
 * The rows of an uploaded log, streamed: CSV through csv-parse as the bytes arrive (delimiter and encoding
 * sniffed from the first 64 kB), .xlsx through the register's zip guard and exceljs's streaming reader.
 * Treats every file as hostile: sizes are capped, binary data in a CSV and broken workbooks are refused
 * with what to do.
 */
import type { Readable } from 'node:stream';
import { parse } from 'csv-parse';
import { AppError, badRequest } from '../http/errors';
import { MAX_LOG_UPLOAD_BYTES } from '../http/request-guard';
import { readXlsx, sniffDelimiter, type SheetRow } from '../register/reader';
import { xlsxRowBatchesIsolated } from './xlsx-in-worker';

/** Largest CSV log accepted (10 million readings in long format are about 300 MB). */
export const MAX_CSV_BYTES = MAX_LOG_UPLOAD_BYTES;
/** Largest .xlsx log accepted: a workbook is unpacked whole by the guard before it is read. */
export const MAX_XLSX_BYTES = 100 * 1024 * 1024;
/** Most rows a log's sheet may have (an .xlsx sheet holds at most 1,048,576). */
export const MAX_LOG_ROWS = 20_000_000;

/** 413: the upload is larger than a log of its kind may be. */
export const logTooLarge = (kind: 'csv' | 'xlsx', bytes: number) =>
  new AppError(
    413,
    'file_too_large',
    `This ${kind === 'csv' ? 'CSV' : 'Excel'} file is ${(bytes / 1024 / 1024).toFixed(0)} MB or more; the limit is ${(kind === 'csv' ? MAX_CSV_BYTES : MAX_XLSX_BYTES) / 1024 / 1024} MB. Split the log (for example by month) and import the parts one by one.`,
    { maxBytes: kind === 'csv' ? MAX_CSV_BYTES : MAX_XLSX_BYTES, bytes },
  );

const tooManyLogRows = () =>
  badRequest(
    `This sheet has more than ${MAX_LOG_ROWS.toLocaleString('en-GB')} rows. Split the log by month and import the parts one by one.`,
  );

/** .csv or .xlsx from the file name; anything else is refused with what to do. */
export function logKindOf(fileName: string): 'csv' | 'xlsx' {
  const lower = fileName.toLowerCase();
  if (lower.endsWith('.csv') || lower.endsWith('.txt') || lower.endsWith('.tsv')) return 'csv';
  if (lower.endsWith('.xlsx') || lower.endsWith('.xlsm')) return 'xlsx';
  if (lower.endsWith('.xls'))
    throw badRequest('Old-style .xls workbooks cannot be read. Save the log as .xlsx or .csv and upload it again.');
  throw badRequest(`"${fileName}" is not a log we can read. Upload the monitor's export as .csv or .xlsx.`);
}

/** Counts bytes as they pass and refuses the stream past `limit`. */
async function* capped(
  source: AsyncIterable<Buffer | string>,
  limit: number,
  kind: 'csv' | 'xlsx',
  onBytes?: (n: number) => void,
) {
  let total = 0;
  for await (const chunk of source) {
    const buf = typeof chunk === 'string' ? Buffer.from(chunk) : chunk;
    total += buf.length;
    if (total > limit) throw logTooLarge(kind, total);
    onBytes?.(total);
    yield buf;
  }
}

/** Rows of a CSV stream in batches (one per 64 kB piece read), numbered from 1, cells as text. */
async function* csvBatches(source: Readable, onBytes?: (n: number) => void): AsyncGenerator<SheetRow[]> {
  const chunks = capped(source, MAX_CSV_BYTES, 'csv', onBytes)[Symbol.asyncIterator]();
  // The first 64 kB decide the encoding and the delimiter.
  const head: Buffer[] = [];
  let headBytes = 0;
  let done = false;
  while (headBytes < 64 * 1024) {
    const next = await chunks.next();
    if (next.done) {
      done = true;
      break;
    }
    head.push(next.value);
    headBytes += next.value.length;
  }
  const first = Buffer.concat(head);
  if (first.length === 0) throw badRequest('The file is empty. Choose the log file again.');
  if (first.subarray(0, 4096).includes(0))
    throw badRequest(
      'This file is not CSV text (it contains binary data). If it is a workbook, give it an .xlsx name.',
    );
  let encoding: BufferEncoding = 'utf8';
  try {
    // Cut at the last newline so a multi-byte character split by the 64 kB boundary is not taken for bad UTF-8.
    const cut = first.lastIndexOf(10);
    new TextDecoder('utf-8', { fatal: true }).decode(cut > 0 ? first.subarray(0, cut) : first);
  } catch {
    encoding = 'latin1';
  }
  const delimiter = sniffDelimiter(first.toString(encoding, 0, Math.min(first.length, 8192)));
  const parser = parse({
    delimiter,
    bom: true,
    encoding,
    relax_column_count: true,
    relax_quotes: true,
    max_record_size: 1024 * 1024,
  });
  // Records arrive as 'data' events while a piece is parsed; they are handed on in one batch per piece, so the
  // reading loop pays one await per 64 kB rather than one per row.
  let batch: SheetRow[] = [];
  let rowNumber = 0;
  let failure: unknown = null;
  parser.on('data', (record: string[]) => {
    rowNumber++;
    batch.push({ rowNumber, values: record });
  });
  parser.on('error', (error) => {
    failure = error;
  });
  const ended = new Promise<void>((resolve) => {
    parser.on('end', resolve);
    parser.on('error', () => resolve());
  });
  const check = () => {
    if (failure) {
      const message = failure instanceof Error ? failure.message : String(failure);
      throw badRequest(
        `This CSV file cannot be read near row ${rowNumber + 1} (${message}). Export the log again and retry.`,
      );
    }
    if (rowNumber > MAX_LOG_ROWS) throw tooManyLogRows();
  };
  const feed = async function* (piece: Buffer) {
    parser.write(piece);
    await new Promise((resolve) => setImmediate(resolve));
    check();
    if (batch.length > 0) {
      const out = batch;
      batch = [];
      yield out;
    }
  };
  try {
    for (let at = 0; at < first.length; at += 64 * 1024) yield* feed(first.subarray(at, at + 64 * 1024));
    if (!done) {
      for (;;) {
        const next = await chunks.next();
        if (next.done) break;
        yield* feed(next.value);
      }
    }
    parser.end();
    await ended;
    check();
    if (batch.length > 0) yield batch;
  } finally {
    if (!parser.destroyed) parser.destroy();
  }
}

/** Reads a whole stream into memory up to `limit` bytes (a workbook's zip directory is at its end). */
async function readAll(source: Readable, limit: number, onBytes?: (n: number) => void): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const chunk of capped(source, limit, 'xlsx', onBytes)) parts.push(chunk);
  return Buffer.concat(parts);
}

/** The rows of a workbook's first sheet with any data, in batches of 1,000 (this thread). */
export async function* xlsxRowBatches(bytes: Buffer): AsyncGenerator<SheetRow[]> {
  if (bytes.length === 0) throw badRequest('The file is empty. Choose the log file again.');
  for await (const sheet of readXlsx(bytes, MAX_LOG_ROWS, tooManyLogRows)) {
    let batch: SheetRow[] = [];
    let any = false;
    for await (const row of sheet.rows) {
      any = true;
      batch.push(row);
      if (batch.length >= 1000) {
        yield batch;
        batch = [];
      }
    }
    if (batch.length > 0) yield batch;
    if (any) return;
  }
  throw badRequest('The workbook has no rows. Check that the log is on the first sheet.');
}

/**
 * The rows of an upload's first sheet with any data, in batches: a CSV parsed as it arrives, a workbook
 * read whole (its zip directory is at its end) and then unpacked in a worker thread (xlsx-in-worker.ts).
 */
export async function* logRowBatches(
  kind: 'csv' | 'xlsx',
  source: Readable,
  onBytes?: (n: number) => void,
): AsyncGenerator<SheetRow[]> {
  if (kind === 'csv') {
    yield* csvBatches(source, onBytes);
    return;
  }
  yield* xlsxRowBatchesIsolated(await readAll(source, MAX_XLSX_BYTES, onBytes));
}
