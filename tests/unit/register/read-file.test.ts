import { describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import { deflateRawSync } from 'node:zlib';
import { readRegisterFile, readRegisterSheets } from '../../../src/lib/server/register/parse';
import { planImport, type EstateSnapshot } from '../../../src/lib/server/register/plan';
import { readZip, writeZip } from '../../helpers/zip';
import { MESSY_EXPECTED, messyRegister, roomRow, semicolonCsv, tidyRegister, toBuffer, trustSurvey } from './fixtures';

const emptyEstate: EstateSnapshot = { schools: [], blocks: [], rooms: [], defaultClimateRegion: 'midlands' };

async function preview(buf: Buffer, kind: 'xlsx' | 'csv' = 'xlsx', estate = emptyEstate) {
  const file = await readRegisterFile(buf, kind, new Map());
  return { file, plan: planImport(file.read, file.header.columns, estate) };
}

describe('reading a messy survey spreadsheet', () => {
  it('finds the two-row header under the title and maps every column it knows', async () => {
    const { file } = await preview(await messyRegister());
    expect(file.header.row).toBe(3);
    expect(file.header.rowCount).toBe(2);
    const byHeader = Object.fromEntries(file.header.columns.map((c) => [c.header, c.field]));
    expect(byHeader).toMatchObject({
      Site: 'school',
      Building: 'block',
      Room: 'code',
      Description: 'name',
      GIA: 'floorAreaM2',
      Height: 'ceilingHeightM',
      'No. of pupils': 'pupils',
      Facing: 'orientationDeg',
      'Window area': 'glazingAreaM2',
      'Free area': 'openableAreaM2',
      'Vent. type': 'ventilationType',
      Usage: 'use',
      Built: 'yearBuilt',
      Comments: 'notes',
      Phase: 'schoolPhase',
    });
    expect(file.header.columns.find((c) => c.header === 'Survey ref')?.field).toBeNull();
  });

  it('accepts the good rows, rejects the bad ones by row and column, and skips the subtotal', async () => {
    const { plan } = await preview(await messyRegister());
    expect(plan.roomWrites.map((w) => w.fields.code).sort()).toEqual([...MESSY_EXPECTED.accepted].sort());
    const errors = plan.problems.filter((p) => p.severity === 'error');
    for (const [row, column] of Object.entries(MESSY_EXPECTED.rejected)) {
      expect(
        errors.some((p) => p.row === Number(row) && p.column === column),
        `row ${row} column ${column}`,
      ).toBe(true);
    }
    expect(new Set(errors.map((p) => p.row))).toEqual(new Set(Object.keys(MESSY_EXPECTED.rejected).map(Number)));
    const warnings = plan.problems.filter((p) => p.severity === 'warning');
    for (const [row, column] of Object.entries(MESSY_EXPECTED.warnings)) {
      expect(
        warnings.some((p) => p.row === Number(row) && p.column === column),
        `warning row ${row}`,
      ).toBe(true);
    }
    expect(plan.summary).toMatchObject({
      rowsSkipped: MESSY_EXPECTED.skipped,
      rowsRejected: 5,
      roomsToCreate: 5,
      schoolsToCreate: 1,
      blocksToCreate: 2,
    });
  });

  it('normalises each kind of messy value', async () => {
    const { plan } = await preview(await messyRegister());
    const room = (code: string) => plan.roomWrites.find((w) => w.fields.code === code)?.fields;
    expect(room('G01')).toMatchObject({
      name: 'Year 1 classroom',
      floorAreaM2: 55,
      ceilingHeightM: 2.7,
      orientationDeg: 225,
      glazingAreaM2: 6.6,
      ventilationType: 'natural_single_sided',
      // Blank in the file: stored as unknown (the engine takes the school phase's age group and says so).
      ageGroup: null,
    });
    expect(room('G02')).toMatchObject({
      name: 'Year 2 classroom',
      pupils: 28,
      orientationDeg: 225,
      notes: '=HYPERLINK("x")',
    });
    expect(room('H14')).toMatchObject({ ceilingHeightM: 5.2, orientationDeg: 180, ventilationType: 'natural_cross' });
    expect(room('H15')).toMatchObject({ ventilationType: 'heat_recovery_unit', orientationDeg: 90 });
    expect(room('K16')).toMatchObject({
      floorAreaM2: 12.5,
      ceilingHeightM: 2.7,
      use: 'office',
      ventilationType: 'mechanical_extract',
      notes: null,
    });
    // The merged school and block cells apply to rows 6 and 7; the serial 23743 is a date in 1965.
    expect(plan.roomWrites.find((w) => w.fields.code === 'G02')?.school).toEqual({ newKey: 'fernhill primary' });
    expect(plan.newBlocks.find((b) => b.name === 'Main')?.yearBuilt).toBe(1965);
    expect(plan.newSchools).toEqual([
      expect.objectContaining({
        key: 'fernhill primary',
        name: 'Fernhill Primary',
        phase: 'primary',
        phaseSource: 'file',
        climateRegion: 'midlands',
        regionSource: 'default',
      }),
    ]);
  });

  it('reads a semicolon CSV with a BOM, decimal commas and a quoted line break', async () => {
    const { plan } = await preview(semicolonCsv(), 'csv');
    expect(plan.summary.rowsRejected).toBe(0);
    expect(plan.roomWrites.map((w) => w.fields)).toMatchObject([
      {
        code: 'C1',
        name: 'Art room; "messy" upstairs',
        floorAreaM2: 62.5,
        ceilingHeightM: 2.9,
        ventilationType: 'heat_recovery_unit',
        orientationDeg: 135,
        openableAreaM2: 1.25,
      },
      { code: 'C2', name: 'Library', floorAreaM2: 80, orientationDeg: 135, ventilationType: 'natural_single_sided' },
    ]);
  });

  it('compares with the estate: unchanged rooms are not written, changed ones list their changes', async () => {
    const buf = await tidyRegister([roomRow('Oak School', 'A1'), roomRow('Oak School', 'A2', { Pupils: 25 })]);
    const first = await preview(buf);
    const fields = (code: string) => first.plan.roomWrites.find((w) => w.fields.code === code)!.fields;
    const estate: EstateSnapshot = {
      schools: [{ id: 's1', name: 'OAK SCHOOL', phase: 'primary' }],
      blocks: [{ id: 'b1', schoolId: 's1', name: 'Main building', yearBuilt: 1968, airPermeabilityM3hM2: 12 }],
      rooms: [
        { id: 'r1', schoolId: 's1', blockId: 'b1', fields: fields('A1') },
        { id: 'r2', schoolId: 's1', blockId: 'b1', fields: { ...fields('A2'), pupils: 30 } },
        { id: 'r3', schoolId: 's1', blockId: 'b1', fields: { ...fields('A1'), code: 'GONE' } },
      ],
      defaultClimateRegion: 'midlands',
    };
    const { plan } = await preview(buf, 'xlsx', estate);
    expect(plan.summary).toMatchObject({
      roomsUnchanged: 1,
      roomsToChange: 1,
      roomsToCreate: 0,
      schoolsToCreate: 0,
      blocksToCreate: 0,
      roomsMissing: 1,
    });
    expect(plan.roomWrites[0]).toMatchObject({ roomId: 'r2', before: { pupils: 30 }, after: { pupils: 25 } });
    expect(plan.missingRooms).toEqual([{ id: 'r3', schoolName: 'OAK SCHOOL', code: 'GONE', name: 'Room A1' }]);
  });

  it('refuses new schools to a member limited to some schools', async () => {
    const file = await readRegisterFile(await tidyRegister([roomRow('Not Mine School', 'A1')]), 'xlsx', new Map());
    const plan = planImport(file.read, file.header.columns, { ...emptyEstate, canCreateSchools: false });
    expect(plan.summary).toMatchObject({ roomsToCreate: 0, schoolsToCreate: 0, rowsRejected: 1 });
    expect(plan.problems).toContainEqual(
      expect.objectContaining({
        row: 2,
        column: 'School',
        severity: 'error',
        message: expect.stringMatching(/not one of the schools your membership covers/),
      }),
    );
  });

  it('imports the rooms of a new school whose phase no one gave, and says once that the phase was assumed', async () => {
    const { plan } = await preview(
      await tidyRegister([
        roomRow('New School', 'A1', { 'School phase': null }),
        roomRow('New School', 'A2', { 'School phase': null }),
      ]),
    );
    expect(plan.summary.rowsRejected).toBe(0);
    expect(plan.roomWrites).toHaveLength(2);
    const aboutPhase = plan.problems.filter((p) => p.column === 'School phase');
    expect(aboutPhase).toEqual([expect.objectContaining({ row: 2, severity: 'warning' })]);
    expect(aboutPhase[0]?.message).toMatch(/does not say its phase/);
  });

  it('says the sheet’s own name', async () => {
    const { file } = await preview(await messyRegister());
    expect(file.sheetName).toBe('Survey 2026');
  });

  it('says the sheet’s own name when the workbook part comes last and names its sheets by absolute paths', async () => {
    // Some spreadsheet programs write the parts in another order and with absolute relationship targets; the
    // streaming reader then knows the sheets only as "Sheet1", "Sheet2".
    const parts = readZip(await trustSurvey()).map((p) =>
      p.name === 'xl/_rels/workbook.xml.rels'
        ? {
            ...p,
            data: Buffer.from(p.data.toString('utf8').replace(/Target="worksheets\//g, 'Target="/xl/worksheets/')),
          }
        : p,
    );
    const reordered = [
      ...parts.filter((p) => p.name !== 'xl/workbook.xml'),
      ...parts.filter((p) => p.name === 'xl/workbook.xml'),
    ];
    const { file } = await preview(writeZip(reordered));
    expect(file.sheetName).toBe('Autumn survey');
    expect(file.header.row).toBe(3);
  });
});

describe('refusing files that are not sane workbooks', () => {
  const refuses = async (buf: Buffer, message: RegExp) => {
    await expect(readRegisterFile(buf, 'xlsx', new Map())).rejects.toMatchObject({
      status: 400,
      message: expect.stringMatching(message),
    });
  };
  it('refuses a file that is not a zip', () =>
    refuses(Buffer.from('%PDF-1.7 not a workbook'.padEnd(2000, 'x')), /plain text|not a zip/));
  it('refuses a picture renamed .xlsx', () =>
    refuses(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0, 0, 0, 0, 1, 2, 3]), /not a zip-based/));
  it('refuses an old .xls workbook', () =>
    refuses(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, 0]), /old-style \.xls/));
  it('refuses a truncated workbook', async () => {
    const buf = await tidyRegister([roomRow('Oak', 'A1')]);
    await refuses(buf.subarray(0, Math.floor(buf.length * 0.7)), /cut short/);
  });
  it('refuses a zip that holds no workbook', async () => {
    await refuses(zipOf([{ name: 'word/document.xml', data: Buffer.from('<w/>') }]), /holds no Excel workbook/);
  });
  it('refuses a zip entry that inflates past a sane size', async () => {
    const bomb = Buffer.alloc(260 * 1024 * 1024, 0x20);
    await refuses(
      zipOf([
        { name: 'xl/workbook.xml', data: Buffer.from('<workbook/>') },
        { name: 'xl/worksheets/sheet1.xml', data: bomb, declaredSize: 1000 },
      ]),
      /zip bomb/,
    );
  }, 60_000);
  it('refuses a workbook whose sheets hold no register header', async () => {
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Budget').addRow(['Quarter', 'Spend']);
    await expect(readRegisterFile(await toBuffer(wb), 'xlsx', new Map())).rejects.toMatchObject({
      status: 400,
      code: 'header_not_found',
    });
  });
});

