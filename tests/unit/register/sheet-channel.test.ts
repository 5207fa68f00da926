/**
 * A workbook read in one thread and checked in another (sheet-channel.ts, parse-worker.ts). Here both ends run in this
 * thread, joined by a real MessageChannel, so every row still crosses the structured clone the threads use.
 */
import { gunzipSync } from 'node:zlib';
import ExcelJS from 'exceljs';
import { afterEach, describe, expect, it } from 'vitest';
import { MessageChannel, type MessagePort } from 'node:worker_threads';
import { analyseSheets, analyseUpload } from '../../../src/lib/server/register/analyse';
import type { EstateSnapshot } from '../../../src/lib/server/register/plan';
import { readXlsx, type SheetStream } from '../../../src/lib/server/register/reader';
import {
  MAX_BATCHES_AHEAD,
  packRows,
  ROWS_PER_BATCH,
  SheetReaderClient,
  serveSheets,
  unpackRows,
} from '../../../src/lib/server/register/sheet-channel';
import { messyRegister, roomRow, tidyRegister, toBuffer } from './fixtures';

const emptyEstate: EstateSnapshot = { schools: [], blocks: [], rooms: [], defaultClimateRegion: 'midlands' };
const ports: MessagePort[] = [];
afterEach(() => {
  for (const p of ports.splice(0)) p.close();
});

/** A reader served with `read` on one end of a channel, and its client on the other. */
function channel(read: (bytes: Buffer) => AsyncIterable<SheetStream> = (bytes) => readXlsx(bytes)) {
  const { port1, port2 } = new MessageChannel();
  ports.push(port1, port2);
  serveSheets(port2, read);
  return new SheetReaderClient(port1);
}
const handOver = (bytes: Buffer) => new Uint8Array(bytes).slice().buffer;

/** Every sheet's name and rows, as given. */
async function collect(sheets: AsyncIterable<SheetStream>) {
  const out: { name: string; rows: { rowNumber: number; values: unknown[] }[] }[] = [];
  for await (const sheet of sheets) {
    const rows: { rowNumber: number; values: unknown[] }[] = [];
    for await (const row of sheet.rows) rows.push(row);
    out.push({ name: sheet.name, rows });
  }
  return out;
}

/** A workbook of two sheets: `n` rooms with a date, a boolean and blanks, then a sheet of notes. */
async function twoSheets(n: number): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  const rooms = wb.addWorksheet('Rooms');
  rooms.addRow(['School', 'Room code', 'Surveyed', 'Occupied', 'Notes']);
  for (let i = 0; i < n; i++)
    rooms.addRow([
      `School ${i % 3}`,
      `R${i}`,
      new Date(Date.UTC(2026, 0, 1 + (i % 28))),
      i % 2 === 0,
      i % 5 ? null : 'x',
    ]);
  wb.addWorksheet('Notes').addRow(['Surveyed by the estates team']);
  return toBuffer(wb);
}

describe('sheets read in another thread', () => {
  it('arrive as readXlsx gives them: every sheet, row number and cell (dates and booleans too), across many batches', async () => {
    const rowCount = 2 * ROWS_PER_BATCH * MAX_BATCHES_AHEAD + 7;
    const bytes = await twoSheets(rowCount);
    const direct = await collect(readXlsx(bytes));
    const sent = await collect(channel().read(handOver(bytes), null));
    expect(sent).toEqual(direct);
    // The file's own facts, not only agreement with readXlsx: both sheets, every row, a date cell as a date.
    expect(sent.map((s) => s.name)).toEqual(['Rooms', 'Notes']);
    expect(sent[0]?.rows).toHaveLength(rowCount + 1);
    expect(sent[0]?.rows[1]?.values.slice(0, 4)).toEqual(['School 0', 'R0', new Date(Date.UTC(2026, 0, 1)), true]);
  });

  it('give the same analysis as reading in this thread', async () => {
    for (const bytes of [await messyRegister(), await tidyRegister([roomRow('Oak Primary', 'R1')])]) {
      const here = await analyseUpload(bytes, 'xlsx', new Map(), {}, emptyEstate);
      const there = await analyseSheets(channel().read(handOver(bytes), null), new Map(), {}, emptyEstate);
      expect({ ...there, rowsGz: gunzipSync(there.rowsGz).toString() }).toEqual({
        ...here,
        rowsGz: gunzipSync(here.rowsGz).toString(),
      });
    }
  });

  it('pass on the reader’s refusal with its status and message', async () => {
    const notAWorkbook = Buffer.from('PK\u0003\u0004 this is not a workbook at all');
    const direct = await collect(readXlsx(notAWorkbook)).catch((e: unknown) => e);
    const sent = await collect(channel().read(handOver(notAWorkbook), null)).catch((e: unknown) => e);
    expect(direct).toMatchObject({ status: 400 });
    expect(sent).toMatchObject({ status: 400, message: (direct as Error).message });
  });

  it('stop the reader when the analyst needs no more, and a later reading gets none of the earlier one’s rows', async () => {
    let finishedEarly = false;
    const client = channel(async function* (bytes) {
      // A source that would go on for ever unless stopped.
      try {
        yield {
          name: bytes.toString(),
          rows: (async function* () {
            for (let n = 1; ; n++) yield { rowNumber: n, values: [bytes.toString(), n] };
          })(),
        };
      } finally {
        finishedEarly = true;
      }
    });
    for await (const sheet of client.read(handOver(Buffer.from('first')), null)) {
      for await (const row of sheet.rows) if (row.rowNumber === 3 * ROWS_PER_BATCH) break;
      break;
    }
    // The next reading is served only once the first has stopped: its rows say whose they are.
    for await (const sheet of client.read(handOver(Buffer.from('second')), null)) {
      expect(sheet.name).toBe('second');
      for await (const row of sheet.rows) {
        expect(row.values[0]).toBe('second');
        if (row.rowNumber === 10) break;
      }
      break;
    }
    expect(finishedEarly).toBe(true);
  });

  it('say when the reader has let go of a reading stopped early, only once its source has closed', async () => {
    // A source whose closing takes a while, as exceljs's does when it has parked a sheet in temporary files: the
    // reading's folder may go only after that.
    let closed = false;
    const client = channel(async function* () {
      try {
        yield {
          name: 'endless',
          rows: (async function* () {
            for (let n = 1; ; n++) yield { rowNumber: n, values: [n] };
          })(),
        };
      } finally {
        await new Promise((resolve) => setTimeout(resolve, 50));
        closed = true;
      }
    });
    for await (const sheet of client.read(handOver(Buffer.from('x')), null)) {
      for await (const row of sheet.rows) if (row.rowNumber === 5) break;
      break;
    }
    await client.whenIdle();
    expect(closed).toBe(true);
  });

  it('fail with the reason when the reader thread is lost', async () => {
    const { port1, port2 } = new MessageChannel();
    ports.push(port1, port2);
    // Nobody serves port2: the reading waits until the reader is declared lost.
    const client = new SheetReaderClient(port1);
    const reading = collect(client.read(handOver(Buffer.from('x')), null));
    client.fail(new Error('out of memory'));
    await expect(reading).rejects.toThrow('out of memory');
    await expect(collect(client.read(handOver(Buffer.from('y')), null))).rejects.toThrow('out of memory');
  });
});

