import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { MeResponse, User } from '@shared/auth';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';

export function useUpdateMe() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { name?: string; notifyOnRunDone?: boolean; notifyOnStudyDone?: boolean }) =>
      api.patch<User>('/api/me', body, { withoutTeam: true }),
    onSuccess: (user) => {
      queryClient.setQueryData<MeResponse | null>(queryKeys.me(), (previous) => (previous ? { ...previous, user } : previous));
    },
  });
}
