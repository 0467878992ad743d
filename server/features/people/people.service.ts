import { createHash, randomBytes } from 'node:crypto';
import { In, type DataSource, type EntityManager } from 'typeorm';
import { ROLE_LABELS, ROLES, type Role } from '@shared/protocol/roles';
import type { AddPersonInput, EditPersonInput, Me, PersonRow, PersonStatus } from '@shared/protocol/people';
import type { MailView } from '@shared/protocol/mail';
import { venueTimeZone } from '@shared/protocol/record';
import { HttpError, notFound } from '../../middleware/http-error';
import type { MailConfig } from '../../config';
import { Venue } from '../venue/venue.entity';
import { Person } from './person.entity';
import { VenueRole } from './venue-role.entity';
import { hashPassword } from '../auth/password';
import { resolveVenue } from '../venue/venue-access';
import { PERSON_WITH_ROLES_SQL, signedInUserOf } from './signed-in-user';
import type { MailQueue } from '../mail/mail-queue';
import { toMailView } from '../mail/mail-queue';
import { invitationText, passwordResetText, venueAddedText } from '../mail/messages';

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

/** Mail the people feature sends; without it (some tests) invitations are made but not mailed. */
export interface PeopleMail {
  queue: MailQueue;
  config: MailConfig;
}

/** What adding a person made: `token` is the one-time invitation (null when a signed-up account only got roles here). */
export interface AddedPerson {
  person: PersonRow;
  token: string | null;
  mail: MailView | null;
  /** The e-mail already had an account: it got the roles here and kept its name. */
  joinedExisting: boolean;
}

export const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');
const newToken = () => randomBytes(32).toString('base64url');
const sortRoles = (roles: Role[]) => [...new Set(roles)].sort((a, b) => ROLES.indexOf(a) - ROLES.indexOf(b));
const INVITE_GONE = 'That invitation (it may have been used, taken back or have expired)';
const RESET_GONE = 'That password reset link (it may have been used or have expired)';

export const invitePath = (token: string) => `/welcome/${token}`;
export const resetPath = (token: string) => `/reset-password/${token}`;

export class PeopleService {
  private readonly inviteDays: number;
  private readonly resetMinutes: number;

  constructor(private readonly db: DataSource, private readonly mail?: PeopleMail) {
    this.inviteDays = mail?.config.inviteDays ?? 7;
    this.resetMinutes = mail?.config.resetMinutes ?? 60;
  }

  /**
   * The person with the venue they act on and their roles there; null if deactivated or holding no role anywhere.
   * `wantedVenueId` is the venue they chose (see resolveVenue); without a role there, their first venue.
   */
  async loadUser(personId: number, wantedVenueId?: number | null): Promise<SignedInUser | null> {
    // One statement: this runs before every socket event that needs fresh roles.
    return signedInUserOf(await this.db.query(PERSON_WITH_ROLES_SQL, [personId]), wantedVenueId);
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
      return { id: v.id, name: v.name, units: v.units, timeZone: venueTimeZone(v.settings) };
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
    const mails = this.mail ? await this.mail.queue.latestFor(ids, 'invitation', venueId) : new Map<number, MailView>();
    return people.map((p) => toRow(p, roles.filter((r) => r.personId === p.id).map((r) => r.role), mails.get(p.id) ?? null));
  }

  /** The venue's people who can sign in, for choosing whom to mail. */
  async recipients(venueId: number): Promise<{ id: number; name: string; email: string }[]> {
    return (await this.list(venueId)).filter((p) => p.status === 'active').map(({ id, name, email }) => ({ id, name, email }));
  }

