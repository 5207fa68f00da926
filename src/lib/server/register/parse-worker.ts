/**
 * Analyses one register upload in a worker thread (see parse-in-worker.ts): the build emits this module
 * as dist/server/register-parse-worker.mjs. It loads its modules, waits for its one job as a message, and posts back
 * the analysis, or the error as plain data.
 */
import { parentPort } from 'node:worker_threads';
import { useThreadTempDir } from '../config';
import { AppError } from '../http/errors';
import { analyseUpload } from './analyse';
import type { ParseJob, ParseReply } from './parse-in-worker';

function timer(on: boolean): (step: string) => void {
  if (!on) return () => {};
  let last = performance.now();
  return (step) => {
    const now = performance.now();
    console.error(`[preview worker] ${step}: ${((now - last) / 1000).toFixed(2)} s`);
    last = now;
  };
}

async function work(job: ParseJob): Promise<ParseReply> {
  try {
    const analysis = await analyseUpload(
      Buffer.from(job.bytes),
      job.kind,
      new Map(job.saved),
      job.options,
      job.snapshot,
      timer(job.timings),
    );
    return { ok: true, analysis };
  } catch (error) {
    if (error instanceof AppError)
      return {
        ok: false,
        error: { status: error.status, code: error.code, message: error.message, details: error.details },
      };
    return { ok: false, error: { message: error instanceof Error ? error.message : String(error) } };
  }
}

if (parentPort) {
  const port = parentPort;
  port.once('message', (job: ParseJob) => {
    // The spreadsheet library's temporary files go to this upload's own folder.
    useThreadTempDir(job.tmpDir);
    void work(job).then((reply) => {
      const transfer = reply.ok ? [reply.analysis.rowsGz.buffer as ArrayBuffer] : [];
      port.postMessage(reply, transfer);
    });
  });
}
