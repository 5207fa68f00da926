/** Data fetching for the assessments islands: typed calls of our API and react-query hooks. */
import { QueryClient, useMutation, useQuery } from '@tanstack/react-query';
import type { RunStatusView } from '../server/assessments/runs.service';
import type { WhatIfAnswer } from '../server/assessments/room-assessment.service';
import type { AssumptionEditBody, StartRunBody, UnitCatalogueBody, WhatIfBody } from '../server/assessments/assessments.schemas';

export type { RunStatusView, WhatIfAnswer, AssumptionEditBody, StartRunBody, UnitCatalogueBody, WhatIfBody };

/** One QueryClient for the assessments islands of a page. */
export const assessmentsQueryClient = new QueryClient({
  defaultOptions: { queries: { retry: 1, refetchOnWindowFocus: false } },
});

/** An error answer of our API, with the message a person can act on. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details: unknown = null,
  ) {
    super(message);
  }
}

/** Fetches JSON from our API; a non-2xx answer becomes an ApiError carrying the server's message. */
export async function fetchJson<T>(path: string, init: RequestInit = {}): Promise<T> {
  const response = await fetch(path, {
    credentials: 'same-origin',
    ...init,
    headers: { accept: 'application/json', ...(init.body ? { 'content-type': 'application/json' } : {}), ...init.headers },
  });
  if (!response.ok) {
    let body: { error?: { code?: string; message?: string; details?: unknown } } = {};
    try {
      body = (await response.json()) as typeof body;
    } catch {
      // Not our JSON shape: keep the generic message.
    }
    throw new ApiError(response.status, body.error?.code ?? 'http_error', body.error?.message ?? `The server answered ${response.status}.`, body.error?.details ?? null);
  }
  return (await response.json()) as T;
}

const finished = (status: RunStatusView['status'] | undefined) => status === 'succeeded' || status === 'failed';

/** A run's status, polled every 500 ms until it has finished. */
export function useRunStatus(id: string | null) {
  return useQuery({
    queryKey: ['assessment-run', id],
    queryFn: () => fetchJson<RunStatusView>(`/api/assessments/${id}`),
    enabled: id !== null,
    refetchInterval: (query) => (finished(query.state.data?.status) ? false : 500),
  });
}

/** The trust's recent runs. */
export function useRuns(initial: RunStatusView[]) {
  return useQuery({
    queryKey: ['assessment-runs'],
    queryFn: async () => (await fetchJson<{ runs: RunStatusView[] }>('/api/assessments?limit=20')).runs,
    initialData: initial,
  });
}

/** Starts a run; resolves to its id. */
export function useStartRun() {
  return useMutation({
    mutationFn: (body: StartRunBody) => fetchJson<{ id: string; alreadyRunning: boolean }>('/api/assessments', { method: 'POST', body: JSON.stringify(body) }),
  });
}

/** Asks what the room would be like with some changes (nothing is saved). */
export function useWhatIf(roomId: string) {
  return useMutation({
    mutationFn: (body: WhatIfBody) => fetchJson<WhatIfAnswer>(`/api/rooms/${roomId}/what-if`, { method: 'POST', body: JSON.stringify(body) }),
  });
}

/** Saves changed assumption values as a new version. */
export function useEditAssumptions() {
  return useMutation({
    mutationFn: (body: AssumptionEditBody) => fetchJson<{ version: number; label: string }>('/api/assumptions', { method: 'PATCH', body: JSON.stringify(body) }),
  });
}

/** Saves the whole unit catalogue as a new assumption version. */
export function useSaveCatalogue() {
  return useMutation({
    mutationFn: (body: UnitCatalogueBody) => fetchJson<{ version: number; label: string }>('/api/unit-models', { method: 'PUT', body: JSON.stringify(body) }),
  });
}
