import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Studies over imported causal sets: the study names its sets (id, name, file name, checksum, …) and
 * each cell keeps its own copy of its set's elements (gzip of the packed points or of the bit-packed
 * closed relation, as causal_sets.elements holds them), so the study stays reproducible and survives
 * a worker restart when a set is deleted meanwhile.
 */
export class StudyCausalSets1765238400000 implements MigrationInterface {
  name = 'StudyCausalSets1765238400000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE studies ADD COLUMN causal_sets jsonb`);
    await q.query(`ALTER TABLE study_cells ADD COLUMN elements bytea`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE study_cells DROP COLUMN IF EXISTS elements`);
    await q.query(`ALTER TABLE studies DROP COLUMN IF EXISTS causal_sets`);
  }
}
