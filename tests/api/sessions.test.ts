import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csrfCookieName, csrfHeaderName, sessionCookieName } from '@shared/headers';
import { apiTokenSchema, createdApiTokenSchema } from '@shared/apiTokens';
import { createApp } from '../../server/app';
import { deleteMembership, insertMembership } from '../../server/db/repositories/teams';
import { createTestContext, signUp, testPassword, tokenFromMail, type SignedUpUser, type TestContext } from '../support/app';

/** Security headers, CSRF for cookie sessions, session and API-token lifetimes, password policy, log redaction. */
let ctx: TestContext;
let user: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  user = await signUp(ctx.app, { teamName: 'Session Team' });
});
afterAll(async () => {
  await ctx?.close();
});

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

/** Signs in like a browser and returns the cookies it was given. */
async function browserSignIn(email: string): Promise<{ session: string; csrf: string; cookieHeader: string }> {
  const res = await request(ctx.app).post('/api/auth/login').send({ email, password: testPassword });
  expect(res.status).toBe(200);
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []);
  const value = (name: string) => cookies.find((c) => c.startsWith(`${name}=`))!.split(';')[0]!.slice(name.length + 1);
  const session = value(sessionCookieName);
  const csrf = value(csrfCookieName);
  const csrfCookie = cookies.find((c) => c.startsWith(`${csrfCookieName}=`))!;
  expect(csrfCookie).not.toMatch(/HttpOnly/i);
  expect(csrfCookie).toMatch(/SameSite=Lax/i);
  return { session, csrf, cookieHeader: `${sessionCookieName}=${session}; ${csrfCookieName}=${csrf}` };
}

describe('security headers', () => {
  it('sends helmet headers with a CSP that allows our own scripts and inline styles only', async () => {
    const res = await request(ctx.app).get('/api/health');
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/script-src[^;]*(unsafe-inline|unsafe-eval|https?:)/);
    // plotly styles its SVG inline and exports images through data: and blob: URLs
    expect(csp).toMatch(/style-src 'self' 'unsafe-inline'/);
    expect(csp).toMatch(/img-src 'self' data: blob:/);
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    expect(res.headers['x-powered-by']).toBeUndefined();
    // plain http on loopback: no HSTS, which would lock a developer's browser onto https
    expect(res.headers['strict-transport-security']).toBeUndefined();
  });
});

describe('CSRF protection of cookie sessions', () => {
  it('refuses a cookie-authenticated write without the header, or with a wrong one, and accepts the right one', async () => {
    const browser = await browserSignIn(user.email);
    const patch = () => request(ctx.app).patch('/api/me').set('Cookie', browser.cookieHeader);
    const missing = await patch().send({ name: 'Forged' });
    expect(missing.status).toBe(403);
    expect(missing.body.error.code).toBe('csrf_failed');
    expect(missing.body.error.message).toContain(csrfHeaderName);
    const wrong = await patch().set(csrfHeaderName, 'x'.repeat(32)).send({ name: 'Forged' });
    expect(wrong.status).toBe(403);
    // the header alone is not enough either: it must match the cookie the attacker cannot read
    const headerOnly = await request(ctx.app)
      .patch('/api/me')
      .set('Cookie', `${sessionCookieName}=${browser.session}`)
      .set(csrfHeaderName, browser.csrf)
      .send({ name: 'Forged' });
    expect(headerOnly.status).toBe(403);
    expect((await request(ctx.app).get('/api/me').set(bearer(user.token))).body.user.name).not.toBe('Forged');

    const right = await patch().set(csrfHeaderName, browser.csrf).send({ name: 'Real Change' });
    expect(right.status).toBe(200);
    expect(right.body.name).toBe('Real Change');
  });

  it('lets reads through and exempts Bearer requests', async () => {
    const browser = await browserSignIn(user.email);
    expect((await request(ctx.app).get('/api/me').set('Cookie', browser.cookieHeader)).status).toBe(200);
    expect((await request(ctx.app).patch('/api/me').set(bearer(user.token)).send({ name: 'Via Bearer' })).status).toBe(200);
    const signOut = await request(ctx.app).post('/api/auth/logout').set('Cookie', browser.cookieHeader);
    expect(signOut.status).toBe(403);
    expect((await request(ctx.app).post('/api/auth/logout').set('Cookie', browser.cookieHeader).set(csrfHeaderName, browser.csrf)).status).toBe(204);
  });

  it('gives a browser with a session but no CSRF cookie one, so it can write after a reload', async () => {
    const browser = await browserSignIn(user.email);
    const res = await request(ctx.app).get('/api/me').set('Cookie', `${sessionCookieName}=${browser.session}`);
    const issued = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith(`${csrfCookieName}=`));
    expect(issued).toBeDefined();
    const csrf = issued!.split(';')[0]!.slice(csrfCookieName.length + 1);
    const write = await request(ctx.app)
      .patch('/api/me')
      .set('Cookie', `${sessionCookieName}=${browser.session}; ${csrfCookieName}=${csrf}`)
      .set(csrfHeaderName, csrf)
      .send({ notifyOnRunDone: true });
    expect(write.status).toBe(200);
  });
});

