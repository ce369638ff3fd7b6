import type { RequestHandler } from 'express';
import { sessionCookieName, teamHeaderName } from '@shared/headers';
import { roleAllows, type Permission } from '@shared/roles';
import { forbidden, notFound, unauthorized } from '../errors';
import { checkCsrf } from './csrf';
import type { AuthService } from '../services/auth';
import type { TeamService } from '../services/team';

function tokenFrom(req: Parameters<RequestHandler>[0]): { token: string; source: 'bearer' | 'cookie' } | null {
  const header = req.get('authorization');
  if (header) {
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    if (match) return { token: match[1]!, source: 'bearer' };
  }
  const cookie = (req.cookies as Record<string, string> | undefined)?.[sessionCookieName];
  return cookie ? { token: cookie, source: 'cookie' } : null;
}

/**
 * 401 unless the request carries a valid, unrevoked session token (cookie or Bearer) or personal API
 * token (Bearer); cookie-authenticated writes must also pass the CSRF check (403).
 */
export function authenticate(auth: AuthService): RequestHandler {
  return async (req, _res, next) => {
    const found = tokenFrom(req);
    if (!found) throw unauthorized();
    const context = await auth.authenticate(found.token);
    if (!context) throw unauthorized('Your session has ended. Sign in again.');
    if (found.source === 'cookie') checkCsrf(req);
    req.auth = context;
    next();
  };
}

/** Routes that manage credentials take a signed-in session, not a personal API token. */
export const requireSession: RequestHandler = (req, _res, next) => {
  if (req.auth?.apiToken) throw forbidden('API tokens cannot manage API tokens; sign in to the app to do this.');
  next();
};

/**
 * The team named by the x-tacet-team header, or the user's first team; 404 if not a member. A
 * personal API token acts only in its own team: another team in the header is answered 404.
 */
export function currentTeam(teams: TeamService): RequestHandler {
  return async (req, _res, next) => {
    const header = req.get(teamHeaderName)?.trim() || null;
    const tokenTeam = req.auth!.apiToken?.teamId ?? null;
    if (tokenTeam && header && header.toLowerCase() !== tokenTeam) throw notFound('Team not found.');
    const requested = tokenTeam ?? header;
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
