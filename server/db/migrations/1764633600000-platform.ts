import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Users, teams with role memberships, revocable sessions, invitations, password resets, mail outbox. */
export class Platform1764633600000 implements MigrationInterface {
  name = 'Platform1764633600000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE users (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        email text NOT NULL UNIQUE CHECK (email = lower(email)),
        name text NOT NULL,
        password_hash text NOT NULL,
        notify_on_run_done boolean NOT NULL DEFAULT false,
        created_at timestamptz NOT NULL DEFAULT now()
      )`);
    await q.query(`
      CREATE TABLE teams (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        name text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now()
      )`);
    await q.query(`
      CREATE TABLE memberships (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        team_id uuid NOT NULL REFERENCES teams(id) ON DELETE CASCADE,
        role text NOT NULL CHECK (role IN ('owner', 'researcher', 'viewer')),
        created_at timestamptz NOT NULL DEFAULT now(),
        UNIQUE (user_id, team_id)
      )`);
    await q.query(`CREATE INDEX memberships_team_idx ON memberships (team_id)`);
    await q.query(`
      CREATE TABLE sessions (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        revoked_at timestamptz
      )`);
    await q.query(`CREATE INDEX sessions_user_idx ON sessions (user_id)`);
    await q.query(`
      CREATE TABLE invitations (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        team_id uuid NOT NULL REFERENCES teams(id) ON DELETE CASCADE,
        email text NOT NULL,
        role text NOT NULL CHECK (role IN ('owner', 'researcher', 'viewer')),
        token_hash text NOT NULL UNIQUE,
        invited_by_user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        accepted_at timestamptz,
        accepted_by_user_id uuid REFERENCES users(id) ON DELETE SET NULL
      )`);
    await q.query(`CREATE INDEX invitations_team_idx ON invitations (team_id)`);
    await q.query(`
      CREATE TABLE password_resets (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        token_hash text NOT NULL UNIQUE,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        used_at timestamptz
      )`);
    await q.query(`
      CREATE TABLE outbox_messages (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        team_id uuid REFERENCES teams(id) ON DELETE SET NULL,
        to_address text NOT NULL,
        subject text NOT NULL,
        text text NOT NULL,
        envelope jsonb NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now()
      )`);
    await q.query(`CREATE INDEX outbox_messages_to_idx ON outbox_messages (to_address)`);
    await q.query(`CREATE INDEX outbox_messages_team_idx ON outbox_messages (team_id)`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['outbox_messages', 'password_resets', 'invitations', 'sessions', 'memberships', 'teams', 'users']) {
      await q.query(`DROP TABLE IF EXISTS ${table}`);
    }
  }
}
