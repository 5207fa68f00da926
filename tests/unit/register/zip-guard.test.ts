import { describe, expect, it } from 'vitest';
import { inspectXlsx } from '../../../src/lib/server/register/zip-guard';
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