/** A minimal zip archive (deflated entries), optionally lying about an entry's unpacked size. */
function zipOf(entries: { name: string; data: Buffer; declaredSize?: number }[]): Buffer {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const e of entries) {
    const name = Buffer.from(e.name);
    const data = deflateRawSync(e.data);
    const size = e.declaredSize ?? e.data.length;
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(8, 8);
    local.writeUInt32LE(data.length, 18);
    local.writeUInt32LE(size, 22);
    local.writeUInt16LE(name.length, 26);
    const central = Buffer.alloc(46);
    central.writeUInt32LE(0x02014b50, 0);
    central.writeUInt16LE(20, 4);
    central.writeUInt16LE(20, 6);
    central.writeUInt16LE(8, 10);
    central.writeUInt32LE(data.length, 20);
    central.writeUInt32LE(size, 24);
    central.writeUInt16LE(name.length, 28);
    central.writeUInt32LE(offset, 42);
    locals.push(local, name, data);
    centrals.push(central, name);
    offset += 30 + name.length + data.length;
  }
  const dir = Buffer.concat(centrals);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(entries.length, 8);
  end.writeUInt16LE(entries.length, 10);
  end.writeUInt32LE(dir.length, 12);
  end.writeUInt32LE(offset, 16);
  return Buffer.concat([...locals, dir, end]);
}

