/** One line of the cumulative chart. */
export interface CumulativeSeries {
  name: string;
  points: { label: string; cumulativeCapitalGbp: number; cumulativePupilHoursRemoved: number }[];
}
