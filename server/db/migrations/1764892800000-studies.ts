import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Scaling studies and their cells: one cell per (N, seed), i.e. one sprinkling, holding every entropy
 * computed on it (subregions × rules) as JSON and the spectrum as compressed bytea. Results are stored
 * per cell, so a restarted worker continues where the last one stopped.
 */
export class Studies1764892800000 implements MigrationInterface {
  name = 'Studies1764892800000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE studies (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        team_id uuid NOT NULL REFERENCES teams(id) ON DELETE CASCADE,
        author_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        title text,
        status text NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'running', 'done', 'failed', 'cancelled')),
        cancel_requested boolean NOT NULL DEFAULT false,
        request jsonb NOT NULL,
        subregions jsonb NOT NULL,
        region_kind text NOT NULL,
        cells_total integer NOT NULL CHECK (cells_total > 0),
        error text,
        created_at timestamptz NOT NULL DEFAULT now(),
        started_at timestamptz,
        finished_at timestamptz
      )`);
    await q.query(`CREATE INDEX studies_team_created_idx ON studies (team_id, created_at DESC)`);
    await q.query(`
      CREATE TABLE study_cells (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        study_id uuid NOT NULL REFERENCES studies(id) ON DELETE CASCADE,
        position integer NOT NULL,
        requested_n integer NOT NULL CHECK (requested_n > 0),
        seed text NOT NULL,
        status text NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'running', 'done', 'failed', 'cancelled')),
        percent real NOT NULL DEFAULT 0 CHECK (percent >= 0 AND percent <= 100),
        n integer,
        result jsonb,
        eigenvalues bytea,
        error text,
        engine_version text,
        backend text,
        started_at timestamptz,
        finished_at timestamptz,
        UNIQUE (study_id, requested_n, seed),
        UNIQUE (study_id, position)
      )`);
    await q.query(`CREATE INDEX study_cells_study_status_idx ON study_cells (study_id, status)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE IF EXISTS study_cells`);
    await q.query(`DROP TABLE IF EXISTS studies`);
  }
}
