import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { badRequest } from '../http/errors';
import { FILE_READ_SLOTS, findBuiltWorker, READER_YOUNG_GENERATION_MB } from '../workers/built-worker';
import { analyseUpload, ownedBuffer, type UploadAnalysis } from './analyse';
import type { RegisterField } from './columns';
import type { SavedMappings } from './headers';
import type { EstateSnapshot } from './plan';
import { sweepStaleFolders, UPLOAD_FOLDER, WARM_UP_FOLDER } from './temp-folders';
import type { ImportOptions } from './register.schemas';
import { errorFromPlain, type PlainError } from './sheet-channel';

/** The file the build emits for parse-worker.ts (see astro.config.mjs). */
const WORKER_FILE = 'register-parse-worker.mjs';
/** Longest a file may take to read; a real 200,000-row register takes a few seconds. */
export const PARSE_TIME_LIMIT_MS = 120_000;
/**
 * Heap a file may use while it is read. A real 200,000-row register needs well under half of it: V8 collects garbage
 * far more often as the heap nears its limit, and at 1 GB a 100,000-row register took about a quarter longer to read
 * (five paired runs here, median 0.80 of the time at 2 GB against 1 GB).
 */
const PARSE_HEAP_LIMIT_MB = 2048;
/**
 * Heap of an .xlsx upload's sheet reader (parse-worker.ts): it holds the workbook's shared strings and styles and the
 * rows in flight, not the rows read, so half the analyst's.
 */
export const SHEET_READER_HEAP_LIMIT_MB = 1024;

/** What a worker is given. */
export interface ParseJob {
  bytes: ArrayBuffer;
  kind: 'xlsx' | 'csv';
  saved: [string, RegisterField][];
  options: ImportOptions;
  snapshot: EstateSnapshot;
  /** Log how long each step takes (AIRTALLY_IMPORT_TIMINGS). */
  timings: boolean;
  /** The folder of this upload's own for the spreadsheet library's temporary files. */
  tmpDir: string;
}

/** What a worker answers: the analysis, or the error as plain data. */
export type ParseReply = { ok: true; analysis: UploadAnalysis } | { ok: false; error: PlainError };

/** Asks a spare to read our own small register first (warm-up.ts), with a folder for its temporary files. */
export interface WarmUpRequest {
  warmUp: { tmpDir: string };
}
/** What a spare says when its warm-up has ended. */
interface WarmedNotice {
  warmed: true;
}

const tooSlow = () =>
  badRequest(
    `This file took longer than ${PARSE_TIME_LIMIT_MS / 1000} seconds to read, far longer than any room register. Check that it is the register itself (not a file with millions of cells or formatting), save it again as .xlsx or .csv, or split it into smaller files.`,
  );
export const tooHungry = () =>
  badRequest(
    'This file needs more memory to read than any room register does. Check that it is the register itself, remove other sheets, pictures and formatting, or split it into smaller files.',
  );

/** A worker thread started for one upload, and what became of it while it waited. */
interface StartedWorker {
  worker: Worker;
  gone: boolean;
}

/**
 * A worker started before the upload it will read, so that loading the reader's modules (about half a second) and a
 * warm-up read of a small register of our own (warm-up.ts) are done while nobody waits. Each worker still reads one
 * upload only and is stopped afterwards; the next spare is started once an upload is read (not during it, so the two do
 * not share the cores). An idle spare does not keep the process running.
 */
let spare: StartedWorker | null = null;

function startWorker(url: URL, warmUp: boolean): StartedWorker {
  const started: StartedWorker = {
    // None of the app's environment (database address, secrets): the worker's only variable is TMPDIR, set with its job.
    worker: new Worker(url, {
      env: {},
      resourceLimits: {
        maxOldGenerationSizeMb: PARSE_HEAP_LIMIT_MB,
        maxYoungGenerationSizeMb: READER_YOUNG_GENERATION_MB,
      },
    }),
    gone: false,
  };
  if (warmUp) warmUpWorker(started);
  // A spare that fails or stops while it waits is not used; whoever holds it then gets the same events.
  started.worker.on('error', () => {
    started.gone = true;
  });
  started.worker.once('exit', () => {
    started.gone = true;
    if (spare === started) spare = null;
  });
  started.worker.unref();
  return started;
}

