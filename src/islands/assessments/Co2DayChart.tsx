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

const clock = (minute: number) =>
  `${String(Math.floor(minute / 60)).padStart(2, '0')}:${String(Math.round(minute % 60)).padStart(2, '0')}`;
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
      axes: {
        x: {
          type: 'number',
          position: 'bottom',
          nice: false,
          label: { formatter: ({ value }: { value: number }) => clock(value) },
          title: { text: 'Time of day' },
        },
        y: {
          type: 'number',
          position: 'left',
          min: 0,
          title: { text: 'CO2 (ppm)' },
          crossLines: limits.map((l, i) => ({
            type: 'line' as const,
            value: l.ppm,
            stroke: dark ? '#f08a83' : '#a1302b',
            lineDash: [6, 4],
            label: { text: l.label, position: i === 0 ? ('bottom-right' as const) : ('top-right' as const) },
          })),
        },
      },
      legend: { position: 'bottom' },
    };
  }, [curves, limits, dark]);
  return <AgCharts options={options} style={{ height: '100%' }} />;
}
