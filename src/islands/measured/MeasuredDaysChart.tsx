/**
 * Measured school days of one season (thin lines) over the model's predicted day for that season (thick line),
 * with the criterion's limits. ag-charts with only the modules used; render client:only in a fixed-height box.
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

export interface MeasuredDaysChartProps {
  predicted: { minute: number; co2Ppm: number }[];
  days: { date: string; points: { minute: number; co2Ppm: number }[] }[];
  limits: { label: string; ppm: number }[];
}

export default function MeasuredDaysChart({ predicted, days, limits }: MeasuredDaysChartProps) {
  const dark = useDarkTheme();
  const options = useMemo<AgCartesianChartOptions>(() => {
    const measuredColour = dark ? '#7fa7c9' : '#3d6b93';
    return {
      theme: dark ? 'ag-default-dark' : 'ag-default',
      background: { visible: false },
      series: [
        ...days.map((d, i) => ({
          type: 'line' as const,
          data: d.points,
          xKey: 'minute',
          yKey: 'co2Ppm',
          yName: i === 0 ? 'Measured school days' : d.date,
          title: d.date,
          stroke: measuredColour,
          strokeOpacity: 0.55,
          strokeWidth: 1.2,
          marker: { enabled: false },
          showInLegend: i === 0,
        })),
        {
          type: 'line' as const,
          data: predicted,
          xKey: 'minute',
          yKey: 'co2Ppm',
          yName: 'Predicted (model)',
          title: 'Predicted',
          stroke: dark ? '#e7b35f' : '#8a5a12',
          strokeWidth: 3,
          marker: { enabled: false },
        },
      ],
      axes: co2DayAxes(limits, dark),
      legend: { position: 'bottom' },
    };
  }, [predicted, days, limits, dark]);
  return <AgCharts options={options} style={{ height: '100%' }} />;
}
