import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Imported causal sets: coordinates or a closed relation as compressed bytea, with the original file. */
export class CausalSets1764806400000 implements MigrationInterface {
  name = 'CausalSets1764806400000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE causal_sets (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        team_id uuid NOT NULL REFERENCES teams(id) ON DELETE CASCADE,
        created_by uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        name text NOT NULL,
        kind text NOT NULL CHECK (kind IN ('coordinates', 'relations')),
        dimension smallint NOT NULL CHECK (dimension IN (2, 4)),
        n integer NOT NULL CHECK (n >= 2),
        region jsonb,
        density double precision CHECK (density > 0),
        volume double precision CHECK (volume > 0),
        file_name text NOT NULL,
        file_bytes integer NOT NULL CHECK (file_bytes > 0),
        checksum text NOT NULL CHECK (checksum ~ '^[0-9a-f]{64}$'),
        stats jsonb NOT NULL,
        elements bytea NOT NULL,
        original bytea NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CHECK (kind = 'relations' OR region IS NOT NULL OR density IS NOT NULL)
      )`);
    await q.query(`CREATE INDEX causal_sets_team_created_idx ON causal_sets (team_id, created_at DESC)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE IF EXISTS causal_sets`);
  }
}
