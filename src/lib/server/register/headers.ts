import { REGISTER_COLUMNS, type RegisterField } from './columns';
import { cellText, type CellValue } from './values';

// Unit words dropped from a header before matching, so "Floor area (m²)" and "GIA sqm" match.
const UNIT_TOKENS = new Set([
  'm2',
  'm',
  'sqm',
  'sq',
  'mm',
  'cm',
  'ls',
  'l',
  's',
  'lps',
  'm3',
  'h',
  'hr',
  'm3h',
  'pa',
  '50',
  'deg',
  'degrees',
  'ft',
  'ft2',
  'sqft',
  'metres',
  'meters',
  'litres',
  'sec',
  'per',
  'at',
  '50pa',
  'sqmetres2',
  'in',
  'a',
  'the',
  'of',
  'no',
  'number',
  'm3hm2',
  'sqmetres',
]);
const KEEP_NO = new Set(['room no', 'no of pupils', 'no of adults']);

/** A header cell as lower-case words without punctuation ("Floor area (m²)" → "floor area m2"). */
function headerWords(text: string): string {
  return text
    .toLowerCase()
    .replace(/²/g, '2')
    .replace(/³/g, '3')
    .replace(/&/g, ' and ')
    .replace(/[^a-z0-9]+/g, ' ')
    .trim();
}

/** A header reduced to lower-case words, punctuation and units removed ("Floor area (m²)" → "floor area"). */
export function headerKey(header: string): string {
  const words = headerWords(header);
  if (KEEP_NO.has(words)) return words;
  return words
    .split(' ')
    .filter((w) => w && !UNIT_TOKENS.has(w))
    .join(' ');
}

/** The factor a header's unit implies for its column's values ("Ceiling height (mm)" → 0.001). */
export function headerScale(header: string, field: RegisterField): number {
  // The same words as the header key, so "m³/h" reads as m3 h as "m²" reads as m2.
  const words = ` ${headerWords(header)} `;
  if (field === 'ceilingHeightM' && / mm /.test(words)) return 0.001;
  if (field === 'ceilingHeightM' && / cm /.test(words)) return 0.01;
  if (['floorAreaM2', 'glazingAreaM2', 'openableAreaM2'].includes(field) && /( ft2 | sq ft | sqft )/.test(words))
    return 0.09290304;
  if (field === 'mechanicalSupplyLps' && / m3 h /.test(words)) return 1 / 3.6;
  return 1;
}

const SYNONYM_INDEX = new Map<string, RegisterField>();
for (const column of REGISTER_COLUMNS) {
  SYNONYM_INDEX.set(headerKey(column.header), column.field);
  for (const synonym of column.synonyms) SYNONYM_INDEX.set(headerKey(synonym), column.field);
}

/** Header keys the trust has mapped before (header_key → field). */
export type SavedMappings = ReadonlyMap<string, RegisterField>;

/** The field a header means, from the trust's saved mappings first, then our synonyms; null when unknown. */
export function matchHeader(header: string, saved: SavedMappings = new Map()): RegisterField | null {
  const key = headerKey(header);
  if (key === '') return null;
  return saved.get(key) ?? SYNONYM_INDEX.get(key) ?? null;
}

/** One column of the file as detected: its position, its header text and the field it feeds (if any). */
export interface DetectedColumn {
  index: number;
  letter: string;
  header: string;
  headerKey: string;
  field: RegisterField | null;
  /** A two-row header's cells together, when the unit sits in the other cell ("Ceiling height" over "(mm)"). */
  headerCells?: string;
}

/** Where the header sits (1-based row numbers, one or two rows) and how each column maps. */
export interface DetectedHeader {
  row: number;
  rowCount: 1 | 2;
  confident: boolean;
  columns: DetectedColumn[];
}

/** The spreadsheet column letter of a 0-based index (0 → A, 26 → AA). */
export function columnLetter(index: number): string {
  let n = index + 1;
  let letters = '';
  while (n > 0) {
    const r = (n - 1) % 26;
    letters = String.fromCharCode(65 + r) + letters;
    n = Math.floor((n - 1) / 26);
  }
  return letters;
}

