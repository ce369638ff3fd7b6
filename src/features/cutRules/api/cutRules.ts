import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CutRule } from '@shared/runs';
import type { TruncationRule } from '@shared/vacuum';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';

export function useCutRules() {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.cutRules.all(teamId ?? 'none'),
    queryFn: () => api.get<{ items: CutRule[] }>('/api/cut-rules'),
    enabled: teamId !== null,
    select: (data) => data.items,
  });
}

export function useCreateCutRule() {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return useMutation({
    mutationFn: (body: { name: string; rule: TruncationRule; note?: string }) => api.post<CutRule>('/api/cut-rules', body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.cutRules.all(teamId) }),
  });
}

export function useDeleteCutRule() {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return useMutation({
    mutationFn: (cutRuleId: string) => api.delete(`/api/cut-rules/${encodeURIComponent(cutRuleId)}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.cutRules.all(teamId) }),
  });
}
