import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
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
});
