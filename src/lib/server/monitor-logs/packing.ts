/**
 * The packed form of a sensor-day in monitor_log_days: little-endian int32 seconds since local midnight,
 * int16 ppm, float32 extra blocks (see db/migrations/20261204T0900_monitor_logs.ts).
 */
import { copyLine } from '../db/copy';
import type { PreparedDay } from './prepare';

const hex = (a: ArrayBufferView) => `\\x${Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('hex')}`;

/** COPY columns of monitor_log_days, in the order dayCopyLine writes them. */
export const DAY_COPY_SQL =
  'COPY monitor_log_days (sensor_id, day, reading_count, times_s, co2_ppm, extras) FROM STDIN';

/** One sensor-day as a line of COPY text (bytea in hex form). */
export function dayCopyLine(sensorId: string, day: PreparedDay): string {
  return copyLine([
    sensorId,
    day.date,
    day.times.length,
    hex(day.times),
    hex(day.ppm),
    day.extras ? hex(day.extras) : null,
  ]);
}

/** A typed view of a bytea copied to fresh, aligned memory. */
function aligned(buf: Buffer): ArrayBuffer {
  return buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength) as ArrayBuffer;
}

/** Unpacks a stored sensor-day. */
export function unpackDay(row: { times_s: Buffer; co2_ppm: Buffer; extras: Buffer | null }): {
  times: Int32Array;
  ppm: Int16Array;
  extras: Float32Array | null;
} {
  return {
    times: new Int32Array(aligned(row.times_s)),
    ppm: new Int16Array(aligned(row.co2_ppm)),
    extras: row.extras ? new Float32Array(aligned(row.extras)) : null,
  };
}
