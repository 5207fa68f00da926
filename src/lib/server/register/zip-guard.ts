import { createInflateRaw, inflateRawSync } from 'node:zlib';
import { badRequest } from '../http/errors';

/** A zip entry as its central directory describes it. */
interface ZipEntry {
  name: string;
  method: number;
  compressedSize: number;
  uncompressedSize: number;
  dataStart: number;
}

/** Largest size any one part of a workbook may unpack to; a real 200,000-row sheet stays well under it. */
export const MAX_ENTRY_BYTES = 256 * 1024 * 1024;

const notXlsx = (why: string) =>
  badRequest(
    `This file is not an Excel workbook we can read: ${why}. Save it from your spreadsheet program as .xlsx (or .csv) and upload it again.`,
  );

function readCentralDirectory(buf: Buffer): ZipEntry[] {
  const min = Math.max(0, buf.length - 65_557);
  let eocd = -1;
  for (let i = buf.length - 22; i >= min; i--) {
    if (buf.readUInt32LE(i) === 0x06054b50) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0)
    throw notXlsx(
      'it seems to be cut short (the end of the zip archive is missing; was the upload or download interrupted?)',
    );
  const count = buf.readUInt16LE(eocd + 10);
  const dirSize = buf.readUInt32LE(eocd + 12);
  const dirOffset = buf.readUInt32LE(eocd + 16);
  if (dirOffset === 0xffffffff || count === 0xffff)
    throw notXlsx('it uses a zip format for very large archives, far larger than a room register');
  if (dirOffset + dirSize > eocd)
    throw notXlsx('it seems to be cut short or damaged (its table of contents points past the end of the file)');
  const entries: ZipEntry[] = [];
  let p = dirOffset;
  for (let n = 0; n < count; n++) {
    if (p + 46 > buf.length || buf.readUInt32LE(p) !== 0x02014b50) throw notXlsx('its table of contents is damaged');
    const method = buf.readUInt16LE(p + 10);
    const compressedSize = buf.readUInt32LE(p + 20);
    const uncompressedSize = buf.readUInt32LE(p + 24);
    const nameLength = buf.readUInt16LE(p + 28);
    const extraLength = buf.readUInt16LE(p + 30);
    const commentLength = buf.readUInt16LE(p + 32);
    const localOffset = buf.readUInt32LE(p + 42);
    const name = buf.toString('utf8', p + 46, p + 46 + nameLength);
    if (localOffset + 30 > buf.length || buf.readUInt32LE(localOffset) !== 0x04034b50)
      throw notXlsx(`the part "${name}" is missing or damaged`);
    const dataStart = localOffset + 30 + buf.readUInt16LE(localOffset + 26) + buf.readUInt16LE(localOffset + 28);
    if (dataStart + compressedSize > buf.length)
      throw notXlsx(`it seems to be cut short (the part "${name}" runs past the end of the file)`);
    entries.push({ name, method, compressedSize, uncompressedSize, dataStart });
    p += 46 + nameLength + extraLength + commentLength;
  }
  return entries;
}

