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

  /** At a point: its centre, m from the stage-left end of the batten. Null = spread. */
  @Column({ type: 'double', name: 'position_m', nullable: true })
  positionM: number | null;

  /** Spread from-to along the batten; both null (and no point) = along the whole batten. */
  @Column({ type: 'double', name: 'spread_from_m', nullable: true })
  spreadFromM: number | null;

  @Column({ type: 'double', name: 'spread_to_m', nullable: true })
  spreadToM: number | null;

  @Column({ type: 'varchar', length: 40, default: '' })
  department: string;

  @Column({ type: 'varchar', length: 500, default: '' })
  notes: string;
}
