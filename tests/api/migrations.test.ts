import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDataSource, runMigrations } from '../../server/db/data-source';
import { migrations } from '../../server/db/migrations/index';
import { createTestDatabase, type TestDatabase } from '../support/db';

let database: TestDatabase;
beforeAll(async () => {
  database = await createTestDatabase();
});
afterAll(async () => {
  await database?.drop();
});

const platformTables = ['invitations', 'memberships', 'outbox_messages', 'password_resets', 'sessions', 'teams', 'users'];

async function publicTables(url: string): Promise<string[]> {
  const ds = createDataSource(url);
  await ds.initialize();
  try {
    const rows: { table_name: string }[] = await ds.query(
      `SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' ORDER BY table_name`,
    );
    return rows.map((r) => r.table_name);
  } finally {
    await ds.destroy();
  }
}

describe('migrations', () => {
  it('build the whole schema on an empty database and are idempotent', async () => {
    expect(await publicTables(database.url)).toEqual([]);
    const ds = createDataSource(database.url);
    await ds.initialize();
    try {
      const first = await runMigrations(ds);
      expect(first).toEqual(migrations.map((m) => new m().name));
      expect(await runMigrations(ds)).toEqual([]);
      expect(await ds.showMigrations()).toBe(false);
    } finally {
      await ds.destroy();
    }
    const tables = await publicTables(database.url);
    for (const table of platformTables) expect(tables).toContain(table);
    expect(tables).toContain('typeorm_migrations');
  });

  it('match the entity schemas (no pending schema difference)', async () => {
    const ds = createDataSource(database.url);
    await ds.initialize();
    try {
      const pending = await ds.driver.createSchemaBuilder().log();
      // The migrations add foreign keys, checks and indexes the EntitySchemas do not describe, so
      // TypeORM would drop those; anything else (a table or column to create or alter) is a mismatch.
      const mismatches = pending.upQueries.map((q) => q.query).filter((q) => !/\bDROP (CONSTRAINT|INDEX)\b/.test(q));
      expect(mismatches).toEqual([]);
    } finally {
      await ds.destroy();
    }
  });

  it('enforce constraints the code relies on', async () => {
    const ds = createDataSource(database.url);
    await ds.initialize();
    try {
      await expect(ds.query(`INSERT INTO users (email, name, password_hash) VALUES ('Upper@X.test', 'U', 'h')`)).rejects.toThrow(/check/i);
      const [team] = await ds.query(`INSERT INTO teams (name) VALUES ('T') RETURNING id`);
      const [user] = await ds.query(`INSERT INTO users (email, name, password_hash) VALUES ('a@x.test', 'A', 'h') RETURNING id`);
      await expect(
        ds.query(`INSERT INTO memberships (user_id, team_id, role) VALUES ($1, $2, 'admin')`, [user.id, team.id]),
      ).rejects.toThrow(/check/i);
      await ds.query(`INSERT INTO memberships (user_id, team_id, role) VALUES ($1, $2, 'owner')`, [user.id, team.id]);
      await expect(
        ds.query(`INSERT INTO memberships (user_id, team_id, role) VALUES ($1, $2, 'viewer')`, [user.id, team.id]),
      ).rejects.toThrow(/duplicate/i);
    } finally {
      await ds.destroy();
    }
  });

  it('give study e-mails their own switch and keep each account’s one choice for both kinds', async () => {
    const ds = createDataSource(database.url);
    await ds.initialize();
    try {
      await runMigrations(ds);
      const split = migrations.findIndex((m) => new m().name === 'NotifyStudyDone1765324800000');
      for (let k = migrations.length - 1; k >= split; k--) await ds.undoLastMigration();
      await ds.query(
        `INSERT INTO users (email, name, password_hash, notify_on_run_done) VALUES ('on@migration.test', 'On', 'x', true), ('off@migration.test', 'Off', 'x', false)`,
      );
      await runMigrations(ds);
      const rows: { email: string; notify_on_run_done: boolean; notify_on_study_done: boolean }[] = await ds.query(
        `SELECT email, notify_on_run_done, notify_on_study_done FROM users WHERE email LIKE '%@migration.test' ORDER BY email`,
      );
      expect(rows).toEqual([
        { email: 'off@migration.test', notify_on_run_done: false, notify_on_study_done: false },
        { email: 'on@migration.test', notify_on_run_done: true, notify_on_study_done: true },
      ]);
    } finally {
      await ds.destroy();
    }
  });
});
