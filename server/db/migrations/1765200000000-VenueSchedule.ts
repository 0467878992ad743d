import type { MigrationInterface, QueryRunner } from 'typeorm';

/** The schedule becomes editable: every field of a line set and piece, brick sizes, and a kept history of changes. */
export class VenueSchedule1765200000000 implements MigrationInterface {
  name = 'VenueSchedule1765200000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE line_set
      ADD COLUMN distance_m DOUBLE NULL AFTER name,
      ADD COLUMN pipe_kg_per_m DOUBLE NOT NULL DEFAULT 0 AFTER pipe_length_m,
      ADD COLUMN high_trim_m DOUBLE NULL,
      ADD COLUMN low_trim_m DOUBLE NULL,
      ADD COLUMN notes VARCHAR(1000) NOT NULL DEFAULT '',
      ADD COLUMN out_of_service VARCHAR(300) NULL,
      ADD COLUMN version INT UNSIGNED NOT NULL DEFAULT 1`);
    await q.query('UPDATE line_set SET pipe_kg_per_m = pipe_kg / pipe_length_m WHERE pipe_length_m > 0');
    await q.query(`ALTER TABLE piece
      ADD COLUMN spread_from_m DOUBLE NULL,
      ADD COLUMN spread_to_m DOUBLE NULL,
      ADD COLUMN department VARCHAR(40) NOT NULL DEFAULT '',
      ADD COLUMN notes VARCHAR(500) NOT NULL DEFAULT ''`);
    await q.query('ALTER TABLE brick_type ADD COLUMN width_m DOUBLE NULL, ADD COLUMN depth_m DOUBLE NULL');
    await q.query(`CREATE TABLE schedule_change (
      id BIGINT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      venue_id INT UNSIGNED NOT NULL,
      subject VARCHAR(20) NOT NULL,
      subject_id INT UNSIGNED NULL,
      line_set_id INT UNSIGNED NULL,
      action VARCHAR(10) NOT NULL,
      changes JSON NOT NULL,
      person_id INT UNSIGNED NULL,
      person_name VARCHAR(120) NOT NULL,
      reason VARCHAR(300) NOT NULL,
      session_id INT UNSIGNED NULL,
      via VARCHAR(40) NULL,
      at_ms BIGINT NOT NULL,
      KEY ix_schedule_change_line_set (venue_id, line_set_id, id),
      CONSTRAINT fk_schedule_change_venue FOREIGN KEY (venue_id) REFERENCES venue (id),
      CONSTRAINT ck_schedule_change_action CHECK (action IN ('create', 'update', 'delete'))
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE schedule_change');
    await q.query('ALTER TABLE brick_type DROP COLUMN width_m, DROP COLUMN depth_m');
    await q.query('ALTER TABLE piece DROP COLUMN spread_from_m, DROP COLUMN spread_to_m, DROP COLUMN department, DROP COLUMN notes');
    await q.query(`ALTER TABLE line_set DROP COLUMN distance_m, DROP COLUMN pipe_kg_per_m, DROP COLUMN high_trim_m, DROP COLUMN low_trim_m,
      DROP COLUMN notes, DROP COLUMN out_of_service, DROP COLUMN version`);
  }
}
