/**
 * A monitor-log workbook unpacked off the request thread: exceljs's reader runs in a worker thread with
 * its own heap limit, hands its rows over in batches (one at a time, as the importer asks for them) and
 * is stopped if it goes quiet for too long, so one hostile workbook can neither freeze other requests
 * nor take the server's memory. Running from source (no built worker), it reads in this thread.
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { AppError, badRequest } from '../http/errors';
import type { SheetRow } from '../register/reader';
import { FILE_READ_SLOTS, findBuiltWorker, READER_YOUNG_GENERATION_MB } from '../workers/built-worker';
import { xlsxRowBatches } from './reader';

/** The file the build emits for xlsx-worker.ts (see astro.config.mjs). */
const WORKER_FILE = 'log-xlsx-worker.mjs';
/** Longest the reader may take for one batch of 1,000 rows (a real log takes milliseconds). */
export const LOG_BATCH_TIME_LIMIT_MS = 60_000;
/** Heap the reader may use: a 100 MB workbook's shared strings and one batch fit well inside it. */
const LOG_READER_HEAP_LIMIT_MB = 1024;

/** What the worker posts: a batch of rows, the end, or the error as plain data. */
export type LogWorkerReply =
  | { kind: 'rows'; rows: SheetRow[] }
  | { kind: 'done' }
  | { kind: 'error'; error: { status?: number; code?: string; message: string; details?: unknown } };

const tooSlow = () =>
  badRequest(
    'This workbook stopped making progress while it was read, which no monitor log does. Check that it is the log itself (not a file with millions of formatted cells), save it again as .xlsx or .csv, or split it by month.',
  );
const tooHungry = () =>
  badRequest(
    'This workbook needs more memory to read than any monitor log does. Remove other sheets, pictures and formatting, save it as .csv, or split it by month.',
  );

/** The next thing the worker says, as a settled promise: a reply, or the error that stopped it. */
function nextReply(worker: Worker): Promise<LogWorkerReply> {
  return new Promise((resolve, reject) => {
    const done = () => {
      clearTimeout(timer);
      worker.off('message', onMessage);
      worker.off('error', onError);
      worker.off('exit', onExit);
    };
    const onMessage = (reply: LogWorkerReply) => {
      done();
      resolve(reply);
    };
    const onError = (error: Error & { code?: string }) => {
      done();
      reject(
        error.code === 'ERR_WORKER_OUT_OF_MEMORY'
          ? tooHungry()
          : badRequest(`We could not read this workbook (${error.message}). Save it again as .xlsx or .csv and retry.`),
      );
    };
    const onExit = (code: number) => {
      done();
      reject(new Error(`The log reader stopped (exit code ${code}) before it finished`));
    };
    const timer = setTimeout(() => {
      done();
      reject(tooSlow());
    }, LOG_BATCH_TIME_LIMIT_MS);
    worker.on('message', onMessage);
    worker.once('error', onError);
    worker.once('exit', onExit);
  });
}

/** The workbook's rows in batches, read in a worker thread (see the module comment). */
export async function* xlsxRowBatchesIsolated(bytes: Buffer): AsyncGenerator<SheetRow[]> {
  const url = findBuiltWorker(WORKER_FILE);
  if (!url) {
    yield* xlsxRowBatches(bytes);
    return;
  }
  const free = await FILE_READ_SLOTS.take();
  const tmp = await mkdtemp(join(tmpdir(), 'airtally-log-'));
  const copy = new Uint8Array(bytes.length);
  copy.set(bytes);
  const worker = new Worker(url, {
    workerData: copy.buffer,
    transferList: [copy.buffer],
    // exceljs may spill sheets to temporary files: a folder of this upload's own, removed afterwards.
    env: { TMPDIR: tmp },
    resourceLimits: {
      maxOldGenerationSizeMb: LOG_READER_HEAP_LIMIT_MB,
      maxYoungGenerationSizeMb: READER_YOUNG_GENERATION_MB,
    },
  });
  try {
    for (;;) {
      const reply = await nextReply(worker);
      if (reply.kind === 'done') return;
      if (reply.kind === 'error') {
        const e = reply.error;
        throw e.status
          ? new AppError(e.status, e.code ?? 'bad_request', e.message, e.details ?? null)
          : badRequest(e.message);
      }
      yield reply.rows;
      worker.postMessage('next');
    }
  } finally {
    await worker.terminate();
    await rm(tmp, { recursive: true, force: true });
    free();
  }
}
