/**
 * Timestamps of monitor logs: which of the usual export formats a column uses (ISO text, day-first or
 * month-first dates with times, with or without seconds, Excel serial numbers, Unix time, spreadsheet date
 * cells, date and time in two columns), a fast parser for that format, and the wall-clock → UTC conversion
 * for Europe/London across both clock changes (@date-fns/tz). Detection checks the chosen format against
 * date-fns's own parser on the sample, so the fast path reads exactly what date-fns would.
 *
 * Times are handled as "naive seconds": the wall-clock reading as if it were UTC (Date.UTC of its fields).
 * Text with an explicit offset ('Z', '+01:00') and Unix times are absolute from the start.
 */
import { tzOffset } from '@date-fns/tz';
import { isValid, parse as parseWithDateFns } from 'date-fns';
import type { CellValue } from '../register/values';

/** The zone the trust's schools keep their clocks in; readings are grouped into its calendar days. */
export const SCHOOL_TIME_ZONE = 'Europe/London';

/** A timestamp format the importer knows. */
export type TimestampFormat = 'iso' | 'day_first' | 'month_first' | 'excel_serial' | 'unix_seconds' | 'unix_ms';

/** Words for a format, as the preview shows them. */
export const FORMAT_LABELS: Record<TimestampFormat, string> = {
  iso: 'ISO 8601 text (2026-10-25 01:30:00)',
  day_first: 'Day-first dates (25/10/2026 01:30)',
  month_first: 'Month-first dates (10/25/2026 01:30)',
  excel_serial: 'Excel serial numbers (46320.0625)',
  unix_seconds: 'Unix time in seconds',
  unix_ms: 'Unix time in milliseconds',
};

/** A parsed instant: naive wall-clock seconds, or absolute UTC seconds when the text said its offset. */
export interface ParsedTime {
  seconds: number;
  absolute: boolean;
}

const EXCEL_EPOCH_S = Date.UTC(1899, 11, 30) / 1000;
const fields = new Float64Array(7);

/**
 * Splits date-time text into numeric fields (up to 7; fractional seconds kept in the 6th), an AM/PM marker and
 * an explicit UTC offset. Returns the number of fields, or −1 for text that is not a date-time.
 */
function scan(text: string, out: { pm: number; offsetMin: number | null }): number {
  let n = 0;
  let i = 0;
  const len = text.length;
  out.pm = 0;
  out.offsetMin = null;
  while (i < len && n < 7) {
    const c = text.charCodeAt(i);
    if (c >= 48 && c <= 57) {
      let v = 0;
      let digits = 0;
      while (i < len) {
        const d = text.charCodeAt(i);
        if (d < 48 || d > 57) break;
        v = v * 10 + (d - 48);
        digits++;
        i++;
      }
      // Fractional seconds after the seconds field: "01:30:05.250".
      if (n === 5 && i < len && (text.charCodeAt(i) === 46 || text.charCodeAt(i) === 44)) {
        i++;
        let scale = 0.1;
        while (i < len) {
          const d = text.charCodeAt(i);
          if (d < 48 || d > 57) break;
          v += (d - 48) * scale;
          scale /= 10;
          i++;
        }
      }
      if (digits > 4) return -1;
      fields[n++] = v;
      continue;
    }
    // After the time, '+hh:mm' / '-hh:mm' / 'Z' give the offset.
    if (n >= 5 && (c === 43 || c === 45)) {
      const sign = c === 43 ? 1 : -1;
      const m = /^(\d{2}):?(\d{2})?/.exec(text.slice(i + 1));
      if (!m) return -1;
      out.offsetMin = sign * (Number(m[1]) * 60 + Number(m[2] ?? 0));
      i += 1 + (m[0]?.length ?? 0);
      continue;
    }
    if (c === 90 || c === 122) {
      if (n < 5) return -1;
      out.offsetMin = 0;
      i++;
      continue;
    }
    if (c === 65 || c === 97 || c === 80 || c === 112) {
      const next = text.charCodeAt(i + 1);
      if (next === 77 || next === 109) {
        out.pm = c === 80 || c === 112 ? 2 : 1;
        i += 2;
        continue;
      }
      return -1;
    }
    // Separators: / - . : space T , and an optional "at" is not accepted.
    if (c === 47 || c === 45 || c === 46 || c === 58 || c === 32 || c === 84 || c === 116 || c === 44 || c === 9) i++;
    else return -1;
  }
  return i < len && n >= 7 ? -1 : n;
}

