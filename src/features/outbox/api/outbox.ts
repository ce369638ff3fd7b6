import { useQuery } from '@tanstack/react-query';
import type { OutboxMessage } from '@shared/teams';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';
import { useCan } from '../../../lib/permissions';

export function useOutbox() {
  const teamId = useCurrentTeamId();
  const canManage = useCan('manageTeam');
  return useQuery({
    queryKey: queryKeys.outbox(teamId ?? 'none'),
    queryFn: () => api.get<{ items: OutboxMessage[] }>('/api/outbox'),
    enabled: teamId !== null && canManage,
    select: (data) => data.items,
    // New mail arrives from other tabs and from the worker; keep the list fresh while it is open.
    refetchInterval: 10_000,
  });
}
