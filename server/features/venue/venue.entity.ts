import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { UnitSystem } from '@shared/protocol/people';

/** Settings a technical director tunes per venue; defaults are common practice (see TRADE.md). */
export interface VenueSettings {
  /** Out-of-balance a rope lock holds, at the batten. Default 50 lb (22.68 kg). */
  ropeLockLimitKg: number;
  /** Seconds before a silent crew member is alerted again after a call. */
  reAlertSeconds: number;
  /** Fewest people per role before loading may begin without a recorded reason. */
  minCrew: { rail: number; loader: number; deck: number };
  /** Longest batten span between lift lines. Default 10 ft (3.048 m). */
  maxSpanM: number;
  /** Stack height between spreader plates. Default 24 in (0.6096 m). */
  spreaderPlateEveryM: number;
}

export const DEFAULT_VENUE_SETTINGS: VenueSettings = {
  ropeLockLimitKg: 50 * 0.45359237,
  reAlertSeconds: 20,
  minCrew: { rail: 1, loader: 2, deck: 1 },
  maxSpanM: 10 * 0.3048,
  spreaderPlateEveryM: 24 * 0.0254,
};

@Entity({ name: 'venue' })
export class Venue {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'varchar', length: 120 })
  name: string;

  @Column({ type: 'varchar', length: 10 })
  units: UnitSystem;

  @Column({ type: 'json' })
  settings: VenueSettings;

  @CreateDateColumn({ type: 'datetime', precision: 3, name: 'created_at' })
  createdAt: Date;
}
