// Register files built in test code: a tidy template-shaped file and a deliberately messy survey.
import ExcelJS from 'exceljs';
import { REGISTER_COLUMNS } from '../../../src/lib/server/register/columns';

/** A workbook written to bytes. */
export async function toBuffer(wb: ExcelJS.Workbook): Promise<Buffer> {
  return Buffer.from(await wb.xlsx.writeBuffer());
}

/** A register in the template's layout with `rows` given as header → value objects. */
export async function tidyRegister(rows: Record<string, unknown>[]): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Rooms');
  ws.addRow(REGISTER_COLUMNS.map((c) => c.header));
  for (const r of rows) ws.addRow(REGISTER_COLUMNS.map((c) => (r[c.header] ?? null) as ExcelJS.CellValue));
  return toBuffer(wb);
}

/** One complete, valid template row for `school` and `code`. */
export function roomRow(school: string, code: string, extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    School: school,
    'School phase': 'Primary',
    Block: 'Main building',
    'Year built': 1968,
    'Room code': code,
    'Room name': `Room ${code}`,
    'Room use': 'Classroom',
    'Floor area (m2)': 55,
    'Ceiling height (m)': 2.7,
    Pupils: 30,
    Adults: 2,
    'Age group': 'Primary',
    Orientation: 'S',
    'Glazing area (m2)': 8,
    'Openable area (m2)': 2,
    'Window type': 'Top-hung casement',
    'Ventilation type': 'Natural, single-sided',
    'Mechanical supply (l/s)': null,
    'Air permeability (m3/h.m2 @ 50 Pa)': 12,
    Notes: null,
    ...extra,
  };
}

/**
 * A surveyor's spreadsheet with every mess the import must survive. `expected` lists, per row
 * number, whether the row is accepted, rejected (and in which column) or skipped.
 */
export async function messyRegister(): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Survey 2026');
  ws.getCell('A1').value = 'Fernhill estate survey — rooms';
  ws.mergeCells('A1:F1');
  // Row 2 blank. Rows 3–4: a header over two rows, in another order, with units and synonyms.
  ws.getRow(3).values = [
    'Site',
    'Building',
    'Room',
    '',
    'GIA',
    'Height',
    'No. of pupils',
    'Facing',
    'Window area',
    'Free area',
    'Vent. type',
    'Usage',
    'Built',
    'Comments',
    'Phase',
    'Survey ref',
  ];
  ws.getRow(4).values = ['', '', 'no.', 'Description', '(sqm)', '(m)', '', '', '(m²)', '(m²)', '', '', '', '', '', ''];
  const put = (row: number, values: unknown[]) => {
    ws.getRow(row).values = values as ExcelJS.CellValue[];
  };
  // School and block merged down rows 5–7 (only the top cell holds the value).
  put(5, [
    'Fernhill Primary',
    'Main',
    'G01',
    { richText: [{ text: 'Year 1 ' }, { text: 'classroom', font: { bold: true } }] },
    '55 m2',
    '2,7',
    30,
    'SW',
    { formula: 'E5*0.12', result: 6.6 },
    2,
    'natural - single sided',
    'Classroom',
    1965,
    '',
    'Primary',
    'S-101',
  ]);
  put(6, [
    null,
    null,
    'G02   ',
    { text: 'Year 2 classroom', hyperlink: 'https://survey.example.test/g02' },
    56,
    2.7,
    '28',
    'south-west',
    6,
    2,
    'Natural',
    'classroom',
    23743,
    '=HYPERLINK("x")',
    '',
    'S-102',
  ]);
  put(7, [null, null, 'G03', 'Store', 'TBC', 2.4, 0, 'N', 1, 0, 'natural', 'Other', '', '', '', 'S-103']);
  ws.mergeCells('A5:A7');
  ws.mergeCells('B5:B7');
  // Row 8 blank; row 9 a subtotal line.
  put(9, ['', '', '', 'Subtotal', { formula: 'SUM(E5:E7)', result: 111 }]);
  put(10, ['Fernhill Primary', 'Main', 'G01', 'Duplicate of G01', 50, 2.7, 30, 'S', 6, 2, 'natural', 'Classroom']);
  put(11, ['', 'Main', 'X1', 'No school', 50, 2.7, 30, 'S', 6, 2, 'natural', 'Classroom']);
  put(12, ['Fernhill Primary', 'Main', '', 'No code', 50, 2.7, 30, 'S', 6, 2, 'natural', 'Classroom']);
  put(13, ['Fernhill Primary', 'Main', 'G13', 'Openable too big', 50, 2.7, 30, 'S', 3, 5, 'natural', 'Classroom']);
  put(14, [
    'Fernhill Primary',
    'Hall block',
    'H14',
    'Tall classroom',
    60,
    '5.2 m',
    30,
    180,
    8,
    2,
    'Natural - cross',
    'Classroom',
  ]);
  put(15, ['Fernhill Primary', 'Hall block', 'H15', 'Crowded', 50, 2.7, 60, 'E', 8, 2, 'MVHR', 'Classroom']);
  put(16, [
    '  fernhill   primary ',
    '',
    'K16',
    'Kitchen office',
    '12,5',
    '2700 mm',
    0,
    'East',
    2,
    '1.0',
    'MEV',
    'Office',
    '',
    'TBC',
  ]);
  return toBuffer(wb);
}

