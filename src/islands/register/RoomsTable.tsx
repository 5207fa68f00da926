import { useMemo, useState } from 'react';
import {
  flexRender,
  getCoreRowModel,
  useReactTable,
  type ColumnDef,
  type RowSelectionState,
  type SortingState,
} from '@tanstack/react-table';
import {
  physicalChecks,
  RoomFieldsSchema,
  useBulkUpdate,
  useDeleteRooms,
  useRooms,
  useUpdateRoom,
  type Room,
  type RoomFields,
  type RoomsQuery,
} from '../../lib/client/register';
import { formatDecimals } from '../../lib/format';
import { EditableCell } from './EditableCell';
import { AddRoomForm } from './AddRoomForm';
import type { Option, RegisterOptions, RegisterPermissions, SchoolOption } from './types';

const SORTABLE = new Set([
  'code',
  'name',
  'school',
  'block',
  'use',
  'floorAreaM2',
  'pupils',
  'ventilationType',
  'openableAreaM2',
]);

const roomFields = (r: Room): RoomFields => ({
  code: r.code,
  name: r.name,
  use: r.use,
  floorAreaM2: r.floorAreaM2,
  ceilingHeightM: r.ceilingHeightM,
  pupils: r.pupils,
  adults: r.adults,
  ageGroup: r.ageGroup,
  orientationDeg: r.orientationDeg,
  glazingAreaM2: r.glazingAreaM2,
  openableAreaM2: r.openableAreaM2,
  windowType: r.windowType,
  frameMaterial: r.frameMaterial,
  glazingGValue: r.glazingGValue,
  ventilationType: r.ventilationType,
  mechanicalSupplyLps: r.mechanicalSupplyLps,
  winterWindowOpenFraction: r.winterWindowOpenFraction,
  notes: r.notes,
});

/** Numbers as en-GB text with at most two decimals, so a height entered as 2.75 m reads 2.75 (never 2.8). */
const numberDisplay = (value: unknown): string | undefined =>
  typeof value === 'number' ? formatDecimals(value, 2) : undefined;

/** The select box and the room code stay in view while the table scrolls sideways. */
function stickyClass(meta: unknown, id: string, afterSelect: boolean): string {
  if (!(meta as { sticky?: boolean } | undefined)?.sticky) return '';
  if (id === 'select') return 'sticky left-0 z-10 w-9 min-w-9 bg-surface';
  return `sticky z-10 bg-surface shadow-[2px_0_0_0_var(--color-line)] ${afterSelect ? 'left-9' : 'left-0'}`;
}

/** Checks an edited room the way the import does; null when it may be sent. */
function problemWith(room: Room, change: Partial<RoomFields>): string | null {
  const parsed = RoomFieldsSchema.safeParse({ ...roomFields(room), ...change });
  if (!parsed.success) return parsed.error.issues.map((i) => i.message).join(' ');
  const errors = physicalChecks(parsed.data).filter((p) => p.severity === 'error');
  return errors.length ? errors.map((e) => e.message).join(' ') : null;
}

