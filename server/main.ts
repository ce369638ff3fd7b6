/** The API process: `tsx server/main.ts`. Serves /api and, when built, the client from dist/client. */
import { join } from 'node:path';
import { createApp } from './app';
import { loadConfig, projectRoot } from './config';
import { createDataSource } from './db/data-source';
import { createMailer } from './mail/mailer';
import { createComputeQueue, createRedisConnection } from './queue/compute-queue';

const config = loadConfig();
const dataSource = createDataSource(config.databaseUrl);
await dataSource.initialize();
const redis = createRedisConnection(config.redisUrl, 'client');
const computeQueue = createComputeQueue(redis, config.queuePrefix);
const clientDir = join(projectRoot, 'dist', 'client');
const requestLog = process.env.TACET_REQUEST_LOG === '1' ? (line: string) => console.log(line) : undefined;
const app = createApp({ config, dataSource, mailer: createMailer(dataSource), redis, computeQueue, clientDir, requestLog });

const server = app.listen(config.port, '127.0.0.1', () => {
  console.log(`[api] listening on http://127.0.0.1:${config.port} (${config.mode})`);
});
server.on('error', (error) => {
  console.error(`[api] cannot listen on 127.0.0.1:${config.port}: ${error.message}`);
  process.exit(1);
});

let stopping = false;
async function shutdown(signal: string): Promise<void> {
  if (stopping) return;
  stopping = true;
  console.log(`[api] ${signal}: stopping`);
  server.close();
  server.closeAllConnections();
  try {
    await computeQueue.close();
    redis.disconnect();
    await dataSource.destroy();
  } finally {
    process.exit(0);
  }
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
