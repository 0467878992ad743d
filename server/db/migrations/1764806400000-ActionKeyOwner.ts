import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * An action key answers only for the person and the action it was first sent with, and keys are
 * compared byte for byte (phones make them; "aB" and "ab" are different keys).
 */
export class ActionKeyOwner1764806400000 implements MigrationInterface {
  name = 'ActionKeyOwner1764806400000';

  async up(q: QueryRunner): Promise<void> {
    await q.query('ALTER TABLE session_action_key MODIFY action_key VARCHAR(64) CHARACTER SET ascii COLLATE ascii_bin NOT NULL');
    await q.query("ALTER TABLE session_action_key ADD COLUMN action_hash CHAR(64) NOT NULL DEFAULT '' AFTER person_id");
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('ALTER TABLE session_action_key DROP COLUMN action_hash');
    await q.query('ALTER TABLE session_action_key MODIFY action_key VARCHAR(64) CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci NOT NULL');
  }
}
