/** The worker process: `tsx server/worker/main.ts`. Runs computations so the API never blocks on numerics. */
import { loadConfig } from '../config';
import { createDataSource } from '../db/data-source';
import { createMailer } from '../mail/mailer';
import { jobHandlers } from './handlers/index';
import { startComputeWorker } from './worker';

const config = loadConfig();
const dataSource = createDataSource(config.databaseUrl);
await dataSource.initialize();
const worker = startComputeWorker({ context: { config, dataSource, mailer: createMailer(dataSource) } });

worker.on('active', (job) => console.log(`[worker] ${job.name} ${job.id} started`));
worker.on('completed', (job) => console.log(`[worker] ${job.name} ${job.id} done`));
worker.on('failed', (job, error) => console.error(`[worker] ${job?.name} ${job?.id} failed: ${error.message}`));
await worker.waitUntilReady();
const known = Object.keys(jobHandlers);
console.log(`[worker] pid ${process.pid} waiting for jobs on ${config.queuePrefix}:tacet-compute (handlers: ${known.join(', ') || 'none yet'})`);

let stopping = false;
async function shutdown(signal: string): Promise<void> {
  if (stopping) return;
  stopping = true;
  console.log(`[worker] ${signal}: finishing the current job, then stopping`);
  try {
    await worker.close();
    await dataSource.destroy();
  } finally {
    process.exit(0);
  }
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
