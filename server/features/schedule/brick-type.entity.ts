import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** A venue's own brick: bricks have no universal size. */
@Entity({ name: 'brick_type' })
export class BrickTypeRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'venue_id' })
  venueId: number;

  /** Short code used in plans ("full", "half"). Unique per venue. */
  @Column({ type: 'varchar', length: 40 })
  code: string;

  @Column({ type: 'varchar', length: 80 })
  name: string;

  @Column({ type: 'double', name: 'mass_kg' })
  massKg: number;

  @Column({ type: 'double', name: 'height_m', nullable: true })
  heightM: number | null;

  @Column({ type: 'double', name: 'width_m', nullable: true })
  widthM: number | null;

  @Column({ type: 'double', name: 'depth_m', nullable: true })
  depthM: number | null;

  /** Bricks of this type waiting on the loading bridge. */
  @Column({ type: 'int', unsigned: true, name: 'bridge_count' })
  bridgeCount: number;
}
