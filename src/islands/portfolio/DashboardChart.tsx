/**
 * One dashboard chart as a figure: a caption saying what it shows, the chart (its library loaded only
 * when the figure is on screen) and the same figures as a table for people who cannot use the chart.
 */
import { useDashboard, type Dashboard } from '../../lib/client/portfolio';
import { formatGbp, formatInteger, formatNumber } from '../../lib/format';
import type { ChartData } from './chart-data';
import { LazyChart } from './LazyChart';
import { QueryRoot } from './QueryRoot';
import { EmptyState, ErrorState, Skeleton } from './States';

export type DashboardChartKind = 'co2' | 'scatter' | 'cumulative';

interface Props {
  kind: DashboardChartKind;
  bandLabels: string[];
}

const TITLES: Record<DashboardChartKind, string> = {
  co2: 'Daily mean CO₂ by school',
  scatter: 'Risk against payback',
  cumulative: 'What each pound buys, in ranked order',
};

function caption(kind: DashboardChartKind, d: Dashboard): string {
  switch (kind) {
    case 'co2':
      return `Rooms in each school by their worst season's mean CO₂ over the school day, in ppm: the darker the part of a bar, the higher the CO₂. These are levels, not the bands: each room's band compares it with its own criterion (see the priorities).${d.co2Schools.ownBar < d.co2Schools.total ? ` Of ${formatInteger(d.co2Schools.total)} schools, the ${formatInteger(d.co2Schools.ownBar)} with the most rooms at 1,500 ppm or more have a bar each; the others share the last bar.` : ''}`;
    case 'scatter':
      return `Each dot is a room with recommended units: how much poor air its pupils breathe (risk score, up) against how many years the net savings (heating less fans and servicing, against the finance lead's baseline) take to repay the units (right). Rooms up and to the left are the best candidates. ${d.scatter.shown < d.scatter.totalWithRetrofit ? `Showing the ${formatInteger(d.scatter.shown)} highest-ranked of ${formatInteger(d.scatter.totalWithRetrofit)} rooms.` : ''}${d.scatter.neverPayBack > 0 ? ` ${formatInteger(d.scatter.neverPayBack)} rooms whose units never pay back (the heat they save does not cover fans and servicing) are not plotted.` : ''}`;
    case 'cumulative':
      return `Capital spent (across) against the pupil-hours of poor air removed each year (up) if rooms are done in ranked order. A steep start means the first rooms on the list do most good per pound. All ${formatGbp(d.cumulative.totalCapitalGbp)} removes about ${formatInteger(d.cumulative.totalPupilHoursRemoved)} pupil-hours a year.`;
  }
}

function chartData(kind: DashboardChartKind, d: Dashboard, bandLabels: string[]): ChartData {
  if (kind === 'co2') return { kind, rows: d.co2BySchool };
  if (kind === 'scatter') return { kind, points: d.scatter.points, bandLabels };
  return { kind, points: d.cumulative.points };
}

function hasData(kind: DashboardChartKind, d: Dashboard): boolean {
  if (kind === 'co2') return d.co2BySchool.length > 0;
  if (kind === 'scatter') return d.scatter.points.length > 0;
  return d.cumulative.points.length > 0;
}

