import { UnrecoverableError, Worker, type Job } from 'bullmq';
import { computeQueueName, createRedisConnection } from '../queue/compute-queue';
import { jobHandlers, type JobHandler, type WorkerContext } from './handlers/index';

export interface StartWorkerOptions {
  context: WorkerContext;
  /** defaults to the registry in ./handlers; tests pass their own */
  handlers?: Record<string, JobHandler>;
  concurrency?: number;
}

/** Dispatches each job by name to its handler; an unknown name fails at once, without retries. */
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
      return handler(job, context);
    },
    { connection, prefix: context.config.queuePrefix, concurrency, autorun: true },
  );
  worker.on('error', (error) => console.error(`[worker] ${error.message}`));
  worker.on('closed', () => connection.disconnect());
  return worker;
}
