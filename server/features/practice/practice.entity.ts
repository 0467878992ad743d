import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { PracticeDebrief, PracticeRole, PracticeSetup, PracticeTap } from '@shared/practice';
import type { PracticeOutcome } from '@shared/protocol/practice';

const bigint = { to: (v: number | null) => v, from: (v: string | number | null) => (v === null ? null : Number(v)) };

/** One practice session: set up by the server, kept once with its taps and debrief. */
@Entity({ name: 'practice_run' })
export class PracticeRunRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'venue_id' })
  venueId: number;

  @Column({ type: 'int', unsigned: true, name: 'person_id' })
  personId: number;

  @Column({ type: 'varchar', length: 20 })
  role: PracticeRole;

  @Column({ type: 'varchar', length: 160 })
  title: string;

  @Column({ type: 'varchar', length: 20 })
  source: 'invented' | 'line-sets';

  @Column({ type: 'int' })
  seed: number;

  @Column({ type: 'double' })
  pace: number;

  @Column({ type: 'json' })
  setup: PracticeSetup;

  @Column({ type: 'json', nullable: true })
  taps: PracticeTap[] | null;

  @Column({ type: 'json', nullable: true })
  debrief: PracticeDebrief | null;

  @Column({ type: 'varchar', length: 20 })
  outcome: PracticeOutcome;

  @Column({ type: 'bigint', unsigned: true, name: 'started_at_ms', transformer: bigint })
  startedAtMs: number;

  @Column({ type: 'bigint', unsigned: true, name: 'ended_at_ms', nullable: true, transformer: bigint })
  endedAtMs: number | null;
}
