import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Live loading sessions, their append-only log and the phones' idempotency keys. */
export class LoadingSessions1764720000000 implements MigrationInterface {
  name = 'LoadingSessions1764720000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE loading_session (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      venue_id INT UNSIGNED NOT NULL,
      title VARCHAR(120) NOT NULL,
      phase VARCHAR(20) NOT NULL,
      state JSON NOT NULL,
      plan JSON NOT NULL,
      created_by INT UNSIGNED NOT NULL,
      created_at_ms BIGINT UNSIGNED NOT NULL,
      last_seq INT UNSIGNED NOT NULL DEFAULT 0,
      last_hash CHAR(64) NOT NULL,
      KEY ix_loading_session_venue (venue_id, phase),
      CONSTRAINT fk_loading_session_venue FOREIGN KEY (venue_id) REFERENCES venue (id),
      CONSTRAINT fk_loading_session_person FOREIGN KEY (created_by) REFERENCES person (id)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    // The kept record. The application account may only SELECT and INSERT here (server/db/grants.ts).
    await q.query(`CREATE TABLE session_event (
      session_id INT UNSIGNED NOT NULL,
      seq INT UNSIGNED NOT NULL,
      server_time_ms BIGINT UNSIGNED NOT NULL,
      client_time_ms BIGINT UNSIGNED NULL,
      person_id INT UNSIGNED NULL,
      person_name VARCHAR(120) NOT NULL,
      role VARCHAR(20) NULL,
      kind VARCHAR(40) NOT NULL,
      line_set_id VARCHAR(64) NULL,
      step_index INT UNSIGNED NULL,
      details JSON NOT NULL,
      prev_hash CHAR(64) NOT NULL,
      hash CHAR(64) NOT NULL,
      PRIMARY KEY (session_id, seq),
      CONSTRAINT fk_session_event_session FOREIGN KEY (session_id) REFERENCES loading_session (id)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`CREATE TABLE session_action_key (
      session_id INT UNSIGNED NOT NULL,
      action_key VARCHAR(64) NOT NULL,
      person_id INT UNSIGNED NOT NULL,
      answer JSON NOT NULL,
      created_at_ms BIGINT UNSIGNED NOT NULL,
      PRIMARY KEY (session_id, action_key),
      CONSTRAINT fk_session_action_key_session FOREIGN KEY (session_id) REFERENCES loading_session (id)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE session_action_key');
    await q.query('DROP TABLE session_event');
    await q.query('DROP TABLE loading_session');
  }
}
