/**
 * CO2 over the school day for each season against the criterion lines. ag-charts with only the modules
 * used here; render with client:only="react" inside a fixed-height container.
 */
import {
  CrossLinesModule,
  LegendModule,
  LineSeriesModule,
  ModuleRegistry,
  NumberAxisModule,
  type AgCartesianChartOptions,
} from 'ag-charts-community';
import { AgCharts } from 'ag-charts-react';
import { useMemo } from 'react';
import { co2DayAxes } from '../co2-day-axes';
import { useDarkTheme } from '../use-dark-theme';

ModuleRegistry.registerModules([LineSeriesModule, NumberAxisModule, LegendModule, CrossLinesModule]);

export interface SeasonCurve {
  label: string;
  points: { minute: number; co2Ppm: number }[];
}

export interface Co2DayChartProps {
  curves: SeasonCurve[];
  /** Horizontal criterion lines, e.g. { label: 'Daily mean limit 1,500 ppm', ppm: 1500 }. */
  limits: { label: string; ppm: number }[];
}

const SEASON_COLOURS = { light: ['#1f6f6b', '#8a5a12', '#a1302b'], dark: ['#5cc3ba', '#e7b35f', '#f08a83'] };

export default function Co2DayChart({ curves, limits }: Co2DayChartProps) {
  const dark = useDarkTheme();
  const options = useMemo<AgCartesianChartOptions>(() => {
    const colours = dark ? SEASON_COLOURS.dark : SEASON_COLOURS.light;
    return {
      theme: dark ? 'ag-default-dark' : 'ag-default',
      background: { visible: false },
      series: curves.map((c, i) => ({
        type: 'line' as const,
        data: c.points,
        xKey: 'minute',
        yKey: 'co2Ppm',
        xName: 'Time',
        yName: c.label,
        title: c.label,
        stroke: colours[i % colours.length] ?? '#1f6f6b',
        marker: { enabled: false },
      })),
      axes: co2DayAxes(limits, dark),
      legend: { position: 'bottom' },
    };
  }, [curves, limits, dark]);
  return <AgCharts options={options} style={{ height: '100%' }} />;
}
