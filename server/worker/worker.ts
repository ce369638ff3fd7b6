import { UnrecoverableError, Worker, type Job } from 'bullmq';
import { computeQueueName, createRedisConnection } from '../queue/compute-queue';
import { JobPayloadError, readContractJob } from '../queue/jobs';
import type { JobHandler, WorkerContext } from './context';
import { jobHandlers } from './handlers/index';

export interface StartWorkerOptions {
  context: WorkerContext;
  /** defaults to the registry in ./handlers; tests pass their own */
  handlers?: Record<string, JobHandler>;
  concurrency?: number;
}

function envMs(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const value = Number(raw);
  if (!Number.isInteger(value) || value < 0) throw new Error(`${name} must be a whole number of milliseconds, got "${raw}".`);
  return value;
}

/**
 * BullMQ's stalled-job recovery: a worker holds a lock on its job, renewed every lockDuration/2; when
 * the worker dies the lock runs out and the next stalled check (every stalledInterval) puts the job
 * back in the queue, up to maxStalledCount times, then fails it. Defaults are BullMQ's; the fault
 * tests shorten them through the environment.
 */
export function stalledJobSettings() {
  return {
    lockDuration: envMs('TACET_JOB_LOCK_MS', 30_000),
    stalledInterval: envMs('TACET_STALLED_INTERVAL_MS', 30_000),
    maxStalledCount: envMs('TACET_MAX_STALLED_COUNT', 1),
  };
}

/**
 * Dispatches each job by name to its handler; an unknown name, or a payload the job contract
 * refuses, fails the job at once, without retries.
 */
export function startComputeWorker({ context, handlers = jobHandlers, concurrency = 1 }: StartWorkerOptions): Worker {
  const connection = createRedisConnection(context.config.redisUrl, 'worker');
  const worker = new Worker(
    computeQueueName,
    async (job: Job) => {
      const handler = handlers[job.name];
      if (!handler) {
        throw new UnrecoverableError(
          `No handler is registered for job "${job.name}" (known: ${Object.keys(handlers).join(', ') || 'none'}).`,
        );
      }
      try {
        readContractJob(job);
      } catch (error) {
        if (error instanceof JobPayloadError) throw new UnrecoverableError(error.message);
        throw error;
      }
      return handler(job, context);
    },
    { connection, prefix: context.config.queuePrefix, concurrency, autorun: true, ...stalledJobSettings() },
  );
  worker.on('error', (error) => console.error(`[worker] ${error.message}`));
  worker.on('closed', () => connection.disconnect());
  return worker;
}
