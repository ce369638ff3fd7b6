import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { memberSchema } from '@shared/teams';
import { insertMembership } from '../../server/db/repositories/teams';
import { createTestContext, signUp, type SignedUpUser, type TestContext } from '../support/app';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => {
  await ctx?.close();
});

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

async function teamWith(...roles: ('owner' | 'researcher' | 'viewer')[]): Promise<{ owner: SignedUpUser; others: SignedUpUser[] }> {
  const owner = await signUp(ctx.app);
  const others: SignedUpUser[] = [];
  for (const role of roles) {
    const user = await signUp(ctx.app);
    await insertMembership(ctx.dataSource.manager, { userId: user.id, teamId: owner.teamId, role });
    others.push(user);
  }
  return { owner, others };
}

describe('current team', () => {
  it('defaults to the oldest membership and switches with x-tacet-team', async () => {
    const { owner, others } = await teamWith('viewer');
    const viewer = others[0]!;
    const own = await request(ctx.app).get('/api/team').set(bearer(viewer.token));
    expect(own.body).toMatchObject({ id: viewer.teamId, role: 'owner' });
    const switched = await request(ctx.app).get('/api/team').set(bearer(viewer.token)).set('x-tacet-team', owner.teamId);
    expect(switched.body).toMatchObject({ id: owner.teamId, role: 'viewer' });
  });

  it('answers 404 for a team the user is not in, and for a malformed id', async () => {
    const a = await signUp(ctx.app);
    const b = await signUp(ctx.app);
    expect((await request(ctx.app).get('/api/team').set(bearer(a.token)).set('x-tacet-team', b.teamId)).status).toBe(404);
    expect((await request(ctx.app).get('/api/team').set(bearer(a.token)).set('x-tacet-team', 'drop table')).status).toBe(404);
  });

  it('renames the team (owner)', async () => {
    const owner = await signUp(ctx.app);
    const res = await request(ctx.app).patch('/api/team').set(bearer(owner.token)).send({ name: '  Null Cone Lab ' });
    expect(res.body).toEqual({ id: owner.teamId, name: 'Null Cone Lab', role: 'owner' });
    expect((await request(ctx.app).patch('/api/team').set(bearer(owner.token)).send({ name: '' })).status).toBe(400);
  });
});

describe('members', () => {
  it('lists members and changes a role', async () => {
    const { owner, others } = await teamWith('viewer');
    const list = await request(ctx.app).get('/api/team/members').set(bearer(owner.token));
    expect(list.body.items).toHaveLength(2);
    list.body.items.forEach((m: unknown) => memberSchema.parse(m));
    const changed = await request(ctx.app)
      .patch(`/api/team/members/${others[0]!.id}`)
      .set(bearer(owner.token))
      .send({ role: 'researcher' });
    expect(changed.status).toBe(200);
    expect(changed.body).toMatchObject({ userId: others[0]!.id, role: 'researcher' });
    expect((await request(ctx.app).patch(`/api/team/members/${others[0]!.id}`).set(bearer(owner.token)).send({ role: 'admin' })).status).toBe(400);
  });

  it('keeps at least one owner (409) but lets one of two owners step down', async () => {
    const { owner, others } = await teamWith('owner');
    const second = others[0]!;
    const demoteSelf = await request(ctx.app).patch(`/api/team/members/${owner.id}`).set(bearer(owner.token)).send({ role: 'viewer' });
    expect(demoteSelf.status).toBe(200);
    const demoteLast = await request(ctx.app)
      .patch(`/api/team/members/${second.id}`)
      .set(bearer(second.token))
      .set('x-tacet-team', owner.teamId)
      .send({ role: 'researcher' });
    expect(demoteLast.status).toBe(409);
    expect(demoteLast.body.error.code).toBe('last_owner');
    const removeLast = await request(ctx.app).delete(`/api/team/members/${second.id}`).set(bearer(second.token)).set('x-tacet-team', owner.teamId);
    expect(removeLast.status).toBe(409);
  });

  it('removes a member, who then loses access (404)', async () => {
    const { owner, others } = await teamWith('researcher');
    const member = others[0]!;
    expect((await request(ctx.app).delete(`/api/team/members/${member.id}`).set(bearer(owner.token))).status).toBe(204);
    expect((await request(ctx.app).get('/api/team').set(bearer(member.token)).set('x-tacet-team', owner.teamId)).status).toBe(404);
    expect((await request(ctx.app).delete(`/api/team/members/${member.id}`).set(bearer(owner.token))).status).toBe(404);
  });

  it('cannot touch a user of another team (404)', async () => {
    const a = await signUp(ctx.app);
    const b = await signUp(ctx.app);
    expect((await request(ctx.app).patch(`/api/team/members/${b.id}`).set(bearer(a.token)).send({ role: 'viewer' })).status).toBe(404);
    expect((await request(ctx.app).delete(`/api/team/members/${b.id}`).set(bearer(a.token))).status).toBe(404);
  });
});

describe('development outbox', () => {
  it('shows mail for the team and its members, newest first, and nothing of other teams', async () => {
    const { owner, others } = await teamWith('viewer');
    const outsider = await signUp(ctx.app);
    await request(ctx.app).post('/api/team/invitations').set(bearer(owner.token)).send({ email: 'guest@tacet.test', role: 'viewer' });
    await request(ctx.app).post('/api/auth/password-reset').send({ email: others[0]!.email });
    await request(ctx.app).post('/api/auth/password-reset').send({ email: outsider.email });
    const res = await request(ctx.app).get('/api/outbox').set(bearer(owner.token));
    expect(res.status).toBe(200);
    expect(res.body.items.map((m: { to: string }) => m.to)).toEqual([others[0]!.email, 'guest@tacet.test']);
  });

  it('does not exist in production mode (404)', async () => {
    const production = await createTestContext({ mode: 'production' });
    try {
      const owner = await signUp(production.app);
      const res = await request(production.app).get('/api/outbox').set(bearer(owner.token));
      expect(res.status).toBe(404);
    } finally {
      await production.close();
    }
  });
});
