import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * A run on an imported relation list keeps its own copy of the closed relation (gzip of the bit-packed
 * rows, as causal_sets.elements holds it), so it stays reproducible when the causal set is deleted.
 */
export class RunRelations1764979200000 implements MigrationInterface {
  name = 'RunRelations1764979200000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE runs ADD COLUMN relation bytea`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE runs DROP COLUMN IF EXISTS relation`);
  }
}
