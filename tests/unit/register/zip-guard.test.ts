import JSZip from 'jszip';
import { describe, expect, it } from 'vitest';
import { readXlsx } from '../../../src/lib/server/register/reader';
import { inspectXlsx, worksheetsLast } from '../../../src/lib/server/register/zip-guard';
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

/** The parts' names in the order they lie in the file, by the offsets its table of contents gives. */
function fileOrder(zip: Buffer): string[] {
  const eocd = zip.lastIndexOf(Buffer.from([0x50, 0x4b, 0x05, 0x06]));
  const count = zip.readUInt16LE(eocd + 10);
  let p = zip.readUInt32LE(eocd + 16);
  const parts: { name: string; offset: number }[] = [];
  for (let i = 0; i < count; i++) {
    const nameLength = zip.readUInt16LE(p + 28);
    parts.push({ name: zip.toString('utf8', p + 46, p + 46 + nameLength), offset: zip.readUInt32LE(p + 42) });
    p += 46 + nameLength + zip.readUInt16LE(p + 30) + zip.readUInt16LE(p + 32);
  }
  return parts.sort((a, b) => a.offset - b.offset).map((part) => part.name);
}

/** Every part's unpacked content, read by JSZip (which finds each part through the table of contents). */
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

describe('worksheets moved after the other parts, for the streaming reader', () => {
  const isSheet = (name: string) => name.startsWith('xl/worksheets/sheet');

  it('keeps every part and its content, and a table of contents that points at them', async () => {
    const zip = await tidyRegister([roomRow('Oak Primary', 'R1'), roomRow('Oak Primary', 'R2')]);
    // exceljs writes the sheet before the shared strings (APPNOTE 4.3.6: parts may lie in any order).
    const before = fileOrder(zip);
    expect(before.indexOf(SHEET)).toBeLessThan(before.indexOf('xl/sharedStrings.xml'));

    const moved = worksheetsLast(zip, (await inspectXlsx(zip)).layout);
    const after = fileOrder(moved);
    expect(after.at(-1)).toBe(SHEET);
    expect(after.filter((name) => !isSheet(name))).toEqual(before.filter((name) => !isSheet(name)));
    expect(moved.length).toBe(zip.length);
    expect(await contents(moved)).toEqual(await contents(zip));
    // The guard's own walk through the parts, one after another, agrees with the table of contents.
    const layout = (await inspectXlsx(moved)).layout;
    expect(worksheetsLast(moved, layout)).toBe(moved);
    expect(await rowsOf(moved)).toEqual(await rowsOf(zip));
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
    const moved = worksheetsLast(zip, (await inspectXlsx(zip)).layout);
    expect(fileOrder(moved)).toEqual([...rest.map((p) => p.name), sheet2.name, SHEET]);
    expect(await contents(moved)).toEqual(await contents(zip));
  });
});
