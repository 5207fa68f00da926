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

/** A value for a binary COPY column: null (or undefined, or a number that is not finite) is NULL. */
export type BinaryValue = string | number | boolean | null | undefined;

/** PGCOPY signature, flags and header extension length: the start of every binary COPY stream. */
const BINARY_HEADER = Buffer.from([
  0x50, 0x47, 0x43, 0x4f, 0x50, 0x59, 0x0a, 0xff, 0x0d, 0x0a, 0x00, 0, 0, 0, 0, 0, 0, 0, 0,
]);

/** The fixed-width types: their size, whether the value must be whole, and how it is written (big-endian). */
const FIXED_WIDTH: Partial<
  Record<BinaryColumn, { bytes: number; whole: boolean; write: (buf: Buffer, value: BinaryValue, at: number) => void }>
> = {
  float8: { bytes: 8, whole: false, write: (buf, value, at) => buf.writeDoubleBE(value as number, at) },
  int8: { bytes: 8, whole: true, write: (buf, value, at) => buf.writeBigInt64BE(BigInt(value as number), at) },
  int4: { bytes: 4, whole: true, write: (buf, value, at) => buf.writeInt32BE(value as number, at) },
  int2: { bytes: 2, whole: true, write: (buf, value, at) => buf.writeInt16BE(value as number, at) },
  bool: {
    bytes: 1,
    whole: false,
    write: (buf, value, at) => {
      buf[at] = value ? 1 : 0;
    },
  },
};

/** The hex digit's value, or -1. */
function hexValue(code: number): number {
  if (code >= 48 && code <= 57) return code - 48;
  if (code >= 97 && code <= 102) return code - 87;
  if (code >= 65 && code <= 70) return code - 55;
  return -1;
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
  let buf = Buffer.allocUnsafe(PIECE_BYTES * 2);
  BINARY_HEADER.copy(buf, 0);
  let at = BINARY_HEADER.length;
  const ensure = (bytes: number) => {
    if (at + bytes <= buf.length) return;
    const bigger = Buffer.allocUnsafe(Math.max(buf.length * 2, at + bytes));
    buf.copy(bigger, 0, 0, at);
    buf = bigger;
  };
  for (const item of items) {
    const values = valuesOf(item);
    if (values.length !== columns.length)
      throw new Error(`binary COPY row has ${values.length} values for ${columns.length} columns`);
    ensure(2);
    buf.writeInt16BE(columns.length, at);
    at += 2;
    for (let i = 0; i < columns.length; i += 1) {
      const value = values[i];
      const type = columns[i]!;
      if (value === null || value === undefined || (typeof value === 'number' && !Number.isFinite(value))) {
        ensure(4);
        buf.writeInt32BE(-1, at);
        at += 4;
        continue;
      }
      const fixed = FIXED_WIDTH[type];
      if (fixed) {
        if (fixed.whole && !Number.isSafeInteger(value)) throw new Error(`not an integer: ${value}`);
        ensure(4 + fixed.bytes);
        buf.writeInt32BE(fixed.bytes, at);
        fixed.write(buf, value, at + 4);
        at += 4 + fixed.bytes;
        continue;
      }
      switch (type) {
        case 'uuid': {
          const text = value as string;
          ensure(20);
          buf.writeInt32BE(16, at);
          let out = at + 4;
          let high = -1;
          for (let c = 0; c < text.length; c += 1) {
            const code = text.charCodeAt(c);
            if (code === 45) continue; // '-'
            const digit = hexValue(code);
            if (digit < 0 || out >= at + 20) throw new Error(`not a uuid: ${text}`);
            if (high < 0) high = digit;
            else {
              buf[out++] = (high << 4) | digit;
              high = -1;
            }
          }
          if (out !== at + 20 || high >= 0) throw new Error(`not a uuid: ${text}`);
          at += 20;
          break;
        }
        case 'text': {
          const text = String(value);
          const bytes = Buffer.byteLength(text);
          ensure(4 + bytes);
          buf.writeInt32BE(bytes, at);
          buf.write(text, at + 4, bytes, 'utf8');
          at += 4 + bytes;
          break;
        }
      }
    }
    if (at >= PIECE_BYTES) {
      yield buf.subarray(0, at);
      buf = Buffer.allocUnsafe(PIECE_BYTES * 2);
      at = 0;
    }
  }
  ensure(2);
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
