import { keepPreviousData, useMutation, useQueries, useQuery, useQueryClient } from '@tanstack/react-query';
import { teamHeaderName } from '@shared/auth';
import type { CreateRunRequest, ListRunsQuery, ReanalyseRunRequest, RunDetail, RunPoints, RunSummary } from '@shared/runs';
import { api, ApiError } from '../../../lib/apiClient';
import { getCurrentTeamId } from '../../../lib/currentTeam';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../auth/api/me';

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

/** The file name a response asks to be saved as (Content-Disposition), or the fallback. */
export function attachmentName(disposition: string | null, fallback: string): string {
  if (!disposition) return fallback;
  const star = /filename\*=UTF-8''([^;]+)/i.exec(disposition);
  if (star) return decodeURIComponent(star[1].trim());
  const plain = /filename="?([^";]+)"?/i.exec(disposition);
  return plain ? plain[1].trim() : fallback;
}

/**
 * Downloads one of a run's exports. Fetched (not a bare link) so the current team's header goes with
 * it, then handed to the browser as a file with the name the server gives.
 */
export async function downloadRunFile(runId: string, file: 'points.csv' | 'spectrum.csv' | 'spectrum.json'): Promise<void> {
  const headers: Record<string, string> = {};
  const teamId = getCurrentTeamId();
  if (teamId) headers[teamHeaderName] = teamId;
  const response = await fetch(runPath(runId, `/${file}`), { credentials: 'include', headers });
  if (!response.ok) {
    let message = `The download failed (${response.status} ${response.statusText}).`;
    try {
      const payload = (await response.json()) as { error?: { message?: string } };
      if (payload.error?.message) message = payload.error.message;
    } catch {
      // not JSON: keep the status line
    }
    throw new ApiError(response.status, 'download_failed', message);
  }
  const blob = await response.blob();
  const name = attachmentName(response.headers.get('content-disposition'), `tacet-run-${runId.slice(0, 8)}-${file}`);
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