describe('session lifetime', () => {
  it('stops a token after sign-out, for cookie and Bearer alike', async () => {
    const other = await signUp(ctx.app);
    expect((await request(ctx.app).post('/api/auth/logout').set(bearer(other.token))).status).toBe(204);
    expect((await request(ctx.app).get('/api/me').set(bearer(other.token))).status).toBe(401);
    expect((await request(ctx.app).get('/api/me').set('Cookie', `${sessionCookieName}=${other.token}`)).status).toBe(401);
  });

  it('stops a token when its JWT expires, and when its session row expires', async () => {
    const shortApp = createApp({
      config: { ...ctx.config, sessionTtlSeconds: 1 },
      dataSource: ctx.dataSource,
      mailer: ctx.mailer,
      redis: ctx.redis,
      computeQueue: ctx.computeQueue,
    });
    const other = await signUp(ctx.app);
    const login = await request(shortApp).post('/api/auth/login').send({ email: other.email, password: testPassword });
    expect((await request(shortApp).get('/api/me').set(bearer(login.body.token))).status).toBe(200);
    await new Promise((r) => setTimeout(r, 2100));
    const expired = await request(shortApp).get('/api/me').set(bearer(login.body.token));
    expect(expired.status).toBe(401);
    expect(expired.body.error.message).toMatch(/session has ended/i);

    // a JWT still valid by its own clock stops with its session row
    await ctx.dataSource.query(`UPDATE sessions SET expires_at = now() - interval '1 second' WHERE user_id = $1`, [other.id]);
    expect((await request(ctx.app).get('/api/me').set(bearer(other.token))).status).toBe(401);
  });

  it('refuses tokens signed with another secret or another algorithm', async () => {
    const [header, payload] = user.token.split('.');
    const unsigned = `${Buffer.from(JSON.stringify({ alg: 'none', typ: 'JWT' })).toString('base64url')}.${payload}.`;
    expect((await request(ctx.app).get('/api/me').set(bearer(unsigned))).status).toBe(401);
    expect((await request(ctx.app).get('/api/me').set(bearer(`${header}.${payload}.AAAA`))).status).toBe(401);
  });
});

describe('password policy', () => {
  const signup = (password: string) =>
    request(ctx.app).post('/api/auth/signup').send({ email: `pw-${Math.random().toString(36).slice(2)}@tacet.test`, name: 'P', password });

  it.each([
    ['short', 'abc-12', /at least 10/],
    ['letters only', 'onlyletterswords', /digit or symbol/],
    ['no letters', '1234567890!!', /letter/],
    ['too long', `a1${'x'.repeat(199)}`, /at most 200/],
  ])('refuses a %s password with the rule in the message', async (_name, password, message) => {
    const res = await signup(password);
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('password');
    expect(res.body.error.message).toMatch(message);
  });

  it('accepts a password that follows the rules, and applies them on reset too', async () => {
    expect((await signup('ten-chars-1')).status).toBe(201);
    await request(ctx.app).post('/api/auth/password-reset').send({ email: user.email });
    const [mail] = await ctx.mailTo(user.email);
    const token = tokenFromMail(mail!.text, ctx.config.appUrl, '/reset-password/');
    const weak = await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: 'short' });
    expect(weak.status).toBe(400);
    expect(weak.body.error.issues[0].path).toBe('password');
  });
});

