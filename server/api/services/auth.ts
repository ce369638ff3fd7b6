import bcrypt from 'bcryptjs';
import jwt from 'jsonwebtoken';
import type { DataSource } from 'typeorm';
import type { LoginRequest, MeResponse, SignupRequest, User } from '@shared/auth';
import type { Config } from '../../config';
import * as passwordResets from '../../db/repositories/passwordResets';
import * as sessions from '../../db/repositories/sessions';
import * as teams from '../../db/repositories/teams';
import * as users from '../../db/repositories/users';
import type { Mailer } from '../../mail/mailer';
import type { AuthContext } from '../context';
import { badRequest, conflict, unauthorized } from '../errors';
import { createApiTokenService, looksLikeApiToken } from './apiTokens';
import type { InvitationService } from './invitations';
import { toUser } from './serializers';
import { hashLinkToken, newLinkToken } from './tokens';

const passwordResetTtlMs = 60 * 60 * 1000;

interface SessionTokenPayload {
  sub: string;
  sid: string;
}

export type AuthService = ReturnType<typeof createAuthService>;

export function createAuthService(deps: {
  config: Config;
  dataSource: DataSource;
  mailer: Mailer;
  invitations: InvitationService;
}) {
  const { config, dataSource, mailer, invitations } = deps;
  // Compared against when the e-mail is unknown, so a login takes as long whether or not the account exists.
  const decoyHash = bcrypt.hashSync('not-a-real-password', config.bcryptCost);
  const apiTokens = createApiTokenService({ dataSource });

  async function issueSession(userId: string): Promise<string> {
    const expiresAt = new Date(Date.now() + config.sessionTtlSeconds * 1000);
    const session = await sessions.insertSession(dataSource.manager, userId, expiresAt);
    return jwt.sign({ sid: session.id }, config.jwtSecret, {
      subject: userId,
      expiresIn: config.sessionTtlSeconds,
      algorithm: 'HS256',
    });
  }

  return {
    /** Sign-up creates the user with a team of their own, or joins the inviting team. */
    async signup(input: SignupRequest): Promise<{ token: string; user: User }> {
      const passwordHash = await bcrypt.hash(input.password, config.bcryptCost);
      const user = await dataSource.transaction(async (m) => {
        if (await users.findUserByEmail(m, input.email)) {
          throw conflict('email_taken', 'An account with this e-mail already exists. Sign in instead.');
        }
        const invitation = input.invitationToken
          ? await invitations.findUsableInvitation(m, input.invitationToken, input.email)
          : null;
        const created = await users.insertUser(m, { email: input.email, name: input.name, passwordHash });
        if (invitation) {
          await teams.insertMembership(m, { userId: created.id, teamId: invitation.teamId, role: invitation.role });
          await invitations.markAccepted(m, invitation.id, created.id);
        } else {
          const team = await teams.insertTeam(m, input.teamName ?? `${input.name}'s team`);
          await teams.insertMembership(m, { userId: created.id, teamId: team.id, role: 'owner' });
        }
        return created;
      });
      return { token: await issueSession(user.id), user: toUser(user) };
    },

    async login(input: LoginRequest): Promise<{ token: string; user: User }> {
      const user = await users.findUserByEmail(dataSource.manager, input.email);
      const matches = await bcrypt.compare(input.password, user?.passwordHash ?? decoyHash);
      if (!user || !matches) throw unauthorized('The e-mail or password is not correct.');
      return { token: await issueSession(user.id), user: toUser(user) };
    },

    async logout(sessionId: string | null): Promise<void> {
      // a personal API token is revoked on the Account page, not by signing out
      if (sessionId) await sessions.revokeSession(dataSource.manager, sessionId);
    },

    /**
     * The signed-in user for a session JWT or a personal API token, or null when it is malformed,
     * expired or revoked.
     */
    async authenticate(token: string): Promise<AuthContext | null> {
      if (looksLikeApiToken(token)) {
        const found = await apiTokens.authenticate(token);
        return found ? { user: found.user, sessionId: null, apiToken: { id: found.token.id, teamId: found.token.teamId } } : null;
      }
      let payload: SessionTokenPayload;
      try {
        payload = jwt.verify(token, config.jwtSecret, { algorithms: ['HS256'] }) as SessionTokenPayload;
      } catch {
        return null;
      }
      if (typeof payload.sub !== 'string' || typeof payload.sid !== 'string') return null;
      const uuid = /^[0-9a-f-]{36}$/i;
      if (!uuid.test(payload.sub) || !uuid.test(payload.sid)) return null;
      const session = await sessions.findLiveSession(dataSource.manager, payload.sid, payload.sub);
      if (!session) return null;
      const user = await users.findUserById(dataSource.manager, payload.sub);
      return user ? { user, sessionId: session.id } : null;
    },

    async me(userId: string): Promise<MeResponse> {
      const user = await users.findUserById(dataSource.manager, userId);
      if (!user) throw unauthorized();
      const memberships = await teams.listMembershipsOfUser(dataSource.manager, userId);
      return {
        user: toUser(user),
        memberships: memberships.map((ms) => ({ team: { id: ms.teamId, name: ms.teamName }, role: ms.role })),
      };
    },

    async updateMe(userId: string, changes: { name?: string; notifyOnRunDone?: boolean; notifyOnStudyDone?: boolean }): Promise<User> {
      await users.updateUser(dataSource.manager, userId, changes);
      const user = await users.findUserById(dataSource.manager, userId);
      if (!user) throw unauthorized();
      return toUser(user);
    },

    /** Always succeeds from the caller's view, so the answer never tells whether an account exists. */
    async requestPasswordReset(email: string): Promise<void> {
      const user = await users.findUserByEmail(dataSource.manager, email);
      if (!user) return;
      const { token, hash } = newLinkToken();
      await passwordResets.insertPasswordReset(dataSource.manager, {
        userId: user.id,
        tokenHash: hash,
        expiresAt: new Date(Date.now() + passwordResetTtlMs),
      });
      await mailer.send({
        to: user.email,
        subject: 'Reset your Tacet password',
        text:
          `Hello ${user.name},\n\n` +
          `someone asked to reset the password of your Tacet account. Choose a new one here:\n\n` +
          `${config.appUrl}/reset-password/${token}\n\n` +
          `The link works once, within one hour. If you did not ask for it, ignore this message.\n`,
      });
    },

    /** Spends a reset token: sets the password and signs the user out everywhere. */
    async confirmPasswordReset(token: string, password: string): Promise<void> {
      const passwordHash = await bcrypt.hash(password, config.bcryptCost);
      await dataSource.transaction(async (m) => {
        const reset = await passwordResets.findPasswordResetForUpdate(m, hashLinkToken(token));
        if (!reset || reset.usedAt || reset.expiresAt.getTime() <= Date.now()) {
          throw badRequest('invalid_token', 'This reset link is invalid, already used or expired. Ask for a new one.');
        }
        await users.updateUser(m, reset.userId, { passwordHash });
        await passwordResets.markPasswordResetUsed(m, reset.id);
        await sessions.revokeAllSessionsOfUser(m, reset.userId);
      });
    },
  };
}
