import { Column, CreateDateColumn, Entity, Index, PrimaryGeneratedColumn } from 'typeorm';

@Entity({ name: 'person' })
export class Person {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'varchar', length: 120 })
  name: string;

  /** Stored lower-cased; sign-in compares lower-cased. */
  @Index({ unique: true })
  @Column({ type: 'varchar', length: 254 })
  email: string;

  /** Argon2id PHC string; null until the person accepts their invitation. */
  @Column({ type: 'varchar', length: 255, name: 'password_hash', nullable: true })
  passwordHash: string | null;

  /** SHA-256 of the one-time invitation token (the token itself is only ever shown once). */
  @Column({ type: 'char', length: 64, name: 'invite_token_hash', nullable: true })
  inviteTokenHash: string | null;

  @Column({ type: 'datetime', precision: 3, name: 'invite_expires_at', nullable: true })
  inviteExpiresAt: Date | null;

  /** SHA-256 of the one-time password reset token, while one is out. */
  @Column({ type: 'char', length: 64, name: 'reset_token_hash', nullable: true })
  resetTokenHash: string | null;

  @Column({ type: 'datetime', precision: 3, name: 'reset_expires_at', nullable: true })
  resetExpiresAt: Date | null;

  /** Set while the person is deactivated: they cannot sign in, and their name stays on the record. */
  @Column({ type: 'datetime', precision: 3, name: 'deactivated_at', nullable: true })
  deactivatedAt: Date | null;

  @CreateDateColumn({ type: 'datetime', precision: 3, name: 'created_at' })
  createdAt: Date;
}
