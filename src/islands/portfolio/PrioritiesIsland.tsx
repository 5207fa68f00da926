/**
 * The priorities page: weight sliders that re-rank without a reload, filters, a server-sorted and
 * server-paged table of every assessed room, row selection with running totals, and the export link.
 */
import {
  flexRender,
  getCoreRowModel,
  useReactTable,
  type ColumnDef,
  type PaginationState,
  type SortingState,
} from '@tanstack/react-table';
import { useEffect, useMemo, useState } from 'react';
import {
  prioritiesSearch,
  usePriorities,
  useSaveWeights,
  useWeights,
  type PriorityRow,
  type Weights,
} from '../../lib/client/portfolio';
import { RISK_BAND_RULES, riskBandOfNumber, riskPriority } from '../../lib/engine/risk';
import { formatGbp, formatInteger, formatNumber } from '../../lib/format';
import { QueryRoot } from './QueryRoot';
import { EmptyState, ErrorState, Skeleton } from './States';
import { WeightSliders } from './WeightSliders';

export interface PrioritiesProps {
  schools: { id: string; name: string; blocks: { id: string; name: string }[] }[];
  ventilationTypes: { value: string; label: string }[];
  bandLabels: { value: number; label: string }[];
  savedWeights: Weights;
  canSaveWeights: boolean;
  canExport: boolean;
  hasRooms: boolean;
  hasResults: boolean;
}

interface Filters {
  schoolId?: string | undefined;
  blockId?: string | undefined;
  band?: number | undefined;
  ventilationType?: string | undefined;
  criteriaMet?: boolean | undefined;
}

/** What a room's risk rests on, as the list shows it. */
const EVIDENCE_LABELS = { measured: 'measured', calibrated: 'calibrated model', predicted: 'predicted' } as const;
const SORT_IDS = new Set([
  'rank',
  'school',
  'pupils',
  'meanCo2Ppm',
  'peakCo2Ppm',
  'riskBand',
  'unitCount',
  'capitalCostGbp',
  'simplePaybackYears',
]);
const sameWeights = (a: Weights, b: Weights) =>
  Math.abs(a.risk - b.risk) < 1e-9 &&
  Math.abs(a.costEffectiveness - b.costEffectiveness) < 1e-9 &&
  Math.abs(a.payback - b.payback) < 1e-9;
const money = (v: number | null) => (v === null ? '—' : formatGbp(v));
const years = (v: number | null, hasUnits: boolean) =>
  !hasUnits ? '—' : v === null ? 'Never' : `${formatNumber(v)} yrs`;

/** Selected rooms across pages, with what the running totals need. */
type Selection = Map<string, { capital: number; pupils: number }>;

/** A band as people read it: its priority (1 = most urgent), its name, and its rule on hover. */
export function BandBadge({ band, label }: { band: number; label: string }) {
  const colour =
    [
      '',
      'border-band-1 text-band-1',
      'border-band-2 text-band-2',
      'border-band-3 text-band-3',
      'border-band-4 text-band-4',
    ][band] ?? '';
  const named = riskBandOfNumber(band);
  const priority = riskPriority(named);
  return (
    <span
      className={`inline-flex cursor-help items-center gap-1 rounded-control border px-2 py-0.5 text-xs font-semibold ${colour}`}
      title={`Priority ${priority}: ${RISK_BAND_RULES[named]}`}
      data-testid="band-badge"
      data-priority={priority}
    >
      <span>
        <span className="sr-only">Priority </span>P{priority}
      </span>
      <span className="sr-only">:</span>
      {label}
    </span>
  );
}

/** The units column: the models for a room that needs them, "None needed" for one that meets its criterion, else why not. */
function UnitsCell({ row }: { row: PriorityRow }) {
  if (row.criteriaMet)
    return (
      <span className="text-xs text-ink-muted" title="The room meets its criterion: no units are recommended.">
        None needed
      </span>
    );
  if (row.unitCount > 0) return <span className="text-xs">{row.unitsRecommended}</span>;
  return <span className="text-xs text-ink-muted">{row.unitsRecommended || 'None: see the room page for why'}</span>;
}