const scanState = { pm: 0, offsetMin: null as number | null };

// The last calendar day built: a log repeats the same date on hundreds of rows in a row.
let lastDayKey = -1;
let lastDayStart = Number.NaN;

function build(y: number, mo: number, d: number, h: number, mi: number, s: number, pm: number): number {
  if (y < 100) y += 2000;
  if (pm === 1 && h === 12) h = 0;
  else if (pm === 2 && h < 12) h += 12;
  if (mo < 1 || mo > 12 || d < 1 || d > 31 || h > 24 || mi > 59 || s >= 61) return Number.NaN;
  const key = (y * 100 + mo) * 100 + d;
  if (key !== lastDayKey) {
    const ms = Date.UTC(y, mo - 1, d);
    // Date.UTC rolls 31 April over to 1 May: refuse days the month does not have.
    lastDayStart = new Date(ms).getUTCDate() === d ? ms / 1000 : Number.NaN;
    lastDayKey = key;
  }
  return lastDayStart + h * 3600 + mi * 60 + s;
}

/** Parses a cell with a known format; null when the cell is not a valid time in that format. */
export function parseTimestamp(value: CellValue, format: TimestampFormat): ParsedTime | null {
  if (value === null || value === '') return null;
  if (value instanceof Date) {
    const t = value.getTime();
    return Number.isFinite(t) ? { seconds: Math.round(t / 1000), absolute: false } : null;
  }
  if (format === 'excel_serial' || format === 'unix_seconds' || format === 'unix_ms') {
    const v = typeof value === 'number' ? value : Number(String(value).trim());
    if (!Number.isFinite(v)) return null;
    if (format === 'excel_serial')
      return v > 0 && v < 2_958_466 ? { seconds: Math.round(EXCEL_EPOCH_S + v * 86_400), absolute: false } : null;
    return { seconds: Math.round(format === 'unix_ms' ? v / 1000 : v), absolute: true };
  }
  const text = typeof value === 'string' ? value.trim() : String(value);
  const n = scan(text, scanState);
  if (n < 5) return null;
  const pm = scanState.pm;
  const s = n >= 6 ? (fields[5] as number) : 0;
  let t: number;
  if (format === 'iso') t = build(fields[0]!, fields[1]!, fields[2]!, fields[3]!, fields[4]!, s, pm);
  else if (format === 'day_first') t = build(fields[2]!, fields[1]!, fields[0]!, fields[3]!, fields[4]!, s, pm);
  else t = build(fields[2]!, fields[0]!, fields[1]!, fields[3]!, fields[4]!, s, pm);
  if (!Number.isFinite(t)) return null;
  // Four-digit years, or two-digit ones after a day and month; never three.
  const year = format === 'iso' ? fields[0]! : fields[2]!;
  if (format === 'iso' ? year < 1000 : year >= 100 && year < 1000) return null;
  const offset = scanState.offsetMin;
  return offset === null
    ? { seconds: Math.round(t), absolute: false }
    : { seconds: Math.round(t - offset * 60), absolute: true };
}

/** Joins a date cell and a time cell (text "HH:mm[:ss]", a day fraction, or a spreadsheet time) into one. */
export function joinDateAndTime(date: CellValue, time: CellValue): CellValue {
  if (date === null || time === null || date === '' || time === '') return null;
  let timeText: string;
  if (time instanceof Date) timeText = time.toISOString().slice(11, 19);
  else if (typeof time === 'number') {
    const secs = Math.round((time % 1) * 86_400);
    timeText = `${String(Math.floor(secs / 3600)).padStart(2, '0')}:${String(Math.floor((secs % 3600) / 60)).padStart(2, '0')}:${String(secs % 60).padStart(2, '0')}`;
  } else timeText = String(time).trim();
  if (date instanceof Date) return `${date.toISOString().slice(0, 10)} ${timeText}`;
  if (typeof date === 'number') {
    const day = new Date((EXCEL_EPOCH_S + Math.floor(date) * 86_400) * 1000).toISOString().slice(0, 10);
    return `${day} ${timeText}`;
  }
  return `${String(date).trim()} ${timeText}`;
}

