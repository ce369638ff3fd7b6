import type { DataSource } from 'typeorm';
import type { Role } from '@shared/roles';
import type { Member } from '@shared/teams';
import * as teams from '../../db/repositories/teams';
import type { TeamContext } from '../context';
import { conflict, notFound } from '../errors';
import { toMember } from './serializers';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export type TeamService = ReturnType<typeof createTeamService>;

export function createTeamService(deps: { dataSource: DataSource }) {
  const { dataSource } = deps;

  return {
    /** The requested team if the user is in it, else (no request) their oldest membership; null otherwise. */
    async resolveCurrentTeam(userId: string, requestedTeamId: string | null): Promise<TeamContext | null> {
      const memberships = await teams.listMembershipsOfUser(dataSource.manager, userId);
      const chosen = requestedTeamId
        ? uuidPattern.test(requestedTeamId)
          ? memberships.find((ms) => ms.teamId === requestedTeamId.toLowerCase())
          : undefined
        : memberships[0];
      return chosen ? { id: chosen.teamId, name: chosen.teamName, role: chosen.role } : null;
    },

    async rename(team: TeamContext, name: string): Promise<TeamContext> {
      await teams.renameTeam(dataSource.manager, team.id, name);
      return { ...team, name };
    },

    async listMembers(teamId: string): Promise<Member[]> {
      return (await teams.listMembersOfTeam(dataSource.manager, teamId)).map(toMember);
    },

    /** Changes a member's role; the team always keeps at least one owner. */
    async changeRole(teamId: string, userId: string, role: Role): Promise<Member> {
      return dataSource.transaction(async (m) => {
        const membership = uuidPattern.test(userId) ? await teams.findMembership(m, userId, teamId) : null;
        if (!membership) throw notFound('Member not found.');
        if (membership.role === 'owner' && role !== 'owner' && (await teams.countOwnersForUpdate(m, teamId)) <= 1) {
          throw conflict('last_owner', 'A team needs at least one owner. Make someone else owner first.');
        }
        await teams.updateMembershipRole(m, userId, teamId, role);
        const member = (await teams.listMembersOfTeam(m, teamId)).find((x) => x.userId === userId)!;
        return toMember(member);
      });
    },

    async removeMember(teamId: string, userId: string): Promise<void> {
      await dataSource.transaction(async (m) => {
        const membership = uuidPattern.test(userId) ? await teams.findMembership(m, userId, teamId) : null;
        if (!membership) throw notFound('Member not found.');
        if (membership.role === 'owner' && (await teams.countOwnersForUpdate(m, teamId)) <= 1) {
          throw conflict('last_owner', 'The last owner cannot leave the team. Make someone else owner first.');
        }
        await teams.deleteMembership(m, userId, teamId);
      });
    },
  };
}