  /**
   * Adds a person to this venue's crew with their roles. A new e-mail gets a new account and a
   * one-time invitation (token returned once, stored hashed, mailed). An e-mail that already has an
   * account holding no role here (crew of another venue, or someone whose roles here were all taken
   * away) gets the roles on that account, its name kept: a notice mail if they have signed up, else a
   * fresh invitation (the old link stops working). Nothing of the account's other venues is answered.
   */
  async add(venueId: number, invitedBy: SignedInUser, input: AddPersonInput): Promise<AddedPerson> {
    const result = await this.db.transaction(async (m): Promise<AddedPerson> => {
      const email = input.email.toLowerCase();
      const roles = sortRoles(input.roles);
      const existing = await m.getRepository(Person).createQueryBuilder('p').setLock('pessimistic_write')
        .where('p.email = :email', { email }).getOne();
      if (!existing) {
        const token = newToken();
        const person = await m.getRepository(Person).save(m.getRepository(Person).create({
          name: input.name,
          email,
          passwordHash: null,
          inviteTokenHash: sha256(token),
          inviteExpiresAt: new Date(Date.now() + this.inviteDays * 24 * 3600 * 1000),
          resetTokenHash: null,
          resetExpiresAt: null,
          deactivatedAt: null,
        }));
        await m.getRepository(VenueRole).insert(roles.map((role) => ({ venueId, personId: person.id, role })));
        const mail = await this.queueInvitation(m, venueId, person, token, invitedBy);
        return { person: toRow(person, roles, mail), token, mail, joinedExisting: false };
      }
      if (await m.getRepository(VenueRole).existsBy({ venueId, personId: existing.id })) {
        throw new HttpError('conflict', `${existing.name} is already in this venue's crew: change their roles on the list instead.`, { email: ["Already in this venue's crew"] });
      }
      if (existing.deactivatedAt) {
        throw new HttpError(
          'conflict',
          'That e-mail belongs to an account that is deactivated. Only a technical director of the venue that deactivated it can reactivate it; once they have, add the person here again.',
          { email: ['This account is deactivated'] },
        );
      }
      await m.getRepository(VenueRole).insert(roles.map((role) => ({ venueId, personId: existing.id, role })));
      if (existing.passwordHash) {
        const mail = await this.queueVenueAdded(m, venueId, existing, roles, invitedBy);
        return { person: toRow(existing, roles, null), token: null, mail, joinedExisting: true };
      }
      // Never signed up: a fresh invitation, exactly as resendInvitation makes one.
      const token = newToken();
      existing.inviteTokenHash = sha256(token);
      existing.inviteExpiresAt = new Date(Date.now() + this.inviteDays * 24 * 3600 * 1000);
      await m.getRepository(Person).update({ id: existing.id }, { inviteTokenHash: existing.inviteTokenHash, inviteExpiresAt: existing.inviteExpiresAt });
      const mail = await this.queueInvitation(m, venueId, existing, token, invitedBy);
      return { person: toRow(existing, roles, mail), token, mail, joinedExisting: true };
    });
    this.mail?.queue.kick();
    return result;
  }

  /** A new invitation link for someone who has not signed up: the old link stops working. */
  async resendInvitation(venueId: number, by: SignedInUser, personId: number): Promise<{ person: PersonRow; token: string; mail: MailView | null }> {
    const result = await this.db.transaction(async (m) => {
      const { person, roles } = await this.lockPerson(m, venueId, personId);
      if (person.passwordHash) throw new HttpError('conflict', `${person.name} has already signed up: there is no invitation to send.`);
      if (person.deactivatedAt) throw new HttpError('conflict', `${person.name} is deactivated. Reactivate them first.`);
      const token = newToken();
      person.inviteTokenHash = sha256(token);
      person.inviteExpiresAt = new Date(Date.now() + this.inviteDays * 24 * 3600 * 1000);
      await m.getRepository(Person).update({ id: person.id }, { inviteTokenHash: person.inviteTokenHash, inviteExpiresAt: person.inviteExpiresAt });
      const mail = await this.queueInvitation(m, venueId, person, token, by);
      return { person: toRow(person, roles, mail), token, mail };
    });
    this.mail?.queue.kick();
    return result;
  }

  /** Takes an invitation back: its link stops working. The person stays listed, to invite again or leave. */
  async revokeInvitation(venueId: number, personId: number): Promise<PersonRow> {
    return this.db.transaction(async (m) => {
      const { person, roles } = await this.lockPerson(m, venueId, personId);
      if (person.passwordHash) throw new HttpError('conflict', `${person.name} has already signed up: there is no invitation to take back.`);
      await m.getRepository(Person).update({ id: person.id }, { inviteTokenHash: null, inviteExpiresAt: null });
      person.inviteTokenHash = null;
      person.inviteExpiresAt = null;
      return toRow(person, roles, await this.latestInvitationMail(venueId, person.id));
    });
  }

  /** Changes a person's name and e-mail address; entries already in the log keep the name they were made under. */
  async edit(venueId: number, personId: number, input: EditPersonInput): Promise<PersonRow> {
    return this.db.transaction(async (m) => {
      const { person, roles } = await this.lockPerson(m, venueId, personId);
      const email = input.email.toLowerCase();
      const clash = await m.getRepository(Person).findOneBy({ email });
      if (clash && clash.id !== person.id) {
        throw new HttpError('conflict', 'Someone else already uses that e-mail address.', { email: ['Already in use'] });
      }
      await m.getRepository(Person).update({ id: person.id }, { name: input.name, email });
      return toRow({ ...person, name: input.name, email }, roles, await this.latestInvitationMail(venueId, person.id));
    });
  }

