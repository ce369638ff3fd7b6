import { IsNull, type EntityManager } from 'typeorm';
import { SessionEntity, type SessionRow } from '../entities';

export function insertSession(m: EntityManager, userId: string, expiresAt: Date): Promise<SessionRow> {
  return m.save(SessionEntity, m.create(SessionEntity, { userId, expiresAt, revokedAt: null }));
}

/** A session that exists, belongs to the user, is not revoked and has not expired. */
export async function findLiveSession(m: EntityManager, id: string, userId: string): Promise<SessionRow | null> {
  const rows: SessionRow[] = await m
    .createQueryBuilder(SessionEntity, 's')
    .where('s.id = :id AND s.user_id = :userId AND s.revoked_at IS NULL AND s.expires_at > now()', { id, userId })
    .getMany();
  return rows[0] ?? null;
}

export async function revokeSession(m: EntityManager, id: string): Promise<void> {
  await m.update(SessionEntity, { id, revokedAt: IsNull() }, { revokedAt: new Date() });
}

export async function revokeAllSessionsOfUser(m: EntityManager, userId: string): Promise<void> {
  await m.update(SessionEntity, { userId, revokedAt: IsNull() }, { revokedAt: new Date() });
}
