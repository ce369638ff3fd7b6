import { useQuery } from '@tanstack/react-query';
import type { MeResponse, Membership } from '@shared/auth';
import { api, isApiError } from './apiClient';
import { useStoredTeamId } from './currentTeam';
import { queryKeys } from './queryKeys';

/** The signed-in user and their teams; `null` when nobody is signed in. */
export async function fetchMe(): Promise<MeResponse | null> {
  try {
    return await api.get<MeResponse>('/api/me', { withoutTeam: true });
  } catch (error) {
    if (isApiError(error, 401)) return null;
    throw error;
  }
}

export function useMe() {
  return useQuery({ queryKey: queryKeys.me(), queryFn: fetchMe, staleTime: 60_000 });
}

/**
 * The membership the user is working in: the stored choice if it is still one of theirs,
 * otherwise their first team (the server's default too).
 */
export function resolveMembership(memberships: Membership[], storedTeamId: string | null): Membership | null {
  return memberships.find((m) => m.team.id === storedTeamId) ?? memberships[0] ?? null;
}

export function useCurrentMembership(): Membership | null {
  const me = useMe();
  const storedTeamId = useStoredTeamId();
  return me.data ? resolveMembership(me.data.memberships, storedTeamId) : null;
}

/** The current team's id, for query keys; null until /api/me has answered. */
export function useCurrentTeamId(): string | null {
  return useCurrentMembership()?.team.id ?? null;
}
