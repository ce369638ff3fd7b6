import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateStudyRequestInput, StudyDetail, StudySummary } from '@shared/studies';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';

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
