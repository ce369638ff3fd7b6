import type { Queue } from 'bullmq';
import type { Redis } from 'ioredis';
import type { DataSource } from 'typeorm';
import type { HealthResponse } from '@shared/api';

const checkTimeoutMs = 2_000;

function withTimeout<T>(promise: Promise<T>, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not answer within ${checkTimeoutMs} ms`)), checkTimeoutMs);
  });
  return Promise.race([promise, timeout]).finally(() => clearTimeout(timer));
}

async function probe(check: () => Promise<unknown>, what: string): Promise<{ ok: boolean; message?: string }> {
  try {
    await withTimeout(check(), what);
    return { ok: true };
  } catch (error) {
    return { ok: false, message: (error as Error).message };
  }
}

export type HealthService = ReturnType<typeof createHealthService>;

export function createHealthService(deps: { dataSource: DataSource; redis: Redis; computeQueue: Queue; version: string }) {
  return {
    /** Database and Redis reachability and the number of workers connected to the compute queue. */
    async check(): Promise<HealthResponse> {
      const [database, redis] = await Promise.all([
        probe(() => deps.dataSource.query('SELECT 1'), 'PostgreSQL'),
        probe(() => deps.redis.ping(), 'Redis'),
      ]);
      // BullMQ workers name their Redis connections after the queue; counting them counts live workers.
      const workers = redis.ok
        ? await withTimeout(deps.computeQueue.getWorkersCount(), 'Redis').catch(() => 0)
        : 0;
      return { status: database.ok && redis.ok ? 'ok' : 'degraded', database, redis, workers, version: deps.version };
    },
  };
}
