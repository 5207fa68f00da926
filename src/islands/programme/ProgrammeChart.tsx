/**
 * Cumulative benefit against cumulative spend, one line per programme (one on the programme page, two or
 * three on the comparison). ag-charts loads in its own chunk once the island is in the browser.
 */
import { lazy, Suspense, useEffect, useState } from 'react';
import type { CumulativeSeries } from './chart-types';
import { Skeleton } from '../portfolio/States';

const Chart = lazy(() => import('./charts/CumulativeChart'));

export default function ProgrammeChart({ series, heightPx = 320 }: { series: CumulativeSeries[]; heightPx?: number }) {
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  return (
    <div style={{ height: heightPx }} data-testid="programme-chart">
      {mounted ? (
        <Suspense fallback={<Skeleton lines={4} label="Loading the chart" />}>
          <Chart series={series} />
        </Suspense>
      ) : (
        <Skeleton lines={4} label="Loading the chart" />
      )}
    </div>
  );
}
