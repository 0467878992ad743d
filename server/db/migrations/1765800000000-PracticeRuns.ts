import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Practice sessions, kept apart from the real record: their own table, never the session tables.
 * A row is set up by the server, then kept once with its taps and debrief (the venue's training record).
 */
export class PracticeRuns1765800000000 implements MigrationInterface {
  name = 'PracticeRuns1765800000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE practice_run (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      venue_id INT UNSIGNED NOT NULL,
      person_id INT UNSIGNED NOT NULL,
      role VARCHAR(20) NOT NULL,
      title VARCHAR(160) NOT NULL,
      source VARCHAR(20) NOT NULL,
      seed INT NOT NULL,
      pace DOUBLE NOT NULL,
      setup JSON NOT NULL,
      taps JSON NULL,
      debrief JSON NULL,
      outcome VARCHAR(20) NOT NULL,
      started_at_ms BIGINT UNSIGNED NOT NULL,
      ended_at_ms BIGINT UNSIGNED NULL,
      KEY ix_practice_run_venue (venue_id, started_at_ms),
      KEY ix_practice_run_person (person_id, started_at_ms),
      CONSTRAINT fk_practice_run_venue FOREIGN KEY (venue_id) REFERENCES venue (id),
      CONSTRAINT fk_practice_run_person FOREIGN KEY (person_id) REFERENCES person (id)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE practice_run');
  }
}
