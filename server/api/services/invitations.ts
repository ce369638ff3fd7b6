import type { DataSource, EntityManager } from 'typeorm';
import type { Role } from '@shared/roles';
import type { Invitation, InvitationPreview } from '@shared/teams';
import type { Config } from '../../config';
import type { InvitationRow } from '../../db/entities';
import * as invitations from '../../db/repositories/invitations';
import * as teams from '../../db/repositories/teams';
import * as users from '../../db/repositories/users';
import type { Mailer } from '../../mail/mailer';
import type { TeamContext } from '../context';
import { conflict, forbidden, gone, notFound } from '../errors';
import { toInvitation } from './serializers';
import { hashLinkToken, newLinkToken } from './tokens';

const invitationTtlMs = 7 * 24 * 60 * 60 * 1000;

export type InvitationService = ReturnType<typeof createInvitationService>;

export function createInvitationService(deps: { config: Config; dataSource: DataSource; mailer: Mailer }) {
  const { config, dataSource, mailer } = deps;

  async function byToken(m: EntityManager, token: string): Promise<InvitationRow> {
    const row = await invitations.findInvitationByTokenHash(m, hashLinkToken(token));
    if (!row) throw notFound('This invitation link is not valid.');
    return row;
  }

  /** Checks an invitation can still be used by this e-mail address; throws the reason otherwise. */
  async function findUsableInvitation(m: EntityManager, token: string, email: string): Promise<InvitationRow> {
    const row = await byToken(m, token);
    if (row.acceptedAt) throw conflict('invitation_used', 'This invitation has already been used.');
    if (row.expiresAt.getTime() <= Date.now()) {
      throw gone('invitation_expired', 'This invitation has expired. Ask the team owner for a new one.');
    }
    if (row.email !== email.toLowerCase()) {
      throw forbidden(`This invitation was sent to ${row.email}. Use that address to accept it.`);
    }
    return row;
  }

  return {
    findUsableInvitation,

    async markAccepted(m: EntityManager, invitationId: string, userId: string): Promise<void> {
      await invitations.markInvitationAccepted(m, invitationId, userId);
    },

    async list(teamId: string): Promise<Invitation[]> {
      return (await invitations.listInvitationsOfTeam(dataSource.manager, teamId)).map(toInvitation);
    },

    /** Invites an address; an earlier open invitation to the same address is replaced by the new link. */
    async create(team: TeamContext, inviter: { id: string; name: string }, email: string, role: Role): Promise<Invitation> {
      const { token, hash } = newLinkToken();
      const row = await dataSource.transaction(async (m) => {
        const existingUser = await users.findUserByEmail(m, email);
        if (existingUser && (await teams.findMembership(m, existingUser.id, team.id))) {
          throw conflict('already_member', `${email} is already a member of ${team.name}.`);
        }
        for (const open of await invitations.listInvitationsOfTeam(m, team.id)) {
          if (open.email === email && !open.acceptedAt) await invitations.deleteInvitation(m, open.id);
        }
        return invitations.insertInvitation(m, {
          teamId: team.id,
          email,
          role,
          tokenHash: hash,
          invitedByUserId: inviter.id,
          expiresAt: new Date(Date.now() + invitationTtlMs),
        });
      });
      await mailer.send({
        to: email,
        teamId: team.id,
        subject: `${inviter.name} invited you to ${team.name} on Tacet`,
        text:
          `Hello,\n\n${inviter.name} invited you to join "${team.name}" on Tacet as ${role}.\n\n` +
          `Accept the invitation here:\n\n${config.appUrl}/invite/${token}\n\n` +
          `The link is valid for 7 days.\n`,
      });
      return toInvitation(row);
    },

    async remove(teamId: string, invitationId: string): Promise<void> {
      if (!/^[0-9a-f-]{36}$/i.test(invitationId)) throw notFound('Invitation not found.');
      const row = await invitations.findInvitationInTeam(dataSource.manager, invitationId, teamId);
      if (!row) throw notFound('Invitation not found.');
      await invitations.deleteInvitation(dataSource.manager, row.id);
    },

    async preview(token: string): Promise<InvitationPreview> {
      const row = await byToken(dataSource.manager, token);
      const team = await teams.findTeamById(dataSource.manager, row.teamId);
      const inviter = await users.findUserById(dataSource.manager, row.invitedByUserId);
      if (!team) throw notFound('This invitation link is not valid.');
      return {
        teamName: team.name,
        email: row.email,
        role: row.role,
        invitedBy: inviter?.name ?? 'a former member',
        expired: row.expiresAt.getTime() <= Date.now(),
        accepted: row.acceptedAt !== null,
      };
    },

    async accept(token: string, user: { id: string; email: string }): Promise<{ team: { id: string; name: string }; role: Role }> {
      return dataSource.transaction(async (m) => {
        const row = await findUsableInvitation(m, token, user.email);
        if (await teams.findMembership(m, user.id, row.teamId)) {
          throw conflict('already_member', 'You are already a member of this team.');
        }
        const team = await teams.findTeamById(m, row.teamId);
        if (!team) throw notFound('This invitation link is not valid.');
        await teams.insertMembership(m, { userId: user.id, teamId: team.id, role: row.role });
        await invitations.markInvitationAccepted(m, row.id, user.id);
        return { team: { id: team.id, name: team.name }, role: row.role };
      });
    },
  };
}
