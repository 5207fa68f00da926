/**
 * Analyses one register upload in a worker thread (see parse-in-worker.ts): the build emits this module
 * as dist/server/register-parse-worker.mjs. It loads its modules, waits for its one job as a message, and posts back
 * the analysis, or the error as plain data. A spare may first be asked to warm up (warm-up.ts): the job then waits for
 * the warm-up to end.
 *
 * An .xlsx is read in a second thread of its own, the sheet reader (this module again, started by the first with
 * `workerData.role` "sheet-reader"): it runs the upload guard and exceljs and sends the rows over (sheet-channel.ts),
 * while this thread checks and plans each row as it arrives. Reading is most of a preview's work, so on two cores the
 * checks and the plan take little time beyond the reading itself.
 */
import { MessageChannel, type MessagePort, parentPort, Worker, workerData } from 'node:worker_threads';
import { setThreadTempDir } from '../config';
import { badRequest } from '../http/errors';
import { READER_YOUNG_GENERATION_MB } from '../workers/built-worker';
import { analyseSheets, analyseUpload, ownedBuffer } from './analyse';
import {
  type ParseJob,
  type ParseReply,
  SHEET_READER_HEAP_LIMIT_MB,
  tooHungry,
  type WarmUpRequest,
} from './parse-in-worker';
import { readXlsx } from './reader';
import { plainError, serveSheets, SheetReaderClient } from './sheet-channel';
import { warmUpReader } from './warm-up';

/** Starts the sheet reader thread, and the client that asks it for readings. */
function startSheetReader(): SheetReaderClient {
  const { port1, port2 } = new MessageChannel();
  const thread = new Worker(new URL(import.meta.url), {
    workerData: { role: 'sheet-reader', port: port2 },
    transferList: [port2],
    resourceLimits: {
      maxOldGenerationSizeMb: SHEET_READER_HEAP_LIMIT_MB,
      maxYoungGenerationSizeMb: READER_YOUNG_GENERATION_MB,
    },
  });
  const client = new SheetReaderClient(port1);
  thread.on('error', (error: Error & { code?: string }) =>
    client.fail(
      error.code === 'ERR_WORKER_OUT_OF_MEMORY'
        ? tooHungry()
        : badRequest(`We could not read this file (${error.message}). Save it again as .xlsx or .csv and retry.`),
    ),
  );
  thread.once('exit', (code) => client.fail(new Error(`The sheet reader stopped (exit code ${code})`)));
  // This thread's job keeps it alive; the reader on its own does not.
  thread.unref();
  port1.unref();
  return client;
}

function timer(on: boolean): (step: string) => void {
  if (!on) return () => {};
  let last = performance.now();
  return (step) => {
    const now = performance.now();
    console.error(`[preview worker] ${step}: ${((now - last) / 1000).toFixed(2)} s`);
    last = now;
  };
}

async function work(job: ParseJob, sheets: SheetReaderClient): Promise<ParseReply> {
  try {
    const saved = new Map(job.saved);
    const mark = timer(job.timings);
    const analysis =
      job.kind === 'xlsx'
        ? await analyseSheets(sheets.read(job.bytes, job.tmpDir), saved, job.options, job.snapshot, mark)
        : await analyseUpload(Buffer.from(job.bytes), job.kind, saved, job.options, job.snapshot, mark);
    return { ok: true, analysis };
  } catch (error) {
    return { ok: false, error: plainError(error) };
  }
}

const role = (workerData as { role?: string } | null)?.role;
if (role === 'sheet-reader') {
  // The sheet reader: reads what the analyst hands it, each in the folder for temporary files it names.
  serveSheets((workerData as { port: MessagePort }).port, (bytes) => readXlsx(bytes), setThreadTempDir);
} else if (parentPort) {
  const port = parentPort;
  let sheets = startSheetReader();
  let warming: Promise<void> = Promise.resolve();
  let jobTaken = false;
  port.on('message', (message: ParseJob | WarmUpRequest) => {
    if ('warmUp' in message) {
      if (jobTaken) return;
      // The warm-up's temporary files go to a folder of its own, removed once it has ended.
      setThreadTempDir(message.warmUp.tmpDir);
      const tmpDir = message.warmUp.tmpDir;
      warming = warmUpReader((bytes) => sheets.read(ownedBuffer([bytes]).buffer, tmpDir))
        .catch(() => undefined)
        // The warm-up's folder is removed when this says so: not before the sheet reader has let go of it.
        .then(() => sheets.whenIdle())
        .then(() => port.postMessage({ warmed: true }));
      return;
    }
    if (jobTaken) return;
    jobTaken = true;
    const job = message;
    void warming.then(async () => {
      // The spreadsheet library's temporary files go to this upload's own folder.
      setThreadTempDir(job.tmpDir);
      // A sheet reader lost while the spare waited is replaced rather than failing the upload.
      if (sheets.isLost) sheets = startSheetReader();
      const reply = await work(job, sheets);
      const transfer = reply.ok ? [reply.analysis.rowsGz.buffer as ArrayBuffer] : [];
      port.postMessage(reply, transfer);
    });
  });
}