/** Expected outcome of each row of messyRegister(): accepted rooms, rejected rows (by column), skipped rows. */
export const MESSY_EXPECTED = {
  accepted: ['G01', 'G02', 'H14', 'H15', 'K16'],
  rejected: { 7: 'GIA', 10: 'Room', 11: 'Site', 12: 'Room', 13: 'Free area' } as Record<number, string>,
  warnings: { 14: 'Height', 15: 'No. of pupils' } as Record<number, string>,
  skipped: 1,
};

/** A CSV export from a European spreadsheet: BOM, semicolons, decimal commas, quoted text with a line break. */
export function semicolonCsv(): Buffer {
  const lines = [
    'School;Room code;Room name;Floor area (m2);Ceiling height (m);Pupils;Ventilation type;Orientation;School phase;Glazing area (m2);Openable area (m2)',
    'Fernhill Primary;C1;"Art room; ""messy""\nupstairs";62,5;2,9;28;MVHR;SE;Primary;7,5;1,25',
    'Fernhill Primary;C2;Library;80;3;0;natural - single sided;135;Primary;9;2',
    ';;;;;;;;;;',
  ];
  return Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(lines.join('\r\n'), 'utf8')]);
}

/**
 * A surveyor's sheet of the kind a new trust brings: two title rows, three schools Airtally does not know and whose
 * phase the sheet never gives (one says it in its name and postcode, one in its name only, one not at all), some bad
 * rows, ventilation left blank on several rows, and notes and a total under the data. `TRUST_SURVEY_EXPECTED` says
 * what the import must make of every row.
 */
export async function trustSurvey(): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.addWorksheet('Read me').addRow(['This workbook lists every teaching room surveyed in the autumn term.']);
  const ws = wb.addWorksheet('Autumn survey');
  ws.addRow(['Northbeck Learning Trust: room survey, autumn term']);
  ws.mergeCells('A1:H1');
  ws.addRow(['Surveyed by the site team']);
  ws.addRow([
    'School',
    'Postcode',
    'Block',
    'Room',
    'Room name',
    'Use',
    'Area (m2)',
    'Height (m)',
    'Pupils',
    'Ventilation',
  ]);
  const rows: (string | number | null)[][] = [
    // 4–7: a high school in Leeds (LS): phase from its name, region from its postcode.
    ['Hartley High School', 'LS6 2AB', 'Main', 'H01', 'Maths 1', 'Classroom', 56, 2.7, 30, 'Natural, single-sided'],
    ['Hartley High School', 'LS6 2AB', 'Main', 'H02', 'Maths 2', 'Classroom', '58 m2', 2.7, 30, null],
    ['Hartley High School', 'LS6 2AB', 'Main', 'H03', 'Science', 'Science lab', 'big', 2.9, 28, null],
    ['Hartley High School', 'LS6 2AB', 'Main', 'H04', 'English', 'Classroom', 52, 2.7, 30, null],
    // 8–10: an infant academy in Manchester (M).
    ['Brookside Infant Academy', 'M14 5RT', 'Infants', 'B01', 'Reception', 'Classroom', 60, 2.6, 30, null],
    ['Brookside Infant Academy', 'M14 5RT', 'Infants', null, 'Year 1', 'Classroom', 55, 2.6, 30, 'Natural, cross-flow'],
    ['Brookside Infant Academy', 'M14 5RT', 'Infants', 'B03', 'Year 2', 'Classroom', 54, 2.6, 30, null],
    // 11–13: an academy whose name and sheet say nothing of its phase or region.
    ['Oakfield Academy', null, 'East', 'O01', 'Room 1', 'Classroom', 50, 2.7, 29, 'Natural, single-sided'],
    ['Oakfield Academy', null, 'East', 'O02', 'Room 2', 'Classroom', 51, 2.7, 29, null],
    ['Oakfield Academy', null, 'East', 'O01', 'Room 1 again', 'Classroom', 50, 2.7, 29, null],
  ];
  for (const r of rows) ws.addRow(r);
  ws.addRow([]);
  ws.addRow(['Total', null, null, null, null, null, 486]);
  ws.addRow(['Notes:']);
  ws.addRow(['Areas are measured on site and rounded to the nearest square metre.']);
  ws.mergeCells('A17:J17');
  ws.addRow([null, null, null, 'Heights to the underside of the ceiling tiles.']);
  return toBuffer(wb);
}

export const TRUST_SURVEY_EXPECTED = {
  sheetName: 'Autumn survey',
  headerRow: 3,
  acceptedRows: [4, 5, 7, 8, 10, 11, 12],
  /** Rejected rows and the column (file header) of their error. */
  rejected: { 6: 'Area (m2)', 9: 'Room', 13: 'Room' } as Record<number, string>,
  /** Rows skipped as notes (the total line on row 15 is skipped as a total). */
  noteRows: [16, 17, 18],
  /** Accepted rows with ventilation blank: rows 5, 8, 10, 12 (row 7 too: H04). */
  ventilationBlankRows: [5, 7, 8, 10, 12],
  newSchools: {
    'Hartley High School': {
      phase: 'secondary',
      phaseSource: 'name',
      climateRegion: 'north_east',
      regionSource: 'postcode',
    },
    'Brookside Infant Academy': {
      phase: 'primary',
      phaseSource: 'name',
      climateRegion: 'north_west',
      regionSource: 'postcode',
    },
    'Oakfield Academy': { phaseSource: 'default', regionSource: 'default' },
  } as Record<string, Record<string, string>>,
};
