/** The heavy half of the programme chart: ag-charts with only the modules it uses. */
import { LegendModule, LineSeriesModule, ModuleRegistry, NumberAxisModule } from 'ag-charts-community';
import { AgCharts } from 'ag-charts-react';
import { useDarkTheme } from '../../use-dark-theme';
import type { CumulativeSeries } from '../chart-types';
import { formatDecimals, formatInteger } from '../../../lib/format';

ModuleRegistry.registerModules([LineSeriesModule, NumberAxisModule, LegendModule]);

const LIGHT = ['#2f6f4f', '#9b5a06', '#3c5a99'];
const DARK = ['#7fcfa3', '#f0b45e', '#9db7f0'];
const gbp = (v: number) =>
  v >= 1e6 ? `£${formatDecimals(v / 1e6, 1, 1)}m` : `£${formatInteger(Math.round(v / 1000))}k`;

export default function CumulativeChart({ series }: { series: CumulativeSeries[] }) {
  const dark = useDarkTheme();
  const colours = dark ? DARK : LIGHT;
  return (
    <AgCharts
      options={{
        background: { visible: false },
        theme: dark ? 'ag-default-dark' : 'ag-default',
        series: series.map((s, i) => ({
          type: 'line' as const,
          data: s.points,
          xKey: 'cumulativeCapitalGbp',
          xName: 'Capital spent',
          yKey: 'cumulativePupilHoursRemoved',
          yName: s.name,
          stroke: colours[i % colours.length]!,
          marker: { enabled: false },
          tooltip: {
            renderer: ({ datum }: { datum: CumulativeSeries['points'][number] }) => ({
              heading: s.name,
              title: datum.label,
              data: [
                { label: 'Capital spent', value: gbp(datum.cumulativeCapitalGbp) },
                {
                  label: 'Pupil-hours removed a year',
                  value: formatInteger(Math.round(datum.cumulativePupilHoursRemoved)),
                },
              ],
            }),
          },
        })),
        axes: {
          x: {
            type: 'number',
            position: 'bottom',
            title: { text: 'Capital spent, with on-costs, in programme order' },
            label: { formatter: ({ value }) => gbp(Number(value)) },
          },
          y: {
            type: 'number',
            position: 'left',
            title: { text: 'Pupil-hours of poor air removed a year' },
            label: { formatter: ({ value }) => formatInteger(Math.round(Number(value))) },
          },
        },
        legend: { enabled: series.length > 1, position: 'bottom' },
      }}
    />
  );
}
