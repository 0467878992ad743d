import type { DataSource, EntityManager } from 'typeorm';
import { ROLES, type Role } from '@shared/protocol/roles';
import { notFound } from '../../middleware/http-error';
import { VenueRole } from '../people/venue-role.entity';

/** The venue a person acts on now, with their roles there and every venue they hold a role at. */
export interface VenueChoice {
  venueId: number;
  roles: Role[];
  /** Every venue the person holds a role at (ascending id), with their roles there. */
  venues: { venueId: number; roles: Role[] }[];
}

const byRoleOrder = (roles: Role[]) => [...new Set(roles)].sort((a, b) => ROLES.indexOf(a) - ROLES.indexOf(b));

/**
 * Which venue a request or socket event acts on: the venue the person chose (kept in their sign-in as
 * `req.session.venueId`) while they still hold a role there, otherwise the first venue they work at.
 * Null when they hold no role anywhere. Every signed-in `user.venueId` comes from here, so a route that
 * filters by `user.venueId` acts on the chosen venue and nothing else.
 */
export async function resolveVenue(db: DataSource | EntityManager, personId: number, wantedVenueId?: number | null): Promise<VenueChoice | null> {
  const rows = await db.getRepository(VenueRole).find({ where: { personId }, order: { venueId: 'ASC' } });
  return venueChoiceOf(rows, wantedVenueId);
}

/** The choice made from a person's role rows, in ascending venue order. */
export function venueChoiceOf(rows: Array<Pick<VenueRole, 'venueId' | 'role'>>, wantedVenueId?: number | null): VenueChoice | null {
  if (rows.length === 0) return null;
  const venues: VenueChoice['venues'] = [];
  for (const row of rows) {
    const last = venues.at(-1);
    if (last?.venueId === row.venueId) last.roles.push(row.role);
    else venues.push({ venueId: row.venueId, roles: [row.role] });
  }
  for (const v of venues) v.roles = byRoleOrder(v.roles);
  const chosen = venues.find((v) => v.venueId === wantedVenueId) ?? venues[0];
  return { venueId: chosen.venueId, roles: chosen.roles, venues };
}

/**
 * Refuses a row that belongs to another venue than the one the person acts on, exactly as if it did not
 * exist (404), so nobody learns what another venue holds. Returns the row for chaining.
 */
export function ofChosenVenue<T extends { venueId: number }>(user: { venueId: number }, row: T | null | undefined, what = 'That'): T {
  if (!row || row.venueId !== user.venueId) throw notFound(what);
  return row;
}
