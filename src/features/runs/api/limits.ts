import { useQuery } from '@tanstack/react-query';
import type { EngineLimits } from '@shared/limits';
import { api } from '../../../lib/apiClient';

/** The server's engine size limits and the rule between them (GET /api/limits); they change only when the server restarts. */
export function useEngineLimits() {
  return useQuery({
    queryKey: ['engine-limits'] as const,
    queryFn: () => api.get<EngineLimits>('/api/limits'),
    staleTime: Infinity,
  });
}
