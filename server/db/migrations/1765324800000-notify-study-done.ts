import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Study e-mails get their own switch beside run e-mails. Existing accounts keep the one choice they
 * made for both kinds: the new column starts as a copy of notify_on_run_done.
 */
export class NotifyStudyDone1765324800000 implements MigrationInterface {
  name = 'NotifyStudyDone1765324800000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE users ADD COLUMN notify_on_study_done boolean NOT NULL DEFAULT true`);
    await q.query(`UPDATE users SET notify_on_study_done = notify_on_run_done`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE users DROP COLUMN notify_on_study_done`);
  }
}
