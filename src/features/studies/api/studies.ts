import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateStudyRequestInput, ExtendStudyRequestInput, ListStudiesQuery, StudyCellRunRequest, StudyDetail, StudySummary } from '@shared/studies';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';

export function isStudyActive(status: StudySummary['status']): boolean {
  return status === 'queued' || status === 'running';
}

const studyPath = (id: string, rest = '') => `/api/studies/${encodeURIComponent(id)}${rest}`;

/** The filters as GET /api/studies reads them; blank ones are left out. */
export function studiesListPath(filters: ListStudiesQuery): string {
  const query = new URLSearchParams(Object.entries(filters).filter((entry): entry is [string, string] => typeof entry[1] === 'string' && entry[1] !== ''));
  const text = query.toString();
  return text ? `/api/studies?${text}` : '/api/studies';
}

export function useStudies(filters: ListStudiesQuery = {}) {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.studies.list(teamId ?? 'none', filters),
    queryFn: () => api.get<{ items: StudySummary[] }>(studiesListPath(filters)),
    placeholderData: (previous) => previous,
    enabled: teamId !== null,
    refetchInterval: (query) => (query.state.data?.items.some((s) => isStudyActive(s.status)) ? 2000 : false),
  });
}

/** One study, polled every 1.5 s while it is queued or running; `enabled` false waits (no id yet). */
export function useStudy(id: string, { enabled = true }: { enabled?: boolean } = {}) {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.studies.detail(teamId ?? 'none', id),
    queryFn: () => api.get<StudyDetail>(studyPath(id)),
    enabled: teamId !== null && enabled && id !== '',
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

/** Queues one failed cell again. */
export function useRetryCell(studyId: string) {
  const invalidate = useInvalidateStudies();
  return useMutation({
    mutationFn: (cellId: string) => api.post<{ cellIds: string[] }>(studyPath(studyId, `/cells/${encodeURIComponent(cellId)}/retry`)),
    onSuccess: () => invalidate(),
  });
}

/** Queues every failed cell of the study again. */
export function useRetryFailedCells(studyId: string) {
  const invalidate = useInvalidateStudies();
  return useMutation({ mutationFn: () => api.post<{ cellIds: string[] }>(studyPath(studyId, '/retry-failed')), onSuccess: () => invalidate() });
}

/** More N values and/or seeds for the study. */
export function useExtendStudy(studyId: string) {
  const invalidate = useInvalidateStudies();
  return useMutation({
    mutationFn: (body: ExtendStudyRequestInput) => api.post<{ cellIds: string[] }>(studyPath(studyId, '/extend'), body),
    onSuccess: () => invalidate(),
  });
}

/** A finished cell's subregion and rule as a new vacuum run; answers the run's id. */
export function useOpenCellAsRun(studyId: string) {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return useMutation({
    mutationFn: ({ cellId, ...body }: StudyCellRunRequest & { cellId: string }) =>
      api.post<{ id: string }>(studyPath(studyId, `/cells/${encodeURIComponent(cellId)}/run`), body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.runs.all(teamId) }),
  });
}