function Priorities(props: PrioritiesProps) {
  const saved = useWeights();
  const savedWeights = saved.data?.weights ?? props.savedWeights;
  const [weights, setWeights] = useState<Weights>(props.savedWeights);
  const [debouncedWeights, setDebouncedWeights] = useState<Weights>(props.savedWeights);
  const [filters, setFilters] = useState<Filters>({});
  const [sorting, setSorting] = useState<SortingState>([{ id: 'rank', desc: false }]);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 50 });
  const [selection, setSelection] = useState<Selection>(new Map());
  const save = useSaveWeights();

  // Sliders move fast: ask the server once they rest for a moment.
  useEffect(() => {
    const timer = setTimeout(() => setDebouncedWeights(weights), 250);
    return () => clearTimeout(timer);
  }, [weights]);
  // A new ranking or filter starts again at the first page.
  // biome-ignore lint/correctness/useExhaustiveDependencies: the dependencies are the triggers, not inputs.
  useEffect(() => setPagination((p) => ({ ...p, pageIndex: 0 })), [filters, debouncedWeights]);

  const sort = sorting[0] ?? { id: 'rank', desc: false };
  const preview = sameWeights(debouncedWeights, savedWeights) ? null : debouncedWeights;
  const params = {
    page: pagination.pageIndex + 1,
    pageSize: pagination.pageSize,
    sort: SORT_IDS.has(sort.id) ? sort.id : 'rank',
    dir: (sort.desc ? 'desc' : 'asc') as 'asc' | 'desc',
    ...filters,
    weights: preview,
  };
  const query = usePriorities(params);
  const data = useMemo(() => query.data?.rows ?? [], [query.data]);

  const columns = useMemo<ColumnDef<PriorityRow>[]>(
    () => [
      {
        id: 'select',
        enableSorting: false,
        header: () => <span className="sr-only">Select</span>,
        cell: ({ row }) => (
          <input
            type="checkbox"
            className="h-4 w-4 accent-brand"
            checked={selection.has(row.original.roomId)}
            aria-label={`Select ${row.original.schoolName} ${row.original.roomCode}`}
            onChange={(e) =>
              setSelection((prev) => {
                const next = new Map(prev);
                if (e.target.checked)
                  next.set(row.original.roomId, {
                    capital: row.original.capitalCostGbp ?? 0,
                    pupils: row.original.pupils,
                  });
                else next.delete(row.original.roomId);
                return next;
              })
            }
          />
        ),
      },
      {
        id: 'rank',
        header: 'Rank',
        cell: ({ row }) => <span className="font-semibold tabular-nums">{row.original.rank}</span>,
      },
      {
        id: 'school',
        header: 'Room, school and block',
        cell: ({ row }) => (
          <span className="block min-w-40">
            <a href={`/app/rooms/${row.original.roomId}`} className="font-semibold">
              {row.original.roomCode}
              <span className="block text-xs font-normal">{row.original.roomName}</span>
            </a>
            <span className="block text-xs text-ink-muted">
              {row.original.schoolName} · {row.original.blockName ?? 'No block'}
            </span>
          </span>
        ),
      },
      {
        id: 'riskBand',
        header: 'Band',
        cell: ({ row }) => (
          <span className="flex min-w-36 flex-col items-start gap-0.5">
            <BandBadge band={row.original.riskBand} label={row.original.riskBandLabel} />
            <span className="text-xs text-ink-muted" data-testid="risk-evidence">
              {EVIDENCE_LABELS[row.original.riskEvidence]}
            </span>
          </span>
        ),
      },
      {
        id: 'unitCount',
        header: 'Units recommended',
        cell: ({ row }) => <UnitsCell row={row.original} />,
      },
      {
        id: 'capitalCostGbp',
        header: 'Capital',
        meta: { numeric: true },
        cell: ({ row }) => money(row.original.capitalCostGbp),
      },
      {
        id: 'simplePaybackYears',
        header: 'Payback',
        meta: { numeric: true },
        cell: ({ row }) => years(row.original.simplePaybackYears, row.original.unitCount > 0),
      },
      {
        id: 'pupilHours',
        enableSorting: false,
        header: 'Pupil-hours a year above the limit',
        meta: { numeric: true },
        cell: ({ row }) => formatInteger(row.original.pupilHoursAbove),
      },
      { id: 'pupils', header: 'Pupils', meta: { numeric: true }, cell: ({ row }) => row.original.pupils },
      {
        id: 'meanCo2Ppm',
        header: 'Mean CO₂ (ppm)',
        meta: { numeric: true },
        cell: ({ row }) => formatInteger(row.original.meanCo2Ppm),
      },
      {
        id: 'peakCo2Ppm',
        header: 'Peak CO₂ (ppm)',
        meta: { numeric: true },
        cell: ({ row }) => formatInteger(row.original.peakCo2Ppm),
      },
      {
        id: 'reason',
        enableSorting: false,
        header: 'Why',
        cell: ({ row }) => <span className="block min-w-64 text-xs">{row.original.reason}</span>,
      },
    ],
    [selection],
  );

  const table = useReactTable({
    data,
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (row) => row.roomId,
    manualPagination: true,
    manualSorting: true,
    rowCount: query.data?.total ?? 0,
    autoResetPageIndex: false,
    enableSortingRemoval: false,
    state: { sorting, pagination },
    onSortingChange: (updater) => {
      setSorting(updater);
      setPagination((p) => ({ ...p, pageIndex: 0 }));
    },
    onPaginationChange: setPagination,
  });

  const totals = useMemo(() => {
    let capital = 0;
    let pupils = 0;
    for (const s of selection.values()) {
      capital += s.capital;
      pupils += s.pupils;
    }
    return { capital, pupils };
  }, [selection]);

  const school = props.schools.find((s) => s.id === filters.schoolId);
  const filtered = Object.values(filters).some((v) => v !== undefined);
  const exportHref = `/api/exports/priorities.xlsx?${prioritiesSearch({ ...params, page: undefined, pageSize: undefined })}`;
  const total = query.data?.total ?? 0;
  const pageCount = Math.max(1, Math.ceil(total / pagination.pageSize));
  const setFilter = (patch: Filters) => setFilters((f) => ({ ...f, ...patch }));

  if (!props.hasRooms) {
    return (
      <EmptyState title="No rooms in the register yet.">
        <a className="underline" href="/app/register">
          Import your register
        </a>{' '}
        to list your schools' rooms, then run an assessment.
      </EmptyState>
    );
  }
  if (!props.hasResults) {
    return (
      <EmptyState title="No assessed rooms yet.">
        <a className="underline" href="/app/assessments">
          Run an assessment
        </a>{' '}
        of the trust to rank its rooms.
      </EmptyState>
    );
  }

  return (
    <div className="space-y-4">
      <WeightSliders
        weights={weights}
        savedWeights={savedWeights}
        isDefault={saved.data?.isDefault ?? true}
        canSave={props.canSaveWeights}
        saving={save.isPending}
        saveError={save.error?.message ?? null}
        saved={save.isSuccess && sameWeights(savedWeights, weights)}
        onChange={setWeights}
        onSave={() => save.mutate(weights)}
      />

      <fieldset className="rounded-card border border-line bg-surface p-4">
        <legend className="px-1 text-sm font-semibold">Filter rooms</legend>
        <div className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-5">
          <label className="text-sm">
            <span className="block font-semibold">School</span>
            <select
              className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1.5"
              value={filters.schoolId ?? ''}
              onChange={(e) => setFilter({ schoolId: e.target.value || undefined, blockId: undefined })}
            >
              <option value="">All schools</option>
              {props.schools.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name}
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm">
            <span className="block font-semibold">Block</span>
            <select
              className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1.5 disabled:opacity-60"
              value={filters.blockId ?? ''}
              disabled={!school}
              onChange={(e) => setFilter({ blockId: e.target.value || undefined })}
            >
              <option value="">{school ? 'All blocks' : 'Choose a school first'}</option>
              {school?.blocks.map((b) => (
                <option key={b.id} value={b.id}>
                  {b.name}
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm">
            <span className="block font-semibold">Band</span>
            <select
              className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1.5"
              value={filters.band ?? ''}
              onChange={(e) => setFilter({ band: e.target.value ? Number(e.target.value) : undefined })}
            >
              <option value="">All bands</option>
              {props.bandLabels.map((b) => (
                <option key={b.value} value={b.value}>
                  {b.label}
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm">
            <span className="block font-semibold">Ventilation</span>
            <select
              className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1.5"
              value={filters.ventilationType ?? ''}
              onChange={(e) => setFilter({ ventilationType: e.target.value || undefined })}
            >
              <option value="">All types</option>
              {props.ventilationTypes.map((v) => (
                <option key={v.value} value={v.value}>
                  {v.label}
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm">
            <span className="block font-semibold">Criterion</span>
            <select
              className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1.5"
              value={filters.criteriaMet === undefined ? '' : String(filters.criteriaMet)}
              onChange={(e) =>
                setFilter({ criteriaMet: e.target.value === '' ? undefined : e.target.value === 'true' })
              }
            >
              <option value="">Met or not</option>
              <option value="false">Not met</option>
              <option value="true">Met</option>
            </select>
          </label>
        </div>
        {filtered && (
          <button
            type="button"
            className="mt-3 text-sm font-semibold text-brand underline"
            onClick={() => setFilters({})}
          >
            Clear filters
          </button>
        )}
      </fieldset>

      <div
        className="flex flex-wrap items-center gap-3 rounded-card border border-line bg-surface px-4 py-3 text-sm"
        aria-live="polite"
        data-testid="selection-totals"
      >
        {selection.size === 0 ? (
          <span className="text-ink-muted">
            Tick rooms to see the capital they need and the pupils they would help.
          </span>
        ) : (
          <>
            <span>
              <strong>{selection.size}</strong> {selection.size === 1 ? 'room' : 'rooms'} selected
            </span>
            <span>
              Capital <strong>{formatGbp(totals.capital)}</strong>
            </span>
            <span>
              Pupils helped <strong>{formatInteger(totals.pupils)}</strong>
            </span>
            <button
              type="button"
              className="font-semibold text-brand underline"
              onClick={() => setSelection(new Map())}
            >
              Clear selection
            </button>
          </>
        )}
        {props.canExport && (
          <a
            className="ml-auto rounded-control border border-brand px-3 py-1.5 font-semibold no-underline"
            href={exportHref}
            download
          >
            Export this view (.xlsx)
          </a>
        )}
      </div>

      {query.isError && !query.data ? (
        <ErrorState message={query.error.message} onRetry={() => void query.refetch()} />
      ) : query.isPending ? (
        <div className="rounded-card border border-line bg-surface">
          <Skeleton lines={10} label="Loading the ranked rooms" />
        </div>
      ) : total === 0 ? (
        <EmptyState title="No rooms match these filters.">
          <button type="button" className="font-semibold text-brand underline" onClick={() => setFilters({})}>
            Clear filters
          </button>{' '}
          to see every assessed room.
        </EmptyState>
      ) : (
        <div className="rounded-card border border-line bg-surface">
          <section className="overflow-x-auto" aria-busy={query.isFetching} tabIndex={0} aria-label="Ranked rooms">
            <table className="w-full text-left text-sm" data-testid="priorities-table">
              <caption className="sr-only">
                Assessed rooms ranked for retrofit,{' '}
                {preview ? 'with the weights you are trying out' : "with the trust's saved weights"}; sorted by{' '}
                {sort.id}.
              </caption>
              <thead className="border-b border-line text-ink-muted">
                {table.getHeaderGroups().map((group) => (
                  <tr key={group.id}>
                    {group.headers.map((header) => {
                      const numeric = (header.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                      const sorted = header.column.getIsSorted();
                      return (
                        <th
                          key={header.id}
                          scope="col"
                          className={`px-3 py-2 font-semibold ${numeric ? 'text-right' : ''}`}
                          aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                        >
                          {header.column.getCanSort() ? (
                            <button
                              type="button"
                              className="inline-flex items-center gap-1 font-semibold hover:text-ink"
                              onClick={header.column.getToggleSortingHandler()}
                            >
                              {flexRender(header.column.columnDef.header, header.getContext())}
                              <span aria-hidden="true">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
                            </button>
                          ) : (
                            flexRender(header.column.columnDef.header, header.getContext())
                          )}
                        </th>
                      );
                    })}
                  </tr>
                ))}
              </thead>
              <tbody className={query.isFetching ? 'opacity-60' : ''}>
                {table.getRowModel().rows.map((row) => (
                  <tr
                    key={row.id}
                    className="border-b border-line align-top last:border-0"
                    data-room-id={row.original.roomId}
                  >
                    {row.getVisibleCells().map((cell) => {
                      const numeric = (cell.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                      return (
                        <td key={cell.id} className={`px-3 py-2 ${numeric ? 'text-right tabular-nums' : ''}`}>
                          {flexRender(cell.column.columnDef.cell, cell.getContext())}
                        </td>
                      );
                    })}
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
          <nav
            aria-label="Pages of the list"
            className="flex flex-wrap items-center gap-3 border-t border-line px-4 py-3 text-sm"
          >
            <button
              type="button"
              className="rounded-control border border-line px-3 py-1.5 font-semibold disabled:opacity-50"
              onClick={() => table.previousPage()}
              disabled={!table.getCanPreviousPage()}
            >
              Previous
            </button>
            <span>
              Page {pagination.pageIndex + 1} of {formatInteger(pageCount)} · {formatInteger(total)} rooms
            </span>
            <button
              type="button"
              className="rounded-control border border-line px-3 py-1.5 font-semibold disabled:opacity-50"
              onClick={() => table.nextPage()}
              disabled={!table.getCanNextPage()}
            >
              Next
            </button>
            <label className="ml-auto">
              Rows per page{' '}
              <select
                className="rounded-control border border-line bg-surface px-2 py-1"
                value={pagination.pageSize}
                onChange={(e) => setPagination({ pageIndex: 0, pageSize: Number(e.target.value) })}
              >
                {[25, 50, 100, 200].map((n) => (
                  <option key={n} value={n}>
                    {n}
                  </option>
                ))}
              </select>
            </label>
            {query.isFetching && (
              <span role="status" className="text-ink-muted">
                Updating…
              </span>
            )}
            <p className="basis-full text-xs text-ink-muted">
              Money is against the baseline the finance lead chose (shown per room). Payback “Never”: heating saved does
              not cover fans and servicing; such units are recommended for the air, not the bill.
            </p>
            {query.isError && query.data && (
              <span role="alert" className="text-danger">
                {query.error.message}{' '}
                <button type="button" className="underline" onClick={() => void query.refetch()}>
                  Try again
                </button>
              </span>
            )}
          </nav>
        </div>
      )}
    </div>
  );
}

/** The priorities island, with its query client. */
export default function PrioritiesIsland(props: PrioritiesProps) {
  return (
    <QueryRoot>
      <Priorities {...props} />
    </QueryRoot>
  );
}
