/** Data fetching for the register islands: rooms (paged on the server), edits with optimistic updates, imports. */
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { pageQueryClient } from './query-client';
import type { Page, Room } from '../server/estate/estate.types';
import type { ImportHistoryItem, ImportOutcome, ImportPreview } from '../server/register/import.service';
import type { RoomCreate, RoomFields } from '../server/estate/estate.schemas';
import { apiFetch, uploadWithProgress } from './api';

export type { ImportHistoryItem, ImportOutcome, ImportPreview, Page, Room, RoomFields };
export type { RegisterField } from '../server/register/columns';

/** The register islands' client: shared by the islands of a page in the browser, new for each server render. */
export const registerQueryClient = () =>
  pageQueryClient('register', {
    defaultOptions: { queries: { staleTime: 15_000, retry: 1, refetchOnWindowFocus: false } },
  });

/** What the rooms table asks the server for. */
export interface RoomsQuery {
  page: number;
  pageSize: number;
  sort: string;
  dir: 'asc' | 'desc';
  schoolId?: string | undefined;
  use?: string | undefined;
  ventilationType?: string | undefined;
  q?: string | undefined;
}

const roomsKey = (q: RoomsQuery) => ['register', 'rooms', q] as const;

function toSearch(q: RoomsQuery): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== '') params.set(k, String(v));
  return params.toString();
}

/** A page of rooms, kept on screen while the next page loads. */
export function useRooms(q: RoomsQuery) {
  return useQuery({
    queryKey: roomsKey(q),
    queryFn: () => apiFetch<Page<Room>>(`/api/rooms?${toSearch(q)}`),
    placeholderData: keepPreviousData,
  });
}

/** Edits one room: the table shows the change at once and rolls it back if the server refuses it. */
export function useUpdateRoom(q: RoomsQuery) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ id, changes }: { id: string; changes: Partial<RoomFields> & { blockId?: string | null } }) =>
      apiFetch<{ warnings: { message: string }[]; room: Room }>(`/api/rooms/${id}`, { method: 'PATCH', body: changes }),
    onMutate: async ({ id, changes }) => {
      await client.cancelQueries({ queryKey: roomsKey(q) });
      const previous = client.getQueryData<Page<Room>>(roomsKey(q));
      if (previous)
        client.setQueryData(roomsKey(q), {
          ...previous,
          rows: previous.rows.map((r) => (r.id === id ? { ...r, ...changes } : r)),
        });
      return { previous };
    },
    onError: (_error, _vars, context) => {
      if (context?.previous) client.setQueryData(roomsKey(q), context.previous);
    },
    onSettled: () => client.invalidateQueries({ queryKey: ['register', 'rooms'] }),
  });
}

/** Deletes rooms (one or many), removing them from the table at once and restoring them on failure. */
export function useDeleteRooms(q: RoomsQuery) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (ids: string[]) =>
      ids.length === 1
        ? apiFetch<void>(`/api/rooms/${ids[0]}`, { method: 'DELETE' })
        : apiFetch<void>('/api/rooms/bulk', { method: 'POST', body: { action: 'delete', ids } }),
    onMutate: async (ids) => {
      await client.cancelQueries({ queryKey: roomsKey(q) });
      const previous = client.getQueryData<Page<Room>>(roomsKey(q));
      if (previous)
        client.setQueryData(roomsKey(q), {
          ...previous,
          rows: previous.rows.filter((r) => !ids.includes(r.id)),
          total: previous.total - ids.length,
        });
      return { previous };
    },
    onError: (_error, _ids, context) => {
      if (context?.previous) client.setQueryData(roomsKey(q), context.previous);
    },
    onSettled: () => client.invalidateQueries({ queryKey: ['register', 'rooms'] }),
  });
}

