import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The mail queue (every message kept with its status until it is sent, so nothing is lost when the
 * mail server is down) and what crew administration needs on a person: a one-time password reset
 * and a switch to deactivate them while keeping their name on the record.
 */
export class MailAndCrew1765500000000 implements MigrationInterface {
  name = 'MailAndCrew1765500000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE mail_message (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      venue_id INT UNSIGNED NULL,
      person_id INT UNSIGNED NULL,
      kind VARCHAR(20) NOT NULL,
      to_address VARCHAR(254) NOT NULL,
      to_name VARCHAR(120) NOT NULL,
      subject VARCHAR(200) NOT NULL,
      body_text TEXT NOT NULL,
      status VARCHAR(20) NOT NULL,
      attempts INT UNSIGNED NOT NULL DEFAULT 0,
      next_attempt_at DATETIME(3) NOT NULL,
      lease_until DATETIME(3) NULL,
      last_error VARCHAR(500) NULL,
      created_at DATETIME(3) NOT NULL,
      sent_at DATETIME(3) NULL,
      KEY ix_mail_message_due (status, next_attempt_at),
      KEY ix_mail_message_venue (venue_id, id),
      KEY ix_mail_message_person (person_id, kind, id),
      CONSTRAINT fk_mail_message_venue FOREIGN KEY (venue_id) REFERENCES venue (id),
      CONSTRAINT fk_mail_message_person FOREIGN KEY (person_id) REFERENCES person (id)
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`CREATE TABLE mail_attachment (
      id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
      message_id INT UNSIGNED NOT NULL,
      filename VARCHAR(200) NOT NULL,
      content_type VARCHAR(100) NOT NULL,
      content LONGBLOB NOT NULL,
      KEY ix_mail_attachment_message (message_id),
      CONSTRAINT fk_mail_attachment_message FOREIGN KEY (message_id) REFERENCES mail_message (id) ON DELETE CASCADE
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`ALTER TABLE person
      ADD COLUMN reset_token_hash CHAR(64) NULL,
      ADD COLUMN reset_expires_at DATETIME(3) NULL,
      ADD COLUMN deactivated_at DATETIME(3) NULL,
      ADD UNIQUE KEY uq_person_reset (reset_token_hash)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('ALTER TABLE person DROP INDEX uq_person_reset, DROP COLUMN reset_token_hash, DROP COLUMN reset_expires_at, DROP COLUMN deactivated_at');
    await q.query('DROP TABLE mail_attachment');
    await q.query('DROP TABLE mail_message');
  }
}
