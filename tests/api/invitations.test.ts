import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { invitationPreviewSchema, invitationSchema } from '@shared/teams';
import { InvitationEntity } from '../../server/db/entities';
import { createTestContext, signUp, testPassword, tokenFromMail, type SignedUpUser, type TestContext } from '../support/app';

let ctx: TestContext;
let owner: SignedUpUser;
beforeAll(async () => {
  ctx = await createTestContext();
  owner = await signUp(ctx.app, { name: 'Ingrid Test', teamName: 'Diamond Group' });
});
afterAll(async () => {
  await ctx?.close();
});

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

async function invite(email: string, role: 'owner' | 'researcher' | 'viewer'): Promise<{ id: string; token: string }> {
  const res = await request(ctx.app).post('/api/team/invitations').set(bearer(owner.token)).send({ email, role });
  expect(res.status).toBe(201);
  const invitation = invitationSchema.parse(res.body);
  const [mail] = await ctx.mailTo(email);
  return { id: invitation.id, token: tokenFromMail(mail!.text, ctx.config.appUrl, '/invite/') };
}

describe('invitation flow', () => {
  it('invite → e-mail → preview → sign up with the token → member with the invited role', async () => {
    const email = 'new.researcher@tacet.test';
    const created = await request(ctx.app).post('/api/team/invitations').set(bearer(owner.token)).send({ email, role: 'researcher' });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ email, role: 'researcher', acceptedAt: null });
    const days = (Date.parse(created.body.expiresAt) - Date.parse(created.body.createdAt)) / 86_400_000;
    expect(days).toBeCloseTo(7, 3);

    const [mail] = await ctx.mailTo(email);
    expect(mail!.subject).toContain('Diamond Group');
    expect(mail!.teamId).toBe(owner.teamId);
    const token = tokenFromMail(mail!.text, ctx.config.appUrl, '/invite/');

    const preview = await request(ctx.app).get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(invitationPreviewSchema.parse(preview.body)).toEqual({
      teamName: 'Diamond Group',
      email,
      role: 'researcher',
      invitedBy: 'Ingrid Test',
      expired: false,
      accepted: false,
    });

    const signup = await request(ctx.app)
      .post('/api/auth/signup')
      .send({ email, password: testPassword, name: 'New Researcher', invitationToken: token });
    expect(signup.status).toBe(201);
    const me = await request(ctx.app).get('/api/me').set(bearer(signup.body.token));
    expect(me.body.memberships).toEqual([{ team: { id: owner.teamId, name: 'Diamond Group' }, role: 'researcher' }]);

    expect((await request(ctx.app).get(`/api/invitations/${token}`)).body.accepted).toBe(true);
    const list = await request(ctx.app).get('/api/team/invitations').set(bearer(owner.token));
    expect(list.body.items.find((i: { email: string }) => i.email === email).acceptedAt).not.toBeNull();
    const members = await request(ctx.app).get('/api/team/members').set(bearer(owner.token));
    expect(members.body.items.map((m: { email: string; role: string }) => [m.email, m.role])).toContainEqual([email, 'researcher']);
  });

  it('lets an existing user accept while signed in, once', async () => {
    const existing = await signUp(ctx.app);
    const { token } = await invite(existing.email, 'viewer');
    const accepted = await request(ctx.app).post(`/api/invitations/${token}/accept`).set(bearer(existing.token));
    expect(accepted.status).toBe(200);
    expect(accepted.body).toEqual({ team: { id: owner.teamId, name: 'Diamond Group' }, role: 'viewer' });
    const me = await request(ctx.app).get('/api/me').set(bearer(existing.token));
    expect(me.body.memberships).toHaveLength(2);
    const again = await request(ctx.app).post(`/api/invitations/${token}/accept`).set(bearer(existing.token));
    expect(again.status).toBe(409);
  });

  it('refuses acceptance by another address (403) and when signed out (401)', async () => {
    const { token } = await invite('intended@tacet.test', 'viewer');
    const stranger = await signUp(ctx.app);
    const res = await request(ctx.app).post(`/api/invitations/${token}/accept`).set(bearer(stranger.token));
    expect(res.status).toBe(403);
    expect(res.body.error.message).toContain('intended@tacet.test');
    expect((await request(ctx.app).post(`/api/invitations/${token}/accept`)).status).toBe(401);
    const signup = await request(ctx.app)
      .post('/api/auth/signup')
      .send({ email: 'other@tacet.test', password: testPassword, name: 'Other', invitationToken: token });
    expect(signup.status).toBe(403);
    // the refused sign-up created nothing
    expect((await request(ctx.app).post('/api/auth/login').send({ email: 'other@tacet.test', password: testPassword })).status).toBe(401);
  });

  it('marks an expired invitation in the preview and refuses it (410)', async () => {
    const { id, token } = await invite('late@tacet.test', 'researcher');
    await ctx.dataSource.manager.update(InvitationEntity, { id }, { expiresAt: new Date(Date.now() - 60_000) });
    expect((await request(ctx.app).get(`/api/invitations/${token}`)).body.expired).toBe(true);
    const res = await request(ctx.app)
      .post('/api/auth/signup')
      .send({ email: 'late@tacet.test', password: testPassword, name: 'Late', invitationToken: token });
    expect(res.status).toBe(410);
  });

  it('answers 404 for an unknown token', async () => {
    expect((await request(ctx.app).get(`/api/invitations/${'z'.repeat(43)}`)).status).toBe(404);
  });

  it('replaces an open invitation to the same address, and deletes on request', async () => {
    const first = await invite('twice@tacet.test', 'viewer');
    const second = await invite('twice@tacet.test', 'researcher');
    expect((await request(ctx.app).get(`/api/invitations/${first.token}`)).status).toBe(404);
    expect((await request(ctx.app).get(`/api/invitations/${second.token}`)).body.role).toBe('researcher');
    const del = await request(ctx.app).delete(`/api/team/invitations/${second.id}`).set(bearer(owner.token));
    expect(del.status).toBe(204);
    expect((await request(ctx.app).get(`/api/invitations/${second.token}`)).status).toBe(404);
    expect((await request(ctx.app).delete(`/api/team/invitations/${second.id}`).set(bearer(owner.token))).status).toBe(404);
  });

  it('refuses to invite someone who is already a member (409)', async () => {
    const res = await request(ctx.app).post('/api/team/invitations').set(bearer(owner.token)).send({ email: owner.email, role: 'viewer' });
    expect(res.status).toBe(409);
  });

  it('cannot delete another team’s invitation (404)', async () => {
    const { id } = await invite('kept@tacet.test', 'viewer');
    const otherOwner = await signUp(ctx.app);
    expect((await request(ctx.app).delete(`/api/team/invitations/${id}`).set(bearer(otherOwner.token))).status).toBe(404);
  });
});
