/**
 * Where things are in a monitor export: the header row (after any title or device lines), the time column(s),
 * and whether it is long (timestamp, sensor, ppm per row), wide (one CO2 column per sensor) or one file per
 * room (a single CO2 column; the sensor named in a line above the header or by the file name). Extra columns
 * (temperature, humidity, anything else numeric) are kept beside the CO2.
 */
import { badRequest } from '../http/errors';
import { cellText, type CellValue } from '../register/values';
import { detectFormat, joinDateAndTime, type FormatChoice } from './timestamps';

/** A kept column besides CO2. */
export interface ExtraColumn {
  column: number;
  /** Stable key within the file, e.g. 'temperature', 'humidity', 'pm2_5'. */
  key: string;
  label: string;
  kind: 'temperature' | 'humidity' | 'other';
  /** Wide files: the sensor the column belongs to; null in long files (every row's sensor). */
  sensorKey: string | null;
}

/** The detected shape of a log file. */
export interface Layout {
  headerRow: number;
  kind: 'long' | 'wide' | 'single';
  timeColumn: number;
  /** Set when date and time are in two columns. */
  dateColumn: number | null;
  timeFormat: FormatChoice;
  sensorColumn: number | null;
  co2Columns: { column: number; sensorKey: string }[];
  extras: ExtraColumn[];
  /** Columns left out, by header text. */
  ignored: string[];
  /** One file per room: the sensor's name and where it came from. */
  fixedSensor: { key: string; source: 'title_lines' | 'file_name' } | null;
}

const TIME_HEADER =
  /^(date ?\/? ?time|timestamp|time ?stamp|time|datetime|local ?time|utc( time)?|recorded( at)?|reading time|sample time|date and time|zeit|horodatage)\b/i;
const DATE_ONLY = /^date$/i;
const TIME_ONLY = /^time( of day)?$/i;
const CO2_HEADER = /co2|co₂|carbon dioxide|\bppm\b/i;
const SENSOR_HEADER = /sensor|device|monitor|room|location|space|logger|serial|channel|name|unit id|\bid\b/i;
const TEMP_HEADER = /temp|°c|deg ?c\b/i;
const HUMIDITY_HEADER = /humid|\brh\b|%\s*rh|rh\s*%/i;
const TITLE_SENSOR =
  /^(?:device(?: name)?|sensor(?: name)?|monitor(?: name)?|location|room|logger(?: name)?|name|serial(?: number)?)\s*[:=]?\s*(?<value>.*)$/i;

/** Words for what a file should look like, for every layout error. */
const SHAPE_HELP =
  'A monitor log needs a header row with a time column (for example "Timestamp" or "Date" and "Time") and either a CO2 column with a sensor or room column, one CO2 column per sensor, or one CO2 column in a file named after its room.';

const keyOf = (text: string) =>
  text
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_|_$/g, '');

/** The sensor part of a wide CO2 header: "G12 CO2 (ppm)" → "G12". */
function sensorFromHeader(header: string): string {
  return header
    .replace(/\((ppm|°c|%|%rh)\)/gi, '')
    .replace(/co2|co₂|carbon dioxide|\bppm\b|concentration|level/gi, '')
    .replace(/[\s\-_:|/]+$|^[\s\-_:|/]+/g, '')
    .trim();
}

const median = (values: number[]) => {
  const s = [...values].sort((a, b) => a - b);
  return s.length === 0 ? Number.NaN : (s[(s.length - 1) >> 1] as number);
};

/**
 * Detects the layout from the first rows of a sheet (at most 40 rows, header and data). `fileName` names the
 * sensor of a one-room file when no title line does.
 */
