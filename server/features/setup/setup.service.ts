import { createHash, randomInt, timingSafeEqual } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { FirstRunInput } from '@shared/protocol/people';
import { HttpError } from '../../middleware/http-error';
import { hashPassword } from '../auth/password';
import { Person } from '../people/person.entity';
import { VenueRole } from '../people/venue-role.entity';
import { DEFAULT_VENUE_SETTINGS, Venue } from '../venue/venue.entity';

// No 0/O or 1/I: the code is read off a console and typed on a phone.
const ALPHABET = 'ABCDEFGHJKLMNPQRSTUVWXYZ23456789';

/** A fresh one-time setup code, three groups of four (about 60 bits). */
export function newSetupCode(): string {
  const groups = Array.from({ length: 3 }, () => Array.from({ length: 4 }, () => ALPHABET[randomInt(ALPHABET.length)]).join(''));
  return groups.join('-');
}

const digest = (code: string) => createHash('sha256').update(code).digest();

export const setupGone = () => new HttpError('not-found', 'This Railcall is set up already. Sign in instead.');

/**
 * First run: while the database holds no venue, whoever has the setup code printed in the server's
 * console may create the first venue and its first technical director. The code works once; after that
 * (or once any venue exists) setup is gone. The code lives only in this process's memory, so a restart
 * before setup prints a new one (a seam: with several processes, set up through one of them).
 */
export class FirstRun {
  private codeDigest: Buffer | null;

  constructor(private readonly db: DataSource, code: string | null) {
    this.codeDigest = code ? digest(code) : null;
  }

  async needed(): Promise<boolean> {
    if (!this.codeDigest) return false;
    return (await this.db.getRepository(Venue).count()) === 0;
  }

  /** Creates the venue and its technical director in one transaction; returns the new person's id. */
  async complete(input: FirstRunInput): Promise<number> {
    if (!this.codeDigest) throw setupGone();
    if (!timingSafeEqual(digest(input.code), this.codeDigest)) {
      throw new HttpError('forbidden', 'That setup code is not the one the server printed. Look at the server console.', { code: ['Not the code the server printed'] });
    }
    const passwordHash = await hashPassword(input.password);
    const personId = await this.db.transaction(async (m) => {
      // Locks the whole (empty) venue table: a second setup racing this one waits, then finds a venue.
      const [{ n }] = await m.query('SELECT COUNT(*) AS n FROM venue FOR UPDATE');
      if (Number(n) > 0) throw setupGone();
      const venue = await m.getRepository(Venue).save(m.getRepository(Venue).create({
        name: input.venueName, units: input.units, settings: DEFAULT_VENUE_SETTINGS,
      }));
      const person = await m.getRepository(Person).save(m.getRepository(Person).create({
        name: input.name, email: input.email.toLowerCase(), passwordHash, inviteTokenHash: null, inviteExpiresAt: null,
      }));
      await m.getRepository(VenueRole).insert({ venueId: venue.id, personId: person.id, role: 'admin' });
      return person.id;
    });
    this.codeDigest = null;
    return personId;
  }
}
