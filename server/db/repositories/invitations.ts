import type { EntityManager } from 'typeorm';
import type { Role } from '@shared/roles';
import { InvitationEntity, type InvitationRow } from '../entities';

export function insertInvitation(
  m: EntityManager,
  values: { teamId: string; email: string; role: Role; tokenHash: string; invitedByUserId: string; expiresAt: Date },
): Promise<InvitationRow> {
  return m.save(InvitationEntity, m.create(InvitationEntity, { ...values, acceptedAt: null, acceptedByUserId: null }));
}

export function findInvitationByTokenHash(m: EntityManager, tokenHash: string): Promise<InvitationRow | null> {
  return m.findOneBy(InvitationEntity, { tokenHash });
}

export function findInvitationInTeam(m: EntityManager, id: string, teamId: string): Promise<InvitationRow | null> {
  return m.findOneBy(InvitationEntity, { id, teamId });
}

export function listInvitationsOfTeam(m: EntityManager, teamId: string): Promise<InvitationRow[]> {
  return m.find(InvitationEntity, { where: { teamId }, order: { createdAt: 'DESC' } });
}

export async function markInvitationAccepted(m: EntityManager, id: string, userId: string): Promise<void> {
  await m.update(InvitationEntity, { id }, { acceptedAt: new Date(), acceptedByUserId: userId });
}

export async function deleteInvitation(m: EntityManager, id: string): Promise<void> {
  await m.delete(InvitationEntity, { id });
}
