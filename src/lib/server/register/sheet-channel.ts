/**
 * A workbook read in one thread and checked in another (parse-worker.ts), so that the two overlap on two cores. The
 * sheet reader reads the .xlsx with readXlsx (upload guard, exceljs) and sends its rows over a MessagePort in batches;
 * the analyst takes them as the same SheetStreams readXlsx gives, and checks and plans each row as it arrives.
 *
 * - Every message of a reading carries the reading's id, so a late message of an earlier reading (a warm-up's) is
 *   never taken for a later one.
 * - The reader sends at most MAX_BATCHES_AHEAD batches that the analyst has not taken yet: a file read faster than it
 *   is checked waits in the reader, rather than piling up between the threads outside either heap's limit.
 * - An analyst that stops early (it found the register and needs no later sheet) says so, and the reader stops.
 * - The reader says when it has let go of a reading (`ended`), however it ended: until then exceljs may still be using
 *   the reading's folder for temporary files, so the folder must not be removed before (SheetReaderClient.whenIdle).
 * - A batch travels packed (packRows): its numbers and cell kinds in typed arrays handed over whole, its text in one list.
 *   Cloning a thousand small arrays of mixed values cost the reader about twice as much, and the analyst four times.
 */
import type { MessagePort } from 'node:worker_threads';
import { AppError } from '../http/errors';
import { batchesOf, type SheetRow, type SheetStream } from './reader';
import type { CellValue } from './values';

/** Rows sent in one message. */
export const ROWS_PER_BATCH = 1000;
/** Batches the reader may send ahead of the analyst. */
export const MAX_BATCHES_AHEAD = 16;

/** An error as plain data, to cross between threads. */
export interface PlainError {
  status?: number;
  code?: string;
  message: string;
  details?: unknown;
}

/** What the analyst asks of the reader. */
export type ToSheetReader =
  | { read: { id: number; bytes: ArrayBuffer; tmpDir: string | null } }
  | { taken: { id: number } }
  | { stop: { id: number } };

/** What the reader sends back, tagged with the reading's id. */
export type FromSheetReader = { id: number } & (
  | { sheet: string }
  | { rows: PackedRows }
  | { sheetEnd: true }
  | { done: true }
  | { error: PlainError }
  | { ended: true }
);

/** Sheet rows packed to cross between threads (packRows, unpackRows). */
export interface PackedRows {
  rowNumbers: Uint32Array<ArrayBuffer>;
  /** How many cells each row has. */
  widths: Uint16Array<ArrayBuffer>;
  /** Each cell's kind (BLANK, NUMBER, …), row after row. */
  kinds: Uint8Array<ArrayBuffer>;
  /** Each number's value and each date's time (ms since 1970), at the cell's place; 0 for other cells. */
  numbers: Float64Array<ArrayBuffer>;
  /** The text cells' values, in the order of the cells. */
  strings: string[];
}

// The kinds of a packed cell.
const BLANK = 0;
const NUMBER = 1;
const TEXT = 2;
const TRUE = 3;
const FALSE = 4;
const DATE = 5;

export function packRows(rows: readonly SheetRow[]): PackedRows {
  let cells = 0;
  for (const row of rows) cells += row.values.length;
  const packed: PackedRows = {
    rowNumbers: new Uint32Array(rows.length),
    widths: new Uint16Array(rows.length),
    kinds: new Uint8Array(cells),
    numbers: new Float64Array(cells),
    strings: [],
  };
  const { kinds, numbers, strings } = packed;
  let k = 0;
  for (let i = 0; i < rows.length; i++) {
    const { rowNumber, values } = rows[i] as SheetRow;
    packed.rowNumbers[i] = rowNumber;
    packed.widths[i] = values.length;
    for (let c = 0; c < values.length; c++, k++) {
      const value = values[c];
      if (typeof value === 'string') {
        kinds[k] = TEXT;
        strings.push(value);
      } else if (typeof value === 'number') {
        kinds[k] = NUMBER;
        numbers[k] = value;
      } else if (value === null || value === undefined) kinds[k] = BLANK;
      else if (typeof value === 'boolean') kinds[k] = value ? TRUE : FALSE;
      else {
        kinds[k] = DATE;
        numbers[k] = value.getTime();
      }
    }
  }
  return packed;
}

