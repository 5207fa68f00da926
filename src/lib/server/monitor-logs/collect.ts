/**
 * Reading a log's rows into compact per-sensor buffers as they stream past (6 bytes a reading plus 4 per kept
 * extra column), so memory grows with the readings kept, never with the file's text.
 */
import { badRequest } from '../http/errors';
import { cellText, type CellValue } from '../register/values';
import type { Layout } from './layout';
import { ProblemTallies } from './problems';
import { joinDateAndTime, parseTimestamp } from './timestamps';

/** Times are kept as seconds from this epoch (2000-01-01) in 32-bit integers: good to 2068. */
export const EPOCH_2000_S = 946_684_800;
/** Most readings one file may hold (about 17 months of 5-minute readings for 300 rooms). */
export const MAX_READINGS = 15_000_000;
/** Most sensors one file may hold. */
export const MAX_SENSORS = 2_000;
/** CO2 readings accepted, ppm: negative or above 10,000 is out of range; below 300 is below outdoor air. */
export const CO2_RANGE = { min: 0, belowOutdoor: 300, max: 10_000 } as const;

/** Readings of one sensor in file order. */
export class SensorBuffer {
  n = 0;
  naive = new Int32Array(1024);
  ppm = new Int16Array(1024);
  extras: Float32Array[];
  readonly problems = new ProblemTallies();
  constructor(
    readonly key: string,
    readonly extraKeys: readonly string[],
  ) {
    this.extras = extraKeys.map(() => new Float32Array(1024));
  }

  push(seconds: number, ppm: number, extras: readonly number[] | null): void {
    if (this.n === this.naive.length) {
      const size = this.n * 2;
      const t = new Int32Array(size);
      t.set(this.naive);
      this.naive = t;
      const p = new Int16Array(size);
      p.set(this.ppm);
      this.ppm = p;
      this.extras = this.extras.map((e) => {
        const grown = new Float32Array(size);
        grown.set(e);
        return grown;
      });
    }
    this.naive[this.n] = seconds - EPOCH_2000_S;
    this.ppm[this.n] = ppm;
    for (let k = 0; k < this.extras.length; k++) (this.extras[k] as Float32Array)[this.n] = extras?.[k] ?? Number.NaN;
    this.n++;
  }
}

/** A number in a cell: 612, "612", "612.5", "612,5", "612 ppm". Null when it is not one. */
export function cellNumber(value: CellValue): number | null {
  if (typeof value === 'number') return Number.isFinite(value) ? value : null;
  if (value === null || typeof value === 'boolean' || value instanceof Date) return null;
  // Fast path for plain digits ("612", "612.5", "-5"), what nearly every cell of a log is.
  const first = value.charCodeAt(0);
  if ((first >= 48 && first <= 57) || first === 45) {
    const direct = Number(value);
    if (Number.isFinite(direct)) return direct;
  }
  const text = value.trim();
  if (text === '') return null;
  const m = /^(-?\d+(?:[.,]\d+)?)\s*(?:ppm|°c|%|%rh)?$/i.exec(text);
  return m ? Number((m[1] as string).replace(',', '.')) : null;
}

/** A cell's text: plain strings as they are (trimmed only when they need it), anything else through cellText. */
function textOf(value: CellValue): string {
  if (typeof value === 'string') {
    const n = value.length;
    if (n === 0) return value;
    const a = value.charCodeAt(0);
    const b = value.charCodeAt(n - 1);
    if (a > 32 && a !== 160 && b > 32 && b !== 160 && a !== 39) return value;
  }
  return cellText(value);
}

/** Everything the rows gave: sensors' buffers, file-level problems, counts, and whether times were absolute. */
export class LogCollector {
  readonly sensors = new Map<string, SensorBuffer>();
  readonly problems = new ProblemTallies();
  rows = 0;
  readings = 0;
  /** True when times carried their own offset (or were Unix times), so no time basis applies. */
  absolute: boolean | null = null;
  private readonly extrasBySensor = new Map<string | null, { column: number; key: string }[]>();
  private lastTimeText: string | null = null;
  private lastTime: ReturnType<typeof parseTimestamp> = null;

