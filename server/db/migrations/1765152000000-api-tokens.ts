import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Personal API tokens for scripts and notebooks: each belongs to one user and one team, and only the
 * SHA-256 of its secret is stored, so a copy of the table opens nothing.
 */
export class ApiTokens1765152000000 implements MigrationInterface {
  name = 'ApiTokens1765152000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE api_tokens (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        team_id uuid NOT NULL REFERENCES teams(id) ON DELETE CASCADE,
        name text NOT NULL,
        token_hash text NOT NULL UNIQUE,
        token_hint text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz,
        last_used_at timestamptz,
        revoked_at timestamptz
      )`);
    await q.query(`CREATE INDEX api_tokens_user_idx ON api_tokens (user_id, created_at DESC)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE IF EXISTS api_tokens`);
  }
}