describe('a plan encoded as its rows arrive', () => {
  const roomLines = (gz: Buffer) => gunzipSync(gz).toString().split('\n').slice(1, -1);

  it('holds one COPY line per room to create, in file order, across several gzip members', async () => {
    const rows = Array.from({ length: 12_001 }, (_, i) => roomRow(`School ${i % 4}`, `C${i}`));
    const analysis = await analyseUpload(await tidyRegister(rows), 'xlsx', new Map(), {}, emptyEstate);
    const lines = roomLines(analysis.rowsGz);
    expect(lines).toHaveLength(12_001);
    // The first field of a staged line is the row number: data starts on row 2, under the header.
    expect(lines.map((l) => Number(l.split('\t')[0]))).toEqual(rows.map((_, i) => i + 2));
  });

  it('leaves out a row refused only once every row is known (a repeated room code)', async () => {
    const rows = [roomRow('Oak Primary', 'A1'), roomRow('Oak Primary', 'A2'), roomRow('Oak Primary', 'A1')];
    const analysis = await analyseUpload(await tidyRegister(rows), 'xlsx', new Map(), {}, emptyEstate);
    expect(analysis.summary).toMatchObject({ roomsToCreate: 2, rowsRejected: 1 });
    expect(roomLines(analysis.rowsGz).map((l) => Number(l.split('\t')[0]))).toEqual([2, 3]);
  });
});

describe('rows packed to cross between threads', () => {
  it('come back as they went: every kind of cell, rows of any width, across a real channel', async () => {
    const rows = [
      { rowNumber: 1, values: ['School', 'Pupils', 'Surveyed', 'Listed', ''] },
      { rowNumber: 2, values: ['Oak Primary', 30, new Date('2026-03-09T00:00:00Z'), true, null] },
      { rowNumber: 7, values: [] },
      { rowNumber: 9, values: [null, -0, 1e-300, Number.MAX_VALUE, false, 'naïve café — 10 m²', new Date(Number.NaN)] },
      { rowNumber: 1_048_576, values: [null, null, 'last row of a sheet'] },
    ];
    const packed = packRows(rows);
    const { port1, port2 } = new MessageChannel();
    ports.push(port1, port2);
    const arrived = new Promise<typeof packed>((resolve) => port2.once('message', resolve));
    port1.postMessage(packed, [
      packed.rowNumbers.buffer,
      packed.widths.buffer,
      packed.kinds.buffer,
      packed.numbers.buffer,
    ]);
    const back = unpackRows(await arrived);
    expect(back).toEqual(rows);
    expect(Object.is(back[3]?.values[1], -0)).toBe(true);
    const invalidDate = back[3]?.values[6];
    expect(invalidDate).toBeInstanceOf(Date);
    expect(Number.isNaN((invalidDate as Date).getTime())).toBe(true);
    // Handed over, not copied: the sender's arrays are empty now.
    expect(packed.numbers.length).toBe(0);
  });
});
