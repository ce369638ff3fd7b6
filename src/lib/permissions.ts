import { roleAllows, type Permission, type Role } from '@shared/roles';
import { useCurrentMembership } from './currentUser';

// Apart from currentUser.ts because shared/roles.ts brings zod, which the sign-in page does not load.

/** The user's role in the current team; null until /api/me has answered. */
export function useRole(): Role | null {
  return useCurrentMembership()?.role ?? null;
}

/** Whether the current role may do this; for hiding actions (the server enforces). */
export function useCan(permission: Permission): boolean {
  const role = useRole();
  return role !== null && roleAllows(role, permission);
}
