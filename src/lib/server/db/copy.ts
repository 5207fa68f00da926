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

/** Streams COPY text (strings or bytes) into `copySql` on a client that is already inside a transaction. */
export async function copyLines(
  client: pg.PoolClient,
  copySql: string,
  pieces: Iterable<string | Buffer> | AsyncIterable<string | Buffer>,
): Promise<void> {
  const target = client.query(copyStreams.from(copySql));
  await pipeline(Readable.from(pieces), target);
}
