/**
 * The one query-key factory. Team-scoped keys start with ['team', teamId] so that one
 * invalidation reaches everything of a team, and switching team never shows another team's data.
 */
export const queryKeys = {
  me: () => ['me'] as const,
  apiTokens: () => ['me', 'api-tokens'] as const,
  invitationPreview: (token: string) => ['invitation-preview', token] as const,

  teamScope: (teamId: string) => ['team', teamId] as const,
  team: (teamId: string) => [...queryKeys.teamScope(teamId), 'info'] as const,
  members: (teamId: string) => [...queryKeys.teamScope(teamId), 'members'] as const,
  invitations: (teamId: string) => [...queryKeys.teamScope(teamId), 'invitations'] as const,
  outbox: (teamId: string) => [...queryKeys.teamScope(teamId), 'outbox'] as const,

  runs: {
    all: (teamId: string) => [...queryKeys.teamScope(teamId), 'runs'] as const,
    list: (teamId: string, filters: Record<string, unknown> = {}) =>
      [...queryKeys.runs.all(teamId), 'list', filters] as const,
    detail: (teamId: string, runId: string) => [...queryKeys.runs.all(teamId), 'detail', runId] as const,
    points: (teamId: string, runId: string) => [...queryKeys.runs.all(teamId), 'points', runId] as const,
  },
  studies: {
    all: (teamId: string) => [...queryKeys.teamScope(teamId), 'studies'] as const,
    list: (teamId: string, filters: Record<string, unknown> = {}) =>
      [...queryKeys.studies.all(teamId), 'list', filters] as const,
    detail: (teamId: string, studyId: string) => [...queryKeys.studies.all(teamId), 'detail', studyId] as const,
  },
  causalSets: {
    all: (teamId: string) => [...queryKeys.teamScope(teamId), 'causal-sets'] as const,
    detail: (teamId: string, causalSetId: string) =>
      [...queryKeys.causalSets.all(teamId), 'detail', causalSetId] as const,
  },
  cutRules: {
    all: (teamId: string) => [...queryKeys.teamScope(teamId), 'cut-rules'] as const,
  },
};
