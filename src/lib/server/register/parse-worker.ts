/**
 * Reads one register upload in a worker thread (see parse-in-worker.ts): the build emits this module as
 * dist/server/register-parse-worker.mjs. It receives the file in `workerData` and posts back what
 * readRegisterFile made of it, or the error as plain data.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { AppError } from '../http/errors';
import { readRegisterFile } from './parse';
import type { ParseJob, ParseReply } from './parse-in-worker';

async function work(job: ParseJob): Promise<ParseReply> {
  try {
    const file = await readRegisterFile(Buffer.from(job.bytes), job.kind, new Map(job.saved), job.options);
    return { ok: true, file };
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
  void work(workerData as ParseJob).then((reply) => port.postMessage(reply));
}
