/** What can be wrong with a monitor log's readings, counted per file and per sensor, with a few examples each. */

export type ProblemKind =
  | 'time_unreadable'
  | 'sensor_missing'
  | 'co2_unreadable'
  | 'out_of_range'
  | 'below_outdoor'
  | 'clock_change_gap'
  | 'duplicate'
  | 'conflicting_duplicate'
  | 'gap'
  | 'flat_line'
  | 'sampling_interval';

/** Words for each kind, and whether the readings concerned were left out. */
export const PROBLEM_TEXT: Record<ProblemKind, { label: string; leftOut: boolean }> = {
  time_unreadable: { label: 'Time not readable', leftOut: true },
  sensor_missing: { label: 'No sensor named on the row', leftOut: true },
  co2_unreadable: { label: 'CO2 value not a number', leftOut: true },
  out_of_range: { label: 'CO2 out of range (negative or above 10,000 ppm)', leftOut: true },
  below_outdoor: { label: 'CO2 below what outdoor air holds (under 300 ppm)', leftOut: true },
  clock_change_gap: { label: 'Local time that does not exist (clocks went forward)', leftOut: true },
  duplicate: { label: 'Same time and value repeated (kept once)', leftOut: false },
  conflicting_duplicate: { label: 'Same time with different values (all left out)', leftOut: true },
  gap: { label: 'Gap in the readings (nothing is filled in)', leftOut: false },
  flat_line: { label: 'Flat-lined sensor: the same value for 4 hours or more (left out)', leftOut: true },
  sampling_interval: { label: 'Logging interval outside 1–15 minutes', leftOut: false },
};

/** One example of a problem: the spreadsheet row, or the time range concerned. */
export interface ProblemExample {
  row?: number;
  at?: string;
  detail: string;
}

/** A count of one kind of problem with up to five examples. */
export interface ProblemTally {
  kind: ProblemKind;
  count: number;
  examples: ProblemExample[];
}

const EXAMPLES_KEPT = 5;

/** Problems counted by kind. */
export class ProblemTallies {
  private readonly byKind = new Map<ProblemKind, ProblemTally>();

  add(kind: ProblemKind, example: ProblemExample, count = 1): void {
    let tally = this.byKind.get(kind);
    if (!tally) {
      tally = { kind, count: 0, examples: [] };
      this.byKind.set(kind, tally);
    }
    tally.count += count;
    if (tally.examples.length < EXAMPLES_KEPT) tally.examples.push(example);
  }

  count(kind: ProblemKind): number {
    return this.byKind.get(kind)?.count ?? 0;
  }

  list(): ProblemTally[] {
    return [...this.byKind.values()];
  }
}