/** Applies one change to the selected rooms, optimistically. */
export function useBulkUpdate(q: RoomsQuery) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ ids, changes }: { ids: string[]; changes: Partial<RoomFields> }) =>
      apiFetch<{ count: number; warnings: { code: string; message: string }[] }>('/api/rooms/bulk', {
        method: 'POST',
        body: { action: 'update', ids, changes },
      }),
    onMutate: async ({ ids, changes }) => {
      await client.cancelQueries({ queryKey: roomsKey(q) });
      const previous = client.getQueryData<Page<Room>>(roomsKey(q));
      if (previous)
        client.setQueryData(roomsKey(q), {
          ...previous,
          rows: previous.rows.map((r) => (ids.includes(r.id) ? { ...r, ...changes } : r)),
        });
      return { previous };
    },
    onError: (_error, _vars, context) => {
      if (context?.previous) client.setQueryData(roomsKey(q), context.previous);
    },
    onSettled: () => client.invalidateQueries({ queryKey: ['register', 'rooms'] }),
  });
}

/** Adds a room. */
export function useCreateRoom() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: Partial<RoomCreate>) =>
      apiFetch<{ id: string; warnings: { message: string }[] }>('/api/rooms', { method: 'POST', body: input }),
    onSuccess: () => client.invalidateQueries({ queryKey: ['register', 'rooms'] }),
  });
}

/** The trust's import history. */
export function useImports() {
  return useQuery({
    queryKey: ['register', 'imports'],
    queryFn: () => apiFetch<{ imports: ImportHistoryItem[] }>('/api/imports'),
  });
}

/** Uploads a register with upload progress (0–1); resolves to the preview. */
export function uploadRegister(
  file: File,
  options: {
    headerRow?: number;
    mapping?: Record<string, string | null>;
    clearBlanks?: boolean;
    /** Phase and region chosen for the schools the file creates, by school name. */
    schools?: Record<string, { phase?: string; climateRegion?: string }>;
  },
  onProgress: (fraction: number) => void,
): Promise<ImportPreview> {
  const form = new FormData();
  form.set('file', file, file.name);
  if (options.schools && Object.keys(options.schools).length) form.set('schools', JSON.stringify(options.schools));
  if (options.headerRow) form.set('headerRow', String(options.headerRow));
  if (options.clearBlanks) form.set('clearBlanks', 'true');
  if (options.mapping) form.set('mapping', JSON.stringify(options.mapping));
  return uploadWithProgress<ImportPreview>('/api/imports', form, onProgress);
}

/** Where the rows an import rejected can be downloaded, with what to fix, as a workbook ready to upload again. */
export const rejectedRowsUrl = (importId: string) => `/api/imports/${importId}/rejected.xlsx`;

/** Commits the valid rows of a previewed import, or cancels it. */
export function commitRegisterImport(id: string, rows: 'valid' | 'none', deleteMissing: boolean) {
  return apiFetch<{ outcome: ImportOutcome }>(`/api/imports/${id}/commit`, {
    method: 'POST',
    body: { rows, deleteMissing },
  });
}

/** The same checks the server runs on an edit, so the editor can say what is wrong before sending. */
export { physicalChecks } from '../server/estate/checks';
export { RoomFieldsSchema } from '../server/estate/estate.schemas';

/** A school with its blocks, as GET /api/schools/[id] answers. */
export type { School, Block } from '../server/estate/estate.types';

/** One school with its blocks. */
export function useSchool(id: string | undefined) {
  return useQuery({
    queryKey: ['register', 'school', id],
    enabled: Boolean(id),
    queryFn: () => apiFetch<{ school: import('../server/estate/estate.types').School }>(`/api/schools/${id}`),
  });
}

/** Changes a school or a block, adds or deletes a block; refetches the school afterwards. */
export function useEstateEdit(schoolId: string | undefined) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (
      edit:
        | { kind: 'school' | 'block'; id: string; changes: Record<string, unknown> }
        | { kind: 'newBlock'; name: string }
        | { kind: 'deleteBlock'; id: string },
    ) => {
      if (edit.kind === 'newBlock')
        return apiFetch('/api/blocks', { method: 'POST', body: { schoolId, name: edit.name } });
      if (edit.kind === 'deleteBlock') return apiFetch(`/api/blocks/${edit.id}`, { method: 'DELETE' });
      return apiFetch(`/api/${edit.kind === 'school' ? 'schools' : 'blocks'}/${edit.id}`, {
        method: 'PATCH',
        body: edit.changes,
      });
    },
    onSettled: () => client.invalidateQueries({ queryKey: ['register'] }),
  });
}
