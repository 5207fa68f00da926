import { pipeline } from 'node:stream/promises';
import { Readable } from 'node:stream';
import type pg from 'pg';
import copyStreams from 'pg-copy-streams';

/** A value in COPY text format: backslash, tab, newline and carriage return escaped; null as \N. */
function copyField(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '\\N';
  if (typeof value === 'boolean') return value ? 't' : 'f';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '\\N';
  // indexOf is several times quicker than a regex test over long text (a result's ~7 kB detail JSON), which has none of these.
  if (
    value.indexOf('\\') === -1 &&
    value.indexOf('\t') === -1 &&
    value.indexOf('\n') === -1 &&
    value.indexOf('\r') === -1
  )
    return value;
  return value.replace(/[\\\t\n\r]/g, (c) => (c === '\\' ? '\\\\' : c === '\t' ? '\\t' : c === '\n' ? '\\n' : '\\r'));
}

/** One row as a line of COPY text. */
export const copyLine = (values: readonly (string | number | boolean | null | undefined)[]): string =>
  `${values.map(copyField).join('\t')}\n`;

/** About how much COPY text goes to the stream at a time. */
const PIECE_BYTES = 256 * 1024;

/**
 * Items as COPY text in pieces of about 256 kB, each line made as the stream asks for it, so the
 * stream handles tens of pieces rather than one per row.
 */
export function* copyPieces<T>(items: Iterable<T>, toLine: (item: T) => string): Generator<string> {
  let batch: string[] = [];
  let length = 0;
  for (const item of items) {
    const line = toLine(item);
    batch.push(line);
    length += line.length;
    if (length >= PIECE_BYTES) {
      yield batch.join('');
      batch = [];
      length = 0;
    }
  }
  if (batch.length > 0) yield batch.join('');
}

/** COPY text already made (bytes) in pieces of 256 kB; a piece may end mid-line, which COPY allows. */
export function* bytePieces(bytes: Buffer): Generator<Buffer> {
  for (let at = 0; at < bytes.length; at += PIECE_BYTES) yield bytes.subarray(at, at + PIECE_BYTES);
}

/** A column's type in PostgreSQL's binary COPY format (the types our bulk writes use). */
export type BinaryColumn = 'uuid' | 'text' | 'int2' | 'int4' | 'int8' | 'float8' | 'bool';

/**
 * A value for a binary COPY column: null (or undefined, or a number that is not finite) is NULL. A uuid may be given as
 * its text or as its 16 bytes.
 */
export type BinaryValue = string | number | boolean | Uint8Array | null | undefined;

/** PGCOPY signature, flags and header extension length: the start of every binary COPY stream. */
const BINARY_HEADER = Buffer.from([
  0x50, 0x47, 0x43, 0x4f, 0x50, 0x59, 0x0a, 0xff, 0x0d, 0x0a, 0x00, 0, 0, 0, 0, 0, 0, 0, 0,
]);

/** Each column type as a small number, so the row loop switches on an integer. */
const TYPE_CODE: Record<BinaryColumn, number> = { uuid: 0, text: 1, int2: 2, int4: 3, int8: 4, float8: 5, bool: 6 };
/** The bytes a value of each fixed-width type takes (uuid 16; text varies). */
const FIXED_BYTES = [16, 0, 2, 4, 8, 8, 1];

/** Each ASCII code's hex digit value, or -1. */
const HEX = new Int8Array(128).fill(-1);
for (let d = 0; d < 16; d += 1) {
  HEX['0123456789abcdef'.charCodeAt(d)] = d;
  HEX['0123456789ABCDEF'.charCodeAt(d)] = d;
}

