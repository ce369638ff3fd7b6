import { randomBytes } from 'node:crypto';
import type { DataSource } from 'typeorm';
import { apiTokenPrefix, type ApiToken, type CreateApiTokenRequest, type CreatedApiToken } from '@shared/apiTokens';
import * as apiTokens from '../../db/repositories/apiTokens';
import * as teams from '../../db/repositories/teams';
import * as users from '../../db/repositories/users';
import type { UserRow } from '../../db/entities';
import type { ApiTokenRow } from '../../db/token-entities';
import { notFound } from '../errors';
import { hashLinkToken } from './tokens';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
/** prefix + 43 base64url characters (32 random bytes) */
const tokenPattern = new RegExp(`^${apiTokenPrefix}[A-Za-z0-9_-]{43}$`);

export function looksLikeApiToken(secret: string): boolean {
  return secret.startsWith(apiTokenPrefix);
}

function toApiToken(row: apiTokens.ApiTokenWithTeam): ApiToken {
  return {
    id: row.id,
    name: row.name,
    team: { id: row.teamId, name: row.teamName },
    hint: row.tokenHint,
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt ? row.expiresAt.toISOString() : null,
    lastUsedAt: row.lastUsedAt ? row.lastUsedAt.toISOString() : null,
  };
}

export type ApiTokenService = ReturnType<typeof createApiTokenService>;

export function createApiTokenService(deps: { dataSource: DataSource }) {
  const m = deps.dataSource.manager;
  return {
    /** A new token for one of the user's teams; the answer carries the secret, which is not stored. */
    async create(user: UserRow, input: CreateApiTokenRequest): Promise<CreatedApiToken> {
      const team = await teams.findTeamById(m, input.teamId.toLowerCase());
      const membership = team ? await teams.findMembership(m, user.id, team.id) : null;
      if (!team || !membership) throw notFound('Team not found.');
      const secret = apiTokenPrefix + randomBytes(32).toString('base64url');
      const row = await apiTokens.insertApiToken(m, {
        userId: user.id,
        teamId: team.id,
        name: input.name,
        tokenHash: hashLinkToken(secret),
        tokenHint: secret.slice(0, apiTokenPrefix.length + 4),
        expiresAt: input.expiresInDays ? new Date(Date.now() + input.expiresInDays * 86_400_000) : null,
      });
      return { ...toApiToken({ ...row, teamName: team.name }), token: secret };
    },

    async list(userId: string): Promise<ApiToken[]> {
      return (await apiTokens.listLiveApiTokensOfUser(m, userId)).map(toApiToken);
    },

    async revoke(userId: string, id: string): Promise<void> {
      const revoked = uuidPattern.test(id) && (await apiTokens.revokeApiToken(m, userId, id.toLowerCase()));
      if (!revoked) throw notFound('Token not found.');
    },

    /** The user and token for a secret, or null when it is malformed, unknown, revoked, expired or its team was left. */
    async authenticate(secret: string): Promise<{ user: UserRow; token: ApiTokenRow } | null> {
      if (!tokenPattern.test(secret)) return null;
      const token = await apiTokens.findLiveApiTokenByHash(m, hashLinkToken(secret));
      if (!token) return null;
      const user = await users.findUserById(m, token.userId);
      if (!user) return null;
      await apiTokens.touchApiToken(m, token.id);
      return { user, token };
    },
  };
}
