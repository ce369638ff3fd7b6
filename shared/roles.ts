import { z } from 'zod';

/** Team roles, from most to least privileged. */
export const roles = ['owner', 'researcher', 'viewer'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

/** What each role may do. The server checks these on every route; the client hides what a role cannot do. */
export const permissions = {
  /** read runs, studies, causal sets, cut rules; download exports */
  read: ['owner', 'researcher', 'viewer'],
  /** create, cancel, re-analyse and delete computations; upload causal sets; save cut rules */
  compute: ['owner', 'researcher'],
  /** members, invitations, team settings, the dev outbox */
  manageTeam: ['owner'],
} as const satisfies Record<string, readonly Role[]>;
export type Permission = keyof typeof permissions;

export function roleAllows(role: Role, permission: Permission): boolean {
  return (permissions[permission] as readonly Role[]).includes(role);
}