/** Writes a uuid's 16 bytes at `at` (after its length); throws when the text is not a uuid (8-4-4-4-12 hex digits). */
function writeUuid(buf: Buffer, text: string, at: number): void {
  if (text.length !== 36) throw new Error(`not a uuid: ${text}`);
  let out = at;
  let bad = 0;
  for (let c = 0; c < 36; c += 2) {
    if (c === 8 || c === 13 || c === 18 || c === 23) {
      bad |= text.charCodeAt(c) ^ 45; // '-'
      c -= 1;
      continue;
    }
    const high = HEX[text.charCodeAt(c) & 127]!;
    const low = HEX[text.charCodeAt(c + 1) & 127]!;
    bad |= (high | low) & 0x80;
    bad |= (text.charCodeAt(c) | text.charCodeAt(c + 1)) & 0xff80;
    buf[out++] = (high << 4) | low;
  }
  if (bad !== 0) throw new Error(`not a uuid: ${text}`);
}

/** Writes text as UTF-8 at `at`; returns its byte length. Short ASCII text (codes, labels) is copied byte by byte. */
function writeText(buf: Buffer, text: string, at: number): number {
  if (text.length <= 64) {
    let c = 0;
    for (; c < text.length; c += 1) {
      const code = text.charCodeAt(c);
      if (code > 127) break;
      buf[at + c] = code;
    }
    if (c === text.length) return c;
  }
  return buf.write(text, at, 'utf8');
}

/**
 * Rows in PostgreSQL's binary COPY format, in pieces of about 256 kB (header first, trailer last). Numbers go as
 * 8-byte floats or integers, so neither side formats or parses decimal text: for rows that are mostly numbers, the
 * cheapest way into a table. The types must match the target columns exactly (PostgreSQL checks the lengths).
 */
export function* binaryCopyPieces<T>(
  items: Iterable<T>,
  columns: readonly BinaryColumn[],
  valuesOf: (item: T) => readonly BinaryValue[],
): Generator<Buffer> {
  const codes = columns.map((type) => TYPE_CODE[type]);
  // A row's size but for its texts: field count, and each field's length and fixed-width bytes.
  const fixedRowBytes = 2 + codes.reduce((sum, code) => sum + 4 + FIXED_BYTES[code]!, 0);
  let buf = Buffer.allocUnsafe(PIECE_BYTES * 2);
  BINARY_HEADER.copy(buf, 0);
  let at = BINARY_HEADER.length;
  for (const item of items) {
    const values = valuesOf(item);
    if (values.length !== codes.length)
      throw new Error(`binary COPY row has ${values.length} values for ${codes.length} columns`);
    // Room for the row: its fixed part, and each text at 3 bytes per UTF-16 unit (UTF-8's most).
    let rowBytes = fixedRowBytes;
    for (let i = 0; i < codes.length; i += 1) if (codes[i] === 1) rowBytes += 3 * String(values[i] ?? '').length;
    if (at + rowBytes > buf.length) {
      const bigger = Buffer.allocUnsafe(Math.max(buf.length * 2, at + rowBytes));
      buf.copy(bigger, 0, 0, at);
      buf = bigger;
    }
    buf.writeInt16BE(codes.length, at);
    at += 2;
    for (let i = 0; i < codes.length; i += 1) {
      const value = values[i];
      if (value === null || value === undefined || (typeof value === 'number' && !Number.isFinite(value))) {
        buf.writeInt32BE(-1, at);
        at += 4;
        continue;
      }
      const code = codes[i]!;
      if (code !== 1) buf.writeInt32BE(FIXED_BYTES[code]!, at);
      switch (code) {
        case 0:
          if (typeof value === 'string') writeUuid(buf, value, at + 4);
          else if (value instanceof Uint8Array && value.length === 16) buf.set(value, at + 4);
          else throw new Error(`not a uuid: ${String(value)}`);
          break;
        case 1: {
          const bytes = writeText(buf, String(value), at + 4);
          buf.writeInt32BE(bytes, at);
          at += bytes;
          break;
        }
        case 2:
        case 3:
        case 4:
          if (!Number.isSafeInteger(value)) throw new Error(`not an integer: ${value}`);
          if (code === 2) buf.writeInt16BE(value as number, at + 4);
          else if (code === 3) buf.writeInt32BE(value as number, at + 4);
          else buf.writeBigInt64BE(BigInt(value as number), at + 4);
          break;
        case 5:
          buf.writeDoubleBE(value as number, at + 4);
          break;
        default:
          buf[at + 4] = value ? 1 : 0;
      }
      at += 4 + FIXED_BYTES[code]!;
    }
    if (at >= PIECE_BYTES) {
      yield buf.subarray(0, at);
      buf = Buffer.allocUnsafe(PIECE_BYTES * 2);
      at = 0;
    }
  }
  buf.writeInt16BE(-1, at);
  yield buf.subarray(0, at + 2);
}

