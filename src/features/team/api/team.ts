import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateInvitationRequest, Invitation, Member } from '@shared/teams';
import type { Role } from '@shared/roles';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';
import { useCan } from '../../../lib/permissions';

export interface TeamInfo {
  id: string;
  name: string;
  role: Role;
}

interface List<T> {
  items: T[];
}

/** Every hook below acts in the current team; its id is in the key and sent as the team header. */
function useTeamId(): string {
  return useCurrentTeamId() ?? 'none';
}

export function useTeam() {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.team(teamId ?? 'none'),
    queryFn: () => api.get<TeamInfo>('/api/team'),
    enabled: teamId !== null,
  });
}

export function useRenameTeam() {
  const queryClient = useQueryClient();
  const teamId = useTeamId();
  return useMutation({
    mutationFn: (body: { name: string }) => api.patch<TeamInfo>('/api/team', body),
    onSuccess: (team) => {
      queryClient.setQueryData(queryKeys.team(teamId), team);
      // The team switcher shows names from /api/me.
      return queryClient.invalidateQueries({ queryKey: queryKeys.me() });
    },
  });
}

export function useMembers() {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.members(teamId ?? 'none'),
    queryFn: () => api.get<List<Member>>('/api/team/members'),
    enabled: teamId !== null,
    select: (data) => data.items,
  });
}

export function useChangeRole() {
  const queryClient = useQueryClient();
  const teamId = useTeamId();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: Role }) =>
      api.patch<Member>(`/api/team/members/${encodeURIComponent(userId)}`, { role }),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: queryKeys.members(teamId) });
      // One's own role may have changed, and with it what the page offers.
      await queryClient.invalidateQueries({ queryKey: queryKeys.me() });
    },
  });
}

export function useRemoveMember() {
  const queryClient = useQueryClient();
  const teamId = useTeamId();
  return useMutation({
    mutationFn: (userId: string) => api.delete(`/api/team/members/${encodeURIComponent(userId)}`),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: queryKeys.members(teamId) });
      await queryClient.invalidateQueries({ queryKey: queryKeys.me() });
    },
  });
}

export function useInvitations() {
  const teamId = useCurrentTeamId();
  const canManage = useCan('manageTeam');
  return useQuery({
    queryKey: queryKeys.invitations(teamId ?? 'none'),
    queryFn: () => api.get<List<Invitation>>('/api/team/invitations'),
    enabled: teamId !== null && canManage,
    select: (data) => data.items,
  });
}

export function useCreateInvitation() {
  const queryClient = useQueryClient();
  const teamId = useTeamId();
  return useMutation({
    mutationFn: (body: CreateInvitationRequest) => api.post<Invitation>('/api/team/invitations', body),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: queryKeys.invitations(teamId) });
      await queryClient.invalidateQueries({ queryKey: queryKeys.outbox(teamId) });
    },
  });
}

export function useRevokeInvitation() {
  const queryClient = useQueryClient();
  const teamId = useTeamId();
  return useMutation({
    mutationFn: (invitationId: string) => api.delete(`/api/team/invitations/${encodeURIComponent(invitationId)}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.invitations(teamId) }),
  });
}
