import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { LoginRequest, SessionResponse, SignupRequest } from '@shared/auth';
import { api } from '../../../lib/apiClient';
import { setCurrentTeamId } from '../../../lib/currentTeam';
import { queryKeys } from '../../../lib/queryKeys';
import { fetchMe } from '../../../lib/currentUser';

/** After any change of who is signed in: drop everything cached for the previous user, load /api/me anew. */
async function startFreshSession(queryClient: ReturnType<typeof useQueryClient>) {
  queryClient.removeQueries({ predicate: (query) => query.queryKey[0] !== 'me' });
  await queryClient.fetchQuery({ queryKey: queryKeys.me(), queryFn: fetchMe, staleTime: 0 });
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: LoginRequest) => api.post<SessionResponse>('/api/auth/login', body, { withoutTeam: true }),
    onSuccess: () => startFreshSession(queryClient),
  });
}

export function useSignUp() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SignupRequest) => api.post<SessionResponse>('/api/auth/signup', body, { withoutTeam: true }),
    onSuccess: async () => {
      // A new account starts in its only team; a stored choice from an earlier user must not linger.
      setCurrentTeamId(null);
      await startFreshSession(queryClient);
    },
  });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<void>('/api/auth/logout', undefined, { withoutTeam: true }),
    onSettled: () => {
      // Even if the server call failed the user asked to leave: forget everything locally.
      queryClient.removeQueries({ predicate: (query) => query.queryKey[0] !== 'me' });
      queryClient.setQueryData(queryKeys.me(), null);
    },
  });
}

export function useRequestPasswordReset() {
  return useMutation({
    mutationFn: (body: { email: string }) =>
      api.post<{ ok: true }>('/api/auth/password-reset', body, { withoutTeam: true }),
  });
}

export function useConfirmPasswordReset() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { token: string; password: string }) =>
      api.post<void>('/api/auth/password-reset/confirm', body, { withoutTeam: true }),
    // The server revokes every session on reset, including this browser's.
    onSuccess: () => queryClient.setQueryData(queryKeys.me(), null),
  });
}
