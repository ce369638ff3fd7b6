import type { EntityManager } from 'typeorm';
import type { Role } from '@shared/roles';
import { MembershipEntity, TeamEntity, type MembershipRow, type TeamRow } from '../entities';

export interface MembershipWithTeam {
  teamId: string;
  teamName: string;
  role: Role;
  createdAt: Date;
}

export interface MemberWithUser {
  userId: string;
  email: string;
  name: string;
  role: Role;
  joinedAt: Date;
}

export function insertTeam(m: EntityManager, name: string): Promise<TeamRow> {
  return m.save(TeamEntity, m.create(TeamEntity, { name }));
}

export function findTeamById(m: EntityManager, id: string): Promise<TeamRow | null> {
  return m.findOneBy(TeamEntity, { id });
}

export async function renameTeam(m: EntityManager, id: string, name: string): Promise<void> {
  await m.update(TeamEntity, { id }, { name });
}

export function insertMembership(m: EntityManager, values: { userId: string; teamId: string; role: Role }): Promise<MembershipRow> {
  return m.save(MembershipEntity, m.create(MembershipEntity, values));
}

export function findMembership(m: EntityManager, userId: string, teamId: string): Promise<MembershipRow | null> {
  return m.findOneBy(MembershipEntity, { userId, teamId });
}

/** The user's teams, oldest membership first (the first one is the default current team). */
export async function listMembershipsOfUser(m: EntityManager, userId: string): Promise<MembershipWithTeam[]> {
  const rows: { team_id: string; team_name: string; role: Role; created_at: Date }[] = await m.query(
    `SELECT t.id AS team_id, t.name AS team_name, ms.role, ms.created_at
       FROM memberships ms JOIN teams t ON t.id = ms.team_id
      WHERE ms.user_id = $1
      ORDER BY ms.created_at, t.name`,
    [userId],
  );
  return rows.map((r) => ({ teamId: r.team_id, teamName: r.team_name, role: r.role, createdAt: r.created_at }));
}

export async function listMembersOfTeam(m: EntityManager, teamId: string): Promise<MemberWithUser[]> {
  const rows: { user_id: string; email: string; name: string; role: Role; created_at: Date }[] = await m.query(
    `SELECT u.id AS user_id, u.email, u.name, ms.role, ms.created_at
       FROM memberships ms JOIN users u ON u.id = ms.user_id
      WHERE ms.team_id = $1
      ORDER BY ms.created_at, u.name`,
    [teamId],
  );
  return rows.map((r) => ({ userId: r.user_id, email: r.email, name: r.name, role: r.role, joinedAt: r.created_at }));
}

export async function updateMembershipRole(m: EntityManager, userId: string, teamId: string, role: Role): Promise<void> {
  await m.update(MembershipEntity, { userId, teamId }, { role });
}

export async function deleteMembership(m: EntityManager, userId: string, teamId: string): Promise<void> {
  await m.delete(MembershipEntity, { userId, teamId });
}

/** Locks the team's owner rows so two concurrent demotions cannot both pass the last-owner check. */
export async function countOwnersForUpdate(m: EntityManager, teamId: string): Promise<number> {
  const rows: { id: string }[] = await m.query(
    `SELECT id FROM memberships WHERE team_id = $1 AND role = 'owner' FOR UPDATE`,
    [teamId],
  );
  return rows.length;
}
