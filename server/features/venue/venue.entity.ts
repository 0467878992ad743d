import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { UnitSystem } from '@shared/protocol/people';
import { DEFAULT_SETTINGS, type VenueSettingsView } from '@shared/protocol/schedule';
import { processTimeZone } from '@shared/protocol/time-zone';

/** Settings a technical director tunes per venue; defaults are common practice. */
export type VenueSettings = VenueSettingsView;

/**
 * A new venue's settings. Its time zone is the server's own (TZ, else the system's), UTC when unknown.
 * Read stored settings through `withDefaultSettings`: a venue saved before a setting existed lacks it.
 */
export const DEFAULT_VENUE_SETTINGS: VenueSettings = { ...DEFAULT_SETTINGS, timeZone: processTimeZone() };

@Entity({ name: 'venue' })
export class Venue {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'varchar', length: 120 })
  name: string;

  @Column({ type: 'varchar', length: 10 })
  units: UnitSystem;

  @Column({ type: 'json' })
  settings: Partial<VenueSettings>;

  @CreateDateColumn({ type: 'datetime', precision: 3, name: 'created_at' })
  createdAt: Date;
}
