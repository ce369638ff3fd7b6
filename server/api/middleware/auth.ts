import type { RequestHandler } from 'express';
import { sessionCookieName, teamHeaderName } from '@shared/auth';
import { roleAllows, type Permission } from '@shared/roles';
import { forbidden, notFound, unauthorized } from '../errors';
import type { AuthService } from '../services/auth-service';
import type { TeamService } from '../services/team-service';

function tokenFrom(req: Parameters<RequestHandler>[0]): string | null {
  const header = req.get('authorization');
  if (header) {
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    if (match) return match[1]!;
  }
  const cookie = (req.cookies as Record<string, string> | undefined)?.[sessionCookieName];
  return cookie || null;
}

/** 401 unless the request carries a valid, unrevoked session token (cookie or Bearer). */
export function authenticate(auth: AuthService): RequestHandler {
  return async (req, _res, next) => {
    const token = tokenFrom(req);
    if (!token) throw unauthorized();
    const context = await auth.authenticate(token);
    if (!context) throw unauthorized('Your session has ended. Sign in again.');
    req.auth = context;
    next();
  };
}

/** The team named by the x-tacet-team header, or the user's first team; 404 if not a member. */
export function currentTeam(teams: TeamService): RequestHandler {
  return async (req, _res, next) => {
    const requested = req.get(teamHeaderName)?.trim() || null;
    const team = await teams.resolveCurrentTeam(req.auth!.user.id, requested);
    if (!team) throw notFound(requested ? 'Team not found.' : 'You are not a member of any team.');
    req.team = team;
    next();
  };
}

const permissionWords: Record<Permission, string> = {
  read: 'view this team',
  compute: 'run computations in this team',
  manageTeam: 'manage this team',
};

export function requirePermission(permission: Permission): RequestHandler {
  return (req, _res, next) => {
    const team = req.team!;
    if (!roleAllows(team.role, permission)) {
      throw forbidden(`Your role (${team.role}) does not allow you to ${permissionWords[permission]}.`);
    }
    next();
  };
}
