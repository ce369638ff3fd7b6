import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * A study cell records when it was last queued. A cell added by extending a study, or queued again
 * by a retry, is younger than its study; the sweep of lost jobs gives each cell its grace period from
 * this time, not from the study's creation, so a cell whose job is being added is never failed as lost.
 */
export class StudyCellQueuedAt1765418400000 implements MigrationInterface {
  name = 'StudyCellQueuedAt1765418400000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE study_cells ADD COLUMN queued_at timestamptz NOT NULL DEFAULT now()`);
    await q.query(`UPDATE study_cells c SET queued_at = s.created_at FROM studies s WHERE s.id = c.study_id`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE study_cells DROP COLUMN queued_at`);
  }
}
