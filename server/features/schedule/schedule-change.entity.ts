import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { HistorySubject } from '@shared/protocol/schedule';

/** One kept change to the venue's data. Append-only for the application account (server/db/grants.ts). */
@Entity({ name: 'schedule_change' })
export class ScheduleChangeRow {
  @PrimaryGeneratedColumn({ type: 'bigint', unsigned: true })
  id: string;

  @Column({ type: 'int', unsigned: true, name: 'venue_id' })
  venueId: number;

  @Column({ type: 'varchar', length: 20 })
  subject: HistorySubject;

  @Column({ type: 'int', unsigned: true, name: 'subject_id', nullable: true })
  subjectId: number | null;

  /** The line set it belongs to (a piece's, or the set itself), for the per-set history. */
  @Column({ type: 'int', unsigned: true, name: 'line_set_id', nullable: true })
  lineSetId: number | null;

  @Column({ type: 'varchar', length: 10 })
  action: 'create' | 'update' | 'delete';

  /** field -> [old, new], in SI units as stored. */
  @Column({ type: 'json' })
  changes: Record<string, [unknown, unknown]>;

  @Column({ type: 'int', unsigned: true, name: 'person_id', nullable: true })
  personId: number | null;

  @Column({ type: 'varchar', length: 120, name: 'person_name' })
  personName: string;

  @Column({ type: 'varchar', length: 300 })
  reason: string;

  @Column({ type: 'int', unsigned: true, name: 'session_id', nullable: true })
  sessionId: number | null;

  @Column({ type: 'varchar', length: 40, nullable: true })
  via: string | null;

  @Column({ type: 'bigint', name: 'at_ms', transformer: { to: (v: number) => v, from: (v: string | number) => Number(v) } })
  atMs: number;
}