/** The figures as a table (the scatter is summarised by band, its points are too many to list). */
function TableAlternative({ kind, d, bandLabels }: { kind: DashboardChartKind; d: Dashboard; bandLabels: string[] }) {
  const cell = 'px-3 py-1.5';
  if (kind === 'co2') {
    return (
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Rooms per school by worst-season mean CO₂</caption>
        <thead>
          <tr>
            <th scope="col" className={cell}>
              School
            </th>
            <th scope="col" className={`${cell} text-right`}>
              Below 1,000 ppm
            </th>
            <th scope="col" className={`${cell} text-right`}>
              1,000–1,499
            </th>
            <th scope="col" className={`${cell} text-right`}>
              1,500–1,999
            </th>
            <th scope="col" className={`${cell} text-right`}>
              2,000 and above
            </th>
          </tr>
        </thead>
        <tbody>
          {d.co2BySchool.map((r) => (
            <tr key={r.schoolId ?? 'other-schools'} className="border-t border-line">
              <th scope="row" className={`${cell} font-normal`}>
                {r.schoolName}
              </th>
              <td className={`${cell} text-right tabular-nums`}>{r.below1000}</td>
              <td className={`${cell} text-right tabular-nums`}>{r.from1000to1500}</td>
              <td className={`${cell} text-right tabular-nums`}>{r.from1500to2000}</td>
              <td className={`${cell} text-right tabular-nums`}>{r.above2000}</td>
            </tr>
          ))}
        </tbody>
      </table>
    );
  }
  if (kind === 'scatter') {
    const byBand = [1, 2, 3, 4].map((band) => {
      const pts = d.scatter.points.filter((p) => p.riskBand === band);
      const paybacks = pts.map((p) => p.simplePaybackYears).sort((a, b) => a - b);
      return {
        band,
        count: pts.length,
        median: paybacks.length ? paybacks[Math.floor(paybacks.length / 2)]! : null,
        capital: pts.reduce((s, p) => s + p.capitalCostGbp, 0),
      };
    });
    return (
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Rooms on the scatter by risk band</caption>
        <thead>
          <tr>
            <th scope="col" className={cell}>
              Band
            </th>
            <th scope="col" className={`${cell} text-right`}>
              Rooms
            </th>
            <th scope="col" className={`${cell} text-right`}>
              Median payback
            </th>
            <th scope="col" className={`${cell} text-right`}>
              Capital
            </th>
          </tr>
        </thead>
        <tbody>
          {byBand.map((b) => (
            <tr key={b.band} className="border-t border-line">
              <th scope="row" className={`${cell} font-normal`}>
                {bandLabels[b.band - 1]}
              </th>
              <td className={`${cell} text-right tabular-nums`}>{b.count}</td>
              <td className={`${cell} text-right tabular-nums`}>
                {b.median === null ? '—' : `${formatNumber(b.median)} yrs`}
              </td>
              <td className={`${cell} text-right tabular-nums`}>{formatGbp(b.capital)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    );
  }
  const pts = d.cumulative.points;
  const step = Math.max(1, Math.ceil(pts.length / 10));
  const rows = pts.filter((_, i) => i % step === step - 1 || i === pts.length - 1);
  return (
    <table className="w-full text-left text-sm">
      <caption className="sr-only">Capital and pupil-hours removed, rooms done in ranked order</caption>
      <thead>
        <tr>
          <th scope="col" className={cell}>
            Up to rank
          </th>
          <th scope="col" className={`${cell} text-right`}>
            Capital spent
          </th>
          <th scope="col" className={`${cell} text-right`}>
            Pupil-hours removed a year
          </th>
        </tr>
      </thead>
      <tbody>
        {rows.map((p) => (
          <tr key={p.rank} className="border-t border-line">
            <th scope="row" className={`${cell} font-normal tabular-nums`}>
              {formatInteger(p.rank)}
            </th>
            <td className={`${cell} text-right tabular-nums`}>{formatGbp(p.cumulativeCapitalGbp)}</td>
            <td className={`${cell} text-right tabular-nums`}>{formatInteger(p.cumulativePupilHoursRemoved)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Figure({ kind, bandLabels }: Props) {
  const query = useDashboard();
  const headingId = `chart-${kind}-title`;
  return (
    <figure className="rounded-card border border-line bg-surface p-4" aria-labelledby={headingId}>
      <h2 id={headingId} className="text-lg font-semibold">
        {TITLES[kind]}
      </h2>
      {query.isPending ? (
        <Skeleton lines={5} label={`Loading ${TITLES[kind].toLowerCase()}`} />
      ) : query.isError ? (
        <ErrorState message={query.error.message} onRetry={() => void query.refetch()} />
      ) : kind === 'scatter' && query.data.scatter.points.length === 0 && query.data.scatter.neverPayBack > 0 ? (
        <EmptyState title="No recommended unit pays back against the chosen baseline.">
          Under the current energy prices all {formatInteger(query.data.scatter.neverPayBack)} rooms with recommended
          units cost more to run than the heat they save, so there is no payback to plot. Rank them by need on the{' '}
          <a className="underline" href="/app/priorities">
            priorities page
          </a>
          ; the finance page shows how prices would change this.
        </EmptyState>
      ) : !hasData(kind, query.data) ? (
        <EmptyState title="Nothing to chart yet.">
          {query.data.headline.roomsInRegister === 0 ? (
            <a className="underline" href="/app/register">
              Import your register
            </a>
          ) : (
            <a className="underline" href="/app/assessments">
              Run an assessment
            </a>
          )}
          {kind === 'co2' ? ' to see CO₂ by school.' : ' with a unit catalogue to see where units pay back.'}
        </EmptyState>
      ) : (
        <>
          <figcaption className="mt-1 text-sm text-ink-muted">{caption(kind, query.data)}</figcaption>
          <div className="mt-3">
            <LazyChart
              data={chartData(kind, query.data, bandLabels)}
              heightPx={kind === 'co2' ? Math.max(260, 60 + query.data.co2BySchool.length * 44) : 320}
            />
          </div>
          <details className="mt-3 text-sm">
            <summary className="cursor-pointer font-semibold text-brand">Show these figures as a table</summary>
            <section className="mt-2 overflow-x-auto" tabIndex={0} aria-label={`${TITLES[kind]}: figures`}>
              <TableAlternative kind={kind} d={query.data} bandLabels={bandLabels} />
            </section>
          </details>
        </>
      )}
    </figure>
  );
}

/** A dashboard chart island. */
export default function DashboardChart(props: Props) {
  return (
    <QueryRoot>
      <Figure {...props} />
    </QueryRoot>
  );
}
