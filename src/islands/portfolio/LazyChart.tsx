/** Loads the chart library only in the browser, after the island has mounted (it is in its own chunk). */
import { lazy, Suspense, useEffect, useState } from 'react';
import type { ChartData } from './chart-data';
import { Skeleton } from './States';

const PortfolioChart = lazy(() => import('./charts/PortfolioChart'));

export function LazyChart({ data, heightPx }: { data: ChartData; heightPx: number }) {
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  return (
    <div style={{ height: heightPx }} data-testid={`chart-${data.kind}`}>
      {mounted ? (
        <Suspense fallback={<Skeleton lines={4} label="Loading the chart" />}>
          <PortfolioChart data={data} />
        </Suspense>
      ) : (
        <Skeleton lines={4} label="Loading the chart" />
      )}
    </div>
  );
}