export function unpackRows(packed: PackedRows): SheetRow[] {
  const { kinds, numbers, strings, widths } = packed;
  const rows: SheetRow[] = new Array(widths.length);
  let k = 0;
  let s = 0;
  for (let i = 0; i < widths.length; i++) {
    const values: CellValue[] = new Array(widths[i]);
    for (let c = 0; c < values.length; c++, k++) {
      const kind = kinds[k];
      values[c] =
        kind === TEXT
          ? (strings[s++] as string)
          : kind === NUMBER
            ? (numbers[k] as number)
            : kind === BLANK
              ? null
              : kind === DATE
                ? new Date(numbers[k] as number)
                : kind === TRUE;
    }
    rows[i] = { rowNumber: packed.rowNumbers[i] as number, values };
  }
  return rows;
}

/** The typed arrays' memory, handed over with the message rather than copied. */
const handedOver = (packed: PackedRows) => [
  packed.rowNumbers.buffer,
  packed.widths.buffer,
  packed.kinds.buffer,
  packed.numbers.buffer,
];

export function plainError(error: unknown): PlainError {
  if (error instanceof AppError)
    return { status: error.status, code: error.code, message: error.message, details: error.details };
  return { message: error instanceof Error ? error.message : String(error) };
}

export function errorFromPlain(e: PlainError): Error {
  return e.status
    ? new AppError(e.status, e.code ?? 'bad_request', e.message, e.details ?? null)
    : new Error(e.message);
}

/**
 * Serves readings on `port` (the reader's side): each `read` is read with `read` and its rows sent back in batches.
 * Readings are served one after another, in the order asked. `beforeRead` is told each reading's folder for temporary
 * files.
 */
export function serveSheets(
  port: MessagePort,
  read: (bytes: Buffer) => AsyncIterable<SheetStream>,
  beforeRead: (tmpDir: string) => void = () => {},
): void {
  let current = 0;
  let ahead = 0;
  let stopped = false;
  let wake: (() => void) | null = null;
  const resume = () => {
    const w = wake;
    wake = null;
    w?.();
  };
  let served: Promise<void> = Promise.resolve();

  async function send(id: number, batch: SheetRow[]): Promise<void> {
    while (ahead >= MAX_BATCHES_AHEAD && !stopped) await new Promise<void>((resolve) => (wake = resolve));
    if (stopped) return;
    ahead++;
    const rows = packRows(batch);
    port.postMessage({ id, rows } satisfies FromSheetReader, handedOver(rows));
  }

  async function serve(id: number, bytes: ArrayBuffer, tmpDir: string | null): Promise<void> {
    current = id;
    ahead = 0;
    stopped = false;
    try {
      if (tmpDir) beforeRead(tmpDir);
      for await (const sheet of read(Buffer.from(bytes))) {
        port.postMessage({ id, sheet: sheet.name } satisfies FromSheetReader);
        let batch: SheetRow[] = [];
        for await (const rows of batchesOf(sheet)) {
          for (const row of rows) batch.push(row);
          if (batch.length < ROWS_PER_BATCH) continue;
          await send(id, batch);
          batch = [];
          if (stopped) return;
        }
        if (batch.length > 0) await send(id, batch);
        if (stopped) return;
        port.postMessage({ id, sheetEnd: true } satisfies FromSheetReader);
      }
      port.postMessage({ id, done: true } satisfies FromSheetReader);
    } catch (error) {
      if (!stopped) port.postMessage({ id, error: plainError(error) } satisfies FromSheetReader);
    } finally {
      port.postMessage({ id, ended: true } satisfies FromSheetReader);
    }
  }

  port.on('message', (message: ToSheetReader) => {
    if ('read' in message) {
      const { id, bytes, tmpDir } = message.read;
      served = served.then(() => serve(id, bytes, tmpDir));
    } else if ('taken' in message) {
      if (message.taken.id !== current) return;
      ahead--;
      resume();
    } else if ('stop' in message && message.stop.id === current) {
      stopped = true;
      resume();
    }
  });
}

