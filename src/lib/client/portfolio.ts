/** Data fetching for the portfolio islands: one QueryClient shared by every island on a page, and typed hooks. */
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { pageQueryClient } from './query-client';
import type { Dashboard, PrioritiesPage, WeightSettings, Weights } from '../server/portfolio/portfolio.types';
import { apiFetch } from './api';

export type {
  Co2BySchool,
  CumulativePoint,
  Dashboard,
  PrioritiesPage,
  PriorityRow,
  ScatterPoint,
  SensitivityCase,
  WeightSettings,
  Weights,
} from '../server/portfolio/portfolio.types';

/** The portfolio islands' client: shared by the islands of a page in the browser, new for each server render. */
export const portfolioQueryClient = () =>
  pageQueryClient('portfolio', {
    defaultOptions: { queries: { staleTime: 30_000, retry: 1, refetchOnWindowFocus: false } },
  });

export { ApiError } from './api';

/** What the priorities table asks for: filters, sort, page and (optionally) preview weights. */
export interface PrioritiesParams {
  page: number;
  pageSize: number;
  sort: string;
  dir: 'asc' | 'desc';
  schoolId?: string | undefined;
  blockId?: string | undefined;
  band?: number | undefined;
  ventilationType?: string | undefined;
  criteriaMet?: boolean | undefined;
  weights?: Weights | null | undefined;
}

/** The query string of a priorities request (shared with the export link). */
export function prioritiesSearch(
  p: Omit<PrioritiesParams, 'page' | 'pageSize'> & { page?: number | undefined; pageSize?: number | undefined },
): string {
  const q = new URLSearchParams();
  if (p.page) q.set('page', String(p.page));
  if (p.pageSize) q.set('pageSize', String(p.pageSize));
  q.set('sort', p.sort);
  q.set('dir', p.dir);
  if (p.schoolId) q.set('schoolId', p.schoolId);
  if (p.blockId) q.set('blockId', p.blockId);
  if (p.band) q.set('band', String(p.band));
  if (p.ventilationType) q.set('ventilationType', p.ventilationType);
  if (p.criteriaMet !== undefined) q.set('criteriaMet', String(p.criteriaMet));
  if (p.weights) {
    q.set('wRisk', String(p.weights.risk));
    q.set('wCost', String(p.weights.costEffectiveness));
    q.set('wPayback', String(p.weights.payback));
  }
  return q.toString();
}

/** A page of ranked rooms; the previous page stays on screen while the next loads. */
export function usePriorities(params: PrioritiesParams) {
  return useQuery({
    queryKey: ['priorities', params],
    queryFn: () => apiFetch<PrioritiesPage>(`/api/priorities?${prioritiesSearch(params)}`),
    placeholderData: keepPreviousData,
  });
}

/** The trust's saved ranking weights. */
export function useWeights() {
  return useQuery({ queryKey: ['weights'], queryFn: () => apiFetch<WeightSettings>('/api/priorities/weights') });
}

/** Saves the trust's ranking weights, then refreshes the weights and the list. */
export function useSaveWeights() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (weights: Weights) =>
      apiFetch<WeightSettings>('/api/priorities/weights', { method: 'PUT', body: weights }),
    onSuccess: (saved) => {
      queryClient.setQueryData(['weights'], saved);
      void queryClient.invalidateQueries({ queryKey: ['priorities'] });
    },
  });
}

/** The dashboard's figures and chart data. */
export function useDashboard() {
  return useQuery({ queryKey: ['dashboard'], queryFn: () => apiFetch<Dashboard>('/api/dashboard') });
}

/** Starts a trust-wide assessment and resolves when it has finished (polling its status). */
export async function runTrustAssessment(onProgress: (done: number, total: number) => void): Promise<void> {
  const { id } = await apiFetch<{ id: string }>('/api/assessments', { method: 'POST', body: { scope: 'trust' } });
  for (;;) {
    const run = await apiFetch<{ status: string; roomsDone: number; roomsTotal: number; error?: string | null }>(
      `/api/assessments/${id}`,
    );
    onProgress(run.roomsDone, run.roomsTotal);
    if (run.status === 'succeeded') return;
    if (run.status === 'failed') throw new Error(run.error ?? 'The assessment failed.');
    await new Promise((resolve) => setTimeout(resolve, 800));
  }
}