function mapColumns(texts: string[][], saved: SavedMappings): DetectedColumn[] {
  const width = Math.max(0, ...texts.map((t) => t.length));
  const columns: DetectedColumn[] = [];
  const used = new Set<RegisterField>();
  for (let index = 0; index < width; index++) {
    const parts = texts.map((t) => t[index] ?? '').filter((p) => p !== '');
    // For two-row headers try the lower cell, the upper cell, then both together ("Floor area" + "(m2)").
    const candidates = parts.length > 1 ? [parts[1] ?? '', parts[0] ?? '', parts.join(' ')] : parts;
    let field: RegisterField | null = null;
    let header = parts.join(' ');
    for (const candidate of candidates) {
      const matched = matchHeader(candidate, saved);
      if (matched && !used.has(matched)) {
        field = matched;
        header = candidate;
        break;
      }
    }
    if (field) used.add(field);
    columns.push({
      index,
      letter: columnLetter(index),
      header,
      headerKey: headerKey(header),
      field,
      ...(parts.length > 1 ? { headerCells: parts.join(' ') } : {}),
    });
  }
  return columns;
}

const score = (columns: DetectedColumn[]) => columns.filter((c) => c.field).length;

/**
 * True for a row of units under a header ("(mm)", "m²", "l/s"): at least one cell, and every cell only unit words.
 * Such a row belongs to the header above it, so its units apply, rather than being read as data.
 */
function isUnitsRow(texts: string[]): boolean {
  const cells = texts.filter((t) => t.trim() !== '');
  if (cells.length === 0) return false;
  return cells.every((t) => {
    const words = headerWords(t);
    return words !== '' && words.split(' ').every((w) => UNIT_TOKENS.has(w));
  });
}

/** How many top rows are searched for the header. */
export const HEADER_SEARCH_ROWS = 30;

/**
 * Finds the header among the first rows: the row (or pair of rows) whose cells match the most
 * register columns. `forcedRow` (1-based) is the user's pick when detection was unsure.
 */
export function detectHeader(
  rows: CellValue[][],
  saved: SavedMappings = new Map(),
  forcedRow?: number,
): DetectedHeader | null {
  const texts = rows.slice(0, HEADER_SEARCH_ROWS).map((r) => r.map((v) => cellText(v)));
  let best: DetectedHeader | null = null;
  let bestScore = -1;
  const consider = (row: number, rowCount: 1 | 2) => {
    const slice = texts.slice(row - 1, row - 1 + rowCount);
    if (slice.length < rowCount) return;
    const columns = mapColumns(slice, saved);
    const s = score(columns);
    // Ties go to the earlier candidate; single rows are tried before pairs, so a pair must score higher, unless its
    // second row is the units of the single row it extends.
    const unitsUnder = rowCount === 2 && best?.row === row && best.rowCount === 1 && isUnitsRow(slice[1] ?? []);
    if (s > bestScore || (s === bestScore && unitsUnder)) {
      best = { row, rowCount, confident: false, columns };
      bestScore = s;
    }
  };
  const rowsToTry = forcedRow !== undefined ? [forcedRow] : texts.map((_, i) => i + 1);
  for (const row of rowsToTry) consider(row, 1);
  for (const row of rowsToTry) consider(row, 2);
  if (!best) return null;
  const found: DetectedHeader = best;
  const fields = new Set(found.columns.map((c) => c.field));
  found.confident = fields.has('school') && fields.has('code') && bestScore >= 4;
  return bestScore === 0 && forcedRow === undefined ? null : found;
}

/** Applies user-chosen fields to columns by letter ({ "H": "floorAreaM2", "K": null }). */
export function applyMapping(
  columns: DetectedColumn[],
  mapping: Record<string, RegisterField | null>,
): DetectedColumn[] {
  const chosen = columns.map((c) => (c.letter in mapping ? { ...c, field: mapping[c.letter] ?? null } : c));
  const seen = new Set<RegisterField>();
  return chosen.map((c) => {
    if (!c.field) return c;
    if (seen.has(c.field)) return { ...c, field: null };
    seen.add(c.field);
    return c;
  });
}
