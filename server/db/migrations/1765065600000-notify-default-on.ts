import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Run e-mails are a switch to turn off: new accounts get them. Existing accounts keep what they chose
 * (the column was false for everyone who never touched the switch, which we cannot tell apart from a choice).
 */
export class NotifyDefaultOn1765065600000 implements MigrationInterface {
  name = 'NotifyDefaultOn1765065600000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE users ALTER COLUMN notify_on_run_done SET DEFAULT true`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE users ALTER COLUMN notify_on_run_done SET DEFAULT false`);
  }
}
