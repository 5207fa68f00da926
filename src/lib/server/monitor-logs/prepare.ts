/**
 * From a sensor's readings in file order to clean local days: wall-clock times turned into instants
 * (Europe/London or UTC: chosen, or told apart by what the file does at the clock changes), sorted,
 * duplicates kept once or left out when they disagree, flat-lined stretches left out, gaps and the logging
 * interval reported, and the readings split into the school's calendar days.
 */
import { EPOCH_2000_S, type LogCollector, type SensorBuffer } from './collect';
import { ProblemTallies } from './problems';
import { localDateOf, localMidnightUtc, localToUtc, type TimeBasis } from './timestamps';

/** A flat line this long (identical readings) is a stuck sensor, not air [CP]. */
export const FLAT_LINE_SECONDS = 4 * 3600;
/** A step longer than this many logging intervals (and at least 30 minutes) is reported as a gap [CP]. */
export const GAP_INTERVALS = 3;

/** One local day of one sensor, ready to store. */
export interface PreparedDay {
  date: string;
  /** Seconds since the day's local midnight. */
  times: Int32Array;
  ppm: Int16Array;
  /** One block of values per extra column (NaN: none), or null without extras. */
  extras: Float32Array | null;
}

/** One sensor of the file after cleaning. */
export interface PreparedSensor {
  key: string;
  extraKeys: readonly string[];
  readings: number;
  days: PreparedDay[];
  firstAt: string | null;
  lastAt: string | null;
  intervalSeconds: number | null;
  problems: ProblemTallies;
}

/** How the file's times were read. */
export interface BasisDecision {
  basis: TimeBasis | 'offsets_in_file';
  /** Why: chosen by the person, told by the file, or the UK default taken. */
  reason: string;
}

const iso = (utc: number) => new Date(utc * 1000).toISOString().replace('.000Z', 'Z');
const naiveText = (naive2000: number) =>
  new Date((naive2000 + EPOCH_2000_S) * 1000).toISOString().slice(0, 16).replace('T', ' ');

/** Last Sunday of a month (1–12) of a year, as naive seconds from 2000 at 01:00 wall-clock. */
function lastSundayAt1(year: number, month: number): number {
  const last = new Date(Date.UTC(year, month, 0));
  const day = last.getUTCDate() - last.getUTCDay();
  return Date.UTC(year, month - 1, day, 1) / 1000 - EPOCH_2000_S;
}

/**
 * Evidence from the clock changes the file spans: readings at wall-clock times that do not exist in March,
 * or a seamless October night, say UTC; a missing hour in March or an hour logged twice in October says
 * local time. Returns the votes for each.
 */
export function clockChangeEvidence(buffers: Iterable<SensorBuffer>): { local: number; utc: number } {
  let local = 0;
  let utc = 0;
  for (const b of buffers) {
    if (b.n < 3) continue;
    let min = Number.POSITIVE_INFINITY;
    let max = Number.NEGATIVE_INFINITY;
    for (let i = 0; i < b.n; i++) {
      const t = b.naive[i] as number;
      if (t < min) min = t;
      if (t > max) max = t;
    }
    const y0 = new Date((min + EPOCH_2000_S) * 1000).getUTCFullYear();
    const y1 = new Date((max + EPOCH_2000_S) * 1000).getUTCFullYear();
    for (let y = y0; y <= y1; y++) {
      const spring = lastSundayAt1(y, 3);
      const autumn = lastSundayAt1(y, 10);
      let inGap = 0;
      let before = 0;
      let after = 0;
      let inRepeat = 0;
      let backwards = 0;
      for (let i = 0; i < b.n; i++) {
        const t = b.naive[i] as number;
        if (t >= spring && t < spring + 3600) inGap++;
        else if (t >= spring - 3600 && t < spring) before++;
        else if (t >= spring + 3600 && t < spring + 7200) after++;
        if (t >= autumn && t < autumn + 3600) inRepeat++;
        if (i > 0 && t < (b.naive[i - 1] as number) && t >= autumn - 600 && t < autumn + 3600) backwards++;
      }
      if (inGap > 0) utc++;
      else if (before > 0 && after > 0) local++;
      if (backwards > 0) local++;
      else if (inRepeat > 0) {
        // An hour logged once at the usual rate is UTC; logged twice, local.
        const hourBefore = [...Array(b.n).keys()].filter((i) => {
          const t = b.naive[i] as number;
          return t >= autumn - 3600 && t < autumn;
        }).length;
        if (hourBefore > 0 && inRepeat >= 1.6 * hourBefore) local++;
        else if (hourBefore > 0) utc++;
      }
    }
  }
  return { local, utc };
}

