import type { EntityManager } from 'typeorm';
import { UserEntity, type UserRow } from '../entities';

export function findUserById(m: EntityManager, id: string): Promise<UserRow | null> {
  return m.findOneBy(UserEntity, { id });
}

export function findUserByEmail(m: EntityManager, email: string): Promise<UserRow | null> {
  return m.findOneBy(UserEntity, { email: email.toLowerCase() });
}

export async function insertUser(
  m: EntityManager,
  values: { email: string; name: string; passwordHash: string },
): Promise<UserRow> {
  return m.save(UserEntity, m.create(UserEntity, { ...values, email: values.email.toLowerCase() }));
}

export async function updateUser(
  m: EntityManager,
  id: string,
  values: Partial<Pick<UserRow, 'name' | 'notifyOnRunDone' | 'notifyOnStudyDone' | 'passwordHash'>>,
): Promise<void> {
  if (Object.keys(values).length > 0) await m.update(UserEntity, { id }, values);
}
