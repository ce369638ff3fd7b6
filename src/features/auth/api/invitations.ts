import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Role } from '@shared/roles';
import type { InvitationPreview } from '@shared/teams';
import { api } from '../../../lib/apiClient';
import { setCurrentTeamId } from '../../../lib/currentTeam';
import { queryKeys } from '../../../lib/queryKeys';

export function useInvitationPreview(token: string) {
  return useQuery({
    queryKey: queryKeys.invitationPreview(token),
    queryFn: () => api.get<InvitationPreview>(`/api/invitations/${encodeURIComponent(token)}`, { withoutTeam: true }),
  });
}

export interface AcceptedInvitation {
  team: { id: string; name: string };
  role: Role;
}

export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () =>
      api.post<AcceptedInvitation>(`/api/invitations/${encodeURIComponent(token)}/accept`, undefined, {
        withoutTeam: true,
      }),
    onSuccess: async (accepted) => {
      // Land in the team just joined.
      setCurrentTeamId(accepted.team.id);
      await queryClient.invalidateQueries({ queryKey: queryKeys.me() });
      await queryClient.invalidateQueries({ queryKey: queryKeys.invitationPreview(token) });
    },
  });
}
