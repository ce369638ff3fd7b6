import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { teamHeaderName } from '@shared/auth';
import type { CreateStudyRequestInput, StudyDetail, StudyExportFormat, StudySummary } from '@shared/studies';
import { api, ApiError } from '../../../lib/apiClient';
import { getCurrentTeamId } from '../../../lib/currentTeam';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../auth/api/me';
import { attachmentName } from '../../runs/api/runs';

export function isStudyActive(status: StudySummary['status']): boolean {
  return status === 'queued' || status === 'running';
}

const studyPath = (id: string, rest = '') => `/api/studies/${encodeURIComponent(id)}${rest}`;

export function useStudies() {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.studies.list(teamId ?? 'none'),
    queryFn: () => api.get<{ items: StudySummary[] }>('/api/studies'),
    enabled: teamId !== null,
    refetchInterval: (query) => (query.state.data?.items.some((s) => isStudyActive(s.status)) ? 2000 : false),
  });
}

/** One study, polled every 1.5 s while it is queued or running. */
export function useStudy(id: string) {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.studies.detail(teamId ?? 'none', id),
    queryFn: () => api.get<StudyDetail>(studyPath(id)),
    enabled: teamId !== null,
    staleTime: 0,
    refetchInterval: (query) => (query.state.data && isStudyActive(query.state.data.status) ? 1500 : false),
  });
}

function useInvalidateStudies() {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId();
  return () => queryClient.invalidateQueries({ queryKey: queryKeys.studies.all(teamId ?? 'none') });
}

export function useCreateStudy() {
  const invalidate = useInvalidateStudies();
  return useMutation({
    mutationFn: (body: CreateStudyRequestInput) => api.post<{ id: string }>('/api/studies', body),
    onSuccess: () => invalidate(),
  });
}

export function useCancelStudy(id: string) {
  const invalidate = useInvalidateStudies();
  return useMutation({ mutationFn: () => api.post<StudyDetail>(studyPath(id, '/cancel')), onSuccess: () => invalidate() });
}

export function useDeleteStudy(id: string) {
  const invalidate = useInvalidateStudies();
  return useMutation({ mutationFn: () => api.delete(studyPath(id)), onSuccess: () => invalidate() });
}

/** Fetches one export with the session and team header, then saves it under the server's file name. */
export async function downloadStudyExport(id: string, format: StudyExportFormat): Promise<void> {
  const headers: Record<string, string> = {};
  const teamId = getCurrentTeamId();
  if (teamId) headers[teamHeaderName] = teamId;
  const response = await fetch(studyPath(id, `/export?format=${format}`), { credentials: 'include', headers });
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
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = attachmentName(response.headers.get('content-disposition'), `tacet-study-${id.slice(0, 8)}-${format}`);
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
