/**
 * Analyses one register upload in a worker thread (see parse-in-worker.ts): the build emits this module
 * as dist/server/register-parse-worker.mjs. It loads its modules, waits for its one job as a message, and posts back
 * the analysis, or the error as plain data. A spare may first be asked to warm up (warm-up.ts): the job then waits for
 * the warm-up to end.
 */
import { parentPort } from 'node:worker_threads';
import { setThreadTempDir } from '../config';
import { AppError } from '../http/errors';
import { analyseUpload } from './analyse';
import type { ParseJob, ParseReply, WarmUpRequest } from './parse-in-worker';
import { warmUpReader } from './warm-up';

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
  let warming: Promise<void> = Promise.resolve();
  let jobTaken = false;
  port.on('message', (message: ParseJob | WarmUpRequest) => {
    if ('warmUp' in message) {
      if (jobTaken) return;
      // The warm-up's temporary files go to a folder of its own, removed once it has ended.
      setThreadTempDir(message.warmUp.tmpDir);
      warming = warmUpReader()
        .catch(() => undefined)
        .then(() => port.postMessage({ warmed: true }));
      return;
    }
    if (jobTaken) return;
    jobTaken = true;
    const job = message;
    void warming.then(async () => {
      // The spreadsheet library's temporary files go to this upload's own folder.
      setThreadTempDir(job.tmpDir);
      const reply = await work(job);
      const transfer = reply.ok ? [reply.analysis.rowsGz.buffer as ArrayBuffer] : [];
      port.postMessage(reply, transfer);
    });
  });
}