/** Gives a spare its warm-up, in a temporary folder of its own that is removed when the warm-up ends or the worker stops. */
function warmUpWorker(started: StartedWorker): void {
  void sweepStaleFolders()
    .catch(() => undefined)
    .then(() => mkdtemp(join(tmpdir(), WARM_UP_FOLDER)))
    .then((dir) => {
      let removed = false;
      const remove = () => {
        if (removed) return;
        removed = true;
        started.worker.off('message', onMessage);
        void rm(dir, { recursive: true, force: true });
      };
      const onMessage = (message: unknown) => {
        if ((message as WarmedNotice | null)?.warmed === true) remove();
      };
      started.worker.on('message', onMessage);
      started.worker.once('exit', remove);
      if (started.gone) return remove();
      started.worker.postMessage({ warmUp: { tmpDir: dir } } satisfies WarmUpRequest);
    })
    .catch(() => undefined);
}

/** The spare worker if it is still sound, else a new one (not warmed up: someone is waiting for it). */
function takeWorker(url: URL): Worker {
  const taken = spare && !spare.gone ? spare : startWorker(url, false);
  if (spare === taken) spare = null;
  taken.worker.ref();
  return taken.worker;
}

/**
 * Runs `job` in a worker. `outcome` settles as soon as the worker answers (or fails, or runs out of time); the worker is
 * stopped after that, and `stopped` resolves once it has (its temporary files may then go).
 */
function runWorker(url: URL, job: ParseJob): { outcome: Promise<UploadAnalysis>; stopped: Promise<void> } {
  const worker = takeWorker(url);
  let markStopped = () => {};
  const stopped = new Promise<void>((resolve) => {
    markStopped = resolve;
  });
  const outcome = new Promise<UploadAnalysis>((resolve, reject) => {
    let settled = false;
    // Stopping a worker with a large heap takes tens of milliseconds: nobody waits for it.
    const settle = (outcome: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      outcome();
      void worker.terminate().finally(() => {
        if (!spare) spare = startWorker(url, true);
        markStopped();
      });
    };
    const timer = setTimeout(() => settle(() => reject(tooSlow())), PARSE_TIME_LIMIT_MS);
    worker.on('message', (reply: ParseReply | WarmedNotice) => {
      if ('warmed' in reply) return;
      settle(() => {
        if (reply.ok) return resolve({ ...reply.analysis, rowsGz: Buffer.from(reply.analysis.rowsGz) });
        const e = reply.error;
        // An error we did not expect is still about the file: a 400 that says what went wrong.
        reject(e.status ? errorFromPlain(e) : badRequest(e.message));
      });
    });
    worker.once('error', (error: Error & { code?: string }) =>
      settle(() =>
        reject(
          error.code === 'ERR_WORKER_OUT_OF_MEMORY'
            ? tooHungry()
            : badRequest(`We could not read this file (${error.message}). Save it again as .xlsx or .csv and retry.`),
        ),
      ),
    );
    worker.once('exit', (code) =>
      settle(() => reject(new Error(`The register reader stopped (exit code ${code}) before answering`))),
    );
    worker.postMessage(job, [job.bytes]);
  });
  return { outcome, stopped };
}

/**
 * Analyses a register upload (analyseUpload) off the request thread: in a worker with its own heap limit
 * and a time limit, at most two at once, so one hostile file can neither freeze every other request nor
 * take the server's memory, and its temporary files are removed afterwards. Running from source (no
 * built worker: development, unit tests), it works in this thread.
 */
export async function analyseUploadIsolated(
  bytes: Buffer,
  kind: 'xlsx' | 'csv',
  saved: SavedMappings,
  options: ImportOptions,
  snapshot: EstateSnapshot,
  timings: boolean,
): Promise<UploadAnalysis> {
  const url = findBuiltWorker(WORKER_FILE);
  if (!url) return analyseUpload(bytes, kind, saved, options, snapshot);
  // The slot and the upload's temporary folder are kept until the worker has stopped, after the answer.
  const free = await FILE_READ_SLOTS.take();
  let release = async () => free();
  try {
    const tmp = await mkdtemp(join(tmpdir(), UPLOAD_FOLDER));
    release = () => rm(tmp, { recursive: true, force: true }).finally(free);
    const job: ParseJob = {
      bytes: ownedBuffer([bytes]).buffer,
      kind,
      saved: [...saved],
      options,
      snapshot,
      timings,
      tmpDir: tmp,
    };
    const { outcome, stopped } = runWorker(url, job);
    const releaseNow = release;
    release = async () => {};
    void stopped.then(releaseNow).catch(() => undefined);
    return await outcome;
  } finally {
    await release();
  }
}
