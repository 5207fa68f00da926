/**
 * The heavy half of every portfolio chart: ag-charts with only the modules we use. Loaded lazily by
 * LazyChart so the library ships in its own chunk, and only once a chart scrolls into view.
 */
import {
  BarSeriesModule,
  CategoryAxisModule,
  LegendModule,
  LineSeriesModule,
  ModuleRegistry,
  NumberAxisModule,
  ScatterSeriesModule,
  type AgCartesianChartOptions,
} from 'ag-charts-community';
import { AgCharts } from 'ag-charts-react';
import type { ChartData } from '../chart-data';
import { formatGbp, formatInteger } from '../../../lib/format';
import { useDarkTheme } from '../../use-dark-theme';

ModuleRegistry.registerModules([
  BarSeriesModule,
  LineSeriesModule,
  ScatterSeriesModule,
  CategoryAxisModule,
  NumberAxisModule,
  LegendModule,
]);

const gbp = (v: number) => formatGbp(v);
const BAND_COLOURS: Record<'light' | 'dark', [string, string, string, string]> = {
  light: ['#2f6f4f', '#6e7d1c', '#9b5a06', '#a1302b'],
  dark: ['#7fcfa3', '#c8d46b', '#f0b45e', '#f08a83'],
};
/** CO2 levels in one hue, light to dark: a scale of ppm, deliberately unlike the band colours. */
const LEVEL_COLOURS: Record<'light' | 'dark', [string, string, string, string]> = {
  light: ['#c9d6e8', '#8ea9cf', '#4f73a8', '#233f6b'],
  dark: ['#2b3d57', '#44648f', '#7397c8', '#b4cbea'],
};

function options(data: ChartData, dark: boolean): AgCartesianChartOptions {
  const bands = dark ? BAND_COLOURS.dark : BAND_COLOURS.light;
  const base = { background: { visible: false }, theme: dark ? 'ag-default-dark' : 'ag-default' } as const;
  switch (data.kind) {
    case 'co2': {
      const levels = dark ? LEVEL_COLOURS.dark : LEVEL_COLOURS.light;
      return {
        ...base,
        data: data.rows,
        series: [
          {
            type: 'bar',
            direction: 'horizontal',
            stacked: true,
            xKey: 'schoolName',
            yKey: 'below1000',
            yName: 'Below 1,000 ppm',
            fill: levels[0],
            stroke: levels[0],
          },
          {
            type: 'bar',
            direction: 'horizontal',
            stacked: true,
            xKey: 'schoolName',
            yKey: 'from1000to1500',
            yName: '1,000–1,499 ppm',
            fill: levels[1],
            stroke: levels[1],
          },
          {
            type: 'bar',
            direction: 'horizontal',
            stacked: true,
            xKey: 'schoolName',
            yKey: 'from1500to2000',
            yName: '1,500–1,999 ppm',
            fill: levels[2],
            stroke: levels[2],
          },
          {
            type: 'bar',
            direction: 'horizontal',
            stacked: true,
            xKey: 'schoolName',
            yKey: 'above2000',
            yName: '2,000 ppm and above',
            fill: levels[3],
            stroke: levels[3],
          },
        ],
        axes: {
          x: { type: 'category', position: 'left' },
          y: { type: 'number', position: 'bottom', title: { text: 'Rooms' } },
        },
        legend: { position: 'bottom' },
      };
    }
    case 'scatter':
      return {
        ...base,
        data: data.points,
        series: [1, 2, 3, 4].map((band) => ({
          type: 'scatter' as const,
          data: data.points.filter((p) => p.riskBand === band),
          xKey: 'simplePaybackYears',
          xName: 'Simple payback (years)',
          yKey: 'riskScore',
          yName: 'Risk score',
          labelKey: 'label',
          title: data.bandLabels[band - 1] ?? `Band ${band}`,
          fill: bands[band - 1]!,
          stroke: bands[band - 1]!,
          size: 6,
        })),
        axes: {
          x: { type: 'number', position: 'bottom', title: { text: 'Simple payback (years)' } },
          y: { type: 'number', position: 'left', min: 0, max: 1, title: { text: 'Risk score (0–1)' } },
        },
        legend: { position: 'bottom' },
      };
    case 'cumulative':
      return {
        ...base,
        data: data.points,
        series: [
          {
            type: 'line',
            xKey: 'cumulativeCapitalGbp',
            xName: 'Capital spent',
            yKey: 'cumulativePupilHoursRemoved',
            yName: 'Pupil-hours of poor air removed a year',
            stroke: bands[0],
            marker: { enabled: false },
          },
        ],
        axes: {
          x: {
            type: 'number',
            position: 'bottom',
            title: { text: 'Capital spent, in ranked order (£)' },
            label: { formatter: ({ value }) => gbp(Number(value)) },
          },
          y: {
            type: 'number',
            position: 'left',
            title: { text: 'Pupil-hours removed a year' },
            label: { formatter: ({ value }) => formatInteger(Number(value)) },
          },
        },
        legend: { enabled: false },
      };
    case 'sensitivity':
      return {
        ...base,
        data: data.rows.map((r) => ({
          ...r,
          label: `${r.energyPriceChangePct > 0 ? '+' : ''}${r.energyPriceChangePct} %`,
        })),
        series: [
          {
            type: 'bar',
            xKey: 'label',
            xName: 'Energy price change',
            yKey: 'npvGbp',
            yName: 'Programme NPV (£)',
            fill: bands[0],
          },
        ],
        axes: {
          x: { type: 'category', position: 'bottom', title: { text: 'Energy prices against the baseline' } },
          y: {
            type: 'number',
            position: 'left',
            title: { text: 'Programme NPV (£)' },
            label: { formatter: ({ value }) => gbp(Number(value)) },
          },
        },
        legend: { enabled: false },
      };
  }
}

/** Renders one chart of the portfolio pages. */
export default function PortfolioChart({ data }: { data: ChartData }) {
  const dark = useDarkTheme();
  return <AgCharts options={options(data, dark)} style={{ height: '100%', width: '100%' }} />;
}
