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
 */
import type { MessagePort } from 'node:worker_threads';
import { AppError } from '../http/errors';
import type { SheetRow, SheetStream } from './reader';
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

/** What the reader sends back, tagged with the reading's id. `rows` holds row numbers and cells, one after the other. */
export type FromSheetReader = { id: number } & (
  | { sheet: string }
  | { rows: (number | CellValue[])[] }
  | { sheetEnd: true }
  | { done: true }
  | { error: PlainError }
  | { ended: true }
);

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

  async function send(id: number, rows: (number | CellValue[])[]): Promise<void> {
    while (ahead >= MAX_BATCHES_AHEAD && !stopped) await new Promise<void>((resolve) => (wake = resolve));
    if (stopped) return;
    ahead++;
    port.postMessage({ id, rows } satisfies FromSheetReader);
  }

  async function serve(id: number, bytes: ArrayBuffer, tmpDir: string | null): Promise<void> {
    current = id;
    ahead = 0;
    stopped = false;
    try {
      if (tmpDir) beforeRead(tmpDir);
      for await (const sheet of read(Buffer.from(bytes))) {
        port.postMessage({ id, sheet: sheet.name } satisfies FromSheetReader);
        let batch: (number | CellValue[])[] = [];
        for await (const rows of sheet.batches ?? oneByOne(sheet.rows)) {
          for (const row of rows) batch.push(row.rowNumber, row.values);
          if (batch.length < 2 * ROWS_PER_BATCH) continue;
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

/** Rows one at a time, as batches of one. */
async function* oneByOne(rows: AsyncIterable<SheetRow>): AsyncGenerator<SheetRow[]> {
  for await (const row of rows) yield [row];
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
    async function* rows(): AsyncGenerator<SheetRow> {
      for (;;) {
        const message = await take();
        if ('sheetEnd' in message) {
          sheetOpen = false;
          return;
        }
        if (!('rows' in message)) throw new Error('The sheet reader sent a message out of turn');
        port.postMessage({ taken: { id } } satisfies ToSheetReader);
        const batch = message.rows;
        for (let i = 0; i < batch.length; i += 2)
          yield { rowNumber: batch[i] as number, values: batch[i + 1] as CellValue[] };
      }
    }
    try {
      for (;;) {
        if (sheetOpen) for await (const _row of rows());
        const message = await take();
        if ('done' in message) {
          finished = true;
          return;
        }
        if (!('sheet' in message)) throw new Error('The sheet reader sent a message out of turn');
        sheetOpen = true;
        yield { name: message.sheet, rows: rows() };
      }
    } finally {
      if (!finished) port.postMessage({ stop: { id } } satisfies ToSheetReader);
      if (this.current === id) this.current = 0;
    }
  }
}
