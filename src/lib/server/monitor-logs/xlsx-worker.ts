/**
 * Unpacks one monitor-log workbook in a worker thread (see xlsx-in-worker.ts); the build emits this module
 * as dist/server/log-xlsx-worker.mjs. It receives the workbook's bytes in `workerData`, posts its rows in
 * batches and waits for "next" after each one, so the rows never pile up faster than they are stored.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { AppError } from '../http/errors';
import type { LogWorkerReply } from './xlsx-in-worker';
import { xlsxRowBatches } from './reader';

async function work(port: NonNullable<typeof parentPort>, bytes: ArrayBuffer): Promise<void> {
  const asked = () => new Promise<void>((resolve) => port.once('message', () => resolve()));
  const send = (reply: LogWorkerReply) => port.postMessage(reply);
  try {
    for await (const rows of xlsxRowBatches(Buffer.from(bytes))) {
      const next = asked();
      send({ kind: 'rows', rows });
      await next;
    }
    send({ kind: 'done' });
  } catch (error) {
    send({
      kind: 'error',
      error:
        error instanceof AppError
          ? { status: error.status, code: error.code, message: error.message, details: error.details }
          : { message: error instanceof Error ? error.message : String(error) },
    });
  }
}

if (parentPort) void work(parentPort, workerData as ArrayBuffer);
