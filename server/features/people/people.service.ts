import { createHash, randomBytes } from 'node:crypto';
import { In, type DataSource, type EntityManager } from 'typeorm';
import { ROLES, type Role } from '@shared/protocol/roles';
import type { AddPersonInput, Me, PersonRow } from '@shared/protocol/people';
import { HttpError, notFound } from '../../middleware/http-error';
import { Venue } from '../venue/venue.entity';
import { Person } from './person.entity';
import { VenueRole } from './venue-role.entity';
import { hashPassword } from '../auth/password';
import { resolveVenue } from '../venue/venue-access';

/** What the server knows of a signed-in person on every request. */
export interface SignedInUser {
  id: number;
  name: string;
  email: string;
  /** The venue every request and socket event of this person acts on (their chosen one). */
  venueId: number;
  /** Their roles at that venue. */
  roles: Role[];
  /** Every venue they hold a role at. */
  venueIds: number[];
}

const INVITE_DAYS = 7;
export const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');
const sortRoles = (roles: Role[]) => [...new Set(roles)].sort((a, b) => ROLES.indexOf(a) - ROLES.indexOf(b));

export class PeopleService {
  constructor(private readonly db: DataSource) {}

  /**
   * The person with the venue they act on and their roles there; null if they hold no role anywhere.
   * `wantedVenueId` is the venue they chose (see resolveVenue); without a role there, their first venue.
   */
  async loadUser(personId: number, wantedVenueId?: number | null): Promise<SignedInUser | null> {
    const person = await this.db.getRepository(Person).findOneBy({ id: personId });
    if (!person) return null;
    const choice = await resolveVenue(this.db, personId, wantedVenueId);
    if (!choice) return null;
    return {
      id: person.id,
      name: person.name,
      email: person.email,
      venueId: choice.venueId,
      roles: choice.roles,
      venueIds: choice.venues.map((v) => v.venueId),
    };
  }

  async findByEmail(email: string): Promise<Person | null> {
    return this.db.getRepository(Person).findOneBy({ email: email.toLowerCase() });
  }

  async me(user: SignedInUser): Promise<Me> {
    const choice = await resolveVenue(this.db, user.id, user.venueId);
    const held = choice?.venues ?? [{ venueId: user.venueId, roles: user.roles }];
    const rows = await this.db.getRepository(Venue).findBy({ id: In(held.map((v) => v.venueId)) });
    const summary = (id: number) => {
      const v = rows.find((r) => r.id === id);
      if (!v) throw notFound('That venue');
      return { id: v.id, name: v.name, units: v.units };
    };
    return {
      id: user.id,
      name: user.name,
      email: user.email,
      venue: summary(user.venueId),
      roles: user.roles,
      venues: held.map((v) => ({ ...summary(v.venueId), roles: v.roles })),
    };
  }

  async list(venueId: number): Promise<PersonRow[]> {
    const roles = await this.db.getRepository(VenueRole).findBy({ venueId });
    const ids = [...new Set(roles.map((r) => r.personId))];
    if (ids.length === 0) return [];
    const people = await this.db.getRepository(Person).find({ where: { id: In(ids) }, order: { name: 'ASC' } });
    return people.map((p) => toRow(p, roles.filter((r) => r.personId === p.id).map((r) => r.role)));
  }

  /** Adds a person with their roles and a one-time invitation token (returned once, stored hashed). */
  async add(venueId: number, input: AddPersonInput): Promise<{ person: PersonRow; token: string }> {
    return this.db.transaction(async (m) => {
      const email = input.email.toLowerCase();
      if (await m.getRepository(Person).findOneBy({ email })) {
        throw new HttpError('conflict', 'Someone with that e-mail already has an account.', { email: ['Already in use'] });
      }
      const token = randomBytes(32).toString('base64url');
      const person = await m.getRepository(Person).save(m.getRepository(Person).create({
        name: input.name,
        email,
        passwordHash: null,
        inviteTokenHash: sha256(token),
        inviteExpiresAt: new Date(Date.now() + INVITE_DAYS * 24 * 3600 * 1000),
      }));
      const roles = sortRoles(input.roles);
      await m.getRepository(VenueRole).insert(roles.map((role) => ({ venueId, personId: person.id, role })));
      return { person: toRow(person, roles), token };
    });
  }

  /** Replaces a person's roles at this venue. A venue always keeps at least one admin. */
  async setRoles(venueId: number, personId: number, wanted: Role[]): Promise<PersonRow> {
    return this.db.transaction(async (m) => {
      // Lock the venue's role rows so two admins cannot both remove the last admin at once.
      const current = await m.getRepository(VenueRole).createQueryBuilder('r')
        .setLock('pessimistic_write').where('r.venue_id = :venueId', { venueId }).getMany();
      const person = await m.getRepository(Person).findOneBy({ id: personId });
      if (!person || !current.some((r) => r.personId === personId)) throw notFound('That person');
      const roles = sortRoles(wanted);
      const adminsAfter = new Set(current.filter((r) => r.role === 'admin' && r.personId !== personId).map((r) => r.personId));
      if (roles.includes('admin')) adminsAfter.add(personId);
      if (adminsAfter.size === 0) {
        throw new HttpError('conflict', 'A venue needs at least one technical director (admin). Give the role to someone else first.');
      }
      await m.getRepository(VenueRole).delete({ venueId, personId });
      if (roles.length) await m.getRepository(VenueRole).insert(roles.map((role) => ({ venueId, personId, role })));
      return toRow(person, roles);
    });
  }

  /** Sets the password of an invited person; the token works once. */
  async acceptInvite(token: string, password: string): Promise<number> {
    // Hash only for a token that exists: an unknown token costs the server nothing.
    const known = await this.db.getRepository(Person).findOneBy({ inviteTokenHash: sha256(token) });
    if (!known) throw notFound('That invitation (it may have been used or have expired)');
    const passwordHash = await hashPassword(password);
    return this.db.transaction(async (m: EntityManager) => {
      const repo = m.getRepository(Person);
      const person = await repo.createQueryBuilder('p').setLock('pessimistic_write')
        .where('p.invite_token_hash = :hash', { hash: sha256(token) }).getOne();
      if (!person || !person.inviteExpiresAt || person.inviteExpiresAt.getTime() < Date.now()) {
        throw notFound('That invitation (it may have been used or have expired)');
      }
      await repo.update({ id: person.id }, { passwordHash, inviteTokenHash: null, inviteExpiresAt: null });
      return person.id;
    });
  }
}

function toRow(person: Person, roles: Role[]): PersonRow {
  return { id: person.id, name: person.name, email: person.email, roles: sortRoles(roles), active: person.passwordHash !== null };
}
