import type { EntityManager } from 'typeorm';
import { OutboxMessageEntity, type OutboxMessageRow } from '../entities';

export function insertOutboxMessage(
  m: EntityManager,
  values: Omit<OutboxMessageRow, 'id' | 'createdAt'>,
): Promise<OutboxMessageRow> {
  return m.save(OutboxMessageEntity, m.create(OutboxMessageEntity, values));
}

/** Messages sent for the team (invitations) or addressed to one of its current members, newest first. */
export async function listOutboxForTeam(m: EntityManager, teamId: string, limit = 200): Promise<OutboxMessageRow[]> {
  return m
    .createQueryBuilder(OutboxMessageEntity, 'o')
    .where(
      `o.team_id = :teamId OR o.to_address IN (
         SELECT u.email FROM memberships ms JOIN users u ON u.id = ms.user_id WHERE ms.team_id = :teamId)`,
      { teamId },
    )
    .orderBy('o.created_at', 'DESC')
    .addOrderBy('o.id', 'DESC')
    .limit(limit)
    .getMany();
}
