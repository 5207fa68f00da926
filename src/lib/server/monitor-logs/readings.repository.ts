/** Reading rooms' committed readings back as the engine's measured days (merged across logs). */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { MeasuredDay } from '../../engine/measured';
import type { AssumptionSet, Season } from '../../engine/types';
import { unpackDay } from './packing';
import { localMidnightUtc, localDateOf } from './timestamps';

/** The season a calendar month belongs to under the assumption set (null: a holiday month, e.g. August). */
export function seasonOfMonth(set: AssumptionSet, month: number): Season | null {
  const profiles = set.seasons.value;
  for (const s of ['winter', 'mid', 'summer'] as const) if (profiles[s].months.includes(month)) return s;
  return null;
}

/** Builds one measured day from its stored pieces (several logs may hold parts of the same day). */
export function toMeasuredDay(
  date: string,
  season: Season,
  parts: { times: Int32Array; ppm: Int16Array }[],
): MeasuredDay {
  let times: Int32Array;
  let ppm: Int16Array;
  if (parts.length === 1) ({ times, ppm } = parts[0]!);
  else {
    // Merge pieces in time order; the same instant from two logs is kept once.
    const all: [number, number][] = [];
    for (const p of parts)
      for (let i = 0; i < p.times.length; i++) all.push([p.times[i] as number, p.ppm[i] as number]);
    all.sort((a, b) => a[0] - b[0]);
    const merged = all.filter((x, i) => i === 0 || x[0] !== (all[i - 1] as [number, number])[0]);
    times = Int32Array.from(merged.map((x) => x[0]));
    ppm = Int16Array.from(merged.map((x) => x[1]));
  }
  const midnight = localMidnightUtc(date);
  const nextDate = new Date(Date.parse(`${date}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
  const changeDay = localMidnightUtc(nextDate) - midnight !== 86_400;
  const n = times.length;
  const elapsedMin = new Float64Array(n);
  const wallMin = new Float64Array(n);
  const offset0 = changeDay ? localDateOf(midnight).offsetMin : 0;
  for (let i = 0; i < n; i++) {
    const e = (times[i] as number) / 60;
    elapsedMin[i] = e;
    wallMin[i] = changeDay ? e + localDateOf(midnight + (times[i] as number)).offsetMin - offset0 : e;
  }
  return {
    date,
    weekday: new Date(`${date}T12:00:00Z`).getUTCDay(),
    season,
    elapsedMin,
    wallMin,
    co2Ppm: ppm,
  };
}

/** Every committed day of the given rooms, grouped by room, in date order (days outside the seasons left out). */
export async function readMeasuredDays(
  db: Kysely<Database>,
  roomIds: readonly string[],
  set: AssumptionSet,
  range: { from?: string; to?: string } = {},
): Promise<Map<string, MeasuredDay[]>> {
  const out = new Map<string, MeasuredDay[]>();
  if (roomIds.length === 0) return out;
  const from = range.from ? sql`AND d.day >= ${range.from}::date` : sql``;
  const to = range.to ? sql`AND d.day <= ${range.to}::date` : sql``;
  const { rows } = await sql<{ room_id: string; day: string; times_s: Buffer; co2_ppm: Buffer }>`
    SELECT s.room_id, d.day::text AS day, d.times_s, d.co2_ppm
    FROM monitor_log_days d
      JOIN monitor_log_sensors s ON s.id = d.sensor_id
      JOIN monitor_logs l ON l.id = s.log_id
    WHERE l.status = 'committed' AND s.room_id = ANY(${roomIds as string[]}::uuid[]) ${from} ${to}
    ORDER BY s.room_id, d.day`.execute(db);
  let i = 0;
  while (i < rows.length) {
    const { room_id, day } = rows[i]!;
    const parts: { times: Int32Array; ppm: Int16Array }[] = [];
    while (i < rows.length && rows[i]!.room_id === room_id && rows[i]!.day === day) {
      const u = unpackDay({ ...rows[i]!, extras: null });
      parts.push({ times: u.times, ppm: u.ppm });
      i++;
    }
    const season = seasonOfMonth(set, Number(day.slice(5, 7)));
    if (!season) continue;
    const list = out.get(room_id) ?? [];
    list.push(toMeasuredDay(day, season, parts));
    out.set(room_id, list);
  }
  return out;
}
