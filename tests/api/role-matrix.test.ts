import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { permissions, roles, type Permission } from '@shared/roles';
import { insertMembership } from '../../server/db/repositories/teams';
import { createTestContext, signUp, type SignedUpUser, type TestContext } from '../support/app';

/**
 * Every team-scoped route, with the permission it needs (shared/roles.ts) and its success status.
 * Each case runs against fresh targets from `prepare`, so destructive routes can succeed repeatedly.
 */
type Actor = (typeof roles)[number] | 'signed-out' | 'other-team';

interface World {
  team: Record<(typeof roles)[number], SignedUpUser>;
  outsider: SignedUpUser;
  teamId: string;
}

interface RouteCase {
  method: 'get' | 'post' | 'patch' | 'delete';
  path: string;
  permission: Permission;
  success: number;
  prepare?: (world: World) => Promise<{ path?: string; body?: object }>;
  body?: object;
}

let ctx: TestContext;
let world: World;

async function addMember(role: (typeof roles)[number]): Promise<SignedUpUser> {
  const user = await signUp(ctx.app);
  await insertMembership(ctx.dataSource.manager, { userId: user.id, teamId: world.teamId, role });
  return user;
}

const routes: RouteCase[] = [
  { method: 'get', path: '/api/team', permission: 'read', success: 200 },
  { method: 'patch', path: '/api/team', permission: 'manageTeam', success: 200, body: { name: 'Matrix Team' } },
  { method: 'get', path: '/api/team/members', permission: 'read', success: 200 },
  {
    method: 'patch',
    path: '/api/team/members/:id',
    permission: 'manageTeam',
    success: 200,
    prepare: async () => ({ path: `/api/team/members/${(await addMember('viewer')).id}`, body: { role: 'researcher' } }),
  },
  {
    method: 'delete',
    path: '/api/team/members/:id',
    permission: 'manageTeam',
    success: 204,
    prepare: async () => ({ path: `/api/team/members/${(await addMember('viewer')).id}` }),
  },
  { method: 'get', path: '/api/team/invitations', permission: 'manageTeam', success: 200 },
  {
    method: 'post',
    path: '/api/team/invitations',
    permission: 'manageTeam',
    success: 201,
    prepare: async () => ({ body: { email: `matrix-${Math.random().toString(36).slice(2)}@tacet.test`, role: 'viewer' } }),
  },
  {
    method: 'delete',
    path: '/api/team/invitations/:id',
    permission: 'manageTeam',
    success: 204,
    prepare: async (w) => {
      const res = await request(ctx.app)
        .post('/api/team/invitations')
        .set('Authorization', `Bearer ${w.team.owner.token}`)
        .send({ email: `del-${Math.random().toString(36).slice(2)}@tacet.test`, role: 'viewer' });
      return { path: `/api/team/invitations/${res.body.id}` };
    },
  },
  { method: 'get', path: '/api/outbox', permission: 'manageTeam', success: 200 },
];

const actors: Actor[] = [...roles, 'signed-out', 'other-team'];

function expectedStatus(route: RouteCase, actor: Actor): number {
  if (actor === 'signed-out') return 401;
  // a team the caller is not in is answered as if it did not exist
  if (actor === 'other-team') return 404;
  return (permissions[route.permission] as readonly string[]).includes(actor) ? route.success : 403;
}

beforeAll(async () => {
  ctx = await createTestContext();
  const owner = await signUp(ctx.app, { teamName: 'Matrix Team' });
  world = { team: { owner } as World['team'], outsider: await signUp(ctx.app), teamId: owner.teamId };
  world.team.researcher = await addMember('researcher');
  world.team.viewer = await addMember('viewer');
});
afterAll(async () => {
  await ctx?.close();
});

describe('role matrix', () => {
  const cases = routes.flatMap((route) => actors.map((actor) => ({ route, actor, expected: expectedStatus(route, actor) })));

  it.each(cases.map((c) => [`${c.route.method.toUpperCase()} ${c.route.path}`, c.actor, c.expected, c] as const))(
    '%s as %s → %i',
    async (_name, actor, expected, { route }) => {
      const prepared = route.prepare ? await route.prepare(world) : {};
      const path = prepared.path ?? route.path;
      let req = request(ctx.app)[route.method](path).set('x-tacet-team', world.teamId);
      if (actor === 'other-team') req = req.set('Authorization', `Bearer ${world.outsider.token}`);
      else if (actor !== 'signed-out') req = req.set('Authorization', `Bearer ${world.team[actor].token}`);
      const body = prepared.body ?? route.body;
      const res = body ? await req.send(body) : await req;
      expect(res.status, JSON.stringify(res.body)).toBe(expected);
      if (expected >= 400) expect(res.body.error.code).toEqual(expect.any(String));
    },
  );

  it('covers every permission level the routes use', () => {
    expect(new Set(routes.map((r) => r.permission))).toEqual(new Set(['read', 'manageTeam']));
  });
});

describe('routes for any signed-in user', () => {
  const signedIn = [
    { method: 'get', path: '/api/me', success: 200 },
    { method: 'patch', path: '/api/me', success: 200, body: { name: 'Still Me' } },
  ] as const;
  it.each(signedIn)('$method $path needs a session', async ({ method, path, success, ...rest }) => {
    const body = 'body' in rest ? rest.body : undefined;
    const anonymous = request(ctx.app)[method](path);
    expect((await (body ? anonymous.send(body) : anonymous)).status).toBe(401);
    for (const actor of [...roles, 'other-team'] as const) {
      const user = actor === 'other-team' ? world.outsider : world.team[actor];
      const req = request(ctx.app)[method](path).set('Authorization', `Bearer ${user.token}`);
      expect((await (body ? req.send(body) : req)).status).toBe(success);
    }
  });

  it('POST /api/auth/logout needs a session', async () => {
    expect((await request(ctx.app).post('/api/auth/logout')).status).toBe(401);
  });

  it('public routes answer without a session', async () => {
    expect((await request(ctx.app).get('/api/health')).status).toBe(200);
    expect((await request(ctx.app).get(`/api/invitations/${'q'.repeat(43)}`)).status).toBe(404);
  });
});
