import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AUTO_STRUCTURED_FROM, STRUCTURED_MAX_N_2D } from '@shared/engineChoice';
import { engineLimitsSchema } from '@shared/limits';
import { DENSE_SIZE_LIMIT, denseSizeLimit } from '../../server/engine/index';
import { backendSelection } from '../../server/engine/linalg';
import { createTestContext, signUp, type TestContext } from '../support/app';
import { diamondRun } from '../worker/runHelpers';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => {
  await ctx?.close();
});

describe('GET /api/limits', () => {
  it('states the dense limit of the backend this server selected, the one POST /api/runs applies', async () => {
    const res = await request(ctx.app).get('/api/limits');
    expect(res.status).toBe(200);
    const limits = engineLimitsSchema.parse(res.body);
    expect(limits.dense.backend).toBe(backendSelection().name);
    expect(limits.dense.maxN).toBe(denseSizeLimit(limits.dense.backend));
    expect(limits.dense.byBackend[limits.dense.backend]).toBe(limits.dense.maxN);
    expect(limits.dense.reason).toBe(DENSE_SIZE_LIMIT.reason);

    const owner = await signUp(ctx.app);
    const auth = { Authorization: `Bearer ${owner.token}` };
    // without truncation only the dense engine serves (a 2D cut may go to the structured engine, whose limit is larger)
    const denseOnly = { truncation: { rule: 'none' } };
    const over = await request(ctx.app).post('/api/runs').set(auth).send(diamondRun(denseOnly, { count: limits.dense.maxN + 1 }));
    expect(over.status).toBe(422);
    expect(over.body.error.code).toBe('too_large');
    expect(over.body.error.message).toContain(`dense limit of ${limits.dense.maxN} elements`);
    const at = await request(ctx.app).post('/api/runs').set(auth).send(diamondRun(denseOnly, { count: limits.dense.maxN }));
    expect(at.status).toBe(202);
    await request(ctx.app).post(`/api/runs/${at.body.id}/cancel`).set(auth);
  });

  it('states the structured limit and the rule, and POST /api/runs applies them', async () => {
    const limits = engineLimitsSchema.parse((await request(ctx.app).get('/api/limits')).body);
    expect(limits.structured).toEqual({
      maxN: STRUCTURED_MAX_N_2D,
      dimensions: [2],
      truncations: ['sqrtN', 'lambda', 'modes'],
      autoFrom: AUTO_STRUCTURED_FROM,
      reason: expect.stringMatching(/never an N×N matrix/),
    });
    expect(limits.rule).toContain(String(STRUCTURED_MAX_N_2D));
    expect(limits.rule).toContain(String(AUTO_STRUCTURED_FROM));

    const owner = await signUp(ctx.app);
    const auth = { Authorization: `Bearer ${owner.token}` };
    // a 2D sqrtN cut: the structured engine serves it, so its limit applies and the dense one does not
    const over = await request(ctx.app).post('/api/runs').set(auth).send(diamondRun({}, { count: limits.structured.maxN + 1 }));
    expect(over.status).toBe(422);
    expect(over.body.error.code).toBe('too_large');
    expect(over.body.error.message).toContain(`the structured engine accepts at most ${limits.structured.maxN} elements`);
    const aboveDense = await request(ctx.app).post('/api/runs').set(auth).send(diamondRun({}, { count: limits.dense.maxN + 1 }));
    expect(aboveDense.status).toBe(202);
    await request(ctx.app).post(`/api/runs/${aboveDense.body.id}/cancel`).set(auth);
    // a 4D region is dense-only, whatever the cut
    const fourD = await request(ctx.app)
      .post('/api/runs')
      .set(auth)
      .send(diamondRun({}, { region: { kind: 'diamond4d', properTime: 2 }, count: limits.dense.maxN + 1 }));
    expect(fourD.status).toBe(422);
    expect(fourD.body.error.message).toContain(`dense limit of ${limits.dense.maxN} elements`);
  });
});
