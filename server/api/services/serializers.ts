import type { User } from '@shared/auth';
import type { Invitation, Member } from '@shared/teams';
import type { InvitationRow, UserRow } from '../../db/entities';
import type { MemberWithUser } from '../../db/repositories/teams';

export function toUser(row: UserRow): User {
  return { id: row.id, email: row.email, name: row.name, notifyOnRunDone: row.notifyOnRunDone, notifyOnStudyDone: row.notifyOnStudyDone };
}

export function toMember(row: MemberWithUser): Member {
  return { userId: row.userId, email: row.email, name: row.name, role: row.role, joinedAt: row.joinedAt.toISOString() };
}

export function toInvitation(row: InvitationRow): Invitation {
  return {
    id: row.id,
    email: row.email,
    role: row.role,
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
    acceptedAt: row.acceptedAt ? row.acceptedAt.toISOString() : null,
  };
}
