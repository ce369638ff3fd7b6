import type { Queue } from 'bullmq';
import type { Redis } from 'ioredis';
import type { DataSource } from 'typeorm';
import type { Role } from '@shared/roles';
import type { Config } from '../config';
import type { UserRow } from '../db/entities';
import type { Mailer } from '../mail/mailer';

/** Everything the API needs from outside; tests build it against their own database and queue prefix. */
export interface AppDeps {
  config: Config;
  dataSource: DataSource;
  mailer: Mailer;
  /** plain connection for health checks */
  redis: Redis;
  computeQueue: Queue;
  /** built client (dist/client) to serve with an SPA fallback; omitted in API tests */
  clientDir?: string;
  /** receives one redacted line per API request (server/main.ts passes console.log when TACET_REQUEST_LOG=1) */
  requestLog?: (line: string) => void;
}

export interface AuthContext {
  user: UserRow;
  /** the session behind a sign-in token; null when a personal API token was sent */
  sessionId: string | null;
  /** set when a personal API token was sent: the request acts only in that token's team */
  apiToken?: { id: string; teamId: string };
}

export interface TeamContext {
  id: string;
  name: string;
  role: Role;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      auth?: AuthContext;
      team?: TeamContext;
    }
  }
}

export function requireAuth(req: Express.Request): AuthContext {
  if (!req.auth) throw new Error('requireAuth called on a route without the authenticate middleware');
  return req.auth;
}

export function requireTeam(req: Express.Request): TeamContext {
  if (!req.team) throw new Error('requireTeam called on a route without the currentTeam middleware');
  return req.team;
}
