/**
 * `tsx server/seed.ts`: adds the demo team to DATABASE_URL if it is missing (see db/demo-team.ts) and,
 * while that team has no runs and no studies, queues its demo work (demoWork.ts) for the worker.
 */
import { loadConfig } from './config';
import { createDataSource } from './db/data-source';
import { seedDemoTeam } from './db/demo-team';
import { queueDemoWork } from './demoWork';
import { createComputeQueue, createRedisConnection } from './queue/compute-queue';

const config = loadConfig();
const dataSource = createDataSource(config.databaseUrl);
const redis = createRedisConnection(config.redisUrl, 'client');
const computeQueue = createComputeQueue(redis, config.queuePrefix);
try {
  await dataSource.initialize();
  const { created } = await seedDemoTeam(dataSource, config.bcryptCost);
  console.log(created.length ? `Seeded demo data: ${created.join(', ')}` : 'Demo team already present.');
  const queued = await queueDemoWork(dataSource, computeQueue);
  if (queued.length) console.log(`Queued the demo team's first work for the worker (${queued.length} items): ${queued.join('; ')}`);
} catch (error) {
  console.error(`Seeding failed: ${(error as Error).message}`);
  process.exitCode = 1;
} finally {
  await computeQueue.close();
  redis.disconnect();
  if (dataSource.isInitialized) await dataSource.destroy();
}