/** Messages in arrival order, taken one at a time. */
class Inbox<T> {
  private readonly items: T[] = [];
  private waiting: ((item: T) => void) | null = null;
  push(item: T): void {
    const waiting = this.waiting;
    this.waiting = null;
    if (waiting) waiting(item);
    else this.items.push(item);
  }
  next(): Promise<T> {
    const item = this.items.shift();
    return item !== undefined ? Promise.resolve(item) : new Promise((resolve) => (this.waiting = resolve));
  }
}

/** The analyst's side: asks the reader on `port` for readings, one at a time, and takes their sheets. */
export class SheetReaderClient {
  private lastId = 0;
  private current = 0;
  private inbox = new Inbox<FromSheetReader>();
  private lost: PlainError | null = null;
  /** The id of the last reading the reader has let go of. */
  private lastEnded = 0;
  private idleWaiters: (() => void)[] = [];

  constructor(private readonly port: MessagePort) {
    port.on('message', (message: FromSheetReader) => {
      if ('ended' in message) {
        this.lastEnded = Math.max(this.lastEnded, message.id);
        if (this.isIdle) for (const wake of this.idleWaiters.splice(0)) wake();
      } else if (message.id === this.current) this.inbox.push(message);
    });
  }

  /** True once the reader thread is gone. */
  get isLost(): boolean {
    return this.lost !== null;
  }

  private get isIdle(): boolean {
    return this.lost !== null || this.lastEnded === this.lastId;
  }

  /** Resolves once the reader has let go of every reading asked of it (or is gone): its temporary files may then go. */
  whenIdle(): Promise<void> {
    return this.isIdle ? Promise.resolve() : new Promise((resolve) => this.idleWaiters.push(resolve));
  }

  /** The reader thread is gone (`error` says why): the reading under way and any later one fail with it. */
  fail(error: unknown): void {
    if (this.lost) return;
    this.lost = plainError(error);
    if (this.current) this.inbox.push({ id: this.current, error: this.lost });
    for (const wake of this.idleWaiters.splice(0)) wake();
  }

  /** The sheets of the workbook `bytes` (handed over to the reader), read there with `tmpDir` for temporary files. */
  async *read(bytes: ArrayBuffer, tmpDir: string | null): AsyncGenerator<SheetStream> {
    if (this.lost) throw errorFromPlain(this.lost);
    const id = ++this.lastId;
    this.current = id;
    this.inbox = new Inbox();
    const inbox = this.inbox;
    this.port.postMessage({ read: { id, bytes, tmpDir } } satisfies ToSheetReader, [bytes]);
    const take = async () => {
      const message = await inbox.next();
      if ('error' in message) throw errorFromPlain(message.error);
      return message;
    };
    let finished = false;
    // Whether the sheet last given out has had its end taken (by its rows, or below when they were left unread).
    let sheetOpen = false;
    const port = this.port;
    async function* batches(): AsyncGenerator<SheetRow[]> {
      for (;;) {
        const message = await take();
        if ('sheetEnd' in message) {
          sheetOpen = false;
          return;
        }
        if (!('rows' in message)) throw new Error('The sheet reader sent a message out of turn');
        port.postMessage({ taken: { id } } satisfies ToSheetReader);
        yield unpackRows(message.rows);
      }
    }
    async function* rows(): AsyncGenerator<SheetRow> {
      for await (const batch of batches()) yield* batch;
    }
    try {
      for (;;) {
        if (sheetOpen) for await (const _batch of batches());
        const message = await take();
        if ('done' in message) {
          finished = true;
          return;
        }
        if (!('sheet' in message)) throw new Error('The sheet reader sent a message out of turn');
        sheetOpen = true;
        yield { name: message.sheet, rows: rows(), batches: batches() };
      }
    } finally {
      if (!finished) port.postMessage({ stop: { id } } satisfies ToSheetReader);
      if (this.current === id) this.current = 0;
    }
  }
}
