import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { MailKind, MailStatus } from '@shared/protocol/mail';

/** A message in the queue; kept after it is sent, as the outbox. */
@Entity({ name: 'mail_message' })
export class MailMessageRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'venue_id', nullable: true })
  venueId: number | null;

  /** The person the message is about (the one invited or resetting), when there is one. */
  @Column({ type: 'int', unsigned: true, name: 'person_id', nullable: true })
  personId: number | null;

  @Column({ type: 'varchar', length: 20 })
  kind: MailKind;

  @Column({ type: 'varchar', length: 254, name: 'to_address' })
  toAddress: string;

  @Column({ type: 'varchar', length: 120, name: 'to_name' })
  toName: string;

  @Column({ type: 'varchar', length: 200 })
  subject: string;

  @Column({ type: 'text', name: 'body_text' })
  bodyText: string;

  @Column({ type: 'varchar', length: 20 })
  status: MailStatus;

  @Column({ type: 'int', unsigned: true })
  attempts: number;

  @Column({ type: 'datetime', precision: 3, name: 'next_attempt_at' })
  nextAttemptAt: Date;

  /** While a sender holds the message; a sender that died lets it go when this passes. */
  @Column({ type: 'datetime', precision: 3, name: 'lease_until', nullable: true })
  leaseUntil: Date | null;

  @Column({ type: 'varchar', length: 500, name: 'last_error', nullable: true })
  lastError: string | null;

  @Column({ type: 'datetime', precision: 3, name: 'created_at' })
  createdAt: Date;

  @Column({ type: 'datetime', precision: 3, name: 'sent_at', nullable: true })
  sentAt: Date | null;
}

@Entity({ name: 'mail_attachment' })
export class MailAttachmentRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'message_id' })
  messageId: number;

  @Column({ type: 'varchar', length: 200 })
  filename: string;

  @Column({ type: 'varchar', length: 100, name: 'content_type' })
  contentType: string;

  @Column({ type: 'longblob' })
  content: Buffer;
}