  constructor(readonly layout: Layout) {
    for (const e of layout.extras) {
      const list = this.extrasBySensor.get(e.sensorKey) ?? [];
      list.push({ column: e.column, key: e.key });
      this.extrasBySensor.set(e.sensorKey, list);
    }
  }

  private buffer(key: string, extrasFor: string | null): SensorBuffer {
    let b = this.sensors.get(key);
    if (!b) {
      if (this.sensors.size >= MAX_SENSORS)
        throw badRequest(
          `This file names more than ${MAX_SENSORS.toLocaleString('en-GB')} sensors. Split it and import the parts one by one.`,
        );
      b = new SensorBuffer(
        key,
        (this.extrasBySensor.get(extrasFor) ?? []).map((e) => e.key),
      );
      this.sensors.set(key, b);
    }
    return b;
  }

  /** Takes one data row (below the header): its sheet row number and cells from column A. */
  add(rowNumber: number, cells: readonly CellValue[]): void {
    const L = this.layout;
    let blank = true;
    for (const c of cells)
      if (c !== null && c !== '') {
        blank = false;
        break;
      }
    if (blank) return;
    this.rows++;
    const rawTime =
      L.dateColumn === null
        ? (cells[L.timeColumn] ?? null)
        : joinDateAndTime(cells[L.dateColumn] ?? null, cells[L.timeColumn] ?? null);
    // Long files repeat each time once per sensor: the text parsed last is reused.
    let time: ReturnType<typeof parseTimestamp>;
    if (typeof rawTime === 'string' && rawTime === this.lastTimeText) time = this.lastTime;
    else {
      time = parseTimestamp(rawTime, L.timeFormat.format);
      if (typeof rawTime === 'string') {
        this.lastTimeText = rawTime;
        this.lastTime = time;
      }
    }
    if (!time || time.seconds - EPOCH_2000_S < 0 || time.seconds - EPOCH_2000_S > 2_100_000_000) {
      this.problems.add('time_unreadable', { row: rowNumber, detail: `"${cellText(rawTime)}"` });
      return;
    }
    if (this.absolute === null) this.absolute = time.absolute;
    for (const co2 of L.co2Columns) {
      let key: string;
      let extrasFor: string | null = null;
      if (L.kind === 'long') {
        key = textOf(cells[L.sensorColumn as number] ?? null);
        if (key === '') {
          this.problems.add('sensor_missing', { row: rowNumber, detail: 'the sensor cell is empty' });
          continue;
        }
      } else if (L.kind === 'single') key = L.fixedSensor?.key ?? 'Sensor';
      else {
        key = co2.sensorKey;
        extrasFor = co2.sensorKey;
      }
      const raw = cells[co2.column] ?? null;
      if (raw === null || raw === '' || textOf(raw) === '') continue;
      const buffer = this.buffer(key, extrasFor);
      const ppm = cellNumber(raw);
      if (ppm === null) {
        buffer.problems.add('co2_unreadable', { row: rowNumber, detail: `"${cellText(raw)}"` });
        continue;
      }
      if (ppm < CO2_RANGE.min || ppm > CO2_RANGE.max) {
        buffer.problems.add('out_of_range', { row: rowNumber, detail: `${ppm} ppm` });
        continue;
      }
      if (ppm < CO2_RANGE.belowOutdoor) {
        buffer.problems.add('below_outdoor', { row: rowNumber, detail: `${ppm} ppm` });
        continue;
      }
      const extras = this.extrasBySensor.get(extrasFor);
      buffer.push(
        time.seconds,
        Math.round(ppm),
        extras ? extras.map((e) => cellNumber(cells[e.column] ?? null) ?? Number.NaN) : null,
      );
      this.readings++;
      if (this.readings > MAX_READINGS)
        throw badRequest(
          `This file holds more than ${MAX_READINGS.toLocaleString('en-GB')} readings. Split it (for example by month) and import the parts one by one.`,
        );
    }
  }
}
