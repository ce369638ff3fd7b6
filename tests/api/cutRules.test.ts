import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cutRuleSchema } from '@shared/runs';
import { insertMembership } from '../../server/db/repositories/teams';
import { createTestContext, signUp, type SignedUpUser, type TestContext } from '../support/app';
import { bearer } from '../worker/runHelpers';

let ctx: TestContext;
let owner: SignedUpUser;
let viewer: SignedUpUser;
let outsider: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  owner = await signUp(ctx.app, { name: 'Cora Cutter', teamName: 'Cut Team' });
  viewer = await signUp(ctx.app, { name: 'Viktor Viewer' });
  outsider = await signUp(ctx.app);
  await insertMembership(ctx.dataSource.manager, { userId: viewer.id, teamId: owner.teamId, role: 'viewer' });
});
afterAll(async () => {
  await ctx?.close();
});

const asViewer = () => ({ ...bearer(viewer.token), 'x-tacet-team': owner.teamId });

describe('cut rules', () => {
  it('saves a named rule, lists it to every member, refuses a duplicate name with 409', async () => {
    const res = await request(ctx.app)
      .post('/api/cut-rules')
      .set(bearer(owner.token))
      .send({ name: 'Sorkin–Yazdi', rule: { rule: 'sqrtN' }, note: '  the 2D rule √N/(4π)  ' });
    expect(res.status).toBe(201);
    const rule = cutRuleSchema.parse(res.body);
    expect(rule).toMatchObject({ name: 'Sorkin–Yazdi', rule: { rule: 'sqrtN' }, note: 'the 2D rule √N/(4π)', createdBy: { id: owner.id, name: 'Cora Cutter' } });

    await request(ctx.app).post('/api/cut-rules').set(bearer(owner.token)).send({ name: 'half', rule: { rule: 'lambda', cut: 0.5 } }).expect(201);
    const listed = await request(ctx.app).get('/api/cut-rules').set(asViewer());
    expect(listed.status).toBe(200);
    expect(listed.body.items.map((r: { name: string }) => r.name)).toEqual(['half', 'Sorkin–Yazdi']);
    expect(listed.body.items[0].rule).toEqual({ rule: 'lambda', cut: 0.5 });

    const duplicate = await request(ctx.app).post('/api/cut-rules').set(bearer(owner.token)).send({ name: 'half', rule: { rule: 'none' } });
    expect(duplicate.status).toBe(409);
    expect(duplicate.body.error.message).toContain('"half"');
    // the same name in another team is fine
    await request(ctx.app).post('/api/cut-rules').set(bearer(outsider.token)).send({ name: 'half', rule: { rule: 'none' } }).expect(201);
  });

  it('validates the rule with the shared schema', async () => {
    const res = await request(ctx.app).post('/api/cut-rules').set(bearer(owner.token)).send({ name: 'bad', rule: { rule: 'modes', count: 0 } });
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('rule.count');
    expect((await request(ctx.app).post('/api/cut-rules').set(bearer(owner.token)).send({ name: ' ', rule: { rule: 'none' } })).status).toBe(400);
  });

  it('lets viewers read but not save or delete; other teams get 404 on delete', async () => {
    const created = await request(ctx.app).post('/api/cut-rules').set(bearer(owner.token)).send({ name: 'knee 5%', rule: { rule: 'knee', tolerance: 0.05 } });
    const id = created.body.id as string;
    expect((await request(ctx.app).post('/api/cut-rules').set(asViewer()).send({ name: 'v', rule: { rule: 'none' } })).status).toBe(403);
    expect((await request(ctx.app).delete(`/api/cut-rules/${id}`).set(asViewer())).status).toBe(403);
    expect((await request(ctx.app).delete(`/api/cut-rules/${id}`).set(bearer(outsider.token))).status).toBe(404);
    expect((await request(ctx.app).delete(`/api/cut-rules/${id}`).set(bearer(owner.token))).status).toBe(204);
    expect((await request(ctx.app).delete(`/api/cut-rules/${id}`).set(bearer(owner.token))).status).toBe(404);
    const names = (await request(ctx.app).get('/api/cut-rules').set(bearer(owner.token))).body.items.map((r: { name: string }) => r.name);
    expect(names).not.toContain('knee 5%');
  });
});