/** Columns of a binary COPY: each with its name, its type and its value in an item. */
export type BinaryColumns<T> = readonly (readonly [
  name: string,
  type: BinaryColumn,
  value: (item: T) => BinaryValue,
])[];

/** A binary COPY of `columns`: its statement for a table, and items as its pieces. */
export function binaryCopy<T>(columns: BinaryColumns<T>) {
  const names = columns.map(([name]) => name).join(', ');
  const types = columns.map(([, type]) => type);
  const values = columns.map(([, , value]) => value);
  return {
    sql: (table: string) => `COPY ${table} (${names}) FROM STDIN (FORMAT binary)`,
    pieces: (items: Iterable<T>) => binaryCopyPieces(items, types, (item) => values.map((value) => value(item))),
  };
}

/** Streams COPY text (strings or bytes) into `copySql` on a client that is already inside a transaction. */
export async function copyLines(
  client: pg.PoolClient,
  copySql: string,
  pieces: Iterable<string | Buffer> | AsyncIterable<string | Buffer>,
): Promise<void> {
  const target = client.query(copyStreams.from(copySql));
  await pipeline(Readable.from(pieces), target);
}

/** Each byte's two hex digits as character codes (high digit × 256 + low digit), for uuids read from binary COPY. */
const BYTE_HEX_CODES = Uint16Array.from({ length: 256 }, (_, b) => {
  const hex = b.toString(16).padStart(2, '0');
  return hex.charCodeAt(0) * 256 + hex.charCodeAt(1);
});
/** Where each byte's digits go in a uuid's text. */
const UUID_TEXT_AT = [0, 2, 4, 6, 9, 11, 14, 16, 19, 21, 24, 26, 28, 30, 32, 34];
/** The text of the uuid being read, dashes in place. */
const uuidText = Buffer.from('00000000-0000-0000-0000-000000000000', 'latin1');

/**
 * A uuid's 16 bytes at `at` as its text (8-4-4-4-12 lowercase hex digits, as PostgreSQL writes it). Made in a buffer and
 * read out as one flat string: a string joined from pieces would keep its pieces, 20 objects per uuid kept for the
 * garbage collector to trace (reading 550,000 ids that way took a second more here).
 */
function readUuid(buf: Buffer, at: number): string {
  for (let i = 0; i < 16; i += 1) {
    const codes = BYTE_HEX_CODES[buf[at + i]!]!;
    const to = UUID_TEXT_AT[i]!;
    uuidText[to] = codes >> 8;
    uuidText[to + 1] = codes & 0xff;
  }
  return uuidText.toString('latin1', 0, 36);
}

/**
 * A column type to read from binary COPY: those written, and `uuid-bytes`, a uuid as a view of its 16 bytes in the
 * stream's buffer (valid only until the next batch is asked for: copy it).
 */
export type ReadColumn = BinaryColumn | 'uuid-bytes';
const READ_CODE: Record<ReadColumn, number> = { ...TYPE_CODE, 'uuid-bytes': 7 };
/** FIXED_BYTES, and 16 for uuid-bytes. */
const READ_BYTES = [...FIXED_BYTES, 16];

/**
 * A value read from binary COPY: uuid and text as strings (uuid-bytes as bytes), numbers as numbers, bool as boolean,
 * NULL as null.
 */
