import ExcelJS from 'exceljs';
import { describe, expect, it } from 'vitest';
import { REGISTER_COLUMNS } from '../../src/lib/server/register/columns';
import { DEMO_ACCOUNTS, api, signIn } from '../helpers/session';

describe('the register template', () => {
  it('has the Rooms sheet with the headers, a frozen header row, drop-downs for enumerated columns and a Guide sheet', async () => {
    const cookie = await signIn(DEMO_ACCOUNTS.viewer);
    const response = await api('/api/templates/register.xlsx', { cookie });
    expect(response.status).toBe(200);
    expect(response.headers.get('content-type')).toContain('spreadsheetml');
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load((await response.arrayBuffer()) as any);
    const rooms = wb.getWorksheet('Rooms')!;
    expect((rooms.getRow(1).values as unknown[]).slice(1)).toEqual([
      'School',
      'School phase',
      'Block',
      'Year built',
      'Room code',
      'Room name',
      'Room use',
      'Floor area (m2)',
      'Ceiling height (m)',
      'Pupils',
      'Adults',
      'Age group',
      'Orientation',
      'Glazing area (m2)',
      'Openable area (m2)',
      'Window type',
      'Ventilation type',
      'Mechanical supply (l/s)',
      'Air permeability (m3/h.m2 @ 50 Pa)',
      'Glazing g-value',
      'Window frame',
      'Winter window opening (%)',
      'School heating fuel',
      'School fuel price (£/kWh)',
      'School heating efficiency',
      'Block heating fuel',
      'Block fuel price (£/kWh)',
      'Block heating efficiency',
      'Notes',
      'School postcode',
    ]);
    expect(rooms.views[0]).toMatchObject({ state: 'frozen', ySplit: 1 });
    REGISTER_COLUMNS.forEach((c, i) => {
      const cell = rooms.getCell(2, i + 1);
      const validation = cell.dataValidation as { type?: string; formulae?: string[] } | undefined;
      if (c.kind === 'enum') expect(validation?.type, c.header).toBe('list');
      if (c.kind === 'number') expect(validation?.type, c.header).toBe('decimal');
      // Ranges from the one declaration of limits (src/lib/engine/limits.ts), in the sheet's unit.
      if (c.limit)
        expect(validation?.formulae?.map(Number), c.header).toEqual([
          c.limit.min * (c.sheetScale ?? 1),
          c.limit.max * (c.sheetScale ?? 1),
        ]);
      if (c.numFmt) expect(rooms.getColumn(i + 1).numFmt, c.header).toBe(c.numFmt);
    });
    const ventilationList = (rooms.getCell('Q2').dataValidation as { formulae: string[] }).formulae[0]!;
    const [sheetName, range] = ventilationList.split('!');
    const lists = wb.getWorksheet(sheetName!)!;
    const values: unknown[] = [];
    const [from, to] = range!.replace(/\$/g, '').split(':');
    for (let r = Number(from!.slice(1)); r <= Number(to!.slice(1)); r++)
      values.push(lists.getCell(`${from![0]}${r}`).value);
    expect(values).toEqual([
      'Natural, single-sided',
      'Natural, cross-ventilated',
      'Mechanical extract',
      'Mechanical supply and extract',
      'Heat-recovery unit',
      'Hybrid',
    ]);
    const guide = wb.getWorksheet('Guide')!;
    const guideText = guide.getSheetValues().flat().join(' ');
    for (const c of REGISTER_COLUMNS) expect(guideText).toContain(c.header);
    expect(guideText).toMatch(/not a ventilation design/);
  });
});
