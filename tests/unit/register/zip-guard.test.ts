import JSZip from 'jszip';
import { describe, expect, it } from 'vitest';
import { readXlsx } from '../../../src/lib/server/register/reader';
import { forStreamingReader, inspectXlsx } from '../../../src/lib/server/register/zip-guard';
import { readZip, writeZip } from '../../helpers/zip';
import { roomRow, tidyRegister } from './fixtures';

const SHEET = 'xl/worksheets/sheet1.xml';
/** The guard unpacks a part in pieces of this size (zip-guard.ts, createInflateRaw's chunkSize). */
const PIECE_BYTES = 1024 * 1024;

/**
 * A two-room register whose sheet has `marker` starting `offset` bytes after the first unpacked piece ends, after an
 * XML comment that pads the sheet to there.
 */
async function sheetWith(marker: string, offset: number, where: 'start' | 'end'): Promise<Buffer> {
  const parts = readZip(await tidyRegister([roomRow('Oak Primary', 'R1'), roomRow('Oak Primary', 'R2')]));
  return writeZip(
    parts.map((p) => {
      if (p.name !== SHEET) return p;
      const xml = p.data.toString('utf8');
      const at = where === 'start' ? xml.indexOf('?>') + 2 : xml.lastIndexOf('</worksheet>');
      const padding = PIECE_BYTES + offset - at;
      const filler = `<!--${'a'.repeat(padding - 7)}-->`;
      return { name: SHEET, data: Buffer.from(xml.slice(0, at) + filler + marker + xml.slice(at), 'utf8') };
    }),
  );
}

describe('the upload guard reading a sheet in pieces', () => {
  // A declaration split between two unpacked pieces must be found as surely as one inside a piece.
  it.each([-9, -5, -1, 0, 1, 40])('refuses a document type starting %i bytes from a piece boundary', async (offset) => {
    const zip = await sheetWith('<!DOCTYPE worksheet>', offset, 'start');
    await expect(inspectXlsx(zip)).rejects.toThrow(/declares XML entities or a document type/);
  });

  it.each([-11, -6, -1, 0, 3, 40])(
    'finds merged ranges whose list starts %i bytes from a piece boundary',
    async (offset) => {
      const zip = await sheetWith(
        '<mergeCells count="2"><mergeCell ref="A2:A3"/><mergeCell ref="B4:D9"/></mergeCells>',
        offset,
        'end',
      );
      const facts = await inspectXlsx(zip);
      expect(facts.sheets.get(SHEET)?.merges).toEqual([
        { top: 2, left: 0, bottom: 3, right: 0 },
        { top: 4, left: 1, bottom: 9, right: 3 },
      ]);
    },
  );

  it('reads the declared last row from the head of the sheet', async () => {
    const facts = await inspectXlsx(await tidyRegister([roomRow('Oak Primary', 'R1'), roomRow('Oak Primary', 'R2')]));
    // Header row and two rooms.
    expect(facts.sheets.get(SHEET)?.lastRow).toBe(3);
  });
});

/** The parts in the order they lie in the file (by the offsets its table of contents gives), and how each is stored. */
function fileOrder(zip: Buffer): { name: string; method: number }[] {
  const eocd = zip.lastIndexOf(Buffer.from([0x50, 0x4b, 0x05, 0x06]));
  const count = zip.readUInt16LE(eocd + 10);
  let p = zip.readUInt32LE(eocd + 16);
  const parts: { name: string; method: number; offset: number }[] = [];
  for (let i = 0; i < count; i++) {
    const nameLength = zip.readUInt16LE(p + 28);
    parts.push({
      name: zip.toString('utf8', p + 46, p + 46 + nameLength),
      method: zip.readUInt16LE(p + 10),
      offset: zip.readUInt32LE(p + 42),
    });
    p += 46 + nameLength + zip.readUInt16LE(p + 30) + zip.readUInt16LE(p + 32);
  }
  return parts.sort((a, b) => a.offset - b.offset).map(({ name, method }) => ({ name, method }));
}

/** Every part's unpacked content, read by JSZip (which finds each part through the table of contents, and checks CRCs). */
async function contents(zip: Buffer): Promise<Map<string, string>> {
  const archive = await JSZip.loadAsync(zip, { checkCRC32: true });
  const out = new Map<string, string>();
  for (const [name, file] of Object.entries(archive.files)) out.set(name, await file.async('string'));
  return out;
}