/** What detection decided about a timestamp column. */
export interface FormatChoice {
  format: TimestampFormat;
  /** True when the sample could not tell day-first from month-first and the UK default was taken. */
  assumedDayFirst: boolean;
  /** Share of the sample the format parses, 0–1. */
  parsedShare: number;
}

/** date-fns patterns equivalent to the fast parser, used to confirm a detected text format on the sample. */
function dateFnsPatterns(format: 'iso' | 'day_first' | 'month_first', sample: string): string[] {
  const sep = /\d([/.-])\d/.exec(sample)?.[1] ?? '/';
  const date =
    format === 'iso'
      ? `yyyy${sep}MM${sep}dd`
      : format === 'day_first'
        ? `dd${sep}MM${sep}yyyy`
        : `MM${sep}dd${sep}yyyy`;
  const dateShort = format === 'iso' ? date : date.replace('yyyy', 'yy');
  const out: string[] = [];
  for (const d of [date, dateShort])
    for (const t of ["'T'HH:mm:ss", "'T'HH:mm", 'HH:mm:ss', 'HH:mm', 'H:mm:ss', 'H:mm', 'h:mm a', 'h:mm:ss a']) {
      out.push(`${d} ${t}`.replace(" 'T'", "'T'"));
    }
  return out;
}

/** True when date-fns reads the text as the same wall-clock time (offset-free text only). */
export function agreesWithDateFns(text: string, format: 'iso' | 'day_first' | 'month_first', seconds: number): boolean {
  const cleaned = text
    .trim()
    .replace(/[.,]\d+(?=$|\s)/, '')
    .replace(',', '');
  for (const pattern of dateFnsPatterns(format, cleaned)) {
    const d = parseWithDateFns(cleaned, pattern, new Date(2000, 0, 1));
    if (!isValid(d)) continue;
    const naive =
      Date.UTC(d.getFullYear(), d.getMonth(), d.getDate(), d.getHours(), d.getMinutes(), d.getSeconds()) / 1000;
    return Math.abs(naive - Math.floor(seconds)) < 1;
  }
  return false;
}

function regularity(times: number[]): number {
  if (times.length < 3) return 0;
  let worst = 0;
  for (let i = 1; i < times.length; i++)
    worst = Math.max(worst, Math.abs((times[i] as number) - (times[i - 1] as number)));
  return worst;
}

/**
 * Chooses the format of a timestamp column from a sample of its cells (in file order). Null when no format
 * reads at least 90 % of the sample.
 */
export function detectFormat(sample: readonly CellValue[]): FormatChoice | null {
  const values = sample.filter((v) => v !== null && v !== '');
  if (values.length === 0) return null;
  if (values.every((v) => v instanceof Date)) return { format: 'iso', assumedDayFirst: false, parsedShare: 1 };
  const numeric = values.filter((v) => typeof v === 'number' || /^\s*\d+(\.\d+)?\s*$/.test(String(v)));
  if (numeric.length >= values.length * 0.9) {
    const nums = numeric.map(Number);
    const max = Math.max(...nums);
    const format: TimestampFormat = max > 1e11 ? 'unix_ms' : max > 1e8 ? 'unix_seconds' : 'excel_serial';
    const parsed = nums.filter((v) => parseTimestamp(v, format) !== null).length;
    return { format, assumedDayFirst: false, parsedShare: parsed / values.length };
  }
  const texts = values.map((v) => (v instanceof Date ? v.toISOString() : String(v)));
  const candidates: ('iso' | 'day_first' | 'month_first')[] = ['iso', 'day_first', 'month_first'];
  const scored = candidates.map((format) => {
    const times: number[] = [];
    for (const t of texts) {
      const p = parseTimestamp(t, format);
      if (p) times.push(p.seconds);
    }
    return { format, share: times.length / texts.length, times };
  });
  const usable = scored.filter((s) => s.share >= 0.9);
  if (usable.length === 0) return null;
  let chosen = usable[0]!;
  let assumedDayFirst = false;
  const dmy = usable.find((s) => s.format === 'day_first');
  const mdy = usable.find((s) => s.format === 'month_first');
  if (dmy && mdy) {
    // Both read every date (all day numbers ≤ 12): the more regular series wins; a tie keeps the UK day-first.
    const rd = regularity(dmy.times);
    const rm = regularity(mdy.times);
    chosen = rm < rd / 2 ? mdy : dmy;
    assumedDayFirst = chosen === dmy && rd === rm;
  } else if (dmy) chosen = dmy;
  else if (mdy) chosen = mdy;
  // The fast parser must read the sample exactly as date-fns does.
  const checked = texts.slice(0, 20).filter((t) => !/[zZ]|[+-]\d{2}:?\d{2}\s*$/.test(t.trim()));
  for (const t of checked) {
    const p = parseTimestamp(t, chosen.format);
    if (p && !agreesWithDateFns(t, chosen.format, p.seconds)) return null;
  }
  return { format: chosen.format, assumedDayFirst, parsedShare: chosen.share };
}

