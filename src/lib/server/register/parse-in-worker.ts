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
/** Heap a file may use while it is read; a real 200,000-row register needs a fraction of it. */
const PARSE_HEAP_LIMIT_MB = 1024;

/** What a worker is given. */
export interface ParseJob {
  bytes: ArrayBuffer;
  kind: 'xlsx' | 'csv';
  saved: [string, RegisterField][];
  options: ImportOptions;
  snapshot: EstateSnapshot;
  /** Log how long each step takes (AIRTALLY_IMPORT_TIMINGS). */
  timings: boolean;
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

function runWorker(url: URL, job: ParseJob, tmp: string): Promise<UploadAnalysis> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(url, {
      workerData: job,
      transferList: [job.bytes],
      // The spreadsheet library writes sheets it cannot read yet to temporary files: keep them in a folder
      // of this upload's own, removed afterwards whatever happens.
      env: { TMPDIR: tmp },
      resourceLimits: { maxOldGenerationSizeMb: PARSE_HEAP_LIMIT_MB },
    });
    let settled = false;
    // Answers only once the worker has stopped, so its temporary files can be removed.
    const settle = (outcome: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      void worker.terminate().finally(outcome);
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
      const job: ParseJob = { bytes: copy.buffer, kind, saved: [...saved], options, snapshot, timings };
      return await runWorker(url, job, tmp);
    } finally {
      await rm(tmp, { recursive: true, force: true });
    }
  });
}
