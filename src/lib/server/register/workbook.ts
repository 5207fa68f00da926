import { PassThrough, type Readable } from 'node:stream';
import ExcelJS from 'exceljs';
import { label } from '../../engine/vocabulary';
import { limitMessage } from '../../engine/limits';
import { REGISTER_COLUMNS, type RegisterField } from './columns';
import { columnLetter } from './headers';
import { guardFormula } from './values';

/** One register row as the export writes it: every field in our units and codes. */
export type RegisterRecord = Record<RegisterField, string | number | null>;

const LISTS_SHEET = 'Lists';
/** Rows of the Rooms sheet that carry drop-downs and number formats in the template. */
const TEMPLATE_ROWS = 5000;

const GUIDE_INTRO = [
  'Airtally room register',
  'One row per room. Write the school (and block, if you know it) on every row; Airtally matches rooms by school and room code, so importing the same file twice changes nothing.',
  'Units are in the column headers. Numbers may carry their unit ("60 m2", "2.7 m"); decimal commas are fine. Blank cells are allowed where noted; "TBC" is read as blank.',
  'Results built on this register are screening estimates for prioritising rooms, not a ventilation design. Ventilation design and installation must follow local building regulations and school guidance, with a competent, licensed engineer.',
];

function cellFor(field: RegisterField, value: string | number | null): string | number | null {
  if (value === null || value === '') return null;
  const column = REGISTER_COLUMNS.find((c) => c.field === field);
  if (column?.kind === 'enum' && typeof value === 'string') return label(value);
  return typeof value === 'string' ? guardFormula(value) : value;
}

/**
 * Writes the register workbook (Rooms, Guide, Lists sheets) to a stream: the template when
 * `records` is empty, an export otherwise. Streaming, so a 100,000-room export stays small in memory.
 */
export function writeRegisterXlsx(records: Iterable<RegisterRecord>): Readable {
  const out = new PassThrough();
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useStyles: true, useSharedStrings: false });
  wb.creator = 'Airtally';
  void (async () => {
    const rooms = wb.addWorksheet('Rooms', { views: [{ state: 'frozen', ySplit: 1 }] });
    rooms.columns = REGISTER_COLUMNS.map((c) => ({
      header: c.header,
      key: c.field,
      width: c.width,
      ...(c.numFmt ? { style: { numFmt: c.numFmt } } : {}),
    }));
    rooms.getRow(1).font = { bold: true };
    const validations = (rooms as unknown as { dataValidations: { add(address: string, rule: unknown): void } })
      .dataValidations;
    const enumColumns = REGISTER_COLUMNS.map((c, i) => ({ c, i })).filter(({ c }) => c.kind === 'enum');
    enumColumns.forEach(({ c, i }, listIndex) => {
      const letter = columnLetter(i);
      const listLetter = columnLetter(listIndex);
      validations.add(`${letter}2:${letter}${TEMPLATE_ROWS}`, {
        type: 'list',
        allowBlank: true,
        showErrorMessage: true,
        errorStyle: 'warning',
        errorTitle: c.header,
        error: `Pick a value from the list for ${c.header}.`,
        formulae: [`${LISTS_SHEET}!$${listLetter}$2:$${listLetter}$${(c.values?.length ?? 0) + 1}`],
      });
    });
    REGISTER_COLUMNS.forEach((c, i) => {
      const letter = columnLetter(i);
      if (c.kind === 'number' || c.kind === 'integer' || c.kind === 'year') {
        // The field's range from limits.ts, in the sheet's unit (percentages × 100).
        const scale = c.sheetScale ?? 1;
        const limit = c.limit;
        validations.add(`${letter}2:${letter}${TEMPLATE_ROWS}`, {
          type: c.kind === 'number' ? 'decimal' : 'whole',
          operator: limit ? 'between' : 'greaterThanOrEqual',
          allowBlank: true,
          showErrorMessage: true,
          errorStyle: 'warning',
          errorTitle: c.header,
          error: limit ? limitMessage(limit) : `${c.header} should be a number.`,
          formulae: limit ? [limit.min * scale, limit.max * scale] : [0],
        });
      }
    });
    for (const record of records) {
      const row: Record<string, string | number | null> = {};
      for (const c of REGISTER_COLUMNS) row[c.field] = cellFor(c.field, record[c.field]);
      rooms.addRow(row).commit();
    }
    rooms.commit();

    const guide = wb.addWorksheet('Guide');
    guide.columns = [{ width: 34 }, { width: 22 }, { width: 90 }];
    GUIDE_INTRO.forEach((text, i) => {
      const row = guide.addRow([text]);
      if (i === 0) row.font = { bold: true, size: 14 };
      row.commit();
    });
    guide.addRow([]).commit();
    const head = guide.addRow(['Column', 'Unit', 'What to write']);
    head.font = { bold: true };
    head.commit();
    for (const c of REGISTER_COLUMNS) {
      const unit =
        /\(([^)]+)\)/.exec(c.header)?.[1] ??
        (c.kind === 'enum' ? 'from the list' : c.kind === 'orientation' ? 'compass point or degrees' : '');
      const allowed = c.values ? ` Allowed: ${c.values.map(label).join('; ')}.` : '';
      const row = guide.addRow([c.header, unit, c.guide + allowed]);
      row.alignment = { wrapText: true, vertical: 'top' };
      row.commit();
    }
    guide.commit();

    const lists = wb.addWorksheet(LISTS_SHEET, { state: 'hidden' });
    lists.addRow(enumColumns.map(({ c }) => c.header)).commit();
    const longest = Math.max(...enumColumns.map(({ c }) => c.values?.length ?? 0));
    for (let r = 0; r < longest; r++)
      lists
        .addRow(
          enumColumns.map(({ c }) => {
            const v = c.values?.[r];
            return v ? label(v) : null;
          }),
        )
        .commit();
    lists.commit();
    await wb.commit();
  })().catch((error: unknown) => out.destroy(error instanceof Error ? error : new Error(String(error))));
  return out;
}

function csvField(value: string): string {
  return /[",\r\n;]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/** The register as CSV lines (header first), with the same formula guard as the workbook. */
export function* registerCsvLines(records: Iterable<RegisterRecord>): Generator<string> {
  yield `${REGISTER_COLUMNS.map((c) => csvField(c.header)).join(',')}\r\n`;
  for (const record of records) {
    const cells = REGISTER_COLUMNS.map((c) => {
      const v = cellFor(c.field, record[c.field]);
      if (v === null) return '';
      return csvField(typeof v === 'number' ? String(v) : guardFormula(v));
    });
    yield `${cells.join(',')}\r\n`;
  }
}
