import { randomBytes, randomUUID } from 'node:crypto';
import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runExportFormats } from '@shared/exports';
import { permissions, roles, type Role } from '@shared/roles';
import { apiRoutes, openApiPath, type RouteAccess } from '../../server/api/openapi';
import { insertMembership } from '../../server/db/repositories/teams';
import { createTestContext, signUp, testPassword, tokenFromMail, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';
import { listApiRoutes } from '../support/routes';
import { diamondRun, postRun, waitUntil } from '../worker/runHelpers';

/**
 * Every API route × every kind of caller. The table below is keyed by "METHOD /path"; the test
 * first checks that its keys, the routes Express really serves and the OpenAPI description name
 * exactly the same set, so a route added anywhere without a line here (and in server/api/openapi.ts)
 * fails. Each case builds fresh targets, so destructive routes can succeed once per caller.
 */
type Actor = Role | 'signed-out' | 'other-team';
const actors: Actor[] = [...roles, 'signed-out', 'other-team'];

interface Prepared {
  path?: string;
  body?: object;
  /** multipart fields and a file instead of a JSON body */
  form?: { fields: Record<string, string>; file: { name: string; content: string } };
  /** a session token to send instead of the actor's usual one (e.g. for sign-out) */
  token?: string;
}

interface MatrixCase {
  access: RouteAccess;
  success: number;
  prepare?: (actor: Actor) => Promise<Prepared>;
}

let ctx: TestContext;
let owner: SignedUpUser;
let outsider: SignedUpUser;
const members = {} as Record<Role, SignedUpUser>;
let teamId: string;
let doneRunId: string;
let doneStudyId: string;
let causalSetId: string;

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });
const asOwner = () => ({ ...bearer(owner.token), 'x-tacet-team': teamId });
const unique = () => randomBytes(4).toString('hex');
const userOf = (actor: Actor): SignedUpUser | null =>
  actor === 'signed-out' ? null : actor === 'other-team' ? outsider : members[actor];

const smallRun = () => diamondRun({ title: `matrix ${unique()}` }, { count: 40 });
const smallStudy = () => ({
  title: `matrix ${unique()}`,
  counts: [40],
  seeds: ['m-1'],
  subregions: { kind: 'concentric', fractions: [0.5] },
  rules: [{ truncation: { rule: 'sqrtN' } }],
});
const csvFile = { name: 'four.csv', content: 't,x\n0.1,0.2\n-0.5,0.25\n0.5,-0.25\n0,0\n' };
const csvFields = () => ({ name: `set ${unique()}`, kind: 'coordinates', region: JSON.stringify({ kind: 'diamond2d', properTime: 2 }) });

