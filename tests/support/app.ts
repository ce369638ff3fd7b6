import { randomBytes } from 'node:crypto';
import type { Queue, Worker } from 'bullmq';
import type { Express } from 'express';
import type { Redis } from 'ioredis';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import { loadConfig, type Config } from '../../server/config';
import { createApp } from '../../server/app';
import { createDataSource, runMigrations } from '../../server/db/data-source';
import { OutboxMessageEntity, type OutboxMessageRow } from '../../server/db/entities';
import { createMailer, type Mailer } from '../../server/mail/mailer';
import { createComputeQueue, createRedisConnection } from '../../server/queue/compute-queue';
import { startComputeWorker } from '../../server/worker/worker';
import { createTestDatabase, type TestDatabase } from './db';

export interface TestContext {
  app: Express;
  config: Config;
  dataSource: DataSource;
  database: TestDatabase;
  redis: Redis;
  computeQueue: Queue;
  mailer: Mailer;
  /** messages stored for an address, newest first */
  mailTo(address: string): Promise<OutboxMessageRow[]>;
  close(): Promise<void>;
}

/**
 * A migrated database of its own, a BullMQ prefix of its own and an app wired to both.
 * Call in beforeAll and `close()` in afterAll.
 */
export async function createTestContext(overrides: Partial<Config> = {}): Promise<TestContext> {
  const database = await createTestDatabase();
  const config: Config = {
    ...loadConfig({ ...process.env, JWT_SECRET: process.env.JWT_SECRET ?? 'test-secret', BCRYPT_COST: '4' }),
    databaseUrl: database.url,
    queuePrefix: `tacet-t-${randomBytes(5).toString('hex')}`,
    ...overrides,
  };
  const dataSource = createDataSource(database.url);
  await dataSource.initialize();
  await runMigrations(dataSource);
  const redis = createRedisConnection(config.redisUrl, 'client');
  const computeQueue = createComputeQueue(redis, config.queuePrefix);
  const mailer = createMailer(dataSource);
  const app = createApp({ config, dataSource, mailer, redis, computeQueue });
  return {
    app,
    config,
    dataSource,
    database,
    redis,
    computeQueue,
    mailer,
    mailTo: (address) =>
      dataSource.manager.find(OutboxMessageEntity, {
        where: { toAddress: address.toLowerCase() },
        order: { createdAt: 'DESC' },
      }),
    async close() {
      await computeQueue.obliterate({ force: true }).catch(() => undefined);
      await computeQueue.close();
      redis.disconnect();
      await dataSource.destroy();
      await database.drop();
    },
  };
}

/** A compute worker in this process on the context's database, queue and mailer, ready to take jobs. */
export async function startTestWorker(ctx: Pick<TestContext, 'config' | 'dataSource' | 'mailer'>): Promise<Worker> {
  const worker = startComputeWorker({ context: { config: ctx.config, dataSource: ctx.dataSource, mailer: ctx.mailer } });
  await worker.waitUntilReady();
  return worker;
}

let userCounter = 0;
export const testPassword = 'causal-diamond-42';

export interface SignedUpUser {
  id: string;
  email: string;
  name: string;
  token: string;
  teamId: string;
}

/** Signs up a fresh user with a team of their own (as owner) and returns the token and that team. */
export async function signUp(app: Express, fields: { email?: string; name?: string; teamName?: string } = {}): Promise<SignedUpUser> {
  userCounter += 1;
  const email = fields.email ?? `person${userCounter}-${randomBytes(3).toString('hex')}@tacet.test`;
  const name = fields.name ?? `Person ${userCounter}`;
  const res = await request(app)
    .post('/api/auth/signup')
    .send({ email, name, password: testPassword, ...(fields.teamName ? { teamName: fields.teamName } : {}) });
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`);
  const me = await request(app).get('/api/me').set('Authorization', `Bearer ${res.body.token}`);
  return { id: res.body.user.id, email, name, token: res.body.token, teamId: me.body.memberships[0].team.id };
}

/** The link in an e-mail body that starts with `${appUrl}${prefix}`; returns its last path segment. */
export function tokenFromMail(text: string, appUrl: string, prefix: string): string {
  const match = new RegExp(`${appUrl.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}${prefix}([A-Za-z0-9_-]+)`).exec(text);
  if (!match) throw new Error(`no ${prefix} link in mail:\n${text}`);
  return match[1]!;
}
