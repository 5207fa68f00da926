import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { AppError, badRequest } from '../http/errors';
import { FILE_READ_SLOTS, findBuiltWorker } from '../workers/built-worker';
import { analyseUpload, type UploadAnalysis } from './analyse';
import type { RegisterField } from './columns';
import type { SavedMappings } from './headers';
import type { EstateSnapshot } from './plan';
import type { ImportOptions } from './register.schemas';

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
export type ParseReply =
  | { ok: true; analysis: UploadAnalysis }
  | { ok: false; error: { status?: number; code?: string; message: string; details?: unknown } };

const tooSlow = () =>
  badRequest(
    `This file took longer than ${PARSE_TIME_LIMIT_MS / 1000} seconds to read, far longer than any room register. Check that it is the register itself (not a file with millions of cells or formatting), save it again as .xlsx or .csv, or split it into smaller files.`,
  );
const tooHungry = () =>
  badRequest(
    'This file needs more memory to read than any room register does. Check that it is the register itself, remove other sheets, pictures and formatting, or split it into smaller files.',
  );

/** A worker thread started for one upload, and what became of it while it waited. */
interface StartedWorker {
  worker: Worker;
  gone: boolean;
}

/**
 * A worker started before the upload it will read, so that loading the reader's modules (about half a second) is done
 * while nobody waits. Each worker still reads one upload only and is stopped afterwards; the next spare is started once
 * an upload is read (not during it, so the two do not share the cores). An idle spare does not keep the process running.
 */
let spare: StartedWorker | null = null;

function startWorker(url: URL): StartedWorker {
  const started: StartedWorker = {
    // None of the app's environment (database address, secrets): the worker's only variable is TMPDIR, set with its job.
    worker: new Worker(url, { env: {}, resourceLimits: { maxOldGenerationSizeMb: PARSE_HEAP_LIMIT_MB } }),
    gone: false,
  };
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

/** The spare worker if it is still sound, else a new one. */
function takeWorker(url: URL): Worker {
  const taken = spare && !spare.gone ? spare : startWorker(url);
  if (spare === taken) spare = null;
  taken.worker.ref();
  return taken.worker;
}

function runWorker(url: URL, job: ParseJob): Promise<UploadAnalysis> {
  return new Promise((resolve, reject) => {
    const worker = takeWorker(url);
    let settled = false;
    // Answers only once the worker has stopped, so its temporary files can be removed.
    const settle = (outcome: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      void worker.terminate().finally(() => {
        if (!spare) spare = startWorker(url);
        outcome();
      });
    };
    const timer = setTimeout(() => settle(() => reject(tooSlow())), PARSE_TIME_LIMIT_MS);
    worker.once('message', (reply: ParseReply) =>
      settle(() => {
        if (reply.ok) return resolve({ ...reply.analysis, rowsGz: Buffer.from(reply.analysis.rowsGz) });
        const e = reply.error;
        reject(
          e.status
            ? new AppError(e.status, e.code ?? 'bad_request', e.message, e.details ?? null)
            : badRequest(e.message),
        );
      }),
    );
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
  return FILE_READ_SLOTS.run(async () => {
    const tmp = await mkdtemp(join(tmpdir(), 'airtally-import-'));
    try {
      const copy = new Uint8Array(bytes.length);
      copy.set(bytes);
      const job: ParseJob = { bytes: copy.buffer, kind, saved: [...saved], options, snapshot, timings, tmpDir: tmp };
      return await runWorker(url, job);
    } finally {
      await rm(tmp, { recursive: true, force: true });
    }
  });
}