describe('refusing registers that are too long', () => {
  it('refuses more than 200,000 rows with a message saying how to split the file', async () => {
    const lines = ['School,Room code,Floor area (m2),Ceiling height (m)'];
    for (let i = 0; i < 200_100; i++) lines.push(`Oak,R${i},50,2.7`);
    await expect(readRegisterFile(Buffer.from(lines.join('\n')), 'csv', new Map())).rejects.toMatchObject({
      status: 400,
      message: expect.stringMatching(/more than 200,000 rows.*Split/),
    });
  }, 60_000); // 200,100 rows to read: slack for a loaded machine, not a speed check
});

describe('a unit written in the row under the header', () => {
  it('reads "Ceiling height" over "(mm)" as millimetres and does not take the units row for data', async () => {
    const csv = [
      'School,Room code,Ceiling height,Floor area,Pupils',
      ',,(mm),(m²),',
      'Fernhill Primary,G1,2700,52,28',
      'Fernhill Primary,G2,3100,55,30',
    ].join('\n');
    const { file, plan } = await preview(Buffer.from(csv), 'csv');
    expect([file.header.row, file.header.rowCount]).toEqual([1, 2]);
    // 2,700 mm is 2.7 m (1 mm = 0.001 m, SI).
    expect(file.read.rows.map((r) => r.values.ceilingHeightM)).toEqual([2.7, 3.1]);
    // No error anywhere and nothing about row 2: the units row is part of the header, not a room.
    expect(plan.problems.filter((p) => p.severity === 'error')).toEqual([]);
    expect(plan.problems.filter((p) => p.row === 2)).toEqual([]);
    expect(plan.roomWrites.map((w) => w.fields.code)).toEqual(['G1', 'G2']);
  });

  it('still reads a plain one-row header when the next row is data', async () => {
    const csv = ['School,Room code,Ceiling height (mm),Pupils', 'Fernhill Primary,G1,2700,28'].join('\n');
    const { file } = await preview(Buffer.from(csv), 'csv');
    expect([file.header.row, file.header.rowCount]).toEqual([1, 1]);
    expect(file.read.rows.map((r) => r.values.ceilingHeightM)).toEqual([2.7]);
  });
});

