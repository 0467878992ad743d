import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Photos of a hang, on a line set or on one piece. The files live under the data folder; their records here. */
export class Photos1765390000000 implements MigrationInterface {
  name = 'Photos1765390000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE photo (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      venue_id INT UNSIGNED NOT NULL,
      line_set_id INT UNSIGNED NOT NULL,
      piece_id INT UNSIGNED NULL,
      file_name VARCHAR(80) CHARACTER SET ascii NOT NULL,
      thumb_name VARCHAR(80) CHARACTER SET ascii NOT NULL,
      width INT UNSIGNED NOT NULL,
      height INT UNSIGNED NOT NULL,
      bytes INT UNSIGNED NOT NULL,
      caption VARCHAR(200) NOT NULL DEFAULT '',
      drawn VARCHAR(40) NULL,
      uploaded_by INT UNSIGNED NULL,
      uploaded_at_ms BIGINT UNSIGNED NOT NULL,
      UNIQUE KEY ux_photo_file (file_name),
      KEY ix_photo_line_set (line_set_id),
      CONSTRAINT fk_photo_venue FOREIGN KEY (venue_id) REFERENCES venue (id),
      CONSTRAINT fk_photo_line_set FOREIGN KEY (line_set_id) REFERENCES line_set (id) ON DELETE CASCADE,
      CONSTRAINT fk_photo_piece FOREIGN KEY (piece_id) REFERENCES piece (id) ON DELETE CASCADE
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE photo');
  }
}
