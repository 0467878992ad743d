import { Entity, PrimaryColumn } from 'typeorm';
import type { Role } from '@shared/protocol/roles';

/** A role a person holds at a venue. Roles are per venue. */
@Entity({ name: 'venue_role' })
export class VenueRole {
  @PrimaryColumn({ type: 'int', unsigned: true, name: 'venue_id' })
  venueId: number;

  @PrimaryColumn({ type: 'int', unsigned: true, name: 'person_id' })
  personId: number;

  @PrimaryColumn({ type: 'varchar', length: 20 })
  role: Role;
}
