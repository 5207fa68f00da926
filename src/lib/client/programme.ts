/** API calls of the capital programme islands. */
import type { ProgrammeSettings } from '../engine/programme/types';
import type { EditImpact, ProgrammeView } from '../server/programme/programme.types';
import { apiFetch } from './api';

export type { EditImpact, ProgrammeView, ProgrammeSettings };
export type {
  ProgrammeComparison,
  ProgrammeSummary,
} from '../server/programme/programme.types';
export { ApiError } from './api';

/** A change by hand, as the edits endpoint takes it. */
export type ProgrammeEditRequest =
  | { action: 'pin'; roomId: string; year: number; windowId: string | null }
  | { action: 'unpin' | 'force_in' | 'keep_out' | 'release'; roomId: string };

export const createProgramme = (body: { name: string; settings: ProgrammeSettings; basedOn?: string }) =>
  apiFetch<{ programme: ProgrammeView }>('/api/programmes', { method: 'POST', body });

export const updateProgramme = (id: string, body: { name?: string; settings?: ProgrammeSettings }) =>
  apiFetch<{ programme: ProgrammeView }>(`/api/programmes/${id}`, { method: 'PUT', body });

export const editProgramme = (id: string, edit: ProgrammeEditRequest) =>
  apiFetch<{ programme: ProgrammeView; impact: EditImpact }>(`/api/programmes/${id}/edits`, {
    method: 'POST',
    body: edit,
  });

export const refreshProgramme = (id: string) =>
  apiFetch<{ programme: ProgrammeView }>(`/api/programmes/${id}/refresh`, { method: 'POST', body: {} });

export const deleteProgramme = (id: string) => apiFetch<void>(`/api/programmes/${id}`, { method: 'DELETE' });