export type ReadValue = string | number | boolean | Uint8Array | null;

/**
 * Decodes the whole rows of binary COPY in `buf` from `at`: the rows, where the rest starts (an incomplete row, or
 * what follows the trailer) and whether the trailer was read. Each field's length must be its column type's.
 */
function decodeRows(
  buf: Buffer,
  at: number,
  codes: readonly number[],
): { rows: ReadValue[][]; next: number; done: boolean } {
  const rows: ReadValue[][] = [];
  for (;;) {
    if (at + 2 > buf.length) return { rows, next: at, done: false };
    const fields = buf.readInt16BE(at);
    if (fields === -1) return { rows, next: at + 2, done: true };
    if (fields !== codes.length) throw new Error(`binary COPY row has ${fields} fields for ${codes.length} columns`);
    // The row is decoded only once all of it has arrived.
    let end = at + 2;
    for (let i = 0; i < fields && end <= buf.length; i += 1) {
      if (end + 4 > buf.length) {
        end = buf.length + 1;
        break;
      }
      const length = buf.readInt32BE(end);
      end += 4 + Math.max(length, 0);
    }
    if (end > buf.length) return { rows, next: at, done: false };
    const row: ReadValue[] = new Array(fields);
    let p = at + 2;
    for (let i = 0; i < fields; i += 1) {
      const length = buf.readInt32BE(p);
      p += 4;
      if (length === -1) {
        row[i] = null;
        continue;
      }
      const code = codes[i]!;
      if (code !== 1 && length !== READ_BYTES[code])
        throw new Error(`binary COPY column ${i + 1} has ${length} bytes, not ${READ_BYTES[code]}`);
      switch (code) {
        case 0:
          row[i] = readUuid(buf, p);
          break;
        case 1:
          row[i] = buf.toString('utf8', p, p + length);
          break;
        case 2:
          row[i] = buf.readInt16BE(p);
          break;
        case 3:
          row[i] = buf.readInt32BE(p);
          break;
        case 4:
          row[i] = Number(buf.readBigInt64BE(p));
          break;
        case 5:
          row[i] = buf.readDoubleBE(p);
          break;
        case 6:
          row[i] = buf[p] !== 0;
          break;
        default:
          row[i] = buf.subarray(p, p + 16);
      }
      p += length;
    }
    rows.push(row);
    at = p;
  }
}

/**
 * Rows of `COPY (…) TO STDOUT (FORMAT binary)` on `client`, decoded by `columns` (the query's column types, exactly:
 * cast in the query), in batches as they arrive. For reads of hundreds of thousands of rows of numbers and ids:
 * neither side formats or parses decimal text, and no row object is made per field.
 */
export async function* readBinaryCopy(
  client: pg.PoolClient,
  copySql: string,
  columns: readonly ReadColumn[],
): AsyncGenerator<ReadValue[][]> {
  const codes = columns.map((type) => READ_CODE[type]);
  let pending: Buffer | null = null;
  let started = false;
  let done = false;
  for await (const chunk of client.query(copyStreams.to(copySql)) as AsyncIterable<Buffer>) {
    const buf: Buffer = pending ? Buffer.concat([pending, chunk]) : chunk;
    let at = 0;
    if (!started) {
      if (buf.length < BINARY_HEADER.length) {
        pending = buf;
        continue;
      }
      if (!buf.subarray(0, 11).equals(BINARY_HEADER.subarray(0, 11))) throw new Error('not a binary COPY stream');
      at = BINARY_HEADER.length + buf.readInt32BE(15);
      started = true;
    }
    if (done) throw new Error('binary COPY data after its trailer');
    const decoded = decodeRows(buf, at, codes);
    done = decoded.done;
    pending = decoded.next < buf.length ? buf.subarray(decoded.next) : null;
    if (decoded.rows.length > 0) yield decoded.rows;
  }
  if (!done || pending) throw new Error('binary COPY stream ended before its trailer');
}
