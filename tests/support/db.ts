import { randomBytes } from 'node:crypto';
import { DataSource } from 'typeorm';

/** The cluster scripts/test.sh starts; every test file gets a database of its own on it. */
export function testClusterUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url) {
    throw new Error('DATABASE_URL is not set: run API tests through `npm test`, which starts PostgreSQL and Redis.');
  }
  return url;
}

export interface TestDatabase {
  name: string;
  url: string;
  drop(): Promise<void>;
}

async function onAdminConnection<T>(work: (admin: DataSource) => Promise<T>): Promise<T> {
  const admin = new DataSource({ type: 'postgres', url: testClusterUrl(), extra: { max: 1 } });
  await admin.initialize();
  try {
    return await work(admin);
  } finally {
    await admin.destroy();
  }
}

/** Creates an empty database `tacet_t_<random>` so test files running in parallel never share rows. */
export async function createTestDatabase(): Promise<TestDatabase> {
  const name = `tacet_t_${randomBytes(6).toString('hex')}`;
  await onAdminConnection((c) => c.query(`CREATE DATABASE ${name}`));
  const url = new URL(testClusterUrl());
  url.pathname = `/${name}`;
  return {
    name,
    url: url.toString(),
    drop: () => onAdminConnection((c) => c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`)).then(() => undefined),
  };
}
