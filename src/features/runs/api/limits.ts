import { useQuery } from '@tanstack/react-query';
import type { EngineLimits } from '@shared/limits';
import { api } from '../../../lib/apiClient';

/** The server's dense size limit (GET /api/limits); it changes only when the server restarts. */
export function useEngineLimits() {
  return useQuery({
    queryKey: ['engine-limits'] as const,
    queryFn: () => api.get<EngineLimits>('/api/limits'),
    staleTime: Infinity,
    select: (data) => data.dense,
  });
}
