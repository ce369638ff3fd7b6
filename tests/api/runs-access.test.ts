import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runListResponseSchema } from '@shared/runs';
import { insertMembership } from '../../server/db/repositories/teams';
import { createTestContext, signUp, type SignedUpUser, type TestContext } from '../support/app';
import { bearer, diamondRun, getRun, postRun } from '../worker/runHelpers';

/**
 * Roles, team isolation, listing and queued-run handling. No worker runs in this file, so every run
 * stays queued until the test changes it: the queue state is exact, not a race.
 */
let ctx: TestContext;
let owner: SignedUpUser;
let researcher: SignedUpUser;
let viewer: SignedUpUser;
let outsider: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  owner = await signUp(ctx.app, { name: 'Ingrid Owner', teamName: 'Access Team' });
  researcher = await signUp(ctx.app, { name: 'Rui Researcher' });
  viewer = await signUp(ctx.app, { name: 'Vera Viewer' });
  outsider = await signUp(ctx.app, { name: 'Otto Outsider' });
  for (const [user, role] of [[researcher, 'researcher'], [viewer, 'viewer']] as const) {
    await insertMembership(ctx.dataSource.manager, { userId: user.id, teamId: owner.teamId, role });
  }
});
afterAll(async () => {
  await ctx?.close();
});

/** Requests as a member of the shared team (their own first team is another one). */
const inTeam = (user: SignedUpUser) => ({ ...bearer(user.token), 'x-tacet-team': owner.teamId });

async function postInTeam(user: SignedUpUser, body: object) {
  return request(ctx.app).post('/api/runs').set(inTeam(user)).send(body);
}

describe('roles', () => {
  it('lets owners and researchers start runs and viewers only read', async () => {
    expect((await postInTeam(owner, diamondRun())).status).toBe(202);
    const byResearcher = await postInTeam(researcher, diamondRun({ title: 'by researcher' }));
    expect(byResearcher.status).toBe(202);
    const refused = await postInTeam(viewer, diamondRun());
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toMatch(/viewer/);

    const id = byResearcher.body.id as string;
    const list = await request(ctx.app).get('/api/runs').set(inTeam(viewer));
    expect(list.status).toBe(200);
    expect(list.body.items.map((r: { id: string }) => r.id)).toContain(id);
    expect((await request(ctx.app).get(`/api/runs/${id}`).set(inTeam(viewer))).body.author.name).toBe('Rui Researcher');

    for (const [method, path] of [
      ['post', `/api/runs/${id}/cancel`],
      ['post', `/api/runs/${id}/reanalyse`],
      ['delete', `/api/runs/${id}`],
      ['post', '/api/cut-rules'],
    ] as const) {
      const res = await request(ctx.app)[method](path).set(inTeam(viewer)).send({ name: 'x', rule: { rule: 'none' } });
      expect(res.status, `${method} ${path}`).toBe(403);
    }
    expect((await request(ctx.app).get('/api/runs')).status).toBe(401);
  });

  it('answers 404 on every run route to a member of another team, and never lists its runs', async () => {
    const id = await postRun(ctx.app, owner.token, diamondRun({ title: 'private' }));
    const routes = [
      ['get', ''], ['get', '/points'], ['get', '/points.csv'], ['get', '/spectrum.csv'], ['get', '/spectrum.json'],
      ['post', '/cancel'], ['post', '/reanalyse'], ['delete', ''],
    ] as const;
    for (const [method, suffix] of routes) {
      // in their own team (the default one) the id does not exist …
      const own = await request(ctx.app)[method](`/api/runs/${id}${suffix}`).set(bearer(outsider.token)).send({});
      expect(own.status, `${method} ${suffix}`).toBe(404);
      // … and naming the other team does not help
      const named = await request(ctx.app)[method](`/api/runs/${id}${suffix}`).set({ ...bearer(outsider.token), 'x-tacet-team': owner.teamId }).send({});
      expect(named.status, `${method} ${suffix} with team header`).toBe(404);
    }
    const list = await request(ctx.app).get('/api/runs').set(bearer(outsider.token));
    expect(list.body).toEqual({ items: [], total: 0, page: 1, pageSize: 25 });
    expect((await getRun(ctx.app, owner.token, id)).status).toBe('queued');
    expect((await request(ctx.app).get('/api/runs/not-a-uuid').set(bearer(owner.token))).status).toBe(404);
  });
});