export function detectLayout(rows: readonly CellValue[][], fileName: string): Layout {
  const texts = rows.map((r) => r.map((v) => cellText(v)));
  let headerRow = -1;
  for (let r = 0; r < Math.min(texts.length, 30); r++) {
    const cells = texts[r] as string[];
    const hasTime = cells.some((c) => TIME_HEADER.test(c) || DATE_ONLY.test(c));
    const others = cells.filter((c) => c !== '' && !TIME_HEADER.test(c) && !DATE_ONLY.test(c));
    if (hasTime && others.length > 0) {
      headerRow = r;
      break;
    }
  }
  if (headerRow < 0) throw badRequest(`We could not find the header row in the first 30 rows. ${SHAPE_HELP}`);
  const header = texts[headerRow] as string[];
  const data = rows.slice(headerRow + 1).filter((r) => r.some((v) => v !== null && cellText(v) !== ''));
  if (data.length === 0) throw badRequest('The file has a header row but no readings under it.');

  let timeColumn = header.findIndex((c) => TIME_HEADER.test(c) && !TIME_ONLY.test(c));
  let dateColumn: number | null = null;
  const dateIdx = header.findIndex((c) => DATE_ONLY.test(c));
  const timeOnlyIdx = header.findIndex((c) => TIME_ONLY.test(c));
  if (dateIdx >= 0 && timeOnlyIdx >= 0) {
    dateColumn = dateIdx;
    timeColumn = timeOnlyIdx;
  } else if (timeColumn < 0) timeColumn = dateIdx >= 0 ? dateIdx : timeOnlyIdx;
  const sample = data
    .slice(0, 200)
    .map((r) =>
      dateColumn === null ? (r[timeColumn] ?? null) : joinDateAndTime(r[dateColumn] ?? null, r[timeColumn] ?? null),
    );
  const timeFormat = detectFormat(sample);
  if (!timeFormat)
    throw badRequest(
      `The "${header[dateColumn ?? timeColumn]}" column does not hold dates and times we can read (for example "2026-01-05 09:05", "05/01/2026 09:05" or Excel date cells).`,
    );

  const used = new Set<number>([timeColumn, ...(dateColumn === null ? [] : [dateColumn])]);
  const numericShare = (col: number) => {
    let numbers = 0;
    let filled = 0;
    for (const r of data.slice(0, 200)) {
      const v = r[col] ?? null;
      if (v === null || cellText(v) === '') continue;
      filled++;
      if (typeof v === 'number' || /^-?\d+([.,]\d+)?$/.test(cellText(v))) numbers++;
    }
    return filled === 0 ? 0 : numbers / filled;
  };
  const co2Candidates = header
    .map((h, i) => ({ h, i }))
    .filter(({ h, i }) => !used.has(i) && CO2_HEADER.test(h) && !TEMP_HEADER.test(h) && !HUMIDITY_HEADER.test(h));
  const sensorCandidates = header
    .map((h, i) => ({ h, i }))
    .filter(({ h, i }) => !used.has(i) && !CO2_HEADER.test(h) && SENSOR_HEADER.test(h) && numericShare(i) < 0.5);

  let kind: Layout['kind'];
  let co2Columns: Layout['co2Columns'];
  let sensorColumn: number | null = null;
  let fixedSensor: Layout['fixedSensor'] = null;
  if (co2Candidates.length === 1 && sensorCandidates.length > 0) {
    kind = 'long';
    sensorColumn = sensorCandidates[0]!.i;
    co2Columns = [{ column: co2Candidates[0]!.i, sensorKey: '' }];
  } else if (co2Candidates.length === 1) {
    kind = 'single';
    co2Columns = [{ column: co2Candidates[0]!.i, sensorKey: '' }];
    fixedSensor = sensorFromTitleLines(texts.slice(0, headerRow)) ?? {
      key: fileName.replace(/\.[^.]+$/, '').trim() || 'Sensor',
      source: 'file_name',
    };
  } else if (co2Candidates.length > 1) {
    kind = 'wide';
    co2Columns = co2Candidates.map(({ h, i }) => ({ column: i, sensorKey: sensorFromHeader(h) || h }));
  } else {
    // Wide without CO2 in the headers: every numeric column whose readings look like CO2 is a sensor.
    const looksLikeCo2 = header
      .map((h, i) => ({ h, i }))
      .filter(({ h, i }) => {
        if (used.has(i) || h === '' || TEMP_HEADER.test(h) || HUMIDITY_HEADER.test(h) || numericShare(i) < 0.9)
          return false;
        const values = data
          .slice(0, 200)
          .map((r) => Number(cellText(r[i] ?? null).replace(',', '.')))
          .filter(Number.isFinite);
        const m = median(values);
        return m >= 250 && m <= 6000;
      });
    if (looksLikeCo2.length === 0) throw badRequest(`We found the time column but no CO2 readings. ${SHAPE_HELP}`);
    kind = 'wide';
    co2Columns = looksLikeCo2.map(({ h, i }) => ({ column: i, sensorKey: h }));
  }
  for (const c of co2Columns) used.add(c.column);
  if (sensorColumn !== null) used.add(sensorColumn);

  const extras: ExtraColumn[] = [];
  const ignored: string[] = [];
  const sensorKeys = co2Columns.map((c) => c.sensorKey).filter((k) => k !== '');
  header.forEach((h, i) => {
    if (used.has(i) || h === '') return;
    if (numericShare(i) < 0.8) {
      ignored.push(h);
      return;
    }
    const kindOf: ExtraColumn['kind'] = TEMP_HEADER.test(h)
      ? 'temperature'
      : HUMIDITY_HEADER.test(h)
        ? 'humidity'
        : 'other';
    let sensorKey: string | null = null;
    if (kind === 'wide') {
      sensorKey = sensorKeys.find((k) => h.toLowerCase().includes(k.toLowerCase())) ?? null;
      if (sensorKey === null) {
        ignored.push(h);
        return;
      }
    }
    const base = kindOf === 'other' ? keyOf(sensorKey ? h.replace(sensorKey, '') : h) || `column_${i + 1}` : kindOf;
    extras.push({ column: i, key: base, label: h, kind: kindOf, sensorKey });
  });
  return {
    headerRow: headerRow + 1,
    kind,
    timeColumn,
    dateColumn,
    timeFormat,
    sensorColumn,
    co2Columns,
    extras,
    ignored,
    fixedSensor,
  };
}

/** "Location: G12" or a "Device name" cell followed by its value, in the lines above the header; a room or location wins over a device name. */
function sensorFromTitleLines(lines: string[][]): Layout['fixedSensor'] {
  let fallback: Layout['fixedSensor'] = null;
  for (const cells of lines) {
    const filled = cells.filter((c) => c !== '');
    if (filled.length === 0) continue;
    const m = TITLE_SENSOR.exec(filled[0] as string);
    if (!m) continue;
    const value = (m.groups?.value ?? '').trim() || (filled[1] ?? '').trim();
    if (!value) continue;
    if (/^(location|room)/i.test(filled[0] as string)) return { key: value, source: 'title_lines' };
    fallback ??= { key: value, source: 'title_lines' };
  }
  return fallback;
}
