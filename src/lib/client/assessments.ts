/** Data fetching for the assessments islands: typed calls of our API and react-query hooks. */
import { useMutation, useQuery } from '@tanstack/react-query';
import { pageQueryClient } from './query-client';
import type { RunStatusView } from '../server/assessments/runs.service';
import type { RetentionSettings } from '../server/assessments/retention.service';
import type { WhatIfAnswer } from '../server/assessments/room-assessment.service';
import type {
  AssumptionEditBody,
  StartRunBody,
  UnitCatalogueBody,
  WhatIfBody,
} from '../server/assessments/assessments.schemas';
import { apiFetch } from './api';

export type {
  RetentionSettings,
  RunStatusView,
  WhatIfAnswer,
  AssumptionEditBody,
  StartRunBody,
  UnitCatalogueBody,
  WhatIfBody,
};

/** The assessments islands' client: shared by the islands of a page in the browser, new for each server render. */
export const assessmentsQueryClient = () =>
  pageQueryClient('assessments', { defaultOptions: { queries: { retry: 1, refetchOnWindowFocus: false } } });

export { ApiError } from './api';

const finished = (status: RunStatusView['status'] | undefined) => status === 'succeeded' || status === 'failed';

/** A run's status, polled every 500 ms until it has finished. */
export function useRunStatus(id: string | null) {
  return useQuery({
    queryKey: ['assessment-run', id],
    queryFn: () => apiFetch<RunStatusView>(`/api/assessments/${id}`),
    enabled: id !== null,
    refetchInterval: (query) => (finished(query.state.data?.status) ? false : 500),
  });
}

/** The trust's recent runs. */
export function useRuns(initial: RunStatusView[]) {
  return useQuery({
    queryKey: ['assessment-runs'],
    queryFn: async () => (await apiFetch<{ runs: RunStatusView[] }>('/api/assessments?limit=20')).runs,
    initialData: initial,
  });
}

/** Starts a run; resolves to its id. */
export function useStartRun() {
  return useMutation({
    mutationFn: (body: StartRunBody) =>
      apiFetch<{ id: string; alreadyRunning: boolean }>('/api/assessments', { method: 'POST', body }),
  });
}

/** Asks what the room would be like with some changes (nothing is saved). */
export function useWhatIf(roomId: string) {
  return useMutation({
    mutationFn: (body: WhatIfBody) => apiFetch<WhatIfAnswer>(`/api/rooms/${roomId}/what-if`, { method: 'POST', body }),
  });
}

/** Saves changed assumption values as a new version. */
export function useEditAssumptions() {
  return useMutation({
    mutationFn: (body: AssumptionEditBody) =>
      apiFetch<{ version: number; label: string }>('/api/assumptions', { method: 'PATCH', body }),
  });
}

/** Saves the whole unit catalogue as a new assumption version. */
export function useSaveCatalogue() {
  return useMutation({
    mutationFn: (body: UnitCatalogueBody) =>
      apiFetch<{ version: number; label: string }>('/api/unit-models', { method: 'PUT', body }),
  });
}

/** Saves how many of the latest runs keep their results; resolves to the rule and how many runs lost theirs. */
export function useSaveRetention() {
  return useMutation({
    mutationFn: (keepRuns: number) =>
      apiFetch<{ settings: RetentionSettings; prunedRuns: number }>('/api/assessments/retention', {
        method: 'PUT',
        body: { keepRuns },
      }),
  });
}
