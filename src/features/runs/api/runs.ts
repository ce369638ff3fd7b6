import { keepPreviousData, useMutation, useQueries, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateRunRequest, ListRunsQuery, ReanalyseRunRequest, RunDetail, RunPoints, RunSummary } from '@shared/runs';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';

export interface RunList {
  items: RunSummary[];
  total: number;
  page: number;
  pageSize: number;
}

export type RunFilters = Partial<Pick<ListRunsQuery, 'status' | 'regionKind' | 'search' | 'sort' | 'order' | 'page' | 'pageSize'>>;

export function isActive(status: RunSummary['status']): boolean {
  return status === 'queued' || status === 'running';
}

export function runsQueryString(filters: RunFilters): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(filters)) {
    if (value !== undefined && value !== '') params.set(key, String(value));
  }
  const text = params.toString();
  return text ? `?${text}` : '';
}

export function useRuns(filters: RunFilters) {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.runs.list(teamId ?? 'none', filters),
    queryFn: () => api.get<RunList>(`/api/runs${runsQueryString(filters)}`),
    enabled: teamId !== null,
    placeholderData: keepPreviousData,
    // Rows of queued and running runs change status on their own; refresh while any are shown.
    refetchInterval: (query) => (query.state.data?.items.some((run) => isActive(run.status)) ? 2000 : false),
  });
}

function runPath(runId: string, rest = ''): string {
  return `/api/runs/${encodeURIComponent(runId)}${rest}`;
}

/** One run, polled every second while it is queued or running. */
export function useRun(runId: string) {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.runs.detail(teamId ?? 'none', runId),
    queryFn: () => api.get<RunDetail>(runPath(runId)),
    enabled: teamId !== null,
    staleTime: 0,
    refetchInterval: (query) => (query.state.data && isActive(query.state.data.status) ? 1000 : false),
  });
}

/** Several runs at once, for the compare page. */
export function useRunDetails(runIds: string[]) {
  const teamId = useCurrentTeamId();
  return useQueries({
    queries: runIds.map((runId) => ({
      queryKey: queryKeys.runs.detail(teamId ?? 'none', runId),
      queryFn: () => api.get<RunDetail>(runPath(runId)),
      enabled: teamId !== null,
    })),
  });
}

export function useRunPoints(runId: string, enabled: boolean) {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.runs.points(teamId ?? 'none', runId),
    queryFn: () => api.get<RunPoints>(runPath(runId, '/points')),
    enabled: teamId !== null && enabled,
    // Stored points never change.
    staleTime: Infinity,
  });
}

function useInvalidateRuns() {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return () => queryClient.invalidateQueries({ queryKey: queryKeys.runs.all(teamId) });
}

export function useCreateRun() {
  const invalidate = useInvalidateRuns();
  return useMutation({
    mutationFn: (body: CreateRunRequest) => api.post<{ id: string }>('/api/runs', body),
    onSuccess: () => invalidate(),
  });
}

export function useReanalyseRun(runId: string) {
  const invalidate = useInvalidateRuns();
  return useMutation({
    mutationFn: (body: ReanalyseRunRequest) => api.post<{ id: string }>(runPath(runId, '/reanalyse'), body),
    onSuccess: () => invalidate(),
  });
}

/** Retry of a failed or cancelled run: a new run with the same settings. */
export function useRetryRun(runId: string) {
  const invalidate = useInvalidateRuns();
  return useMutation({
    mutationFn: () => api.post<{ id: string }>(runPath(runId, '/retry')),
    onSuccess: () => invalidate(),
  });
}

/** Same settings, new seed: a new run on a fresh sprinkling; the answer names the seed. */
export function useReseedRun(runId: string) {
  const invalidate = useInvalidateRuns();
  return useMutation({
    mutationFn: () => api.post<{ id: string; seed: string }>(runPath(runId, '/reseed')),
    onSuccess: () => invalidate(),
  });
}

export function useCancelRun(runId: string) {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return useMutation({
    mutationFn: () => api.post<RunDetail>(runPath(runId, '/cancel')),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(teamId, runId), run);
      return queryClient.invalidateQueries({ queryKey: [...queryKeys.runs.all(teamId), 'list'] });
    },
  });
}

export function useDeleteRun() {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return useMutation({
    mutationFn: (runId: string) => api.delete(runPath(runId)),
    onSuccess: (_nothing, runId) => {
      queryClient.removeQueries({ queryKey: queryKeys.runs.detail(teamId, runId) });
      return queryClient.invalidateQueries({ queryKey: [...queryKeys.runs.all(teamId), 'list'] });
    },
  });
}
