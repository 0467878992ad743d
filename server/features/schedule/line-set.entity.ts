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

  @Column({ type: 'tinyint', unsigned: true })
  purchase: Purchase;

  /** Pipe size as on the schedule, e.g. "NPS 1-1/2 Sch 40". */
  @Column({ type: 'varchar', length: 40, name: 'pipe_size' })
  pipeSize: string;

  @Column({ type: 'double', name: 'pipe_length_m' })
  pipeLengthM: number;

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

  /** True when the last test of balance found it out of balance; cleared by a balanced test. */
  @Column({ type: 'boolean', name: 'out_of_balance', default: false })
  outOfBalance: boolean;
}