describe('reading a sheet that arrives in batches', () => {
  /** A sheet of a title, a header and `count` rooms, given as the reader would: in batches of `size` rows. */
  function sheetInBatches(count: number, size: number) {
    const header = ['School', 'Room code', 'Pupils'];
    const rows = [
      { rowNumber: 1, values: ['Room survey, autumn term'] },
      { rowNumber: 3, values: header },
      ...Array.from({ length: count }, (_, i) => ({
        rowNumber: 4 + i,
        values: ['Oak Primary', `R${i + 1}`, 20 + (i % 10)],
      })),
    ];
    async function* batches() {
      for (let i = 0; i < rows.length; i += size) yield rows.slice(i, i + size);
    }
    async function* one() {
      for await (const batch of batches()) yield* batch;
    }
    return { name: 'Rooms', rows: one(), batches: batches() };
  }

  // Batches smaller than the rows searched for the header, one that ends inside them, and one larger than them all.
  it.each([1, 7, 29, 30, 31, 1000])('reads every room once, in order, from batches of %i rows', async (size) => {
    async function* sheets() {
      yield sheetInBatches(95, size);
    }
    const file = await readRegisterSheets(sheets(), new Map());
    expect(file.header.row).toBe(3);
    expect(file.read.rows.map((r) => r.rowNumber)).toEqual(Array.from({ length: 95 }, (_, i) => 4 + i));
    expect(file.read.rows.map((r) => r.values.code)).toEqual(Array.from({ length: 95 }, (_, i) => `R${i + 1}`));
    expect(file.read.rows[94]?.values.pupils).toBe(24);
  });
});
