import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiErrorSchema } from '@shared/api';
import { meResponseSchema, sessionResponseSchema } from '@shared/auth';
import { sessionCookieName } from '@shared/headers';
import { PasswordResetEntity } from '../../server/db/entities';
import { createTestContext, signUp, testPassword, tokenFromMail, type TestContext } from '../support/app';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => {
  await ctx?.close();
});

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

describe('sign-up', () => {
  it('creates the user, a team they own and a session cookie', async () => {
    const res = await request(ctx.app)
      .post('/api/auth/signup')
      .send({ email: ' Alma.Voss@Tacet.TEST ', password: testPassword, name: 'Alma Voss' });
    expect(res.status).toBe(201);
    const body = sessionResponseSchema.parse(res.body);
    expect(body.user).toMatchObject({ email: 'alma.voss@tacet.test', name: 'Alma Voss', notifyOnRunDone: true });
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toContain(`${sessionCookieName}=${body.token}`);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);

    const me = await request(ctx.app).get('/api/me').set('Cookie', `${sessionCookieName}=${body.token}`);
    expect(me.status).toBe(200);
    const parsed = meResponseSchema.parse(me.body);
    expect(parsed.memberships).toEqual([{ team: { id: expect.any(String), name: "Alma Voss's team" }, role: 'owner' }]);
  });

  it('uses the given team name', async () => {
    const user = await signUp(ctx.app, { teamName: 'Sprinkling Lab' });
    const team = await request(ctx.app).get('/api/team').set(bearer(user.token));
    expect(team.body).toEqual({ id: user.teamId, name: 'Sprinkling Lab', role: 'owner' });
  });

  it('refuses a second account with the same e-mail (409)', async () => {
    const user = await signUp(ctx.app);
    const res = await request(ctx.app)
      .post('/api/auth/signup')
      .send({ email: user.email.toUpperCase(), password: testPassword, name: 'Someone Else' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('email_taken');
  });

  it('reports every invalid field with its path (400)', async () => {
    const res = await request(ctx.app).post('/api/auth/signup').send({ email: 'not-an-address', password: 'short', name: '' });
    expect(res.status).toBe(400);
    const { error } = apiErrorSchema.parse(res.body);
    expect(error.code).toBe('validation_failed');
    expect([...new Set(error.issues?.map((i) => i.path))].sort()).toEqual(['email', 'name', 'password']);
  });

  it('rejects unknown fields (strict schema)', async () => {
    const res = await request(ctx.app)
      .post('/api/auth/signup')
      .send({ email: 'x1@tacet.test', password: testPassword, name: 'X', role: 'owner' });
    expect(res.status).toBe(400);
  });
});

describe('sign-in and sign-out', () => {
  it('signs in with the right password and returns a working token', async () => {
    const user = await signUp(ctx.app);
    const res = await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: testPassword });
    expect(res.status).toBe(200);
    const { token } = sessionResponseSchema.parse(res.body);
    expect(String(res.headers['set-cookie'])).toContain(`${sessionCookieName}=`);
    const me = await request(ctx.app).get('/api/me').set(bearer(token));
    expect(me.body.user.id).toBe(user.id);
  });

  it('answers a wrong password and an unknown e-mail alike (401)', async () => {
    const user = await signUp(ctx.app);
    const wrong = await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: 'wrong-password-1' });
    const unknown = await request(ctx.app).post('/api/auth/login').send({ email: 'nobody@tacet.test', password: testPassword });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
  });

  it('revokes the token on sign-out, leaving other sessions alive', async () => {
    const user = await signUp(ctx.app);
    const second = (await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: testPassword })).body.token;
    const out = await request(ctx.app).post('/api/auth/logout').set(bearer(user.token));
    expect(out.status).toBe(204);
    expect(String(out.headers['set-cookie'])).toMatch(new RegExp(`${sessionCookieName}=;`));
    const after = await request(ctx.app).get('/api/me').set(bearer(user.token));
    expect(after.status).toBe(401);
    expect((await request(ctx.app).get('/api/me').set(bearer(second))).status).toBe(200);
  });

  it('rejects missing, malformed and forged tokens (401)', async () => {
    expect((await request(ctx.app).get('/api/me')).status).toBe(401);
    expect((await request(ctx.app).get('/api/me').set(bearer('not.a.jwt'))).status).toBe(401);
    const user = await signUp(ctx.app);
    const [h, p] = user.token.split('.');
    expect((await request(ctx.app).get('/api/me').set(bearer(`${h}.${p}.forgedsignature`))).status).toBe(401);
  });

  it('updates the name and notification preference with PATCH /api/me', async () => {
    const user = await signUp(ctx.app);
    const res = await request(ctx.app).patch('/api/me').set(bearer(user.token)).send({ name: 'Renamed', notifyOnRunDone: true });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id: user.id, name: 'Renamed', notifyOnRunDone: true });
    expect((await request(ctx.app).patch('/api/me').set(bearer(user.token)).send({ email: 'x@y.z' })).status).toBe(400);
  });
});