function inflateEntry(buf: Buffer, entry: ZipEntry): Buffer {
  const data = buf.subarray(entry.dataStart, entry.dataStart + entry.compressedSize);
  if (entry.method === 0) return data;
  if (entry.method !== 8) throw notXlsx(`the part "${entry.name}" is compressed in a way Excel files never are`);
  try {
    return inflateRawSync(data, { maxOutputLength: MAX_ENTRY_BYTES });
  } catch (error) {
    if (error instanceof RangeError || (error as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE') {
      throw notXlsx(
        `the part "${entry.name}" unpacks to more than ${MAX_ENTRY_BYTES / 1024 / 1024} MB, far more than any room register (a "zip bomb"?)`,
      );
    }
    throw notXlsx(`the part "${entry.name}" is damaged and cannot be unpacked`);
  }
}

/** A merged range, 1-based rows and 0-based columns, as the sheet's XML lists it. */
export interface MergedRange {
  top: number;
  left: number;
  bottom: number;
  right: number;
}

/** What the guard learned about a workbook that passed: worksheets' merged ranges and row counts. */
export interface WorkbookFacts {
  sheets: Map<string, { merges: MergedRange[]; lastRow: number | null }>;
}

function decodeRef(ref: string): { row: number; col: number } {
  const m = /^([A-Z]+)(\d+)$/.exec(ref);
  if (!m) return { row: 0, col: 0 };
  let col = 0;
  for (const ch of m[1] ?? '') col = col * 26 + (ch.charCodeAt(0) - 64);
  return { row: Number(m[2]), col: col - 1 };
}

function parseMerges(xml: string, merges: MergedRange[]): void {
  for (const m of xml.matchAll(/<mergeCell ref="([A-Z]+\d+):([A-Z]+\d+)"/g)) {
    const a = decodeRef(m[1] ?? '');
    const b = decodeRef(m[2] ?? '');
    merges.push({ top: a.row, left: a.col, bottom: b.row, right: b.col });
  }
}

/**
 * Unpacks a worksheet chunk by chunk (never whole, so memory stays flat), refusing it past
 * MAX_ENTRY_BYTES, and picks out its declared size and merged ranges on the way.
 */
async function sheetFacts(buf: Buffer, entry: ZipEntry): Promise<{ merges: MergedRange[]; lastRow: number | null }> {
  const data = buf.subarray(entry.dataStart, entry.dataStart + entry.compressedSize);
  if (entry.method === 0) {
    const text = data.toString('utf8');
    const merges: MergedRange[] = [];
    parseMerges(text.slice(text.lastIndexOf('<mergeCells')), merges);
    return {
      merges,
      lastRow: Number(/<dimension ref="[A-Z]+\d+:[A-Z]+(\d+)"/.exec(text.slice(0, 4096))?.[1] ?? 0) || null,
    };
  }
  if (entry.method !== 8) throw notXlsx(`the part "${entry.name}" is compressed in a way Excel files never are`);
  return new Promise((resolve, reject) => {
    const inflate = createInflateRaw({ chunkSize: 1024 * 1024 });
    let total = 0;
    let head = '';
    let tail = '';
    let inMerges = false;
    const merges: MergedRange[] = [];
    let carry = Buffer.alloc(0);
    inflate.on('data', (chunk: Buffer) => {
      total += chunk.length;
      if (total > MAX_ENTRY_BYTES) {
        inflate.destroy();
        reject(
          notXlsx(
            `the part "${entry.name}" unpacks to more than ${MAX_ENTRY_BYTES / 1024 / 1024} MB, far more than any room register (a "zip bomb"?)`,
          ),
        );
        return;
      }
      if (head.length < 4096) head += chunk.toString('latin1', 0, 4096);
      // Only text from <mergeCells> on is decoded; the rows before it are counted, not read.
      const bytes = carry.length ? Buffer.concat([carry, chunk]) : chunk;
      if (!inMerges) {
        const at = bytes.indexOf('<mergeCells');
        if (at < 0) {
          carry = Buffer.from(bytes.subarray(Math.max(0, bytes.length - 16)));
          return;
        }
        inMerges = true;
        tail = '';
        carry = Buffer.alloc(0);
        const text = bytes.toString('latin1', at);
        const cut = text.lastIndexOf('>') + 1;
        parseMerges(text.slice(0, cut), merges);
        tail = text.slice(cut);
        return;
      }
      const text = tail + chunk.toString('latin1');
      const cut = text.lastIndexOf('>') + 1;
      parseMerges(text.slice(0, cut), merges);
      tail = text.slice(cut);
    });
    inflate.on('error', () => reject(notXlsx(`the part "${entry.name}" is damaged and cannot be unpacked`)));
    inflate.on('end', () => {
      const dim = /<dimension ref="[A-Z]+\d+:[A-Z]+(\d+)"/.exec(head);
      resolve({ merges, lastRow: dim ? Number(dim[1]) : null });
    });
    inflate.end(data);
  });
}

/**
 * Checks that an upload is a whole, sane .xlsx before the spreadsheet library sees it: a zip,
 * not cut short, every part unpacking within a sane size, and holding a workbook. Reads the
 * merged ranges on the way (the streaming reader does not report them).
 */
export async function inspectXlsx(buf: Buffer): Promise<WorkbookFacts> {
  if (buf.length >= 4 && buf.readUInt32BE(0) === 0xd0cf11e0) {
    throw badRequest(
      'This is an old-style .xls workbook (Excel 97–2003). Open it in your spreadsheet program, save it as .xlsx and upload it again.',
    );
  }
  if (buf.length < 4 || buf.readUInt32LE(0) !== 0x04034b50) {
    const looksLikeText = buf.length > 0 && !buf.subarray(0, 512).includes(0);
    throw notXlsx(
      looksLikeText
        ? 'it contains plain text, not a workbook (if it is a CSV file, give it a .csv name)'
        : 'it is not a zip-based .xlsx file (perhaps a PDF or a picture renamed)',
    );
  }
  const entries = readCentralDirectory(buf);
  if (!entries.some((e) => e.name === 'xl/workbook.xml')) {
    throw notXlsx(
      "it is a zip archive but holds no Excel workbook (perhaps a Word document or another program's file renamed)",
    );
  }
  const sheets = new Map<string, { merges: MergedRange[]; lastRow: number | null }>();
  for (const entry of entries) {
    if (/^xl\/worksheets\/sheet\d+\.xml$/.test(entry.name)) sheets.set(entry.name, await sheetFacts(buf, entry));
    else if (/\.(xml|rels)$/.test(entry.name)) inflateEntry(buf, entry);
  }
  return { sheets };
}
