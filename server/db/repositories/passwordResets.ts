import type { EntityManager } from 'typeorm';
import { PasswordResetEntity, type PasswordResetRow } from '../entities';

export function insertPasswordReset(
  m: EntityManager,
  values: { userId: string; tokenHash: string; expiresAt: Date },
): Promise<PasswordResetRow> {
  return m.save(PasswordResetEntity, m.create(PasswordResetEntity, { ...values, usedAt: null }));
}

/** Row-locked so a token cannot be spent twice by two concurrent requests. */
export async function findPasswordResetForUpdate(m: EntityManager, tokenHash: string): Promise<PasswordResetRow | null> {
  return m
    .createQueryBuilder(PasswordResetEntity, 'r')
    .setLock('pessimistic_write')
    .where('r.token_hash = :tokenHash', { tokenHash })
    .getOne();
}

export async function markPasswordResetUsed(m: EntityManager, id: string): Promise<void> {
  await m.update(PasswordResetEntity, { id }, { usedAt: new Date() });
}