describe('password reset by e-mail link', () => {
  it('mails a single-use link that sets a new password and ends old sessions', async () => {
    const user = await signUp(ctx.app);
    const asked = await request(ctx.app).post('/api/auth/password-reset').send({ email: user.email });
    expect(asked.status).toBe(202);
    expect(asked.body).toEqual({ ok: true });

    const [mail] = await ctx.mailTo(user.email);
    expect(mail?.subject).toMatch(/reset/i);
    const token = tokenFromMail(mail!.text, ctx.config.appUrl, '/reset-password/');

    const newPassword = 'pauli-jordan-2026';
    const confirmed = await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: newPassword });
    expect(confirmed.status).toBe(204);
    expect((await request(ctx.app).get('/api/me').set(bearer(user.token))).status).toBe(401);
    expect((await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: testPassword })).status).toBe(401);
    expect((await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: newPassword })).status).toBe(200);

    const again = await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: 'another-pass-3' });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe('invalid_token');
  });

  it('answers 202 for an unknown address and sends nothing', async () => {
    const res = await request(ctx.app).post('/api/auth/password-reset').send({ email: 'ghost@tacet.test' });
    expect(res.status).toBe(202);
    expect(await ctx.mailTo('ghost@tacet.test')).toHaveLength(0);
  });

  it('refuses an expired link', async () => {
    const user = await signUp(ctx.app);
    await request(ctx.app).post('/api/auth/password-reset').send({ email: user.email });
    const token = tokenFromMail((await ctx.mailTo(user.email))[0]!.text, ctx.config.appUrl, '/reset-password/');
    await ctx.dataSource.manager.update(PasswordResetEntity, { userId: user.id }, { expiresAt: new Date(Date.now() - 1000) });
    const res = await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: 'too-late-pass-1' });
    expect(res.status).toBe(400);
  });

  it('applies the password policy to the new password', async () => {
    const res = await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token: 'x'.repeat(43), password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('password');
  });
});

describe('rate limits', () => {
  it('stops password guessing for one e-mail after 10 failures (429), not other accounts', async () => {
    const user = await signUp(ctx.app);
    const other = await signUp(ctx.app);
    for (let attempt = 1; attempt <= 10; attempt++) {
      const res = await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: `guess-number-${attempt}` });
      expect(res.status).toBe(401);
    }
    const blocked = await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: testPassword });
    expect(blocked.status).toBe(429);
    expect(apiErrorSchema.parse(blocked.body).error.code).toBe('rate_limited');
    expect((await request(ctx.app).post('/api/auth/login').send({ email: other.email, password: testPassword })).status).toBe(200);
  });

  it('caps reset e-mails per address', async () => {
    const user = await signUp(ctx.app);
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await request(ctx.app).post('/api/auth/password-reset').send({ email: user.email })).status);
    expect(statuses).toEqual([202, 202, 202, 202, 202, 429]);
    expect(await ctx.mailTo(user.email)).toHaveLength(5);
  });
});