async function created(res: request.Response, status: number): Promise<string> {
  if (res.status !== status) throw new Error(`setup answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}
const newRun = async () => postRun(ctx.app, owner.token, smallRun());
const newStudy = async () => created(await request(ctx.app).post('/api/studies').set(asOwner()).send(smallStudy()), 202);
const firstCellOf = async (studyId: string): Promise<string> => (await request(ctx.app).get(`/api/studies/${studyId}`).set(asOwner())).body.cells[0].id;
/** A queued study whose one cell failed, as a lost job leaves it (no worker runs after setup). */
const newStudyWithFailedCell = async () => {
  const studyId = await newStudy();
  const cellId = await firstCellOf(studyId);
  await ctx.dataSource.query(`UPDATE study_cells SET status = 'failed', error = 'lost', finished_at = now() WHERE id = $1`, [cellId]);
  return { studyId, cellId };
};
const newCausalSet = async () => {
  const req = request(ctx.app).post('/api/causal-sets').set(asOwner());
  for (const [k, v] of Object.entries(csvFields())) req.field(k, v);
  return created(await req.attach('file', Buffer.from(csvFile.content), csvFile.name), 201);
};
const newCutRule = async () =>
  created(await request(ctx.app).post('/api/cut-rules').set(asOwner()).send({ name: `rule ${unique()}`, rule: { rule: 'sqrtN' } }), 201);
const newInvitation = async (email = `inv-${unique()}@tacet.test`) =>
  created(await request(ctx.app).post('/api/team/invitations').set(asOwner()).send({ email, role: 'viewer' }), 201);
async function newMember(): Promise<string> {
  const user = await signUp(ctx.app);
  await insertMembership(ctx.dataSource.manager, { userId: user.id, teamId, role: 'viewer' });
  return user.id;
}
/** An invitation into a third team addressed to `email`, and the token from its e-mail. */
async function invitationTokenFor(email: string): Promise<string> {
  const host = await signUp(ctx.app, { teamName: `Host ${unique()}` });
  const res = await request(ctx.app).post('/api/team/invitations').set(bearer(host.token)).send({ email, role: 'viewer' });
  if (res.status !== 201) throw new Error(`invitation answered ${res.status}`);
  const [mail] = await ctx.mailTo(email);
  return tokenFromMail(mail!.text, ctx.config.appUrl, '/invite/');
}
async function freshSession(actor: Actor): Promise<string | undefined> {
  const user = userOf(actor);
  if (!user) return undefined;
  const res = await request(ctx.app).post('/api/auth/login').send({ email: user.email, password: testPassword });
  return res.body.token as string;
}
/** The team an actor would make a token for: ours, or the outsider's own. */
const tokenTeamOf = (actor: Actor) => (actor === 'other-team' ? outsider.teamId : teamId);

const matrix: Record<string, MatrixCase> = {
  'GET /api/health': { access: 'public', success: 200 },
  'GET /api/limits': { access: 'public', success: 200 },
  'GET /api/openapi.json': { access: 'public', success: 200 },
  'POST /api/auth/signup': {
    access: 'public',
    success: 201,
    prepare: async () => ({ body: { email: `new-${unique()}@tacet.test`, name: 'New Person', password: testPassword } }),
  },
  'POST /api/auth/login': {
    access: 'public',
    success: 200,
    prepare: async (actor) => ({ body: { email: (userOf(actor) ?? owner).email, password: testPassword } }),
  },
  'POST /api/auth/logout': { access: 'signedIn', success: 204, prepare: async (actor) => ({ token: await freshSession(actor) }) },
  'POST /api/auth/password-reset': { access: 'public', success: 202, prepare: async () => ({ body: { email: `nobody-${unique()}@tacet.test` } }) },
  'POST /api/auth/password-reset/confirm': {
    access: 'public',
    success: 204,
    prepare: async () => {
      const user = await signUp(ctx.app);
      await request(ctx.app).post('/api/auth/password-reset').send({ email: user.email });
      const [mail] = await ctx.mailTo(user.email);
      return { body: { token: tokenFromMail(mail!.text, ctx.config.appUrl, '/reset-password/'), password: 'another-secret-7' } };
    },
  },
  'GET /api/me': { access: 'signedIn', success: 200 },
  'PATCH /api/me': { access: 'signedIn', success: 200, prepare: async () => ({ body: { notifyOnRunDone: true } }) },
  'GET /api/me/tokens': { access: 'sessionOnly', success: 200 },
  'POST /api/me/tokens': { access: 'sessionOnly', success: 201, prepare: async (actor) => ({ body: { name: 'matrix', teamId: tokenTeamOf(actor) } }) },
  'DELETE /api/me/tokens/:id': {
    access: 'sessionOnly',
    success: 204,
    prepare: async (actor) => {
      const user = userOf(actor) ?? owner;
      const res = await request(ctx.app).post('/api/me/tokens').set(bearer(user.token)).send({ name: 'to revoke', teamId: tokenTeamOf(actor) });
      return { path: `/api/me/tokens/${await created(res, 201)}` };
    },
  },

  'GET /api/team': { access: 'read', success: 200 },
  'PATCH /api/team': { access: 'manageTeam', success: 200, prepare: async () => ({ body: { name: 'Matrix Team' } }) },
  'GET /api/team/members': { access: 'read', success: 200 },
  'PATCH /api/team/members/:userId': {
    access: 'manageTeam',
    success: 200,
    prepare: async () => ({ path: `/api/team/members/${await newMember()}`, body: { role: 'researcher' } }),
  },
  'DELETE /api/team/members/:userId': { access: 'manageTeam', success: 204, prepare: async () => ({ path: `/api/team/members/${await newMember()}` }) },
  'GET /api/team/invitations': { access: 'manageTeam', success: 200 },
  'POST /api/team/invitations': {
    access: 'manageTeam',
    success: 201,
    prepare: async () => ({ body: { email: `inv-${unique()}@tacet.test`, role: 'viewer' } }),
  },
  'DELETE /api/team/invitations/:id': { access: 'manageTeam', success: 204, prepare: async () => ({ path: `/api/team/invitations/${await newInvitation()}` }) },
  'GET /api/invitations/:token': {
    access: 'public',
    success: 200,
    prepare: async () => ({ path: `/api/invitations/${await invitationTokenFor(`preview-${unique()}@tacet.test`)}` }),
  },
  'POST /api/invitations/:token/accept': {
    access: 'signedIn',
    success: 200,
    prepare: async (actor) => ({ path: `/api/invitations/${await invitationTokenFor((userOf(actor) ?? owner).email)}/accept` }),
  },
  'GET /api/outbox': { access: 'manageTeam', success: 200 },

  'POST /api/runs': { access: 'compute', success: 202, prepare: async () => ({ body: smallRun() }) },
  'GET /api/runs': { access: 'read', success: 200 },
  'GET /api/runs/:id': { access: 'read', success: 200, prepare: async () => ({ path: `/api/runs/${doneRunId}` }) },
  'POST /api/runs/:id/cancel': { access: 'compute', success: 200, prepare: async () => ({ path: `/api/runs/${await newRun()}/cancel` }) },
  'POST /api/runs/:id/reanalyse': {
    access: 'compute',
    success: 202,
    prepare: async () => ({ path: `/api/runs/${doneRunId}/reanalyse`, body: { truncation: { rule: 'none' } } }),
  },
  'POST /api/runs/:id/retry': {
    access: 'compute',
    success: 202,
    prepare: async () => {
      const cancelled = await newRun();
      await request(ctx.app).post(`/api/runs/${cancelled}/cancel`).set(asOwner()).expect(200);
      return { path: `/api/runs/${cancelled}/retry` };
    },
  },
  'POST /api/runs/:id/reseed': { access: 'compute', success: 202, prepare: async () => ({ path: `/api/runs/${doneRunId}/reseed` }) },
  'DELETE /api/runs/:id': { access: 'compute', success: 204, prepare: async () => ({ path: `/api/runs/${await newRun()}` }) },
  'GET /api/runs/:id/points': { access: 'read', success: 200, prepare: async () => ({ path: `/api/runs/${doneRunId}/points` }) },
  // one route per run export of shared/exports.ts (points.csv, spectrum.csv, spectrum.json)
  ...Object.fromEntries(
    runExportFormats.map((format): [string, MatrixCase] => [
      `GET /api/runs/:id/${format}`,
      { access: 'read', success: 200, prepare: async () => ({ path: `/api/runs/${doneRunId}/${format}` }) },
    ]),
  ),

  'GET /api/cut-rules': { access: 'read', success: 200 },
  'POST /api/cut-rules': { access: 'compute', success: 201, prepare: async () => ({ body: { name: `rule ${unique()}`, rule: { rule: 'sqrtN' } } }) },
  'DELETE /api/cut-rules/:id': { access: 'compute', success: 204, prepare: async () => ({ path: `/api/cut-rules/${await newCutRule()}` }) },

  'GET /api/causal-sets': { access: 'read', success: 200 },
  'POST /api/causal-sets': { access: 'compute', success: 201, prepare: async () => ({ form: { fields: csvFields(), file: csvFile } }) },
  'GET /api/causal-sets/:id': { access: 'read', success: 200, prepare: async () => ({ path: `/api/causal-sets/${causalSetId}` }) },
  'GET /api/causal-sets/:id/file': { access: 'read', success: 200, prepare: async () => ({ path: `/api/causal-sets/${causalSetId}/file` }) },
  'DELETE /api/causal-sets/:id': { access: 'compute', success: 204, prepare: async () => ({ path: `/api/causal-sets/${await newCausalSet()}` }) },

  'POST /api/studies': { access: 'compute', success: 202, prepare: async () => ({ body: smallStudy() }) },
  'GET /api/studies': { access: 'read', success: 200 },
  'GET /api/studies/:id': { access: 'read', success: 200, prepare: async () => ({ path: `/api/studies/${doneStudyId}` }) },
  'POST /api/studies/:id/cancel': { access: 'compute', success: 200, prepare: async () => ({ path: `/api/studies/${await newStudy()}/cancel` }) },
  'POST /api/studies/:id/extend': { access: 'compute', success: 202, prepare: async () => ({ path: `/api/studies/${await newStudy()}/extend`, body: { seedCount: 1 } }) },
  'POST /api/studies/:id/retry-failed': {
    access: 'compute',
    success: 202,
    prepare: async () => ({ path: `/api/studies/${(await newStudyWithFailedCell()).studyId}/retry-failed` }),
  },
  'POST /api/studies/:id/cells/:cellId/retry': {
    access: 'compute',
    success: 202,
    prepare: async () => {
      const { studyId, cellId } = await newStudyWithFailedCell();
      return { path: `/api/studies/${studyId}/cells/${cellId}/retry` };
    },
  },
  'POST /api/studies/:id/cells/:cellId/run': {
    access: 'compute',
    success: 202,
    prepare: async () => ({ path: `/api/studies/${doneStudyId}/cells/${await firstCellOf(doneStudyId)}/run`, body: { subregion: 'l/L=0.5', rule: 'sqrtN' } }),
  },
  'DELETE /api/studies/:id': { access: 'compute', success: 204, prepare: async () => ({ path: `/api/studies/${await newStudy()}` }) },
  'GET /api/studies/:id/export': { access: 'read', success: 200, prepare: async () => ({ path: `/api/studies/${doneStudyId}/export?format=csv` }) },
  'GET /api/studies/:id/bundle': { access: 'read', success: 200, prepare: async () => ({ path: `/api/studies/${doneStudyId}/bundle` }) },
  'POST /api/bundles': { access: 'read', success: 200, prepare: async () => ({ body: { runIds: [doneRunId] } }) },
};

function expectedStatus(entry: MatrixCase, actor: Actor): number {
  if (entry.access === 'public') return entry.success;
  if (actor === 'signed-out') return 401;
  if (entry.access === 'signedIn' || entry.access === 'sessionOnly') return entry.success;
  // every request names our team in the header; a team the caller is not in does not exist for them
  if (actor === 'other-team') return 404;
  return (permissions[entry.access] as readonly string[]).includes(actor) ? entry.success : 403;
}

function send(key: string, prepared: Prepared, auth: Record<string, string>) {
  const [method, templatePath] = key.split(' ') as [string, string];
  const verb = method.toLowerCase() as 'get' | 'post' | 'patch' | 'delete';
  const req = request(ctx.app)[verb](prepared.path ?? templatePath).set({ ...auth, 'x-tacet-team': teamId });
  if (prepared.form) {
    for (const [k, v] of Object.entries(prepared.form.fields)) req.field(k, v);
    return req.attach('file', Buffer.from(prepared.form.file.content), prepared.form.file.name);
  }
  return prepared.body ? req.send(prepared.body) : req;
}

beforeAll(async () => {
  ctx = await createTestContext();
  owner = await signUp(ctx.app, { teamName: 'Matrix Team' });
  teamId = owner.teamId;
  members.owner = owner;
  for (const role of ['researcher', 'viewer'] as const) {
    members[role] = await signUp(ctx.app);
    await insertMembership(ctx.dataSource.manager, { userId: members[role].id, teamId, role });
  }
  outsider = await signUp(ctx.app, { teamName: 'Elsewhere' });

  // A done run and a study with a finished cell for the read routes; afterwards no worker runs, so
  // every run and study the matrix creates stays queued and can be cancelled or deleted exactly.
  const worker: Worker = await startTestWorker(ctx);
  doneRunId = await newRun();
  doneStudyId = await newStudy();
  await waitUntil(
    async () => [(await request(ctx.app).get(`/api/runs/${doneRunId}`).set(asOwner())).body.status, (await request(ctx.app).get(`/api/studies/${doneStudyId}`).set(asOwner())).body.status],
    ([run, study]) => run === 'done' && study === 'done',
    45_000,
  );
  await worker.close();
  causalSetId = await newCausalSet();
}, 90_000);
afterAll(async () => {
  await ctx?.close();
});

describe('the route table', () => {
  it('names exactly the routes Express serves and the OpenAPI description lists', async () => {
    const served = listApiRoutes(ctx.app);
    const described = apiRoutes.map((r) => `${r.method.toUpperCase()} ${r.path}`).sort();
    expect(Object.keys(matrix).sort(), 'tests/api/accessMatrix.test.ts table vs Express').toEqual(served);
    expect(described, 'server/api/openapi.ts apiRoutes vs Express').toEqual(served);

    const doc = (await request(ctx.app).get('/api/openapi.json')).body as { paths: Record<string, Record<string, { 'x-tacet-access': string }>> };
    const inDocument = Object.entries(doc.paths).flatMap(([path, ops]) => Object.keys(ops).map((m) => `${m.toUpperCase()} ${path}`));
    expect(inDocument.sort()).toEqual(served.map((r) => r.replace(/ (.*)$/, (_m, p: string) => ` ${openApiPath(p).path}`)).sort());
    // the access the description states is the one the matrix checks
    for (const route of apiRoutes) {
      expect(matrix[`${route.method.toUpperCase()} ${route.path}`]!.access, `${route.method} ${route.path}`).toBe(route.access);
      expect(doc.paths[openApiPath(route.path).path]![route.method]!['x-tacet-access']).toBe(route.access);
    }
  });
});

describe('every route as every caller', () => {
  const cases = Object.entries(matrix).flatMap(([key, entry]) => actors.map((actor) => [key, actor, expectedStatus(entry, actor)] as const));

  it.each(cases)('%s as %s → %i', async (key, actor, expected) => {
    const entry = matrix[key]!;
    const prepared: Prepared = entry.prepare ? await entry.prepare(actor) : {};
    const user = userOf(actor);
    const token = prepared.token ?? user?.token;
    const res = await send(key, prepared, token ? bearer(token) : {});
    expect(res.status, JSON.stringify(res.body)).toBe(expected);
    if (expected >= 400) {
      expect(res.body.error.code).toEqual(expect.any(String));
      expect(res.body.error.message.length).toBeGreaterThan(5);
    }
  });
});

describe('personal API tokens on the matrix', () => {
  it('act with the owner’s role in the token’s team only, and cannot manage tokens', async () => {
    const viewer = members.viewer;
    const made = await request(ctx.app).post('/api/me/tokens').set(bearer(viewer.token)).send({ name: 'reader', teamId });
    const token = made.body.token as string;
    expect((await request(ctx.app).get('/api/runs').set(bearer(token))).status).toBe(200);
    expect((await request(ctx.app).post('/api/runs').set(bearer(token)).send(smallRun())).status).toBe(403);
    // another team in the header: as if it did not exist
    const elsewhere = await request(ctx.app).get('/api/runs').set({ ...bearer(token), 'x-tacet-team': viewer.teamId });
    expect(elsewhere.status).toBe(404);
    for (const [method, path] of [['get', '/api/me/tokens'], ['post', '/api/me/tokens'], ['delete', `/api/me/tokens/${made.body.id}`]] as const) {
      const res = await request(ctx.app)[method](path).set(bearer(token)).send({ name: 'x', teamId });
      expect(res.status, `${method} ${path}`).toBe(403);
    }
  });
});

describe("another team's ids", () => {
  /** Every route with an id in its path, filled with our team's ids, asked by the outsider in their own team. */
  async function ourIds(): Promise<Record<string, string>> {
    return {
      ':id/runs': doneRunId,
      ':id/studies': doneStudyId,
      ':id/causal-sets': causalSetId,
      ':id/cut-rules': await newCutRule(),
      ':id/team/invitations': await newInvitation(),
      ':userId/team/members': members.viewer.id,
      ':id/me/tokens': (await request(ctx.app).post('/api/me/tokens').set(bearer(owner.token)).send({ name: 'ours', teamId })).body.id,
    };
  }

  it('answer 404 exactly like ids that never existed, on every route, with a session or an API token', async () => {
    const ids = await ourIds();
    const outsiderToken = (await request(ctx.app).post('/api/me/tokens').set(bearer(outsider.token)).send({ name: 'probe', teamId: outsider.teamId })).body
      .token as string;
    const withIds = apiRoutes.filter((r) => /:(id|userId)\b/.test(r.path) && r.access !== 'public' && r.access !== 'signedIn');
    expect(withIds.length).toBeGreaterThanOrEqual(20);
    for (const route of withIds) {
      const family = Object.keys(ids).find((k) => {
        const [param, prefix] = [k.split('/')[0]!, '/api/' + k.split('/').slice(1).join('/')];
        return route.path.startsWith(`${prefix}/${param}`);
      });
      expect(family, `${route.method} ${route.path} has an id the test does not know`).toBeDefined();
      const fill = (id: string) => route.path.replace(/:(id|userId)/, id) + (route.path.endsWith('/export') ? '?format=csv' : '');
      const body = route.method === 'patch' ? { role: 'owner' } : route.path.endsWith('/reanalyse') ? {} : undefined;
      for (const credential of [outsider.token, route.access === 'sessionOnly' ? null : outsiderToken]) {
        if (!credential) continue;
        const ask = (path: string) => {
          const req = request(ctx.app)[route.method](path).set({ ...bearer(credential), 'x-tacet-team': outsider.teamId });
          return body ? req.send(body) : req;
        };
        const theirs = await ask(fill(ids[family!]!));
        const never = await ask(fill(randomUUID()));
        expect(theirs.status, `${route.method} ${route.path}`).toBe(404);
        expect(theirs.body, `${route.method} ${route.path}`).toEqual(never.body);
        expect(JSON.stringify(theirs.body)).not.toContain(ids[family!]!);
      }
    }
    // nothing of ours shows in their lists
    for (const path of ['/api/runs', '/api/studies', '/api/causal-sets', '/api/cut-rules', '/api/team/members', '/api/team/invitations']) {
      const res = await request(ctx.app).get(path).set({ ...bearer(outsider.token), 'x-tacet-team': outsider.teamId });
      expect(res.status, path).toBe(200);
      const text = JSON.stringify(res.body);
      for (const id of Object.values(ids)) expect(text, path).not.toContain(id);
    }
    // and our data is untouched by all that
    expect((await request(ctx.app).get(`/api/runs/${doneRunId}`).set(asOwner())).body.status).toBe('done');
    expect((await request(ctx.app).get(`/api/team/members`).set(asOwner())).body.items.map((m: { userId: string }) => m.userId)).toContain(members.viewer.id);
  });
});