/** Decides how to read the file's wall-clock times. */
export function decideBasis(collector: LogCollector, chosen: TimeBasis | null): BasisDecision {
  if (collector.absolute) return { basis: 'offsets_in_file', reason: 'The times carry their own UTC offset.' };
  if (chosen) return { basis: chosen, reason: `Read as ${chosen === 'UTC' ? 'UTC' : 'UK local time'}, as chosen.` };
  const votes = clockChangeEvidence(collector.sensors.values());
  if (votes.utc > votes.local)
    return {
      basis: 'UTC',
      reason: 'Read as UTC: the file logs straight through a clock change without a missing or repeated hour.',
    };
  if (votes.local > 0)
    return {
      basis: 'Europe/London',
      reason: 'Read as UK local time: the file skips or repeats the hour at a clock change.',
    };
  return {
    basis: 'Europe/London',
    reason:
      'Read as UK local time (the usual for school monitors; the file spans no clock change to tell). Choose UTC if the logger kept UTC.',
  };
}

/** Cleans one sensor's readings into local days. */
export function prepareSensor(b: SensorBuffer, basis: BasisDecision['basis']): PreparedSensor {
  const n = b.n;
  const problems = b.problems;
  const utc = new Float64Array(n);
  const keep = new Uint8Array(n).fill(1);
  // Instants, in time order of the file (newest-first files are walked backwards for the autumn hour).
  let descending = 0;
  for (let i = 1; i < n; i++) if ((b.naive[i] as number) < (b.naive[i - 1] as number)) descending++;
  const backwards = descending > n / 2;
  let previous = Number.NEGATIVE_INFINITY;
  for (let j = 0; j < n; j++) {
    const i = backwards ? n - 1 - j : j;
    const naive = (b.naive[i] as number) + EPOCH_2000_S;
    const t = basis === 'Europe/London' ? localToUtc(naive, previous) : naive;
    if (Number.isNaN(t)) {
      problems.add('clock_change_gap', {
        at: naiveText(b.naive[i] as number),
        detail: 'no such time in the UK that day',
      });
      keep[i] = 0;
      continue;
    }
    utc[i] = t;
    if (t > previous) previous = t;
  }
  let order: Uint32Array | null = null;
  for (let i = 1; i < n; i++)
    if ((utc[i] as number) < (utc[i - 1] as number)) {
      order = new Uint32Array(n);
      for (let k = 0; k < n; k++) order[k] = k;
      order.sort((x, y) => (utc[x] as number) - (utc[y] as number) || x - y);
      break;
    }
  const at = (k: number) => (order ? (order[k] as number) : k);

  // Duplicates: the same instant twice.
  for (let k = 1; k < n; k++) {
    const i = at(k);
    if (!keep[i]) continue;
    let p = k - 1;
    while (p >= 0 && !keep[at(p)]) p--;
    if (p < 0) continue;
    const j = at(p);
    if (utc[i] !== utc[j]) continue;
    if (b.ppm[i] === b.ppm[j]) {
      keep[i] = 0;
      problems.add('duplicate', { at: iso(utc[i] as number), detail: `${b.ppm[i]} ppm twice` });
    } else {
      problems.add(
        'conflicting_duplicate',
        { at: iso(utc[i] as number), detail: `${b.ppm[j]} and ${b.ppm[i]} ppm` },
        2,
      );
      keep[i] = 0;
      keep[j] = 0;
    }
  }
  // Flat lines: identical values for FLAT_LINE_SECONDS or more.
  let runStart = -1;
  const closeRun = (endK: number) => {
    if (runStart < 0) return;
    const first = at(runStart);
    const last = at(endK);
    if ((utc[last] as number) - (utc[first] as number) >= FLAT_LINE_SECONDS) {
      let count = 0;
      for (let q = runStart; q <= endK; q++)
        if (keep[at(q)]) {
          keep[at(q)] = 0;
          count++;
        }
      problems.add(
        'flat_line',
        { at: `${iso(utc[first] as number)} – ${iso(utc[last] as number)}`, detail: `${b.ppm[first]} ppm throughout` },
        count,
      );
    }
  };
  let lastKept = -1;
  for (let k = 0; k < n; k++) {
    const i = at(k);
    if (!keep[i]) continue;
    if (lastKept >= 0 && b.ppm[i] === b.ppm[at(lastKept)]) {
      if (runStart < 0) runStart = lastKept;
    } else {
      if (lastKept >= 0) closeRun(lastKept);
      runStart = -1;
    }
    lastKept = k;
  }
  if (lastKept >= 0) closeRun(lastKept);

  // Kept readings in order; the logging interval and the gaps.
  const kept: number[] = [];
  for (let k = 0; k < n; k++) if (keep[at(k)]) kept.push(at(k));
  const steps: number[] = [];
  for (let k = 1; k < kept.length; k++)
    steps.push((utc[kept[k] as number] as number) - (utc[kept[k - 1] as number] as number));
  const sortedSteps = [...steps].sort((x, y) => x - y);
  const interval = sortedSteps.length > 0 ? (sortedSteps[(sortedSteps.length - 1) >> 1] as number) : null;
  if (interval !== null && (interval < 50 || interval > 15.5 * 60))
    problems.add('sampling_interval', {
      detail: `readings every ${Math.round(interval / 60) || '<1'} min; decay and build-up estimates need 1–15 minutes`,
    });
  if (interval !== null) {
    const gapSeconds = Math.max(GAP_INTERVALS * interval, 1800);
    for (let k = 1; k < kept.length; k++) {
      const from = utc[kept[k - 1] as number] as number;
      const to = utc[kept[k] as number] as number;
      if (to - from > gapSeconds)
        problems.add('gap', {
          at: `${iso(from)} – ${iso(to)}`,
          detail: `${Math.round((to - from) / 60)} min without readings`,
        });
    }
  }

  // Local days.
  const days: PreparedDay[] = [];
  const nExtras = b.extras.length;
  let k = 0;
  while (k < kept.length) {
    const first = utc[kept[k] as number] as number;
    const { date } = localDateOf(first);
    const start = localMidnightUtc(date);
    const next = new Date(Date.parse(`${date}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
    const end = localMidnightUtc(next);
    let e = k;
    while (e < kept.length && (utc[kept[e] as number] as number) < end) e++;
    const count = e - k;
    const times = new Int32Array(count);
    const ppm = new Int16Array(count);
    const extras = nExtras > 0 ? new Float32Array(nExtras * count) : null;
    for (let q = 0; q < count; q++) {
      const i = kept[k + q] as number;
      times[q] = (utc[i] as number) - start;
      ppm[q] = b.ppm[i] as number;
      if (extras) for (let x = 0; x < nExtras; x++) extras[x * count + q] = (b.extras[x] as Float32Array)[i] as number;
    }
    days.push({ date, times, ppm, extras });
    k = e;
  }
  const firstI = kept[0];
  const lastI = kept[kept.length - 1];
  return {
    key: b.key,
    extraKeys: b.extraKeys,
    readings: kept.length,
    days,
    firstAt: firstI === undefined ? null : iso(utc[firstI] as number),
    lastAt: lastI === undefined ? null : iso(utc[lastI] as number),
    intervalSeconds: interval,
    problems,
  };
}

export { ProblemTallies };
