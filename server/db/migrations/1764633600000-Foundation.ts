import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Venues, people and their roles, the line set schedule, brick stock, and stored sign-ins. */
export class Foundation1764633600000 implements MigrationInterface {
  name = 'Foundation1764633600000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE venue (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      name VARCHAR(120) NOT NULL,
      units VARCHAR(10) NOT NULL,
      settings JSON NOT NULL,
      created_at DATETIME(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`CREATE TABLE person (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      name VARCHAR(120) NOT NULL,
      email VARCHAR(254) NOT NULL,
      password_hash VARCHAR(255) NULL,
      invite_token_hash CHAR(64) NULL,
      invite_expires_at DATETIME(3) NULL,
      created_at DATETIME(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
      UNIQUE KEY uq_person_email (email),
      UNIQUE KEY uq_person_invite (invite_token_hash)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`CREATE TABLE venue_role (
      venue_id INT UNSIGNED NOT NULL,
      person_id INT UNSIGNED NOT NULL,
      role VARCHAR(20) NOT NULL,
      PRIMARY KEY (venue_id, person_id, role),
      KEY ix_venue_role_person (person_id),
      CONSTRAINT fk_venue_role_venue FOREIGN KEY (venue_id) REFERENCES venue (id),
      CONSTRAINT fk_venue_role_person FOREIGN KEY (person_id) REFERENCES person (id) ON DELETE CASCADE
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`CREATE TABLE brick_type (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      venue_id INT UNSIGNED NOT NULL,
      code VARCHAR(40) NOT NULL,
      name VARCHAR(80) NOT NULL,
      mass_kg DOUBLE NOT NULL,
      height_m DOUBLE NULL,
      bridge_count INT UNSIGNED NOT NULL DEFAULT 0,
      UNIQUE KEY uq_brick_type_code (venue_id, code),
      CONSTRAINT fk_brick_type_venue FOREIGN KEY (venue_id) REFERENCES venue (id)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`CREATE TABLE line_set (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      venue_id INT UNSIGNED NOT NULL,
      number INT UNSIGNED NOT NULL,
      name VARCHAR(80) NOT NULL,
      purchase TINYINT UNSIGNED NOT NULL,
      pipe_size VARCHAR(40) NOT NULL,
      pipe_length_m DOUBLE NOT NULL,
      pipe_kg DOUBLE NOT NULL,
      lift_lines_m JSON NOT NULL,
      lift_line_rating_kg DOUBLE NOT NULL,
      batten_rating_kg_per_m DOUBLE NOT NULL,
      arbor_kg DOUBLE NOT NULL,
      arbor_capacity_kg DOUBLE NOT NULL,
      bricks JSON NOT NULL,
      out_of_balance BOOLEAN NOT NULL DEFAULT FALSE,
      UNIQUE KEY uq_line_set_number (venue_id, number),
      CONSTRAINT fk_line_set_venue FOREIGN KEY (venue_id) REFERENCES venue (id),
      CONSTRAINT ck_line_set_purchase CHECK (purchase IN (1, 2))
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`CREATE TABLE piece (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      line_set_id INT UNSIGNED NOT NULL,
      name VARCHAR(80) NOT NULL,
      mass_kg DOUBLE NOT NULL,
      position_m DOUBLE NULL,
      KEY ix_piece_line_set (line_set_id),
      CONSTRAINT fk_piece_line_set FOREIGN KEY (line_set_id) REFERENCES line_set (id) ON DELETE CASCADE
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    // Sign-ins, in the layout express-mysql-session reads and writes.
    await q.query(`CREATE TABLE http_session (
      session_id VARCHAR(128) CHARACTER SET utf8mb4 COLLATE utf8mb4_bin NOT NULL PRIMARY KEY,
      expires INT UNSIGNED NOT NULL,
      data MEDIUMTEXT CHARACTER SET utf8mb4 COLLATE utf8mb4_bin,
      KEY ix_http_session_expires (expires)
    ) ENGINE=InnoDB`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['http_session', 'piece', 'line_set', 'brick_type', 'venue_role', 'person', 'venue']) {
      await q.query(`DROP TABLE ${table}`);
    }
  }
}
