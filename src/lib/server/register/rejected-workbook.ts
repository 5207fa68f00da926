/**
 * The rejected-rows workbook: the rows an import refused, under the file's own header, with a last column saying what
 * to fix. Fixing the cells and uploading the workbook imports them (the "What to fix" column is not a register column,
 * so the import ignores it).
 */
import ExcelJS from 'exceljs';
import type { RejectedRows } from './analyse';
import { guardFormula } from './values';

/** The header of the column that says what to fix in each row. */
export const WHAT_TO_FIX = 'What to fix';

/** Writes the rejected rows as an .xlsx (one sheet named after the file's sheet). */
export async function writeRejectedRowsXlsx(rejected: RejectedRows): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Airtally';
  const sheet = wb.addWorksheet(sheetTitle(rejected.sheetName), { views: [{ state: 'frozen', ySplit: 1 }] });
  const header = [...rejected.header, WHAT_TO_FIX];
  sheet.addRow(header).font = { bold: true };
  for (const row of rejected.rows) {
    const cells = rejected.header.map((_, i) => {
      const v = row.cells[i] ?? null;
      return typeof v === 'string' ? guardFormula(v) : v;
    });
    sheet.addRow([...cells, guardFormula(`Row ${row.row} of the file: ${row.fixes.join(' ')}`)]);
  }
  sheet.columns.forEach((column, i) => {
    column.width = i === header.length - 1 ? 80 : Math.min(30, Math.max(10, (header[i] ?? '').length + 2));
  });
  const fix = sheet.getColumn(header.length);
  fix.alignment = { wrapText: true, vertical: 'top' };
  fix.font = { color: { argb: 'FF9A3412' } };
  return Buffer.from(await wb.xlsx.writeBuffer());
}

/** A worksheet title from the file's sheet name (at most 31 characters, none of Excel's forbidden ones). */
function sheetTitle(name: string): string {
  const clean = name.replace(/[[\]:*?/\\]/g, ' ').trim();
  return (clean || 'Rejected rows').slice(0, 31);
}