/** How naive wall-clock times are turned into instants: the school's local time, or UTC. */
export type TimeBasis = 'Europe/London' | 'UTC';

/** Offsets (minutes east of UTC) valid for a naive time, cached per naive hour (London changes on the hour). */
const hourCache = new Map<number, number[]>();

/** The UTC offsets under which a naive wall-clock time exists in the school's zone: none (spring gap), one, or two (autumn repeat). */
let lastHour = Number.NaN;
let lastOffsets: number[] = [];

export function offsetsForNaive(naiveSeconds: number): number[] {
  const hour = Math.floor(naiveSeconds / 3600);
  if (hour === lastHour) return lastOffsets;
  const hit = hourCache.get(hour);
  if (hit) {
    lastHour = hour;
    lastOffsets = hit;
    return hit;
  }
  const probe = hour * 3600 + 1800;
  const seen = new Set<number>([
    tzOffset(SCHOOL_TIME_ZONE, new Date((probe - 3 * 3600) * 1000)),
    tzOffset(SCHOOL_TIME_ZONE, new Date((probe + 3 * 3600) * 1000)),
  ]);
  const valid = [...seen]
    .filter((o) => tzOffset(SCHOOL_TIME_ZONE, new Date((probe - o * 60) * 1000)) === o)
    .sort((a, b) => b - a);
  if (hourCache.size > 200_000) hourCache.clear();
  hourCache.set(hour, valid);
  return valid;
}

/**
 * Converts a naive wall-clock time to UTC seconds in the school's zone. In the repeated autumn hour the
 * earliest candidate after `previousUtc` is taken (a series in time order goes through BST, then GMT); in
 * the missing spring hour the time does not exist and NaN is returned.
 */
export function localToUtc(naiveSeconds: number, previousUtc: number): number {
  const offsets = offsetsForNaive(naiveSeconds);
  if (offsets.length === 0) return Number.NaN;
  if (offsets.length === 1) return naiveSeconds - (offsets[0] as number) * 60;
  // Largest offset first = earliest instant.
  for (const o of offsets) {
    const utc = naiveSeconds - o * 60;
    if (utc > previousUtc) return utc;
  }
  return naiveSeconds - (offsets[offsets.length - 1] as number) * 60;
}

/** The UTC instant of local midnight starting a 'YYYY-MM-DD' day in the school's zone, seconds. */
export function localMidnightUtc(date: string): number {
  const naive = Date.parse(`${date}T00:00:00Z`) / 1000;
  return localToUtc(naive, Number.NEGATIVE_INFINITY);
}

/** The school-zone calendar date and offset (minutes) of a UTC instant. */
export function localDateOf(utcSeconds: number): { date: string; offsetMin: number } {
  const offsetMin = tzOffset(SCHOOL_TIME_ZONE, new Date(utcSeconds * 1000));
  return { date: new Date((utcSeconds + offsetMin * 60) * 1000).toISOString().slice(0, 10), offsetMin };
}
