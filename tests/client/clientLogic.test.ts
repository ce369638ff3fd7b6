import { describe, expect, it } from 'vitest';
import { createInvitationRequestSchema } from '@shared/teams';
import { loginRequestSchema } from '@shared/auth';
import type { Membership } from '@shared/auth';
import { resolveMembership } from '../../src/lib/currentUser';
import { validate } from '../../src/lib/forms';
import { queryKeys } from '../../src/lib/queryKeys';

const memberships: Membership[] = [
  { team: { id: 'a', name: 'First group' }, role: 'owner' },
  { team: { id: 'b', name: 'Second group' }, role: 'viewer' },
];

describe('resolveMembership', () => {
  it('uses the stored team when the user still belongs to it', () => {
    expect(resolveMembership(memberships, 'b')?.team.name).toBe('Second group');
  });
  it('falls back to the first team (the server default) for a stale or missing choice', () => {
    expect(resolveMembership(memberships, 'gone')?.team.id).toBe('a');
    expect(resolveMembership(memberships, null)?.team.id).toBe('a');
  });
  it('has no membership for a user without teams', () => {
    expect(resolveMembership([], 'a')).toBeNull();
  });
});

describe('validate', () => {
  it('returns the parsed data, normalised by the shared schema', () => {
    const result = validate(loginRequestSchema, { email: '  Ingrid@Example.ORG ', password: 'x' });
    expect(result).toEqual({ ok: true, data: { email: 'ingrid@example.org', password: 'x' } });
  });
  it('returns the first message per field', () => {
    const result = validate(createInvitationRequestSchema, { email: 'not-an-address', role: 'admiral' });
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.errors.email).toBe('Enter a valid e-mail address.');
      expect(Object.keys(result.errors).sort()).toEqual(['email', 'role']);
    }
  });
});

describe('queryKeys', () => {
  it('scopes team resources under the team, so one invalidation reaches them all', () => {
    const scope = queryKeys.teamScope('t1');
    for (const key of [queryKeys.members('t1'), queryKeys.invitations('t1'), queryKeys.outbox('t1'), queryKeys.runs.detail('t1', 'r1')]) {
      expect(key.slice(0, scope.length)).toEqual([...scope]);
    }
    expect(queryKeys.members('t1')).not.toEqual(queryKeys.members('t2'));
  });
});