async function rowsOf(zip: Buffer): Promise<unknown[]> {
  const rows: unknown[] = [];
  for await (const sheet of readXlsx(zip)) for await (const row of sheet.rows) rows.push([sheet.name, row]);
  return rows;
}

/** The workbook as forStreamingReader gives it to the spreadsheet library, in one piece. */
async function forReader(zip: Buffer, keepBytes?: number): Promise<Buffer> {
  return Buffer.concat([...forStreamingReader(zip, await inspectXlsx(zip, keepBytes))]);
}

const STORED = 0;
const DEFLATED = 8;

describe('the workbook as the streaming reader gets it', () => {
  const isSheet = (name: string) => name.startsWith('xl/worksheets/sheet');
  const names = (parts: { name: string }[]) => parts.map((p) => p.name);

  it('has its worksheets last and stored unpacked, with every part and a table of contents that points at them', async () => {
    const zip = await tidyRegister([roomRow('Oak Primary', 'R1'), roomRow('Oak Primary', 'R2')]);
    // exceljs writes the sheet deflated, before the shared strings (APPNOTE 4.3.6: parts may lie in any order).
    const before = fileOrder(zip);
    expect(names(before).indexOf(SHEET)).toBeLessThan(names(before).indexOf('xl/sharedStrings.xml'));
    expect(before.find((p) => p.name === SHEET)?.method).toBe(DEFLATED);

    const read = await forReader(zip);
    const after = fileOrder(read);
    expect(after.at(-1)).toEqual({ name: SHEET, method: STORED });
    expect(after.filter((p) => !isSheet(p.name))).toEqual(before.filter((p) => !isSheet(p.name)));
    expect(await contents(read)).toEqual(await contents(zip));
    // The guard's own walk through the parts, one after another, agrees with the table of contents.
    await expect(inspectXlsx(read)).resolves.toBeDefined();
    expect(await rowsOf(read)).toEqual(await rowsOf(zip));
  });

  it('keeps several worksheets in their own order behind the other parts', async () => {
    const parts = readZip(await tidyRegister([roomRow('Oak Primary', 'R1')]));
    const sheet = parts.find((p) => p.name === SHEET);
    if (!sheet) throw new Error('no sheet');
    const sheet2 = { name: 'xl/worksheets/sheet2.xml', data: sheet.data };
    const rest = parts.filter((p) => p !== sheet);
    // sheet2, half the other parts, sheet1, the other half.
    const half = Math.ceil(rest.length / 2);
    const zip = writeZip([sheet2, ...rest.slice(0, half), sheet, ...rest.slice(half)]);
    const read = await forReader(zip);
    expect(names(fileOrder(read))).toEqual([...names(rest), sheet2.name, SHEET]);
    expect(await contents(read)).toEqual(await contents(zip));
  });

  it('leaves a worksheet packed once the unpacked ones kept would pass the limit', async () => {
    const parts = readZip(await tidyRegister([roomRow('Oak Primary', 'R1')]));
    const sheet = parts.find((p) => p.name === SHEET);
    if (!sheet) throw new Error('no sheet');
    const big = {
      name: 'xl/worksheets/sheet2.xml',
      data: Buffer.concat([sheet.data, Buffer.from(`<!--${'x'.repeat(5000)}-->`)]),
    };
    const zip = writeZip([...parts, big]);
    // Room for the first sheet unpacked, not for both.
    const read = await forReader(zip, sheet.data.length + 100);
    expect(fileOrder(read).slice(-2)).toEqual([
      { name: SHEET, method: STORED },
      { name: big.name, method: DEFLATED },
    ]);
    expect(await contents(read)).toEqual(await contents(zip));
  });

  it('reads a zip whose parts carry their sizes after the data, as streamed zips do', async () => {
    const original = await tidyRegister([roomRow('Oak Primary', 'R1'), roomRow('Oak Primary', 'R2')]);
    const archive = await JSZip.loadAsync(original);
    const streamed = await archive.generateAsync({ type: 'nodebuffer', streamFiles: true, compression: 'DEFLATE' });
    // JSZip's streamFiles sets bit 3 (sizes in a data descriptor) on every part (APPNOTE 4.4.4).
    expect(streamed.readUInt16LE(6) & 0x0008).toBe(0x0008);
    const read = await forReader(streamed);
    expect(fileOrder(read).at(-1)).toEqual({ name: SHEET, method: STORED });
    expect(await contents(read)).toEqual(await contents(original));
    expect(await rowsOf(read)).toEqual(await rowsOf(original));
  });
});