  /**
   * Deactivates a person: they are signed out everywhere at once (their stored sign-ins are deleted
   * here, the caller closes their sockets) and cannot sign in; their roles and log entries stay.
   */
  async deactivate(venueId: number, by: SignedInUser, personId: number): Promise<PersonRow> {
    return this.db.transaction(async (m) => {
      const current = await this.lockVenueRoles(m, venueId);
      const { person, roles } = await this.lockPerson(m, venueId, personId);
      if (person.id === by.id) throw new HttpError('conflict', 'You cannot deactivate yourself. Ask another technical director.');
      if (roles.includes('admin')) await this.keepAnAdmin(m, current, personId);
      const now = new Date();
      await m.getRepository(Person).update({ id: person.id }, { deactivatedAt: now, resetTokenHash: null, resetExpiresAt: null, inviteTokenHash: null, inviteExpiresAt: null });
      await signOutEverywhere(m, person.id);
      return toRow({ ...person, deactivatedAt: now, inviteTokenHash: null, inviteExpiresAt: null }, roles, await this.latestInvitationMail(venueId, person.id));
    });
  }

  async reactivate(venueId: number, personId: number): Promise<PersonRow> {
    return this.db.transaction(async (m) => {
      const { person, roles } = await this.lockPerson(m, venueId, personId);
      await m.getRepository(Person).update({ id: person.id }, { deactivatedAt: null });
      return toRow({ ...person, deactivatedAt: null }, roles, await this.latestInvitationMail(venueId, person.id));
    });
  }

  /** Replaces a person's roles at this venue. A venue always keeps at least one admin. */
  async setRoles(venueId: number, personId: number, wanted: Role[]): Promise<PersonRow> {
    return this.db.transaction(async (m) => {
      // Lock the venue's role rows so two admins cannot both remove the last admin at once.
      const current = await this.lockVenueRoles(m, venueId);
      const person = await m.getRepository(Person).findOneBy({ id: personId });
      if (!person || !current.some((r) => r.personId === personId)) throw notFound('That person');
      const roles = sortRoles(wanted);
      if (!roles.includes('admin')) await this.keepAnAdmin(m, current, personId);
      await m.getRepository(VenueRole).delete({ venueId, personId });
      if (roles.length) await m.getRepository(VenueRole).insert(roles.map((role) => ({ venueId, personId, role })));
      return toRow(person, roles, await this.latestInvitationMail(venueId, person.id));
    });
  }

  /** Sets the password of an invited person; the token works once. */
  async acceptInvite(token: string, password: string): Promise<number> {
    // Hash only for a token that exists: an unknown token costs the server nothing.
    const known = await this.db.getRepository(Person).findOneBy({ inviteTokenHash: sha256(token) });
    if (!known) throw notFound(INVITE_GONE);
    const passwordHash = await hashPassword(password);
    return this.db.transaction(async (m: EntityManager) => {
      const repo = m.getRepository(Person);
      const person = await repo.createQueryBuilder('p').setLock('pessimistic_write')
        .where('p.invite_token_hash = :hash', { hash: sha256(token) }).getOne();
      if (!person || person.deactivatedAt || !person.inviteExpiresAt || person.inviteExpiresAt.getTime() < Date.now()) {
        throw notFound(INVITE_GONE);
      }
      await repo.update({ id: person.id }, { passwordHash, inviteTokenHash: null, inviteExpiresAt: null });
      return person.id;
    });
  }

  /**
   * Mails a one-time reset link to a person who has signed up and is active. Answers nothing either
   * way: whether an address has an account is not told to whoever asks.
   */
  async requestPasswordReset(email: string): Promise<void> {
    const queued = await this.db.transaction(async (m) => {
      const person = await m.getRepository(Person).createQueryBuilder('p').setLock('pessimistic_write')
        .where('p.email = :email', { email: email.toLowerCase() }).getOne();
      if (!person || !person.passwordHash || person.deactivatedAt || !this.mail) return false;
      const role = await m.getRepository(VenueRole).findOne({ where: { personId: person.id }, order: { venueId: 'ASC' } });
      if (!role) return false;
      const token = newToken();
      const expiresAt = new Date(Date.now() + this.resetMinutes * 60 * 1000);
      await m.getRepository(Person).update({ id: person.id }, { resetTokenHash: sha256(token), resetExpiresAt: expiresAt });
      const words = passwordResetText({ name: person.name, link: this.mail.config.publicUrl + resetPath(token), expiresAt });
      await this.mail.queue.enqueue(m, { venueId: role.venueId, personId: person.id, kind: 'password-reset', to: { name: person.name, address: person.email }, ...words });
      return true;
    });
    if (queued) this.mail?.queue.kick();
  }

