/** The worker process: `tsx server/worker/main.ts`. Runs computations so the API never blocks on numerics. */
import { readdirSync } from 'node:fs';
import os from 'node:os';
import { loadConfig } from '../config';
import { createDataSource } from '../db/data-source';
import { createMailer } from '../mail/mailer';
import { createComputeQueue, createRedisConnection } from '../queue/compute-queue';
import { jobHandlers } from './handlers/index';
import { reconcileStalledJob, sweepOrphanedWork } from './recovery';
import { startComputeWorker } from './worker';

// Numerics take every core they get; on a machine shared with the API, compute at a lower CPU priority
// so requests stay fast. Set before any thread starts: engine and BLAS threads inherit it.
const workerNice = Number(process.env.TACET_WORKER_NICE ?? 10);
if (!Number.isInteger(workerNice) || workerNice < -20 || workerNice > 19) {
  throw new Error(`TACET_WORKER_NICE must be an integer from -20 to 19, got "${process.env.TACET_WORKER_NICE}"`);
}
// Linux keeps a priority per thread: the threads Node started before this line (V8's garbage
// collection and compiler helpers) are lowered one by one, the main thread's later ones inherit it.
const threadIds = (() => {
  try {
    return readdirSync('/proc/self/task').map(Number).filter((tid) => tid !== process.pid);
  } catch {
    return [];
  }
})();
try {
  os.setPriority(workerNice);
  for (const tid of threadIds) {
    try {
      os.setPriority(tid, workerNice);
    } catch {
      // the thread has ended since the listing
    }
  }
} catch (error) {
  console.warn(`[worker] could not set CPU priority ${workerNice}: ${(error as Error).message}`);
}

const config = loadConfig();
const dataSource = createDataSource(config.databaseUrl);
await dataSource.initialize();
const worker = startComputeWorker({ context: { config, dataSource, mailer: createMailer(dataSource) } });
// a producer-side handle on the same queue, to look up the jobs of rows the sweep checks
const queueConnection = createRedisConnection(config.redisUrl, 'client');
const queue = createComputeQueue(queueConnection, config.queuePrefix);

worker.on('active', (job) => console.log(`[worker] ${job.name} ${job.id} started`));
worker.on('completed', (job) => console.log(`[worker] ${job.name} ${job.id} done`));
worker.on('failed', (job, error) => console.error(`[worker] ${job?.name} ${job?.id} failed: ${error.message}`));
worker.on('stalled', (jobId) => {
  console.warn(`[worker] job ${jobId} stalled (its worker stopped without finishing)`);
  reconcileStalledJob(dataSource, queue, jobId)
    .then((failed) => failed && console.warn(`[worker] job ${jobId} stalled too often; its run is marked failed`))
    .catch((error: Error) => console.warn(`[worker] could not check stalled job ${jobId}: ${error.message}`));
});
// The handlers go in before the worker can take a job, so a SIGTERM at any moment after start-up
// finishes or re-queues it.
let sweepTimer: NodeJS.Timeout | undefined;
/**
 * SIGTERM/SIGINT: stop taking jobs and let the current one finish. If it takes longer than the grace
 * period the worker closes anyway; the job's lock then runs out and BullMQ's stalled-job check hands
 * it to another worker (re-queued, not lost). A second signal stops at once the same way.
 */
const shutdownGraceMs = Number(process.env.TACET_SHUTDOWN_GRACE_MS ?? 120_000);
let stopping = false;
async function shutdown(signal: string): Promise<void> {
  if (stopping) {
    console.log(`[worker] ${signal} again: stopping now; the current job will be re-queued`);
    process.exit(1);
  }
  stopping = true;
  if (sweepTimer) clearInterval(sweepTimer);
  console.log(`[worker] ${signal}: finishing the current job, then stopping (at most ${Math.round(shutdownGraceMs / 1000)} s)`);
  const graceOver = new Promise<'timeout'>((resolve) => setTimeout(() => resolve('timeout'), shutdownGraceMs).unref());
  let code = 0;
  try {
    if ((await Promise.race([worker.close().then(() => 'closed' as const), graceOver])) === 'timeout') {
      console.log('[worker] grace period over: leaving the current job to BullMQ stalled-job recovery');
      code = 1;
    }
    await queue.close();
    queueConnection.disconnect();
    await dataSource.destroy();
  } finally {
    process.exit(code);
  }
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
await worker.waitUntilReady();
const known = Object.keys(jobHandlers);
console.log(`[worker] pid ${process.pid} waiting for jobs on ${config.queuePrefix}:tacet-compute (handlers: ${known.join(', ') || 'none yet'})`);

const sweepGraceMs = Number(process.env.TACET_SWEEP_GRACE_MS ?? 60_000);
const sweepIntervalMs = Number(process.env.TACET_SWEEP_INTERVAL_MS ?? 60_000);
async function sweep(): Promise<void> {
  try {
    const report = await sweepOrphanedWork({ dataSource, queue, graceMs: sweepGraceMs });
    if (report.runs.length || report.cells.length) {
      console.warn(`[worker] sweep: marked failed ${report.runs.length} run(s) and ${report.cells.length} study cell(s) whose jobs were lost`);
    }
  } catch (error) {
    console.warn(`[worker] sweep skipped: ${(error as Error).message}`);
  }
}
await sweep();
if (!stopping) sweepTimer = setInterval(() => void sweep(), sweepIntervalMs);


