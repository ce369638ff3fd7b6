import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ApiToken, CreateApiTokenRequest, CreatedApiToken } from '@shared/apiTokens';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';

export function useApiTokens() {
  return useQuery({
    queryKey: queryKeys.apiTokens(),
    queryFn: ({ signal }) => api.get<{ items: ApiToken[] }>('/api/me/tokens', { signal, withoutTeam: true }).then((r) => r.items),
  });
}

export function useCreateApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateApiTokenRequest) => api.post<CreatedApiToken>('/api/me/tokens', body, { withoutTeam: true }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.apiTokens() }),
  });
}

export function useRevokeApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.delete(`/api/me/tokens/${id}`, { withoutTeam: true }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.apiTokens() }),
  });
}