describe('personal API tokens', () => {
  it('are shown once, listed without the secret, hashed at rest, accepted as Bearer, and stop when revoked', async () => {
    const owner = await signUp(ctx.app, { teamName: 'Token Team' });
    const made = await request(ctx.app).post('/api/me/tokens').set(bearer(owner.token)).send({ name: 'notebook', teamId: owner.teamId, expiresInDays: 30 });
    expect(made.status).toBe(201);
    const token = createdApiTokenSchema.parse(made.body);
    expect(token.token).toMatch(/^tct_[A-Za-z0-9_-]{43}$/);
    expect(token.team).toEqual({ id: owner.teamId, name: 'Token Team' });
    expect(new Date(token.expiresAt!).getTime() - Date.now()).toBeGreaterThan(29 * 86_400_000);

    const listed = await request(ctx.app).get('/api/me/tokens').set(bearer(owner.token));
    expect(listed.body.items).toHaveLength(1);
    expect(apiTokenSchema.strict().parse(listed.body.items[0])).toMatchObject({ id: token.id, hint: token.token.slice(0, 8) });
    expect(JSON.stringify(listed.body)).not.toContain(token.token);

    const rows: Record<string, unknown>[] = await ctx.dataSource.query('SELECT * FROM api_tokens WHERE id = $1', [token.id]);
    expect(rows[0]!.token_hash).toBe(createHash('sha256').update(token.token).digest('hex'));
    expect(JSON.stringify(rows)).not.toContain(token.token);

    const team = await request(ctx.app).get('/api/team').set(bearer(token.token));
    expect(team.body).toEqual({ id: owner.teamId, name: 'Token Team', role: 'owner' });
    const used = await request(ctx.app).get('/api/me/tokens').set(bearer(owner.token));
    expect(used.body.items[0].lastUsedAt).not.toBeNull();

    expect((await request(ctx.app).delete(`/api/me/tokens/${token.id}`).set(bearer(owner.token))).status).toBe(204);
    const after = await request(ctx.app).get('/api/team').set(bearer(token.token));
    expect(after.status).toBe(401);
    expect((await request(ctx.app).get('/api/me/tokens').set(bearer(owner.token))).body.items).toEqual([]);
    expect((await request(ctx.app).delete(`/api/me/tokens/${token.id}`).set(bearer(owner.token))).status).toBe(404);
  });

  it('follow the role of their owner, and stop when the token expires or the owner leaves the team', async () => {
    const owner = await signUp(ctx.app, { teamName: 'Lab' });
    const member = await signUp(ctx.app);
    await insertMembership(ctx.dataSource.manager, { userId: member.id, teamId: owner.teamId, role: 'viewer' });
    const make = async () =>
      (await request(ctx.app).post('/api/me/tokens').set(bearer(member.token)).send({ name: 'lab', teamId: owner.teamId })).body as { id: string; token: string };
    const first = await make();
    expect((await request(ctx.app).get('/api/team').set(bearer(first.token))).body.role).toBe('viewer');
    await request(ctx.app).patch(`/api/team/members/${member.id}`).set(bearer(owner.token)).send({ role: 'researcher' });
    expect((await request(ctx.app).get('/api/team').set(bearer(first.token))).body.role).toBe('researcher');

    await ctx.dataSource.query(`UPDATE api_tokens SET expires_at = now() - interval '1 second' WHERE id = $1`, [first.id]);
    expect((await request(ctx.app).get('/api/team').set(bearer(first.token))).status).toBe(401);

    const second = await make();
    expect((await request(ctx.app).get('/api/team').set(bearer(second.token))).status).toBe(200);
    await deleteMembership(ctx.dataSource.manager, member.id, owner.teamId);
    expect((await request(ctx.app).get('/api/team').set(bearer(second.token))).status).toBe(401);
  });

  it('cannot be made for a team the user is not in, and refuse a forged secret', async () => {
    const stranger = await signUp(ctx.app);
    const res = await request(ctx.app).post('/api/me/tokens').set(bearer(stranger.token)).send({ name: 'sneaky', teamId: user.teamId });
    expect(res.status).toBe(404);
    expect((await request(ctx.app).get('/api/team').set(bearer(`tct_${'A'.repeat(43)}`))).status).toBe(401);
    expect((await request(ctx.app).get('/api/team').set(bearer('tct_short'))).status).toBe(401);
  });
});

describe('request log', () => {
  it('writes one line per request and never a password, token, cookie or link secret', async () => {
    const lines: string[] = [];
    const loggedApp = createApp({
      config: ctx.config,
      dataSource: ctx.dataSource,
      mailer: ctx.mailer,
      redis: ctx.redis,
      computeQueue: ctx.computeQueue,
      requestLog: (line) => lines.push(line),
    });
    const password = 'very-secret-password-9';
    const signed = await request(loggedApp).post('/api/auth/signup').send({ email: `log-${Date.now()}@tacet.test`, name: 'Logged', password });
    const jwt = signed.body.token as string;
    const apiToken = (await request(loggedApp).post('/api/me/tokens').set(bearer(jwt)).send({ name: 'log', teamId: (await request(loggedApp).get('/api/team').set(bearer(jwt))).body.id }))
      .body.token as string;
    const linkToken = 'Zq3'.repeat(15);
    await request(loggedApp).get('/api/team').set(bearer(apiToken));
    await request(loggedApp).get('/api/me').set('Cookie', `${sessionCookieName}=${jwt}`);
    await request(loggedApp).get(`/api/invitations/${linkToken}`);
    await request(loggedApp).get(`/api/runs?search=x&token=${linkToken}&password=${password}`).set(bearer(jwt));
    await request(loggedApp).post('/api/auth/login').send({ email: 'nobody@tacet.test', password });
    await request(loggedApp).post('/api/auth/password-reset/confirm').send({ token: linkToken, password });

    expect(lines.length).toBe(9);
    const log = lines.join('\n');
    for (const secret of [password, jwt, apiToken, linkToken, jwt.split('.')[2]!]) expect(log).not.toContain(secret);
    const parsed = lines.map((l) => JSON.parse(l) as { method: string; path: string; status: number; via: string });
    expect(parsed.find((l) => l.path.startsWith('/api/invitations/'))!.path).toBe('/api/invitations/[redacted]');
    expect(parsed.find((l) => l.path.startsWith('/api/runs'))!.path).toBe('/api/runs?search=x&token=[redacted]&password=[redacted]');
    expect(parsed.map((l) => l.via)).toContain('api-token');
    expect(parsed.every((l) => typeof l.status === 'number' && l.status >= 200)).toBe(true);
  });
});
