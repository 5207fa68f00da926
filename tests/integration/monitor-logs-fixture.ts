/**
 * Monitor logs as exports write them, for the import tests: a school day's CO2 from the exact single-zone
 * solution C(t) = C_ss + (C_0 − C_ss)·e^(−λt) (Batterman 2017) with a fixed-seed wobble, then written as long or
 * wide CSV, day-first or ISO text, with or without seconds.
 */
import { prng } from '../../scripts/seed/prng';

/** CO2 at each minute of a weekday (pupils 09:00–15:15 with breaks) or a weekend (empty), ppm. */
export function dayCurve(weekday: boolean, seed: number, lessonAch = 1.5): number[] {
  const random = prng(seed);
  const out: number[] = [];
  let c = 430;
  const rise = 3000; // ppm/h with everyone in (about 30 pupils in a 180 m³ room)
  for (let m = 0; m < 1440; m++) {
    const inLesson = weekday && ((m >= 540 && m < 660) || (m >= 675 && m < 735) || (m >= 795 && m < 915));
    const daytime = weekday && m >= 540 && m < 930;
    const ach = inLesson ? lessonAch : daytime ? 3 : 0.5;
    const steady = 420 + (inLesson ? rise / ach : 0);
    c = steady + (c - steady) * Math.exp(-ach / 60);
    out.push(Math.round(c + (random() - 0.5) * 20));
  }
  return out;
}

const pad = (n: number) => String(n).padStart(2, '0');

/** Day-first text: "05/01/2026 09:05" (with seconds: "05/01/2026 09:05:00"). */
export function dayFirst(date: string, minute: number, seconds = false): string {
  const [y, mo, d] = date.split('-');
  return `${d}/${mo}/${y} ${pad(Math.floor(minute / 60))}:${pad(minute % 60)}${seconds ? ':00' : ''}`;
}

/** ISO text without offset: "2026-01-05 09:05:00". */
export const isoText = (date: string, minute: number) =>
  `${date} ${pad(Math.floor(minute / 60))}:${pad(minute % 60)}:00`;

/** Consecutive dates from `first` (YYYY-MM-DD). */
export function dates(first: string, count: number): string[] {
  const t0 = Date.parse(`${first}T00:00:00Z`);
  return Array.from({ length: count }, (_, i) => new Date(t0 + i * 86_400_000).toISOString().slice(0, 10));
}

const isWeekday = (date: string) => {
  const d = new Date(`${date}T12:00:00Z`).getUTCDay();
  return d >= 1 && d <= 5;
};

/** A long CSV (timestamp, sensor, CO2, temperature) of every sensor over the dates, every `step` minutes. */
export function longCsv(sensors: string[], days: string[], step = 5, format: 'iso' | 'day_first' = 'iso'): string {
  const lines = ['Timestamp,Sensor name,CO2 (ppm),Temperature (°C)'];
  days.forEach((date, di) => {
    const curves = sensors.map((_, si) => dayCurve(isWeekday(date), 1000 + di * 31 + si));
    for (let m = 0; m < 1440; m += step)
      sensors.forEach((s, si) => {
        const t = format === 'iso' ? isoText(date, m) : dayFirst(date, m, true);
        lines.push(`${t},${s},${curves[si]![m]},${(19 + (m > 540 ? 2 : 0)).toFixed(1)}`);
      });
  });
  return `${lines.join('\n')}\n`;
}

/** A wide CSV: one "<sensor> CO2" column per sensor, day-first times without seconds. */
export function wideCsv(sensors: string[], days: string[], step = 10): string {
  const lines = [`Date/Time,${sensors.map((s) => `${s} CO2 (ppm)`).join(',')}`];
  days.forEach((date, di) => {
    const curves = sensors.map((_, si) => dayCurve(isWeekday(date), 2000 + di * 17 + si));
    for (let m = 0; m < 1440; m += step) lines.push(`${dayFirst(date, m)},${curves.map((c) => c[m]).join(',')}`);
  });
  return `${lines.join('\n')}\n`;
}