  /** Sets a new password from a reset link (works once) and ends every other sign-in of that person. */
  async resetPassword(token: string, password: string): Promise<number> {
    const known = await this.db.getRepository(Person).findOneBy({ resetTokenHash: sha256(token) });
    if (!known) throw notFound(RESET_GONE);
    const passwordHash = await hashPassword(password);
    return this.db.transaction(async (m) => {
      const repo = m.getRepository(Person);
      const person = await repo.createQueryBuilder('p').setLock('pessimistic_write')
        .where('p.reset_token_hash = :hash', { hash: sha256(token) }).getOne();
      if (!person || person.deactivatedAt || !person.resetExpiresAt || person.resetExpiresAt.getTime() < Date.now()) {
        throw notFound(RESET_GONE);
      }
      await repo.update({ id: person.id }, { passwordHash, resetTokenHash: null, resetExpiresAt: null });
      await signOutEverywhere(m, person.id);
      return person.id;
    });
  }

  private async queueInvitation(m: EntityManager, venueId: number, person: Person, token: string, by: SignedInUser): Promise<MailView | null> {
    if (!this.mail) return null;
    const venue = await m.getRepository(Venue).findOneByOrFail({ id: venueId });
    const words = invitationText({
      name: person.name,
      venueName: venue.name,
      link: this.mail.config.publicUrl + invitePath(token),
      expiresAt: person.inviteExpiresAt!,
      invitedBy: by.name,
    });
    const row = await this.mail.queue.enqueue(m, { venueId, personId: person.id, kind: 'invitation', to: { name: person.name, address: person.email }, ...words });
    return toMailView(row);
  }

  private async queueVenueAdded(m: EntityManager, venueId: number, person: Person, roles: Role[], by: SignedInUser): Promise<MailView | null> {
    if (!this.mail) return null;
    const venue = await m.getRepository(Venue).findOneByOrFail({ id: venueId });
    const words = venueAddedText({ name: person.name, venueName: venue.name, roles: roles.map((r) => ROLE_LABELS[r]), addedBy: by.name });
    const row = await this.mail.queue.enqueue(m, { venueId, personId: person.id, kind: 'venue-added', to: { name: person.name, address: person.email }, ...words });
    return toMailView(row);
  }

  private async latestInvitationMail(venueId: number, personId: number): Promise<MailView | null> {
    return this.mail ? ((await this.mail.queue.latestFor([personId], 'invitation', venueId)).get(personId) ?? null) : null;
  }

  private lockVenueRoles(m: EntityManager, venueId: number): Promise<VenueRole[]> {
    return m.getRepository(VenueRole).createQueryBuilder('r').setLock('pessimistic_write').where('r.venue_id = :venueId', { venueId }).getMany();
  }

  /** The person, locked, with their roles here; not found when they hold no role at this venue. */
  private async lockPerson(m: EntityManager, venueId: number, personId: number): Promise<{ person: Person; roles: Role[] }> {
    const person = await m.getRepository(Person).createQueryBuilder('p').setLock('pessimistic_write').where('p.id = :personId', { personId }).getOne();
    const roles = person ? (await m.getRepository(VenueRole).findBy({ venueId, personId })).map((r) => r.role) : [];
    if (!person || roles.length === 0) throw notFound('That person');
    return { person, roles: sortRoles(roles) };
  }

  /** Refuses when taking `personId` away would leave the venue with no active technical director. */
  private async keepAnAdmin(m: EntityManager, venueRoles: VenueRole[], personId: number): Promise<void> {
    const others = [...new Set(venueRoles.filter((r) => r.role === 'admin' && r.personId !== personId).map((r) => r.personId))];
    const stillActive = others.length ? (await m.getRepository(Person).findBy({ id: In(others) })).filter((p) => !p.deactivatedAt).length : 0;
    if (stillActive === 0) {
      throw new HttpError('conflict', 'A venue needs at least one technical director (admin) who is not deactivated. Give the role to someone else first.');
    }
  }
}

/** Deletes every stored sign-in of a person (express-session rows in MariaDB): each device is signed out on its next request. */
async function signOutEverywhere(m: EntityManager, personId: number): Promise<void> {
  await m.query("DELETE FROM http_session WHERE JSON_VALUE(data, '$.passport.user') = ?", [String(personId)]);
}

function statusOf(person: Pick<Person, 'passwordHash' | 'deactivatedAt' | 'inviteTokenHash' | 'inviteExpiresAt'>): PersonStatus {
  if (person.deactivatedAt) return 'deactivated';
  if (person.passwordHash) return 'active';
  if (!person.inviteTokenHash || !person.inviteExpiresAt) return 'invitation-revoked';
  return person.inviteExpiresAt.getTime() < Date.now() ? 'invitation-expired' : 'invited';
}

function toRow(person: Person, roles: Role[], invitationMail: MailView | null): PersonRow {
  const status = statusOf(person);
  return {
    id: person.id,
    name: person.name,
    email: person.email,
    roles: sortRoles(roles),
    active: person.passwordHash !== null,
    status,
    invitationExpiresAt: status === 'invited' || status === 'invitation-expired' ? person.inviteExpiresAt!.toISOString() : null,
    invitationMail: person.passwordHash ? null : invitationMail,
  };
}
