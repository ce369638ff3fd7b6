import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { apiErrorSchema } from '@shared/api';
import { createApp } from '../../server/app';
import { createDataSource } from '../../server/db/data-source';
import { createTestContext, signUp, type TestContext } from '../support/app';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => {
  await ctx?.close();
});

describe('error shape', () => {
  it('answers an unknown API route with JSON 404', async () => {
    const res = await request(ctx.app).get('/api/no/such/route');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(apiErrorSchema.parse(res.body).error.code).toBe('not_found');
  });

  it('answers malformed JSON with 400', async () => {
    const res = await request(ctx.app).post('/api/auth/login').set('Content-Type', 'application/json').send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_json');
  });

  it('answers a missing body with a validation error, not a crash', async () => {
    const res = await request(ctx.app).post('/api/auth/login');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
  });

  it('hides internal errors behind a 500 without stack or SQL', async () => {
    const user = await signUp(ctx.app);
    const broken = createDataSource(ctx.database.url);
    await broken.initialize();
    await broken.destroy();
    const app = createApp({ ...ctx, dataSource: broken });
    const log = vi.spyOn(console, 'error').mockImplementation(() => {});
    try {
      const res = await request(app).get('/api/me').set('Authorization', `Bearer ${user.token}`);
      expect(res.status).toBe(500);
      expect(apiErrorSchema.parse(res.body).error.code).toBe('internal_error');
      expect(JSON.stringify(res.body)).not.toMatch(/at |\.ts:|SELECT|stack/i);
      expect(log).toHaveBeenCalled();
    } finally {
      log.mockRestore();
    }
  });
});
