import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Vacuum runs (parameters, status, result summary, long arrays as compressed bytea) and team cut rules. */
export class Runs1764720000000 implements MigrationInterface {
  name = 'Runs1764720000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE runs (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        team_id uuid NOT NULL REFERENCES teams(id) ON DELETE CASCADE,
        author_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        title text,
        status text NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'running', 'done', 'failed', 'cancelled')),
        stage text CHECK (stage IN ('sprinkle', 'order', 'green', 'spectrum', 'state', 'entropy')),
        percent real NOT NULL DEFAULT 0 CHECK (percent >= 0 AND percent <= 100),
        cancel_requested boolean NOT NULL DEFAULT false,
        request jsonb NOT NULL,
        dimension smallint NOT NULL CHECK (dimension IN (2, 4)),
        region_kind text NOT NULL,
        requested_n integer,
        n integer,
        truncation_text text NOT NULL,
        entropy_s double precision,
        error text,
        engine_version text,
        backend text,
        created_at timestamptz NOT NULL DEFAULT now(),
        started_at timestamptz,
        finished_at timestamptz,
        parent_run_id uuid REFERENCES runs(id) ON DELETE SET NULL,
        summary jsonb,
        points bytea,
        eigenvalues bytea,
        generalized_eigenvalues bytea,
        subregion_elements bytea
      )`);
    await q.query(`CREATE INDEX runs_team_created_idx ON runs (team_id, created_at DESC)`);
    await q.query(`CREATE INDEX runs_team_status_idx ON runs (team_id, status)`);
    await q.query(`CREATE INDEX runs_parent_idx ON runs (parent_run_id)`);
    await q.query(`
      CREATE TABLE cut_rules (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        team_id uuid NOT NULL REFERENCES teams(id) ON DELETE CASCADE,
        name text NOT NULL,
        rule jsonb NOT NULL,
        note text,
        created_by uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        UNIQUE (team_id, name)
      )`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE IF EXISTS cut_rules`);
    await q.query(`DROP TABLE IF EXISTS runs`);
  }
}
