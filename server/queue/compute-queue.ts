import { Queue } from 'bullmq';
import { Redis } from 'ioredis';

/** The one queue all computations go through; its jobs are the contract of ./jobs.ts. */
export const computeQueueName = 'tacet-compute';

/**
 * Workers need `maxRetriesPerRequest: null` (BullMQ requires it for blocking commands); the API
 * side retries a command once, so a request fails soon instead of hanging when Redis is down.
 */
export function createRedisConnection(redisUrl: string, role: 'worker' | 'client'): Redis {
  const redis = new Redis(redisUrl, {
    maxRetriesPerRequest: role === 'worker' ? null : 1,
    connectTimeout: 5_000,
    retryStrategy: (attempt) => Math.min(attempt * 200, 2_000),
  });
  // Without a listener ioredis reports every failed reconnect as an unhandled error event.
  redis.on('error', () => {});
  return redis;
}

let lastRedisWarning = 0;

/** The producer side used by the API. Redis trouble is logged once a minute at most; /api/health reports it. */
export function createComputeQueue(connection: Redis, prefix: string): Queue {
  const queue = new Queue(computeQueueName, { connection, prefix, skipWaitingForReady: true });
  queue.on('error', (error) => {
    if (Date.now() - lastRedisWarning < 60_000) return;
    lastRedisWarning = Date.now();
    console.warn(`[queue] Redis problem: ${error.message}`);
  });
  return queue;
}
