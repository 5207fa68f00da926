/** The data each portfolio chart draws (serialisable: it crosses from page to island as props). */
import type { Co2BySchool, CumulativePoint, ScatterPoint, SensitivityCase } from '../../lib/client/portfolio';

export type ChartData =
  | { kind: 'co2'; rows: Co2BySchool[] }
  | { kind: 'scatter'; points: ScatterPoint[]; bandLabels: string[] }
  | { kind: 'cumulative'; points: CumulativePoint[] }
  | { kind: 'sensitivity'; rows: SensitivityCase[] };