/** The register as an editable table: server-side paging, sorting and filters; inline and bulk edits. */
export function RoomsTable({
  schools,
  options,
  can,
}: {
  schools: SchoolOption[];
  options: RegisterOptions;
  can: RegisterPermissions;
}) {
  const [query, setQuery] = useState<RoomsQuery>({ page: 1, pageSize: 50, sort: 'school', dir: 'asc' });
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [message, setMessage] = useState<{ kind: 'error' | 'info'; text: string } | null>(null);
  const [adding, setAdding] = useState(false);
  const rooms = useRooms(query);
  const update = useUpdateRoom(query);
  const remove = useDeleteRooms(query);
  const bulk = useBulkUpdate(query);
  const editable = can.canUpdate;

  const setFilter = (patch: Partial<RoomsQuery>) => {
    setQuery((q) => ({ ...q, ...patch, page: 1 }));
    setSelection({});
  };

  const edit = (room: Room, change: Partial<RoomFields>) => {
    // Text typed into a number cell ("1.6 m2", "SW") is read by the server as the import reads it; it checks it then.
    const typed =
      Object.values(change).some((v) => typeof v === 'string') &&
      !('code' in change || 'name' in change || 'notes' in change);
    const problem = typed ? null : problemWith(room, change);
    if (problem) {
      setMessage({ kind: 'error', text: `Room ${room.code}: ${problem}` });
      return;
    }
    setMessage(null);
    update.mutate(
      { id: room.id, changes: change },
      {
        onError: (e) => setMessage({ kind: 'error', text: `Room ${room.code} was not changed: ${e.message}` }),
        onSuccess: (r) =>
          setMessage(
            r.warnings.length
              ? { kind: 'info', text: `Room ${room.code} saved. Check: ${r.warnings.map((w) => w.message).join(' ')}` }
              : null,
          ),
      },
    );
  };

  // biome-ignore lint/correctness/useExhaustiveDependencies: edit and remove only call setters and mutations; rebuilding columns every render would reset open cell editors.
  const columns = useMemo<ColumnDef<Room>[]>(() => {
    const text = (
      id: keyof RoomFields,
      header: string,
      kind: 'text' | 'number',
      nullable = false,
    ): ColumnDef<Room> => ({
      id,
      header,
      cell: ({ row }) => (
        <EditableCell
          value={row.original[id] as string | number | null}
          kind={kind}
          display={numberDisplay(row.original[id])}
          nullable={nullable}
          editable={editable}
          label={`${header} of room ${row.original.code}`}
          onCommit={(v) => edit(row.original, { [id]: v } as Partial<RoomFields>)}
        />
      ),
    });
    const select = (id: keyof RoomFields, header: string, opts: Option[], nullable = false): ColumnDef<Room> => ({
      id,
      header,
      cell: ({ row }) => (
        <EditableCell
          value={row.original[id] as string | null}
          kind="select"
          options={opts}
          nullable={nullable}
          editable={editable}
          label={`${header} of room ${row.original.code}`}
          onCommit={(v) => edit(row.original, { [id]: v } as Partial<RoomFields>)}
        />
      ),
    });
    const cols: ColumnDef<Room>[] = [];
    if (can.canUpdate || can.canDelete) {
      cols.push({
        id: 'select',
        meta: { sticky: true },
        header: ({ table }) => (
          <input
            type="checkbox"
            aria-label="Select all rooms on this page"
            checked={table.getIsAllPageRowsSelected()}
            onChange={table.getToggleAllPageRowsSelectedHandler()}
          />
        ),
        cell: ({ row }) => (
          <input
            type="checkbox"
            aria-label={`Select room ${row.original.code}`}
            checked={row.getIsSelected()}
            onChange={row.getToggleSelectedHandler()}
          />
        ),
      });
    }
    const code = text('code', 'Room code', 'text');
    cols.push(
      {
        ...code,
        // The room code stays in view while the table scrolls sideways, with the way to the room's page.
        meta: { sticky: true },
        cell: (ctx) => (
          <span className="flex items-center gap-2">
            <span className="min-w-12">{flexRender(code.cell, ctx)}</span>
            <a
              href={`/app/rooms/${ctx.row.original.id}`}
              className="text-xs font-semibold whitespace-nowrap"
              aria-label={`Open room ${ctx.row.original.code} of ${ctx.row.original.schoolName}`}
            >
              Open ›
            </a>
          </span>
        ),
      },
      text('name', 'Room name', 'text'),
      {
        id: 'school',
        header: 'School',
        cell: ({ row }) => (
          <span className="block max-w-48 truncate" title={row.original.schoolName}>
            {row.original.schoolName}
          </span>
        ),
      },
      {
        id: 'block',
        header: 'Block',
        cell: ({ row }) => (
          <span className="block max-w-36 truncate" title={row.original.blockName ?? undefined}>
            {row.original.blockName ?? '—'}
          </span>
        ),
      },
      select('use', 'Use', options.uses, true),
      text('floorAreaM2', 'Floor m²', 'number'),
      text('ceilingHeightM', 'Ceiling m', 'number', true),
      text('pupils', 'Pupils', 'number', true),
      text('adults', 'Adults', 'number', true),
      select('ageGroup', 'Age group', options.ageGroups, true),
      text('orientationDeg', 'Bearing °', 'number', true),
      text('glazingAreaM2', 'Glazing m²', 'number', true),
      text('openableAreaM2', 'Openable m²', 'number', true),
      select('windowType', 'Window', options.windowTypes, true),
      select('frameMaterial', 'Frame', options.frameMaterials, true),
      text('glazingGValue', 'g-value', 'number', true),
      select('ventilationType', 'Ventilation', options.ventilationTypes, true),
      text('mechanicalSupplyLps', 'Supply l/s', 'number', true),
      text('winterWindowOpenFraction', 'Winter window open (0–1)', 'number', true),
      text('notes', 'Notes', 'text', true),
    );
    if (can.canDelete) {
      cols.push({
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        cell: ({ row }) => (
          <button
            type="button"
            className="text-danger hover:underline"
            onClick={() => {
              if (!window.confirm(`Delete room ${row.original.code} of ${row.original.schoolName}?`)) return;
              remove.mutate([row.original.id], {
                onError: (e) =>
                  setMessage({ kind: 'error', text: `Room ${row.original.code} was not deleted: ${e.message}` }),
              });
            }}
          >
            Delete
          </button>
        ),
      });
    }
    return cols;
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [editable, can.canDelete, can.canUpdate, options, query]);

  const data = useMemo(() => rooms.data?.rows ?? [], [rooms.data]);
  const sorting: SortingState = [{ id: query.sort, desc: query.dir === 'desc' }];
  const table = useReactTable({
    data,
    columns,
    getRowId: (r) => r.id,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    autoResetPageIndex: false,
    enableRowSelection: true,
    rowCount: rooms.data?.total ?? 0,
    state: { sorting, rowSelection: selection, pagination: { pageIndex: query.page - 1, pageSize: query.pageSize } },
    onRowSelectionChange: setSelection,
  });
  const selectedIds = Object.keys(selection).filter((id) => selection[id]);
  const pages = Math.max(1, Math.ceil((rooms.data?.total ?? 0) / query.pageSize));
  const sortBy = (id: string) => {
    if (!SORTABLE.has(id)) return;
    setQuery((q) => ({ ...q, sort: id, dir: q.sort === id && q.dir === 'asc' ? 'desc' : 'asc', page: 1 }));
  };
  const applyBulk = (change: Partial<RoomFields>) => {
    bulk.mutate(
      { ids: selectedIds, changes: change },
      {
        onError: (e) => setMessage({ kind: 'error', text: `No room was changed: ${e.message}` }),
        onSuccess: (r) => {
          setMessage({
            kind: 'info',
            text: `${r.count} rooms changed.${
              r.warnings.length
                ? ` Check: ${r.warnings
                    .slice(0, 3)
                    .map((w) => `${w.code}: ${w.message}`)
                    .join(' ')}`
                : ''
            }`,
          });
          setSelection({});
        },
      },
    );
  };

  return (
    <section aria-label="Rooms">
      <div className="flex flex-wrap items-end gap-3">
        <label className="text-sm">
          School
          <br />
          <select
            className="rounded-control border border-line bg-surface px-2 py-1"
            value={query.schoolId ?? ''}
            onChange={(e) => setFilter({ schoolId: e.target.value || undefined })}
          >
            <option value="">All schools</option>
            {schools.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm">
          Use
          <br />
          <select
            className="rounded-control border border-line bg-surface px-2 py-1"
            value={query.use ?? ''}
            onChange={(e) => setFilter({ use: e.target.value || undefined })}
          >
            <option value="">Any use</option>
            {options.uses.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm">
          Ventilation
          <br />
          <select
            className="rounded-control border border-line bg-surface px-2 py-1"
            value={query.ventilationType ?? ''}
            onChange={(e) => setFilter({ ventilationType: e.target.value || undefined })}
          >
            <option value="">Any ventilation</option>
            {options.ventilationTypes.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm">
          Search code or name
          <br />
          <input
            className="rounded-control border border-line bg-surface px-2 py-1"
            type="search"
            value={query.q ?? ''}
            onChange={(e) => setFilter({ q: e.target.value || undefined })}
          />
        </label>
        {can.canCreate && (
          <button
            type="button"
            className="ml-auto rounded-control bg-brand px-3 py-1.5 font-semibold text-white"
            onClick={() => setAdding((a) => !a)}
          >
            {adding ? 'Close' : 'Add a room'}
          </button>
        )}
      </div>
      {adding && (
        <AddRoomForm
          schools={schools}
          options={options}
          onDone={(text) => {
            setMessage({ kind: 'info', text });
            setAdding(false);
          }}
        />
      )}

      {selectedIds.length > 0 && (
        <section
          className="mt-3 flex flex-wrap items-center gap-3 rounded-card border border-brand bg-brand-soft p-3 text-sm"
          aria-label="Bulk edit"
        >
          <strong>{selectedIds.length} selected</strong>
          {can.canUpdate && (
            <>
              <label>
                Set ventilation{' '}
                <select
                  aria-label="Set ventilation of selected rooms"
                  className="rounded-control border border-line bg-surface px-2 py-1"
                  value=""
                  onChange={(e) =>
                    e.target.value && applyBulk({ ventilationType: e.target.value as RoomFields['ventilationType'] })
                  }
                >
                  <option value="">Choose…</option>
                  {options.ventilationTypes.map((o) => (
                    <option key={o.value} value={o.value}>
                      {o.label}
                    </option>
                  ))}
                </select>
              </label>
              <label>
                Set use{' '}
                <select
                  aria-label="Set use of selected rooms"
                  className="rounded-control border border-line bg-surface px-2 py-1"
                  value=""
                  onChange={(e) => e.target.value && applyBulk({ use: e.target.value as RoomFields['use'] })}
                >
                  <option value="">Choose…</option>
                  {options.uses.map((o) => (
                    <option key={o.value} value={o.value}>
                      {o.label}
                    </option>
                  ))}
                </select>
              </label>
            </>
          )}
          {can.canDelete && (
            <button
              type="button"
              className="rounded-control border border-danger px-2 py-1 text-danger"
              onClick={() => {
                if (!window.confirm(`Delete ${selectedIds.length} rooms? This cannot be undone.`)) return;
                remove.mutate(selectedIds, {
                  onError: (e) => setMessage({ kind: 'error', text: `No room was deleted: ${e.message}` }),
                  onSuccess: () => setSelection({}),
                });
              }}
            >
              Delete selected
            </button>
          )}
        </section>
      )}

      <p
        role="status"
        aria-live="polite"
        className={
          message
            ? `mt-3 rounded-control p-2 text-sm ${message.kind === 'error' ? 'bg-danger-soft text-danger' : 'bg-brand-soft'}`
            : 'sr-only'
        }
      >
        {message?.text ?? ''}
      </p>

      <div className="mt-3 overflow-x-auto rounded-card border border-line bg-surface">
        <table className="w-full text-left text-sm" data-testid="register-table">
          <caption className="sr-only">Rooms of the register{editable ? '; select a value to edit it' : ''}</caption>
          <thead className="border-b border-line text-ink-muted">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted =
                    query.sort === h.column.id ? (query.dir === 'asc' ? 'ascending' : 'descending') : 'none';
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      className={`whitespace-nowrap px-2 py-2 ${stickyClass(h.column.columnDef.meta, h.column.id, can.canUpdate || can.canDelete)}`}
                      aria-sort={SORTABLE.has(h.column.id) ? sorted : undefined}
                    >
                      {SORTABLE.has(h.column.id) ? (
                        <button type="button" className="font-semibold" onClick={() => sortBy(h.column.id)}>
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          {sorted === 'ascending' ? ' ↑' : sorted === 'descending' ? ' ↓' : ''}
                        </button>
                      ) : (
                        flexRender(h.column.columnDef.header, h.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-b border-line last:border-0" data-room-code={row.original.code}>
                {row.getVisibleCells().map((cell) => (
                  <td
                    key={cell.id}
                    className={`whitespace-nowrap px-2 py-1 ${stickyClass(cell.column.columnDef.meta, cell.column.id, can.canUpdate || can.canDelete)}`}
                  >
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {!rooms.isLoading && data.length === 0 && (
              <tr>
                <td className="px-3 py-6 text-ink-muted" colSpan={columns.length}>
                  No rooms match. Import a register or add a room.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      <nav aria-label="Pages" className="mt-3 flex items-center gap-3 text-sm">
        <button
          type="button"
          className="rounded-control border border-line px-2 py-1 disabled:opacity-50"
          disabled={query.page <= 1}
          onClick={() => setQuery((q) => ({ ...q, page: q.page - 1 }))}
        >
          Previous
        </button>
        <span>
          Page {query.page} of {pages} · {rooms.data?.total ?? 0} rooms
        </span>
        <button
          type="button"
          className="rounded-control border border-line px-2 py-1 disabled:opacity-50"
          disabled={query.page >= pages}
          onClick={() => setQuery((q) => ({ ...q, page: q.page + 1 }))}
        >
          Next
        </button>
        {rooms.isFetching && <span className="text-ink-muted">Loading…</span>}
      </nav>
    </section>
  );
}
