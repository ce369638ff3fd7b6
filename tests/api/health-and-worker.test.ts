import { QueueEvents, type Job } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { healthResponseSchema } from '@shared/api';
import { createApp } from '../../server/app';
import { computeQueueName, createComputeQueue, createRedisConnection } from '../../server/queue/compute-queue';
import { startComputeWorker } from '../../server/worker/worker';
import { createTestContext, type TestContext } from '../support/app';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => {
  await ctx?.close();
});

async function waitFor<T>(probe: () => Promise<T>, accept: (value: T) => boolean, timeoutMs = 10_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (accept(value) || Date.now() > deadline) return value;
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('GET /api/health', () => {
  it('reports database, Redis, version and no workers when none runs', async () => {
    const res = await request(ctx.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(healthResponseSchema.parse(res.body)).toEqual({
      status: 'ok',
      database: { ok: true },
      redis: { ok: true },
      workers: 0,
      version: ctx.config.version,
    });
  });

  it('counts a worker connected to this queue and stops counting it after close', async () => {
    const worker = startComputeWorker({
      context: { config: ctx.config, dataSource: ctx.dataSource, mailer: ctx.mailer },
      handlers: {},
    });
    try {
      await worker.waitUntilReady();
      const up = await waitFor(() => request(ctx.app).get('/api/health'), (r) => r.body.workers === 1);
      expect(up.body.workers).toBe(1);
    } finally {
      await worker.close();
    }
    const down = await waitFor(() => request(ctx.app).get('/api/health'), (r) => r.body.workers === 0);
    expect(down.body.workers).toBe(0);
  });

  it('is degraded (503) when Redis cannot be reached', async () => {
    // Port 9 (discard) has no Redis on loopback; the health probe must give up within its timeout.
    const deadRedis = createRedisConnection('redis://127.0.0.1:9', 'client');
    const deadQueue = createComputeQueue(deadRedis, ctx.config.queuePrefix);
    try {
      const app = createApp({ ...ctx, redis: deadRedis, computeQueue: deadQueue });
      const res = await request(app).get('/api/health');
      expect(res.status).toBe(503);
      expect(res.body.status).toBe('degraded');
      expect(res.body.database.ok).toBe(true);
      expect(res.body.redis.ok).toBe(false);
      expect(res.body.redis.message).toEqual(expect.any(String));
      expect(res.body.workers).toBe(0);
    } finally {
      deadRedis.disconnect();
      await deadQueue.close().catch(() => undefined);
    }
  });
});

describe('compute worker', () => {
  it('dispatches by job name, forwards progress and the result', async () => {
    const seen: number[] = [];
    const worker = startComputeWorker({
      context: { config: ctx.config, dataSource: ctx.dataSource, mailer: ctx.mailer },
      handlers: {
        'sum-squares': async (job: Job<{ n: number }>) => {
          let total = 0;
          for (let k = 1; k <= job.data.n; k++) {
            total += k * k;
            await job.updateProgress(Math.round((100 * k) / job.data.n));
          }
          return total;
        },
      },
    });
    const events = new QueueEvents(computeQueueName, { connection: { url: ctx.config.redisUrl }, prefix: ctx.config.queuePrefix });
    try {
      await events.waitUntilReady();
      events.on('progress', ({ data }) => seen.push(Number(data)));
      const job = await ctx.computeQueue.add('sum-squares', { n: 4 });
      // 1 + 4 + 9 + 16 = 30 (closed form n(n+1)(2n+1)/6, common practice)
      expect(await job.waitUntilFinished(events, 10_000)).toBe(30);
      expect(seen).toContain(100);

      const unknown = await ctx.computeQueue.add('no-such-job', {}, { attempts: 3 });
      await expect(unknown.waitUntilFinished(events, 10_000)).rejects.toThrow(/No handler is registered for job "no-such-job"/);
      const failed = await ctx.computeQueue.getJob(unknown.id!);
      expect(failed?.attemptsMade).toBe(1);
    } finally {
      await worker.close();
      await events.close();
    }
  });

  it('fails a job of the contract whose payload it refuses at once, before its handler runs', async () => {
    let called = false;
    const worker = startComputeWorker({
      context: { config: ctx.config, dataSource: ctx.dataSource, mailer: ctx.mailer },
      handlers: { 'vacuum-run': async () => (called = true) },
    });
    const events = new QueueEvents(computeQueueName, { connection: { url: ctx.config.redisUrl }, prefix: ctx.config.queuePrefix });
    try {
      await events.waitUntilReady();
      const bad = await ctx.computeQueue.add('vacuum-run', { runId: 'not-a-run' }, { attempts: 3 });
      await expect(bad.waitUntilFinished(events, 10_000)).rejects.toThrow(/job "vacuum-run" has a payload the job contract refuses \(runId: /);
      expect((await ctx.computeQueue.getJob(bad.id!))?.attemptsMade).toBe(1);
      expect(called).toBe(false);
    } finally {
      await worker.close();
      await events.close();
    }
  });
});
