import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { BrickCounts, Purchase } from '@shared/rigging/types';

/** One line set of the venue's schedule: its batten, lift lines, arbor and what it carries now. */
@Entity({ name: 'line_set' })
export class LineSetRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'venue_id' })
  venueId: number;

  /** Number on the schedule, counted from the proscenium. */
  @Column({ type: 'int', unsigned: true })
  number: number;

  @Column({ type: 'varchar', length: 80 })
  name: string;

  /** Upstage of the plaster line, m. */
  @Column({ type: 'double', name: 'distance_m', nullable: true })
  distanceM: number | null;

  @Column({ type: 'tinyint', unsigned: true })
  purchase: Purchase;

  /** Pipe size from the pipe table, e.g. "1-1/2 in Schedule 40"; "" when the weight per length is given by hand. */
  @Column({ type: 'varchar', length: 40, name: 'pipe_size' })
  pipeSize: string;

  @Column({ type: 'double', name: 'pipe_length_m' })
  pipeLengthM: number;

  @Column({ type: 'double', name: 'pipe_kg_per_m' })
  pipeKgPerM: number;

  /** Pipe self-weight, pipe_kg_per_m × pipe_length_m, kept for the planner. */
  @Column({ type: 'double', name: 'pipe_kg' })
  pipeKg: number;

  /** Lift line pick points, metres from the stage-left end of the pipe. */
  @Column({ type: 'json', name: 'lift_lines_m' })
  liftLinesM: number[];

  @Column({ type: 'double', name: 'lift_line_rating_kg' })
  liftLineRatingKg: number;

  @Column({ type: 'double', name: 'batten_rating_kg_per_m' })
  battenRatingKgPerM: number;

  @Column({ type: 'double', name: 'arbor_kg' })
  arborKg: number;

  @Column({ type: 'double', name: 'arbor_capacity_kg' })
  arborCapacityKg: number;

  /** Bricks on the arbor now, by brick type code. */
  @Column({ type: 'json' })
  bricks: BrickCounts;

  @Column({ type: 'double', name: 'high_trim_m', nullable: true })
  highTrimM: number | null;

  @Column({ type: 'double', name: 'low_trim_m', nullable: true })
  lowTrimM: number | null;

  @Column({ type: 'varchar', length: 1000, default: '' })
  notes: string;

  /** Why the set is out of service; null when in service. */
  @Column({ type: 'varchar', length: 300, name: 'out_of_service', nullable: true })
  outOfService: string | null;

  /** Raised by every change to the set or its pieces (edit conflicts compare it). */
  @Column({ type: 'int', unsigned: true, default: 1 })
  version: number;

  /** True when the last test of balance found it out of balance; cleared by a balanced test. */
  @Column({ type: 'boolean', name: 'out_of_balance', default: false })
  outOfBalance: boolean;
}
