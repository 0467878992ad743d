import type { Role } from '@shared/protocol/roles';
import { venueChoiceOf } from '../venue/venue-access';
import type { SignedInUser } from './people.service';

/** A person with every role they hold, one row per role (one row with nulls when they hold none). */
export const PERSON_WITH_ROLES_SQL = `SELECT p.id, p.name, p.email, p.deactivated_at, r.venue_id, r.role
  FROM person p LEFT JOIN venue_role r ON r.person_id = p.id
  WHERE p.id = ? ORDER BY r.venue_id, r.role`;

export interface PersonRoleSqlRow { id: number; name: string; email: string; deactivated_at: Date | null; venue_id: number | null; role: Role | null }

/** The signed-in person those rows describe; null if deactivated or holding no role anywhere. */
export function signedInUserOf(rows: PersonRoleSqlRow[], wantedVenueId?: number | null): SignedInUser | null {
  const person = rows[0];
  if (!person || person.deactivated_at) return null;
  const choice = venueChoiceOf(rows.filter((r) => r.venue_id !== null).map((r) => ({ venueId: Number(r.venue_id), role: r.role! })), wantedVenueId);
  if (!choice) return null;
  return {
    id: Number(person.id),
    name: person.name,
    email: person.email,
    venueId: choice.venueId,
    roles: choice.roles,
    venueIds: choice.venues.map((v) => v.venueId),
  };
}