describe('queued runs', () => {
  it('are stored with a job of the same id; cancel removes the job and a second cancel is 409', async () => {
    const id = await postRun(ctx.app, researcher.token, diamondRun({ title: 'cancel me' }));
    expect(await (await ctx.computeQueue.getJob(id))?.getState()).toBe('waiting');
    const res = await request(ctx.app).post(`/api/runs/${id}/cancel`).set(bearer(researcher.token));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id, status: 'cancelled', cancelRequested: false, result: null });
    expect(res.body.finishedAt).not.toBeNull();
    expect(await ctx.computeQueue.getJob(id)).toBeUndefined();
    expect((await request(ctx.app).post(`/api/runs/${id}/cancel`).set(bearer(researcher.token))).status).toBe(409);
    const points = await request(ctx.app).get(`/api/runs/${id}/points.csv`).set(bearer(researcher.token));
    expect(points.status).toBe(409);
    expect(points.body.error.code).toBe('points_not_ready');
  });

  it('delete removes the row and its job', async () => {
    const id = await postRun(ctx.app, researcher.token, diamondRun({ title: 'delete me' }));
    expect((await request(ctx.app).delete(`/api/runs/${id}`).set(bearer(researcher.token))).status).toBe(204);
    expect((await request(ctx.app).get(`/api/runs/${id}`).set(bearer(researcher.token))).status).toBe(404);
    expect(await ctx.computeQueue.getJob(id)).toBeUndefined();
  });

  it('a queue that refuses the job leaves the run failed with the reason, never queued forever', async () => {
    const closedQueue = ctx.computeQueue;
    const brokenApp = (await import('../../server/app')).createApp({
      config: ctx.config,
      dataSource: ctx.dataSource,
      mailer: ctx.mailer,
      redis: ctx.redis,
      computeQueue: Object.assign(Object.create(closedQueue), {
        add: async () => {
          throw new Error('Connection is closed.');
        },
      }),
    });
    const res = await request(brokenApp).post('/api/runs').set(bearer(researcher.token)).send(diamondRun({ title: 'unqueued' }));
    expect(res.status).toBe(503);
    expect(res.body.error.message).toMatch(/could not be queued: Connection is closed/);
    const list = await request(ctx.app).get('/api/runs?search=unqueued').set(bearer(researcher.token));
    expect(list.body.items).toHaveLength(1);
    expect(list.body.items[0].status).toBe('failed');
    expect((await getRun(ctx.app, researcher.token, list.body.items[0].id)).error).toMatch(/could not be queued/);
  });
});

describe('GET /api/runs', () => {
  let team: SignedUpUser;
  const made: { id: string; N: number; kind: string; title: string }[] = [];

  beforeAll(async () => {
    team = await signUp(ctx.app, { name: 'Lena Lister', teamName: 'List Team' });
    const bodies = [
      { title: 'alpha diamond', sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 40, seed: 1 } },
      { title: 'beta cylinder', sprinkling: { region: { kind: 'cylinder2d', properTime: 1, circumference: 2 }, count: 90, seed: 2 } },
      { title: 'gamma slab', sprinkling: { region: { kind: 'slab2d', tMin: 0, tMax: 1, xMin: 0, xMax: 1 }, count: 60, seed: 3 } },
      { title: 'delta diamond', sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 120, seed: 4 } },
      { title: 'epsilon diamond', sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 20, seed: 5 } },
    ];
    for (const body of bodies) {
      const id = await postRun(ctx.app, team.token, { ...body, truncation: { rule: 'knee' } });
      made.push({ id, N: body.sprinkling.count, kind: body.sprinkling.region.kind, title: body.title });
    }
    await request(ctx.app).post(`/api/runs/${made[3]!.id}/cancel`).set(bearer(team.token));
  });

  const list = async (query: string) => {
    const res = await request(ctx.app).get(`/api/runs${query}`).set(bearer(team.token));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    return runListResponseSchema.parse(res.body);
  };

  it('lists newest first by default with summaries in the shared shape', async () => {
    const all = await list('');
    expect(all.total).toBe(5);
    expect(all.items.map((r) => r.title)).toEqual([...made].reverse().map((r) => r.title));
    expect(all.items[0]).toMatchObject({ status: 'queued', stage: null, percent: 0, N: 20, truncation: 'knee', S: null, regionKind: 'diamond2d', dimension: 2 });
  });

  it('filters by status, region and search text', async () => {
    expect((await list('?status=cancelled')).items.map((r) => r.title)).toEqual(['delta diamond']);
    expect((await list('?regionKind=diamond2d')).items.map((r) => r.title).sort()).toEqual(['alpha diamond', 'delta diamond', 'epsilon diamond']);
    expect((await list('?search=CYLIN')).items.map((r) => r.title)).toEqual(['beta cylinder']);
    expect((await list('?search=100%25')).total).toBe(0);
    expect((await list(`?authorId=${team.id}`)).total).toBe(5);
  });

  it('sorts by N either way and pages with total', async () => {
    expect((await list('?sort=N&order=asc')).items.map((r) => r.N)).toEqual([20, 40, 60, 90, 120]);
    expect((await list('?sort=N&order=desc')).items.map((r) => r.N)).toEqual([120, 90, 60, 40, 20]);
    const page2 = await list('?sort=N&order=asc&page=2&pageSize=2');
    expect(page2).toMatchObject({ total: 5, page: 2, pageSize: 2 });
    expect(page2.items.map((r) => r.N)).toEqual([60, 90]);
    expect((await list('?sort=N&order=asc&page=3&pageSize=2')).items.map((r) => r.N)).toEqual([120]);
  });

  it('rejects an unknown sort field or filter with 400', async () => {
    const res = await request(ctx.app).get('/api/runs?sort=colour').set(bearer(team.token));
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('sort');
    expect((await request(ctx.app).get('/api/runs?shape=round').set(bearer(team.token))).status).toBe(400);
  });
});
