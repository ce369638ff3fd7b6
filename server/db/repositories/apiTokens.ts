import type { EntityManager } from 'typeorm';
import { ApiTokenEntity, type ApiTokenRow } from '../token-entities';
import { changedRows } from './runs';

export type ApiTokenWithTeam = ApiTokenRow & { teamName: string };

export function insertApiToken(
  m: EntityManager,
  values: Pick<ApiTokenRow, 'userId' | 'teamId' | 'name' | 'tokenHash' | 'tokenHint' | 'expiresAt'>,
): Promise<ApiTokenRow> {
  return m.save(ApiTokenEntity, m.create(ApiTokenEntity, { ...values, lastUsedAt: null, revokedAt: null }));
}

/** The user's tokens that still work (not revoked, not expired), newest first, with their team's name. */
export async function listLiveApiTokensOfUser(m: EntityManager, userId: string): Promise<ApiTokenWithTeam[]> {
  const { entities, raw } = await m
    .createQueryBuilder(ApiTokenEntity, 't')
    .innerJoin('teams', 'team', 'team.id = t.team_id')
    .addSelect('team.name', 'team_name')
    .where('t.user_id = :userId AND t.revoked_at IS NULL AND (t.expires_at IS NULL OR t.expires_at > now())', { userId })
    .orderBy('t.created_at', 'DESC')
    .getRawAndEntities();
  const names = new Map((raw as { t_id: string; team_name: string }[]).map((r) => [r.t_id, r.team_name]));
  return entities.map((row) => ({ ...row, teamName: names.get(row.id) ?? '' }));
}

/** A live token by the hash of its secret, only while its owner is still a member of its team. */
export async function findLiveApiTokenByHash(m: EntityManager, tokenHash: string): Promise<ApiTokenRow | null> {
  return m
    .createQueryBuilder(ApiTokenEntity, 't')
    .innerJoin('memberships', 'ms', 'ms.user_id = t.user_id AND ms.team_id = t.team_id')
    .where('t.token_hash = :tokenHash AND t.revoked_at IS NULL AND (t.expires_at IS NULL OR t.expires_at > now())', { tokenHash })
    .getOne();
}

/** Last use is kept to the minute, so a busy script does not write a row per request. */
export async function touchApiToken(m: EntityManager, id: string): Promise<void> {
  await m.query(
    `UPDATE api_tokens SET last_used_at = now() WHERE id = $1 AND (last_used_at IS NULL OR last_used_at < now() - interval '1 minute')`,
    [id],
  );
}

export function revokeApiToken(m: EntityManager, userId: string, id: string): Promise<boolean> {
  return changedRows(m, `UPDATE api_tokens SET revoked_at = now() WHERE id = $1 AND user_id = $2 AND revoked_at IS NULL`, [id, userId]);
}
