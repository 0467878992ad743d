import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * What one process used to keep in memory, kept where every server process sees it: when a
 * session's next re-alert is due (claimed under the session's row lock by whichever process gets
 * there first), and when each person last had a session open.
 */
export class SharedAcrossServers1765600000000 implements MigrationInterface {
  name = 'SharedAcrossServers1765600000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query('ALTER TABLE loading_session ADD COLUMN re_alert_due_ms BIGINT UNSIGNED NULL AFTER last_hash, ADD KEY ix_loading_session_re_alert (re_alert_due_ms)');
    await q.query(`CREATE TABLE session_presence (
      session_id INT UNSIGNED NOT NULL,
      person_id INT UNSIGNED NOT NULL,
      person_name VARCHAR(120) NOT NULL,
      last_seen_ms BIGINT UNSIGNED NOT NULL,
      PRIMARY KEY (session_id, person_id),
      CONSTRAINT fk_session_presence_session FOREIGN KEY (session_id) REFERENCES loading_session (id)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE session_presence');
    await q.query('ALTER TABLE loading_session DROP KEY ix_loading_session_re_alert, DROP COLUMN re_alert_due_ms');
  }
}
