import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** Something hanging on a line set's batten. */
@Entity({ name: 'piece' })
export class PieceRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'line_set_id' })
  lineSetId: number;

  @Column({ type: 'varchar', length: 80 })
  name: string;

  @Column({ type: 'double', name: 'mass_kg' })
  massKg: number;

  /** Where its weight sits: centre, metres from the stage-left end. Null = spread along the pipe. */
  @Column({ type: 'double', name: 'position_m', nullable: true })
  positionM: number | null;
}
